//! The bad-input corpus in `tests/bad-inputs/`: every file with the exit
//! code and the words its message must contain (`cases.tsv`), run by one
//! table-driven test. Input errors exit 2, name the file and say what to
//! do; no case may panic or leave a report folder behind.

use crate::util::{bin, repo, stderr, stdout, tmp};
use std::path::{Path, PathBuf};

/// The clean seven-point file of the `GOOD` cases: a survey grid in metres
/// with a false origin, so that it reads as projected without `--coords`
/// (small numbers under x,y would look like lon/lat degrees and stop).
const GOOD: &str = "x,y\n512001,5600001\n512004,5600002\n512002,5600007\n512008,5600003\n512005,5600005\n512009,5600009\n512000,5600006\n";

fn corpus() -> PathBuf {
    repo().join("tests/bad-inputs")
}

#[test]
fn every_case_in_the_corpus() {
    let dir = tmp();
    let good = dir.path().join("good.csv");
    std::fs::write(&good, GOOD).unwrap();
    let table = std::fs::read_to_string(corpus().join("cases.tsv")).unwrap();
    let mut failures = Vec::new();
    let mut count = 0;
    for (k, line) in table.lines().enumerate() {
        if line.starts_with('#') || line.trim().is_empty() {
            continue;
        }
        let cols: Vec<&str> = line.split('\t').collect();
        assert_eq!(cols.len(), 4, "cases.tsv line {}: four columns", k + 1);
        count += 1;
        let file = match cols[0] {
            "GOOD" => good.clone(),
            f => corpus().join(f),
        };
        let out = dir.path().join(format!("out-{k}"));
        let mut cmd = bin();
        cmd.arg("audit").arg(&file).current_dir(corpus());
        cmd.args(cols[1].split_whitespace());
        cmd.args(["--sims", "19", "--quiet", "--out"]).arg(&out);
        let o = cmd.output().unwrap();
        let text = format!("{}{}", stdout(&o), stderr(&o));
        let want: i32 = cols[2].parse().unwrap();
        let mut problems = Vec::new();
        if o.status.code() != Some(want) {
            problems.push(format!("exit {:?}, want {want}", o.status.code()));
        }
        for w in cols[3].split('|') {
            if !text.contains(w) {
                problems.push(format!("missing `{w}`"));
            }
        }
        if text.contains("panicked") {
            problems.push("panicked".into());
        }
        if want == 2 {
            if !text.contains("what to do") {
                problems.push("no `what to do`".into());
            }
            if out.exists() {
                problems.push("left a report folder".into());
            }
        } else if !out.join("report.json").is_file() {
            problems.push("no report written".into());
        }
        if !problems.is_empty() {
            failures.push(format!(
                "{}: {}\n    output: {}",
                cols[0],
                problems.join("; "),
                text.trim()
            ));
        }
    }
    assert!(
        count >= 30,
        "the corpus holds {count} cases, the issue asks for 30"
    );
    assert!(
        failures.is_empty(),
        "{} case(s) failed:\n{}",
        failures.len(),
        failures.join("\n")
    );
}

/// An earlier report is replaced only with `--force`; a user's own folder
/// never.
#[test]
fn existing_folders_need_force() {
    let dir = tmp();
    let good = dir.path().join("good.csv");
    std::fs::write(&good, GOOD).unwrap();
    let out = dir.path().join("r");
    let run = |extra: &[&str], out: &Path| {
        bin()
            .arg("audit")
            .arg(&good)
            .args(["--sims", "9", "--quiet", "--out"])
            .arg(out)
            .args(extra)
            .output()
            .unwrap()
    };
    assert!(run(&[], &out).status.success());
    let before = std::fs::read(out.join("report.json")).unwrap();
    let again = run(&["--seed", "2"], &out);
    assert_eq!(again.status.code(), Some(2));
    assert!(stderr(&again).contains("--force"));
    assert_eq!(
        std::fs::read(out.join("report.json")).unwrap(),
        before,
        "untouched"
    );
    assert!(run(&["--seed", "2", "--force"], &out).status.success());
    assert_ne!(
        std::fs::read(out.join("report.json")).unwrap(),
        before,
        "replaced"
    );

    let mine = dir.path().join("mine");
    std::fs::create_dir(&mine).unwrap();
    std::fs::write(mine.join("notes.txt"), "keep").unwrap();
    let o = run(&["--force"], &mine);
    assert_eq!(o.status.code(), Some(2));
    assert_eq!(
        std::fs::read_to_string(mine.join("notes.txt")).unwrap(),
        "keep"
    );
}
