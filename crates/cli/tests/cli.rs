//! End-to-end tests: run the `patternproof` binary on small fixtures and on
//! the demo data, and check exit codes, messages and the report folder.

#![allow(clippy::unwrap_used)]

use std::path::{Path, PathBuf};
use std::process::{Command, Output};

fn bin() -> Command {
    Command::new(env!("CARGO_BIN_EXE_patternproof"))
}

fn repo() -> PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR")).join("../..")
}

fn audit(args: &[&str], out: &Path) -> Output {
    bin()
        .arg("audit")
        .args(args)
        .arg("--out")
        .arg(out)
        .arg("--quiet")
        .output()
        .expect("binary runs")
}

fn write(dir: &Path, name: &str, text: &str) -> PathBuf {
    let p = dir.join(name);
    std::fs::write(&p, text).unwrap();
    p
}

fn stderr(o: &Output) -> String {
    String::from_utf8_lossy(&o.stderr).into_owned()
}

/// Bad input: exit 2, the message names the file, and no report folder.
fn assert_refused(args: &[&str], dir: &Path, must_mention: &[&str]) {
    let out = dir.join("report");
    let o = audit(args, &out);
    let e = stderr(&o);
    assert_eq!(o.status.code(), Some(2), "stderr: {e}");
    assert!(e.starts_with("patternproof: error: "), "{e}");
    assert!(e.contains("what to do"), "{e}");
    for m in must_mention {
        assert!(e.contains(m), "expected `{m}` in: {e}");
    }
    assert!(!out.exists(), "a report folder was left behind");
}

fn grid_csv(k: usize) -> String {
    let mut s = String::from("x,y\n");
    for i in 0..k {
        for j in 0..k {
            s.push_str(&format!("{},{}\n", i * 10, j * 10));
        }
    }
    s
}

#[test]
fn demo_data_gives_a_full_report() {
    let dir = tempfile::tempdir().unwrap();
    let out = dir.path().join("rep");
    let r = repo();
    let o = audit(
        &[
            r.join("demo-data/meadow-burrows.csv").to_str().unwrap(),
            "--boundary",
            r.join("demo-data/meadow-boundary.geojson")
                .to_str()
                .unwrap(),
            "--sims",
            "99",
        ],
        &out,
    );
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    for f in [
        "report.json",
        "verdict.csv",
        "verdict.md",
        "windows.geojson",
    ] {
        assert!(out.join(f).is_file(), "{f} missing");
    }
    let j: serde_json::Value =
        serde_json::from_slice(&std::fs::read(out.join("report.json")).unwrap()).unwrap();
    assert_eq!(j["schema"], "patternproof.audit/3");
    let ids: Vec<&str> = j["windows"]
        .as_array()
        .unwrap()
        .iter()
        .map(|w| w["id"].as_str().unwrap())
        .collect();
    for id in ["bbox", "hull", "concave", "boundary"] {
        assert!(ids.contains(&id), "{ids:?}");
    }
    let n = j["input"]["n"].as_u64().unwrap() as f64;
    // Clark & Evans (1954): uncorrected z = (R − 1)·sqrt(n)·0.5/0.26136 for every window.
    for row in j["results"]
        .as_array()
        .unwrap()
        .iter()
        .filter(|r| r["edge"] == "none")
    {
        let r = row["ratio"].as_f64().unwrap();
        let z = row["z"].as_f64().unwrap();
        let k = row["n_used"].as_f64().unwrap();
        assert!(k <= n);
        let expected = (r - 1.0) * k.sqrt() * 0.5
            / ((4.0 - std::f64::consts::PI) / (4.0 * std::f64::consts::PI)).sqrt();
        assert!((z - expected).abs() < 1e-9, "{z} vs {expected}");
    }
    let calls = &j["summary"]["calls"];
    let total = calls["clustered"].as_u64().unwrap()
        + calls["dispersed"].as_u64().unwrap()
        + calls["not-significant"].as_u64().unwrap();
    assert_eq!(total as usize, j["results"].as_array().unwrap().len());
    let csv = std::fs::read_to_string(out.join("verdict.csv")).unwrap();
    assert_eq!(csv.lines().count(), total as usize + 1);
    let gj: serde_json::Value =
        serde_json::from_slice(&std::fs::read(out.join("windows.geojson")).unwrap()).unwrap();
    assert_eq!(gj["features"].as_array().unwrap().len(), ids.len());
    // The window map names every window in its legend.
    let svg = std::fs::read_to_string(out.join("windows.svg")).unwrap();
    assert!(svg.starts_with("<svg"));
    for id in &ids {
        assert!(
            svg.contains(&format!("\n{id}\n</text>")),
            "{id} missing from the map legend"
        );
    }
    assert!(svg.contains(" m\n</text>"), "scale bar label with its unit");
    let md = std::fs::read_to_string(out.join("verdict.md")).unwrap();
    assert!(md.contains("personal data"));
    // The methods paragraph repeats the run's own settings.
    let methods = md.split("## Methods paragraph").nth(1).unwrap();
    assert!(methods.contains(&format!("the {} mapped points", j["input"]["n"])));
    assert!(methods.contains("with 99 patterns"));
    assert!(methods.contains("(seed 1)"));
    assert!(methods.contains("α = 0.05"));
}

