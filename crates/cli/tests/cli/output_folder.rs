//! End-to-end: the report folder under `--force`, odd `--out` values and
//! signals (issue 20). Whatever happens, `--out` holds an earlier report or
//! the new one, whole, nothing of a user's is deleted, and no temporary
//! `.patternproof-*` folder stays beside it.

use crate::util::{bin, stderr, tmp};
use serde_json::Value;
use std::collections::BTreeSet;
use std::path::{Path, PathBuf};
use std::process::{Child, Command, Output, Stdio};

/// `n` invented points, scattered by a fixed linear congruential sequence.
fn points(dir: &Path, n: usize) -> PathBuf {
    let mut s = String::from("x,y\n");
    let mut state: u64 = 12345;
    let mut next = || {
        state = state
            .wrapping_mul(6_364_136_223_846_793_005)
            .wrapping_add(1_442_695_040_888_963_407);
        (state >> 11) as f64 / (1u64 << 53) as f64 * 1000.0
    };
    for _ in 0..n {
        let (x, y) = (next(), next());
        s.push_str(&format!("{x:.3},{y:.3}\n"));
    }
    let p = dir.join("points.csv");
    std::fs::write(&p, s).unwrap();
    p
}

fn audit(points: &Path, out: &Path, extra: &[&str]) -> Command {
    let mut c = bin();
    c.arg("audit")
        .arg(points)
        .args(["--quiet", "--sims", "19", "--out"])
        .arg(out)
        .args(extra);
    c
}

fn run(mut c: Command) -> Output {
    c.output().unwrap()
}

/// Entries of `dir` whose names start with `.patternproof-`.
fn leftovers(dir: &Path) -> Vec<String> {
    std::fs::read_dir(dir)
        .unwrap()
        .map(|e| e.unwrap().file_name().to_string_lossy().into_owned())
        .filter(|n| n.starts_with(".patternproof-"))
        .collect()
}

/// Every file under `dir`, relative, `/`-separated.
fn files(dir: &Path) -> BTreeSet<String> {
    fn walk(dir: &Path, rel: &str, out: &mut BTreeSet<String>) {
        for e in std::fs::read_dir(dir).unwrap() {
            let e = e.unwrap();
            let name = e.file_name().to_string_lossy().into_owned();
            let path = if rel.is_empty() {
                name
            } else {
                format!("{rel}/{name}")
            };
            if e.file_type().unwrap().is_dir() {
                walk(&e.path(), &path, out);
            } else {
                out.insert(path);
            }
        }
    }
    let mut out = BTreeSet::new();
    walk(dir, "", &mut out);
    out
}

/// `out` holds one whole report: its list names exactly the files there
/// (besides itself), and `report.json` parses. Returns the report's seed.
fn assert_whole(out: &Path, context: &str) -> u64 {
    let list = std::fs::read_to_string(out.join(".patternproof"))
        .unwrap_or_else(|e| panic!("{context}: no file list in {}: {e}", out.display()));
    let listed: BTreeSet<String> = list
        .lines()
        .skip(1)
        .filter(|l| !l.starts_with('#'))
        .map(String::from)
        .collect();
    let mut present = files(out);
    present.remove(".patternproof");
    assert_eq!(present, listed, "{context}: files against their list");
    let doc: Value =
        serde_json::from_str(&std::fs::read_to_string(out.join("report.json")).unwrap())
            .unwrap_or_else(|e| panic!("{context}: report.json does not parse: {e}"));
    doc["settings"]["seed"].as_u64().unwrap()
}

