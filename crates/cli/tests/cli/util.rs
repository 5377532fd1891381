//! What every end-to-end test needs: the repository's files, a fresh
//! temporary folder, the binary under test as a ready command, its output
//! as text, and a relative-tolerance assertion that names what it checks.

use std::path::{Path, PathBuf};
use std::process::{Command, Output};

/// The workspace root, where `demo-data/`, `reference/` and `tests/` live.
pub fn repo() -> PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR")).join("../..")
}

/// A file under the workspace root, as the text of a command-line argument.
pub fn repo_arg(relative: &str) -> String {
    repo().join(relative).display().to_string()
}

/// A fresh, empty folder, removed when the value is dropped; every test
/// takes its own so that tests running side by side never share files.
pub fn tmp() -> tempfile::TempDir {
    tempfile::tempdir().expect("a temporary folder")
}

/// The freshly built `patternproof` binary, ready for arguments. Cargo
/// builds it for the tests of the package that owns it, so the path is
/// never guessed.
pub fn bin() -> Command {
    Command::new(env!("CARGO_BIN_EXE_patternproof"))
}

/// Runs the binary with `args` and waits for it.
pub fn run(args: &[&str]) -> Output {
    bin().args(args).output().expect("the binary runs")
}

/// What the run printed on standard output.
pub fn stdout(o: &Output) -> String {
    String::from_utf8_lossy(&o.stdout).into_owned()
}

/// What the run printed on standard error.
pub fn stderr(o: &Output) -> String {
    String::from_utf8_lossy(&o.stderr).into_owned()
}

/// Whether this is a CI run (`CI=true`, as `.ci/run` sets it): there a
/// test whose outside tool (Chromium, the reference venv) is missing fails
/// instead of saying SKIPPED.
pub fn under_ci() -> bool {
    std::env::var("CI").is_ok_and(|v| v == "true")
}

/// Writes `text` to `dir/name` and returns the path.
pub fn write(dir: &Path, name: &str, text: &str) -> PathBuf {
    let p = dir.join(name);
    std::fs::write(&p, text).unwrap_or_else(|e| panic!("{}: {e}", p.display()));
    p
}

/// The text of a file the test expects to exist.
pub fn read(p: &Path) -> String {
    std::fs::read_to_string(p).unwrap_or_else(|e| panic!("{}: {e}", p.display()))
}

/// `got` lies within `rel` of `want`, relative to the larger magnitude of
/// the two (`approx::relative_eq`); the message names `what` is checked,
/// since the reference tests check many values in one loop.
pub fn assert_rel(what: &str, got: f64, want: f64, rel: f64) {
    let err = (got - want).abs() / want.abs().max(f64::MIN_POSITIVE);
    assert!(
        approx::relative_eq!(got, want, epsilon = 0.0, max_relative = rel),
        "{what}: got {got}, want {want}, relative error {err:e} > {rel:e}"
    );
}

/// SHA-256 of a file, lower-case hex (computed with sha2, a
/// general-purpose library), to compare with a page's provenance.
pub fn sha256_hex(p: &Path) -> String {
    use sha2::Digest;
    let bytes = std::fs::read(p).unwrap_or_else(|e| panic!("{}: {e}", p.display()));
    sha2::Sha256::digest(&bytes)
        .iter()
        .map(|b| format!("{b:02x}"))
        .collect()
}

/// Debian's headless Chromium, if it is on PATH. Without it a browser test
/// fails under CI (`CI=true`, or `PATTERNPROOF_REQUIRE_BROWSER` set) and
/// elsewhere says loudly that `test` was skipped (`None`).
pub fn chromium(test: &str) -> Option<&'static str> {
    let found = ["chromium", "chromium-browser"].into_iter().find(|b| {
        Command::new(b)
            .arg("--version")
            .output()
            .is_ok_and(|o| o.status.success())
    });
    if found.is_none() {
        let required = std::env::var_os("PATTERNPROOF_REQUIRE_BROWSER").is_some() || under_ci();
        assert!(
            !required,
            "chromium is missing but this run requires the browser test (CI=true or PATTERNPROOF_REQUIRE_BROWSER)"
        );
        eprintln!(
            "SKIPPED {test}: no chromium on PATH (install Debian's `chromium`; .ci/run does)"
        );
    }
    found
}

/// A screenshot of `page` at `width` × `height` pixels, written to `png`
/// and decoded: its size, its samples per pixel and its pixels.
pub fn screenshot(
    browser: &str,
    page: &Path,
    (width, height): (u32, u32),
    png: &Path,
) -> (u32, u32, usize, Vec<u8>) {
    let _ = std::fs::remove_file(png);
    let o = Command::new(browser)
        .args([
            "--headless",
            "--no-sandbox",
            "--disable-gpu",
            "--hide-scrollbars",
        ])
        .arg(format!("--window-size={width},{height}"))
        .arg(format!("--screenshot={}", png.display()))
        .arg(format!("file://{}", page.display()))
        .output()
        .expect("chromium runs");
    assert!(png.exists(), "no screenshot: {}", stderr(&o));
    let decoder = png::Decoder::new(std::io::BufReader::new(
        std::fs::File::open(png).expect("png"),
    ));
    let mut reader = decoder.read_info().expect("PNG header");
    let mut buf = vec![0; reader.output_buffer_size().expect("size")];
    let info = reader.next_frame(&mut buf).expect("PNG frame");
    buf.truncate(info.buffer_size());
    (info.width, info.height, info.color_type.samples(), buf)
}