/// Same seed, same bytes, on one thread or two.
#[test]
fn same_seed_same_bytes_for_any_thread_count() {
    let dir = tempfile::tempdir().unwrap();
    let pts = write(
        dir.path(),
        "p.csv",
        "x,y\n1,1\n2,5\n7,3\n9,9\n4,4\n6,8\n3,7\n8,1\n5,2\n1,9\n",
    );
    let run = |threads: &str, name: &str| {
        let out = dir.path().join(name);
        let o = bin()
            .env("RAYON_NUM_THREADS", threads)
            .args([
                "audit",
                pts.to_str().unwrap(),
                "--sims",
                "199",
                "--seed",
                "42",
                "--quiet",
                "--out",
            ])
            .arg(&out)
            .output()
            .unwrap();
        assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
        std::fs::read(out.join("report.json")).unwrap()
    };
    assert_eq!(run("1", "a"), run("2", "b"));
}

#[test]
fn empty_file_is_refused() {
    let dir = tempfile::tempdir().unwrap();
    let p = write(dir.path(), "empty.csv", "");
    assert_refused(&[p.to_str().unwrap()], dir.path(), &["empty.csv"]);
}

#[test]
fn a_single_point_is_refused() {
    let dir = tempfile::tempdir().unwrap();
    let p = write(dir.path(), "one.csv", "x,y\n3,4\n");
    assert_refused(&[p.to_str().unwrap()], dir.path(), &["one.csv", "two"]);
}

#[test]
fn non_numeric_and_nan_coordinates_name_the_line() {
    let dir = tempfile::tempdir().unwrap();
    let p = write(dir.path(), "bad.csv", "x,y\n1,2\n3,abc\n5,6\n");
    assert_refused(&[p.to_str().unwrap()], dir.path(), &["bad.csv", "line 3"]);
    let q = write(dir.path(), "nan.csv", "x,y\n1,2\n3,4\nNaN,6\n");
    assert_refused(&[q.to_str().unwrap()], dir.path(), &["nan.csv", "line 4"]);
}

#[test]
fn lonlat_out_of_range_suggests_projected() {
    let dir = tempfile::tempdir().unwrap();
    let p = write(dir.path(), "ll.csv", "lon,lat\n10,50\n200,50\n11,51\n");
    assert_refused(
        &[p.to_str().unwrap()],
        dir.path(),
        &["ll.csv", "--coords projected"],
    );
}

#[test]
fn identical_or_collinear_points_are_refused_without_a_window() {
    let dir = tempfile::tempdir().unwrap();
    let p = write(dir.path(), "same.csv", "x,y\n1,1\n1,1\n1,1\n");
    assert_refused(&[p.to_str().unwrap()], dir.path(), &["same.csv"]);
    let q = write(dir.path(), "line.csv", "x,y\n0,3\n1,3\n2,3\n5,3\n");
    assert_refused(&[q.to_str().unwrap()], dir.path(), &["line.csv", "--area"]);
    // With a bare area the collinear set can still be tested.
    let out = dir.path().join("with-area");
    let o = audit(&[q.to_str().unwrap(), "--area", "100"], &out);
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
}

