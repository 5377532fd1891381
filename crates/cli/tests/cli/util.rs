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