/// Issue 20: `--force` over a folder that merely holds some `report.json`,
/// or over an old report the user saved a file into, is refused (exit 2)
/// and leaves every file as it was.
#[test]
fn force_leaves_a_user_s_folder_alone() {
    let dir = tmp();
    let pts = points(dir.path(), 60);
    let theirs = dir.path().join("theirs");
    std::fs::create_dir(&theirs).unwrap();
    std::fs::write(theirs.join("report.json"), "{\"mine\": true}").unwrap();
    std::fs::write(theirs.join("chapter-2.tex"), "draft").unwrap();
    let o = run(audit(&pts, &theirs, &["--force"]));
    let e = stderr(&o);
    assert_eq!(o.status.code(), Some(2), "{e}");
    assert!(
        e.contains(&theirs.display().to_string()) && e.contains("what to do"),
        "{e}"
    );
    assert_eq!(
        files(&theirs),
        ["chapter-2.tex", "report.json"].map(String::from).into()
    );
    assert_eq!(
        std::fs::read_to_string(theirs.join("report.json")).unwrap(),
        "{\"mine\": true}"
    );

    let out = dir.path().join("out");
    assert!(run(audit(&pts, &out, &[])).status.success());
    std::fs::write(out.join("my-notes.md"), "keep").unwrap();
    let o = run(audit(&pts, &out, &["--force", "--seed", "7"]));
    let e = stderr(&o);
    assert_eq!(o.status.code(), Some(2), "{e}");
    assert!(e.contains("my-notes.md"), "{e}");
    assert_eq!(
        std::fs::read_to_string(out.join("my-notes.md")).unwrap(),
        "keep"
    );
    std::fs::remove_file(out.join("my-notes.md")).unwrap();
    assert_ne!(assert_whole(&out, "before"), 7);
    assert!(
        run(audit(&pts, &out, &["--force", "--seed", "7"]))
            .status
            .success()
    );
    assert_eq!(assert_whole(&out, "after"), 7);
    assert!(leftovers(dir.path()).is_empty());
}

/// Issue 20: `--out .` is refused before anything is written.
#[test]
fn out_dot_is_refused_cleanly() {
    let dir = tmp();
    let pts = points(dir.path(), 60);
    let cwd = dir.path().join("work");
    std::fs::create_dir(&cwd).unwrap();
    std::fs::write(cwd.join("report.json"), "{}").unwrap();
    for force in [false, true] {
        let mut c = audit(&pts, Path::new("."), if force { &["--force"] } else { &[] });
        c.current_dir(&cwd);
        let o = run(c);
        let e = stderr(&o);
        assert_eq!(o.status.code(), Some(2), "{e}");
        assert!(e.contains("what to do"), "{e}");
        assert_eq!(files(&cwd), ["report.json".to_string()].into());
        assert!(leftovers(dir.path()).is_empty() && leftovers(&cwd).is_empty());
    }
}

#[cfg(unix)]
mod signals {
    use super::*;
    use nix::sys::signal::{Signal, kill};
    use nix::unistd::Pid;
    use std::os::unix::process::ExitStatusExt;
    use std::time::{Duration, Instant};

    fn send(child: &Child, sig: Signal) {
        // The child may have finished already: that is a trial too.
        let _ = kill(Pid::from_raw(child.id() as i32), sig);
    }

    /// Wait until the child has made its staging folder (the write phase
    /// began) or has ended.
    fn wait_for_staging(child: &mut Child, dir: &Path) {
        let start = Instant::now();
        while start.elapsed() < Duration::from_secs(120) {
            if leftovers(dir)
                .iter()
                .any(|n| n.starts_with(".patternproof-stage-"))
            {
                return;
            }
            if child.try_wait().unwrap().is_some() {
                return;
            }
            std::thread::sleep(Duration::from_micros(50));
        }
    }

    fn spawn(pts: &Path, out: &Path, seed: u64) -> Child {
        audit(pts, out, &["--force", "--seed", &seed.to_string()])
            .stdout(Stdio::null())
            .stderr(Stdio::piped())
            .spawn()
            .unwrap()
    }