#[test]
fn duplicates_are_counted_kept_or_dropped() {
    let dir = tempfile::tempdir().unwrap();
    let mut text = grid_csv(5);
    text.push_str("10,10\n20,20\n");
    let p = write(dir.path(), "dup.csv", &text);
    let out = dir.path().join("kept");
    let o = audit(&[p.to_str().unwrap(), "--sims", "19"], &out);
    assert_eq!(o.status.code(), Some(0));
    assert!(stderr(&o).contains("2 point(s) repeat"), "{}", stderr(&o));
    let j: serde_json::Value =
        serde_json::from_slice(&std::fs::read(out.join("report.json")).unwrap()).unwrap();
    assert_eq!(j["input"]["duplicates"], 2);
    assert_eq!(j["input"]["n"], 27);
    let out2 = dir.path().join("dropped");
    let o = audit(
        &[p.to_str().unwrap(), "--sims", "19", "--drop-duplicates"],
        &out2,
    );
    assert_eq!(o.status.code(), Some(0));
    let j: serde_json::Value =
        serde_json::from_slice(&std::fs::read(out2.join("report.json")).unwrap()).unwrap();
    assert_eq!(j["input"]["n"], 25);
}

#[test]
fn invalid_boundary_is_refused() {
    let dir = tempfile::tempdir().unwrap();
    let p = write(dir.path(), "g.csv", &grid_csv(4));
    let b = write(
        dir.path(),
        "bowtie.wkt",
        "POLYGON((0 0, 30 30, 30 0, 0 30, 0 0))",
    );
    assert_refused(
        &[p.to_str().unwrap(), "--boundary", b.to_str().unwrap()],
        dir.path(),
        &["bowtie.wkt", "valid polygon"],
    );
}

#[test]
fn points_outside_a_boundary_are_counted_and_flagged() {
    let dir = tempfile::tempdir().unwrap();
    let p = write(dir.path(), "g.csv", &grid_csv(5));
    // Covers x, y in [0, 25]: the 9 points with x or y = 30 or 40 … count by hand:
    // grid values 0..40 step 10; inside [−1, 25] are 0, 10, 20 → 3 × 3 = 9 inside, 16 outside.
    let b = write(
        dir.path(),
        "small.wkt",
        "POLYGON((-1 -1, 25 -1, 25 25, -1 25, -1 -1))",
    );
    let out = dir.path().join("rep");
    let o = audit(
        &[
            p.to_str().unwrap(),
            "--boundary",
            b.to_str().unwrap(),
            "--sims",
            "19",
        ],
        &out,
    );
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    let j: serde_json::Value =
        serde_json::from_slice(&std::fs::read(out.join("report.json")).unwrap()).unwrap();
    let w = j["windows"]
        .as_array()
        .unwrap()
        .iter()
        .find(|w| w["id"] == "boundary")
        .unwrap()
        .clone();
    assert_eq!(w["points_outside"], 16);
    let row = j["results"]
        .as_array()
        .unwrap()
        .iter()
        .find(|r| r["window"] == "boundary" && r["edge"] == "none")
        .unwrap()
        .clone();
    assert_eq!(row["n_used"], 9);
    assert!(
        row["note"]
            .as_str()
            .unwrap()
            .contains("16 point(s) outside")
    );
}

#[test]
fn geojson_without_crs_but_planar_values_asks_for_coords() {
    let dir = tempfile::tempdir().unwrap();
    let p = write(
        dir.path(),
        "planar.geojson",
        r#"{"type":"FeatureCollection","features":[
            {"type":"Feature","properties":{},"geometry":{"type":"Point","coordinates":[512000.5,4100000.0]}},
            {"type":"Feature","properties":{},"geometry":{"type":"Point","coordinates":[512100.5,4100050.0]}},
            {"type":"Feature","properties":{},"geometry":{"type":"Point","coordinates":[512050.5,4100200.0]}}]}"#,
    );
    assert_refused(
        &[p.to_str().unwrap()],
        dir.path(),
        &["planar.geojson", "--coords projected"],
    );
}

