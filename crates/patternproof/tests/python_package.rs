//! The Python package (`python/`) built into a fresh virtual environment
//! and tested against the command line: `python/run-tests.sh` builds the
//! wheel with maturin, installs it with pinned numpy, shapely and pytest,
//! and runs `python/tests`, which compares every document with the one the
//! `patternproof` binary writes.
//!
//! The package is not a workspace member (it links against Python), so
//! this test is where `cargo test --workspace` reaches it. Without
//! python3, its `venv` module or pip the test fails under CI (`CI=true`)
//! or when `PATTERNPROOF_REQUIRE_PYTHON` is set, and elsewhere says loudly
//! that it was skipped.

use std::path::{Path, PathBuf};
use std::process::Command;

fn repo() -> PathBuf {
    PathBuf::from(env!("CARGO_MANIFEST_DIR"))
        .join("../..")
        .canonicalize()
        .expect("the repository root")
}

/// Why Python cannot make a virtual environment with pip here, if it
/// cannot.
fn python_missing(python: &str) -> Option<String> {
    match Command::new(python)
        .args([
            "-c",
            "import venv, ensurepip, sys; assert sys.version_info >= (3, 9)",
        ])
        .output()
    {
        Err(e) => Some(format!("{python} cannot be run ({e})")),
        Ok(o) if !o.status.success() => Some(format!(
            "{python} has no venv/ensurepip or is older than 3.9: {}",
            String::from_utf8_lossy(&o.stderr).trim()
        )),
        Ok(_) => None,
    }
}

/// The `patternproof` binary: the one cargo built for this profile, built
/// now if it is not there yet.
fn cli(repo: &Path) -> PathBuf {
    if let Some(given) = std::env::var_os("PATTERNPROOF_CLI") {
        return PathBuf::from(given);
    }
    let target = std::env::var_os("CARGO_TARGET_DIR")
        .map(PathBuf::from)
        .unwrap_or_else(|| repo.join("target"));
    let status = Command::new(env!("CARGO"))
        .args([
            "build",
            "--locked",
            "-p",
            "patternproof-cli",
            "--bin",
            "patternproof",
        ])
        .current_dir(repo)
        .status()
        .expect("cargo runs");
    assert!(status.success(), "cargo build of the command line failed");
    let exe = target
        .join("debug")
        .join(format!("patternproof{}", std::env::consts::EXE_SUFFIX));
    assert!(exe.exists(), "no binary at {}", exe.display());
    exe
}

#[test]
fn the_python_package_gives_the_command_lines_documents() {
    let python = std::env::var("PYTHON").unwrap_or_else(|_| "python3".into());
    if let Some(why) = python_missing(&python) {
        eprintln!(
            "SKIPPED the_python_package_gives_the_command_lines_documents: {why} (install python3 with venv and pip, e.g. Debian's python3-venv)"
        );
        let required = std::env::var_os("PATTERNPROOF_REQUIRE_PYTHON").is_some()
            || std::env::var("CI").is_ok_and(|v| v == "true");
        assert!(
            !required,
            "python3 with venv is missing but this run requires the Python tests (CI=true or PATTERNPROOF_REQUIRE_PYTHON)"
        );
        return;
    }
    let repo = repo();
    let exe = cli(&repo);
    let out = Command::new("bash")
        .arg(repo.join("python/run-tests.sh"))
        .env("PATTERNPROOF_CLI", &exe)
        .env("PYTHON", &python)
        .current_dir(&repo)
        .output()
        .expect("bash runs");
    let stdout = String::from_utf8_lossy(&out.stdout);
    let stderr = String::from_utf8_lossy(&out.stderr);
    assert!(
        out.status.success(),
        "python/run-tests.sh failed\n--- stdout\n{stdout}\n--- stderr\n{stderr}"
    );
    // pytest's closing line, e.g. "15 passed in 40.1s": every test ran and
    // none failed or was skipped.
    let last = stdout
        .lines()
        .rev()
        .find(|l| !l.trim().is_empty())
        .unwrap_or("");
    assert!(
        last.contains(" passed") && !last.contains("failed") && !last.contains("skipped"),
        "unexpected pytest summary: {last}\n{stdout}"
    );
    let passed: usize = last
        .split_whitespace()
        .next()
        .and_then(|n| n.parse().ok())
        .unwrap_or(0);
    assert!(passed >= 15, "only {passed} Python tests passed: {last}");
}