    /// Issue 20: SIGINT or SIGTERM at many moments, most of them inside the
    /// write phase, over an existing report with `--force`. Each trial must
    /// end with the old or the new report whole and nothing beside it; the
    /// exit is 0 (too late to stop) or the signal's own.
    #[test]
    fn an_interrupt_leaves_the_old_or_the_new_report() {
        let dir = tmp();
        let pts = points(dir.path(), 1000);
        let out = dir.path().join("out");
        assert!(run(audit(&pts, &out, &["--seed", "1000"])).status.success());
        let mut stopped_while_writing = 0;
        for trial in 0..18u64 {
            let seed = trial + 1;
            let before = assert_whole(&out, "before the trial");
            let (sig, code) = if trial % 2 == 0 {
                (Signal::SIGINT, 130)
            } else {
                (Signal::SIGTERM, 143)
            };
            let mut child = spawn(&pts, &out, seed);
            if trial % 6 == 5 {
                // Early, while simulating: nothing is on disk yet.
                std::thread::sleep(Duration::from_millis(20 * trial));
            } else {
                wait_for_staging(&mut child, dir.path());
                std::thread::sleep(Duration::from_micros(400 * (trial % 6)));
            }
            send(&child, sig);
            let o = child.wait_with_output().unwrap();
            let context = format!("trial {trial} ({sig})");
            let status = o.status;
            let by_signal = status.signal() == Some(sig as i32) || status.code() == Some(code);
            assert!(
                status.success() || by_signal,
                "{context}: ended with {status:?}: {}",
                stderr(&o)
            );
            let stderr = stderr(&o);
            if stderr.contains("while writing") || stderr.contains("already complete") {
                stopped_while_writing += 1;
            }
            assert!(!stderr.contains("panicked"), "{context}: {stderr}");
            assert_eq!(leftovers(dir.path()), Vec::<String>::new(), "{context}");
            let now = assert_whole(&out, &context);
            assert!(now == before || now == seed, "{context}: seed {now}");
            if status.success() {
                assert_eq!(now, seed, "{context}: a run that finished wrote its report");
            }
        }
        eprintln!("{stopped_while_writing} of 18 trials were stopped in the write phase");
    }

    /// Issue 20: after SIGKILL (which no program can handle) in the write
    /// phase, the next run beside the same `--out` repairs what was left:
    /// no temporary folder remains and `--out` holds a whole report.
    #[test]
    fn the_run_after_a_kill_repairs_the_leftovers() {
        let dir = tmp();
        let pts = points(dir.path(), 1000);
        let out = dir.path().join("out");
        assert!(run(audit(&pts, &out, &["--seed", "1000"])).status.success());
        let mut repaired = 0;
        for trial in 0..6u64 {
            let mut child = spawn(&pts, &out, trial + 1);
            wait_for_staging(&mut child, dir.path());
            std::thread::sleep(Duration::from_micros(300 * trial));
            send(&child, Signal::SIGKILL);
            child.wait().unwrap();
            let left = leftovers(dir.path());
            let contents: Vec<String> = left
                .iter()
                .map(|n| {
                    let names: Vec<String> = std::fs::read_dir(dir.path().join(n))
                        .map(|d| {
                            d.filter_map(Result::ok)
                                .map(|e| e.file_name().to_string_lossy().into_owned())
                                .collect()
                        })
                        .unwrap_or_default();
                    format!("{n}: {names:?}")
                })
                .collect();
            // Killed between the two renames, `out` may be missing for now.
            if !out.exists() {
                assert!(
                    left.iter().any(|n| n.starts_with(".patternproof-old-")),
                    "{left:?}"
                );
            }
            let o = run(audit(&pts, &out, &["--force", "--seed", "500"]));
            let e = stderr(&o);
            assert!(o.status.success(), "trial {trial}: {:?} {e}", o.status);
            if !left.is_empty() {
                repaired += 1;
                assert!(
                    e.contains("patternproof: note: "),
                    "trial {trial}: left {contents:?}: {e}"
                );
            }
            assert_eq!(leftovers(dir.path()), Vec::<String>::new(), "trial {trial}");
            assert_eq!(assert_whole(&out, "after the repair"), 500);
        }
        eprintln!("{repaired} of 6 kills left something to repair");
    }
}