#[test]
fn a_foreign_out_folder_is_not_overwritten() {
    let dir = tempfile::tempdir().unwrap();
    let p = write(dir.path(), "g.csv", &grid_csv(4));
    let mine = dir.path().join("mine");
    std::fs::create_dir(&mine).unwrap();
    std::fs::write(mine.join("notes.txt"), "keep me").unwrap();
    let o = audit(&[p.to_str().unwrap(), "--sims", "19"], &mine);
    assert_eq!(o.status.code(), Some(2));
    assert!(stderr(&o).contains("does not hold an earlier report"));
    assert_eq!(
        std::fs::read_to_string(mine.join("notes.txt")).unwrap(),
        "keep me"
    );
}

#[test]
fn bad_flags_exit_2() {
    let dir = tempfile::tempdir().unwrap();
    let p = write(dir.path(), "g.csv", &grid_csv(4));
    assert_refused(
        &[p.to_str().unwrap(), "--alpha", "1.5"],
        dir.path(),
        &["--alpha"],
    );
    assert_refused(
        &[p.to_str().unwrap(), "--edges", "none,magic"],
        dir.path(),
        &["magic"],
    );
    assert_refused(
        &[p.to_str().unwrap(), "--buffers=2,-3"],
        dir.path(),
        &["--buffers"],
    );
}

/// `--where` on a CSV: the demo burrows marked `year=2024`, mixed with 40
/// rows of another year elsewhere, give the same rows of results as the
/// demo file alone (the filter is applied before anything is measured),
/// and the report names the filter beside the file.
#[test]
fn where_on_a_csv_equals_the_filtered_file() {
    let dir = tempfile::tempdir().unwrap();
    let demo = std::fs::read_to_string(repo().join("demo-data/meadow-burrows.csv")).unwrap();
    let mut mixed = String::from("burrow,x,y,year\n");
    for (k, line) in demo.lines().skip(1).enumerate() {
        mixed.push_str(&format!("{line},2024\n"));
        if k < 40 {
            mixed.push_str(&format!("Z{k},{},{},2023\n", 500 + 3 * k, 40 + 7 * k));
        }
    }
    let mixed = write(dir.path(), "mixed.csv", &mixed);
    let run = |file: &Path, extra: &[&str], name: &str| {
        let out = dir.path().join(name);
        let mut args = vec![file.to_str().unwrap(), "--sims", "19"];
        args.extend_from_slice(extra);
        let o = audit(&args, &out);
        assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
        let text = std::fs::read_to_string(out.join("report.json")).unwrap();
        serde_json::from_str::<serde_json::Value>(&text).unwrap()
    };
    let plain = run(&repo().join("demo-data/meadow-burrows.csv"), &[], "plain");
    let filtered = run(&mixed, &["--where", "year=2024"], "filtered");
    assert_eq!(plain["results"], filtered["results"]);
    assert_eq!(plain["windows"], filtered["windows"]);
    let shown = filtered["input"]["points_file"].as_str().unwrap();
    assert!(shown.ends_with("mixed.csv (year = 2024)"), "{shown}");
}

/// Issue 20: `--sims 1000000000` used to run for ever, its kept results
/// growing. Now the memory it needs is estimated before anything runs, and
/// a run beyond the machine stops with exit 2, the estimate, the memory
/// available and the largest `--sims` that fits (no timing involved).
#[test]
fn a_billion_simulations_are_refused_up_front() {
    let dir = tempfile::tempdir().unwrap();
    let points = repo().join("demo-data/meadow-burrows.csv");
    let args = [points.to_str().unwrap(), "--sims", "1000000000"];
    assert_refused(
        &args,
        dir.path(),
        &[
            "--sims 1000000000: the run needs about",
            "of memory",
            "bytes per simulation",
            "available",
            "use at most --sims ",
        ],
    );
    let e = stderr(&audit(&args, &dir.path().join("report")));
    let fits: u64 = e
        .split("use at most --sims ")
        .nth(1)
        .and_then(|t| t.split_whitespace().next())
        .and_then(|v| v.parse().ok())
        .unwrap();
    assert!(fits < 1_000_000_000, "{e}");
}
