//! End-to-end tests: run the `patternproof` binary on small fixtures and on
//! the demo data, and check exit codes, messages and the report folder.

use crate::util::{bin, repo, stderr, stdout, tmp, write};
use approx::abs_diff_eq;
use std::path::Path;
use std::process::Output;

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

/// Bad input: exit 2, the message names the file, and no report folder.
fn assert_refused(args: &[&str], dir: &Path, must_mention: &[&str]) {
    let out = dir.join("report");
    let o = audit(args, &out);
    let e = stderr(&o);
    assert_eq!(o.status.code(), Some(2), "stderr: {e}");
    // The error may follow the line saying how the points were read.
    assert!(
        e.lines().any(|l| l.starts_with("patternproof: error: ")),
        "{e}"
    );
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
    let dir = tmp();
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
        assert!(
            abs_diff_eq!(z, expected, epsilon = 1e-9),
            "{z} vs {expected}"
        );
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
    let dir = tmp();
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
                "--coords",
                "projected",
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
    let dir = tmp();
    let p = write(dir.path(), "empty.csv", "");
    assert_refused(&[p.to_str().unwrap()], dir.path(), &["empty.csv"]);
}

#[test]
fn a_single_point_is_refused() {
    let dir = tmp();
    let p = write(dir.path(), "one.csv", "x,y\n3,4\n");
    assert_refused(&[p.to_str().unwrap()], dir.path(), &["one.csv", "two"]);
}

#[test]
fn non_numeric_and_nan_coordinates_name_the_line() {
    let dir = tmp();
    let p = write(dir.path(), "bad.csv", "x,y\n1,2\n3,abc\n5,6\n");
    assert_refused(&[p.to_str().unwrap()], dir.path(), &["bad.csv", "line 3"]);
    let q = write(dir.path(), "nan.csv", "x,y\n1,2\n3,4\nNaN,6\n");
    assert_refused(&[q.to_str().unwrap()], dir.path(), &["nan.csv", "line 4"]);
}

#[test]
fn lonlat_out_of_range_suggests_projected() {
    let dir = tmp();
    let p = write(dir.path(), "ll.csv", "lon,lat\n10,50\n200,50\n11,51\n");
    assert_refused(
        &[p.to_str().unwrap()],
        dir.path(),
        &["ll.csv", "--coords projected"],
    );
}

#[test]
fn identical_or_collinear_points_are_refused_without_a_window() {
    let dir = tmp();
    let planar = ["--coords", "projected"];
    let p = write(dir.path(), "same.csv", "x,y\n1,1\n1,1\n1,1\n");
    assert_refused(
        &[p.to_str().unwrap(), planar[0], planar[1]],
        dir.path(),
        &["same.csv", "no window could be tested"],
    );
    let q = write(dir.path(), "line.csv", "x,y\n0,3\n1,3\n2,3\n5,3\n");
    assert_refused(
        &[q.to_str().unwrap(), planar[0], planar[1]],
        dir.path(),
        &["line.csv", "--area"],
    );
    // With a bare area four points get no closed-form row (fewer than
    // ten), and the message says why.
    assert_refused(
        &[q.to_str().unwrap(), "--area", "100", planar[0], planar[1]],
        dir.path(),
        &["line.csv", "at least 10"],
    );
    // Twelve collinear points with a bare area can be tested.
    let mut text = String::from("x,y\n");
    for i in 0..12 {
        text.push_str(&format!("{},3\n", i * 2));
    }
    let q = write(dir.path(), "line12.csv", &text);
    let out = dir.path().join("with-area");
    let o = audit(
        &[q.to_str().unwrap(), "--area", "400", planar[0], planar[1]],
        &out,
    );
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
}

#[test]
fn duplicates_are_counted_kept_or_dropped() {
    let dir = tmp();
    let mut text = grid_csv(5);
    text.push_str("10,10\n20,20\n");
    let p = write(dir.path(), "dup.csv", &text);
    let out = dir.path().join("kept");
    let o = audit(
        &[p.to_str().unwrap(), "--sims", "19", "--coords", "projected"],
        &out,
    );
    assert_eq!(o.status.code(), Some(0));
    assert!(stderr(&o).contains("2 point(s) repeat"), "{}", stderr(&o));
    let j: serde_json::Value =
        serde_json::from_slice(&std::fs::read(out.join("report.json")).unwrap()).unwrap();
    assert_eq!(j["input"]["duplicates"], 2);
    assert_eq!(j["input"]["n"], 27);
    let out2 = dir.path().join("dropped");
    let o = audit(
        &[
            p.to_str().unwrap(),
            "--sims",
            "19",
            "--drop-duplicates",
            "--coords",
            "projected",
        ],
        &out2,
    );
    assert_eq!(o.status.code(), Some(0));
    let j: serde_json::Value =
        serde_json::from_slice(&std::fs::read(out2.join("report.json")).unwrap()).unwrap();
    assert_eq!(j["input"]["n"], 25);
}

#[test]
fn invalid_boundary_is_refused() {
    let dir = tmp();
    let p = write(dir.path(), "g.csv", &grid_csv(4));
    let b = write(
        dir.path(),
        "bowtie.wkt",
        "POLYGON((0 0, 30 30, 30 0, 0 30, 0 0))",
    );
    assert_refused(
        &[
            p.to_str().unwrap(),
            "--boundary",
            b.to_str().unwrap(),
            "--coords",
            "projected",
        ],
        dir.path(),
        &["bowtie.wkt", "valid polygon"],
    );
}

#[test]
fn points_outside_a_boundary_are_counted_and_flagged() {
    let dir = tmp();
    let p = write(dir.path(), "g.csv", &grid_csv(6));
    // Count by hand: grid values 0..50 step 10; inside [−1, 35] are 0, 10,
    // 20, 30 → 4 × 4 = 16 inside, 36 − 16 = 20 outside.
    let b = write(
        dir.path(),
        "small.wkt",
        "POLYGON((-1 -1, 35 -1, 35 35, -1 35, -1 -1))",
    );
    let out = dir.path().join("rep");
    let o = audit(
        &[
            p.to_str().unwrap(),
            "--boundary",
            b.to_str().unwrap(),
            "--sims",
            "19",
            "--coords",
            "projected",
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
    assert_eq!(w["points_outside"], 20);
    let row = j["results"]
        .as_array()
        .unwrap()
        .iter()
        .find(|r| r["window"] == "boundary" && r["edge"] == "none")
        .unwrap()
        .clone();
    assert_eq!(row["n_used"], 16);
    assert!(
        row["note"]
            .as_str()
            .unwrap()
            .contains("20 point(s) outside")
    );
    // More than 5 % left out: a caution in the report, verdict.md and the
    // terminal, naming the window and the count (20/36 = 56 %).
    let caution = "window `boundary` leaves out 20 of 36 points (56 %)";
    let cautions = j["summary"]["cautions"].as_array().unwrap();
    assert!(
        cautions
            .iter()
            .any(|c| c.as_str().unwrap().starts_with(caution))
    );
    let md = std::fs::read_to_string(out.join("verdict.md")).unwrap();
    assert!(md.contains(caution), "{md}");
    // The terminal has no Markdown: the same words without backticks,
    // wrapped between words.
    let terminal = stdout(&o);
    let words = terminal.split_whitespace().collect::<Vec<_>>().join(" ");
    assert!(
        words.contains("window boundary leaves out 20 of 36 points (56 %)"),
        "{terminal}"
    );
    assert!(!terminal.contains('`'), "{terminal}");
}

/// A window that leaves out a few points, under 5 %, gets its row note but
/// no caution of its own.
#[test]
fn a_boundary_missing_a_few_points_gets_no_caution() {
    let dir = tmp();
    // 21 × 21 = 441 points; the boundary misses the column x = 200 (21
    // points, 4.8 %).
    let p = write(dir.path(), "g.csv", &grid_csv(21));
    let b = write(
        dir.path(),
        "most.wkt",
        "POLYGON((-1 -1, 195 -1, 195 201, -1 201, -1 -1))",
    );
    let out = dir.path().join("rep");
    let o = audit(
        &[
            p.to_str().unwrap(),
            "--boundary",
            b.to_str().unwrap(),
            "--sims",
            "0",
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
    assert_eq!(w["points_outside"], 21);
    let terminal = stdout(&o);
    assert!(!terminal.contains("leaves out"), "{terminal}");
}

/// Three points: no closed-form row and no flip threshold (fewer than ten
/// points), only simulation rows, and the headline says "small sample".
#[test]
fn tiny_samples_get_no_closed_form_rows_and_a_headline_caution() {
    let dir = tmp();
    let p = write(
        dir.path(),
        "three.csv",
        "x,y
1000,1000
1010,1003
1004,1012
",
    );
    let out = dir.path().join("rep");
    let o = audit(&[p.to_str().unwrap(), "--sims", "99"], &out);
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    let j: serde_json::Value =
        serde_json::from_slice(&std::fs::read(out.join("report.json")).unwrap()).unwrap();
    let rows = j["results"].as_array().unwrap();
    assert!(!rows.is_empty());
    assert!(rows.iter().all(|r| r["edge"] == "simulation"), "{rows:?}");
    let skipped = j["skipped"].as_array().unwrap();
    assert!(
        skipped
            .iter()
            .any(|s| s["edge"] == "none" && s["reason"].as_str().unwrap().contains("at least 10"))
    );
    for f in j["flip"].as_array().unwrap() {
        assert!(f["clustered_above_area"].is_null() && f["dispersed_below_area"].is_null());
    }
    let verdict = j["summary"]["verdict"].as_str().unwrap();
    assert!(verdict.starts_with("small sample (n = 3)"), "{verdict}");
    let terminal = stdout(&o);
    assert!(
        terminal.contains("Verdict: small sample (n = 3)"),
        "{terminal}"
    );
    assert!(
        terminal.contains("caution: small sample: only 3 points"),
        "{terminal}"
    );

    // Twenty points: closed-form rows are back, with the milder caution.
    let mut text = String::from("x,y\n");
    for i in 0..20 {
        text.push_str(&format!(
            "{},{}\n",
            1000 + (i % 5) * 7,
            1000 + (i / 5) * 9 + i % 3
        ));
    }
    let p = write(dir.path(), "twenty.csv", &text);
    let out = dir.path().join("rep20");
    let o = audit(&[p.to_str().unwrap(), "--sims", "19"], &out);
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    let terminal = stdout(&o);
    assert!(
        terminal.contains("Verdict: small sample (n = 20)"),
        "{terminal}"
    );
    assert!(terminal.contains("n = 20 is below 30"), "{terminal}");
    let j: serde_json::Value =
        serde_json::from_slice(&std::fs::read(out.join("report.json")).unwrap()).unwrap();
    assert!(
        j["results"]
            .as_array()
            .unwrap()
            .iter()
            .any(|r| r["edge"] == "none")
    );
}

#[test]
fn geojson_without_crs_but_planar_values_asks_for_coords() {
    let dir = tmp();
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
    let dir = tmp();
    let p = write(dir.path(), "g.csv", &grid_csv(4));
    let mine = dir.path().join("mine");
    std::fs::create_dir(&mine).unwrap();
    std::fs::write(mine.join("notes.txt"), "keep me").unwrap();
    let o = audit(
        &[p.to_str().unwrap(), "--sims", "19", "--coords", "projected"],
        &mine,
    );
    assert_eq!(o.status.code(), Some(2));
    assert!(stderr(&o).contains("does not hold an earlier report"));
    assert_eq!(
        std::fs::read_to_string(mine.join("notes.txt")).unwrap(),
        "keep me"
    );
}

#[test]
fn bad_flags_exit_2() {
    let dir = tmp();
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
    let dir = tmp();
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

/// Any order of the input rows gives the same bytes: the points are put in
/// one canonical order (x, then y) before anything is summed. The demo
/// meadow, its rows reversed and rotated, gives the same report apart from
/// the input file's own checksum.
#[test]
fn shuffled_rows_give_the_same_report() {
    let text = std::fs::read_to_string(repo().join("demo-data/meadow-burrows.csv")).unwrap();
    let mut lines: Vec<&str> = text.lines().collect();
    let header = lines.remove(0);
    let mut shuffled = lines.clone();
    shuffled.reverse();
    shuffled.rotate_left(37);
    assert_ne!(shuffled, lines);
    let boundary = repo().join("demo-data/meadow-boundary.geojson");
    let run = |rows: &[&str], name: &str| {
        let dir = tmp();
        let pts = write(
            dir.path(),
            "burrows.csv",
            &format!("{header}\n{}\n", rows.join("\n")),
        );
        assert!(pts.is_file());
        let out = dir.path().join(name);
        // Run beside the file, so that the report names it the same way.
        let o = bin()
            .current_dir(dir.path())
            .args(["audit", "burrows.csv", "--boundary"])
            .arg(&boundary)
            .args(["--sims", "99", "--quiet", "--out"])
            .arg(&out)
            .output()
            .unwrap();
        assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
        let mut report: serde_json::Value =
            serde_json::from_slice(&std::fs::read(out.join("report.json")).unwrap()).unwrap();
        let provenance = report.as_object_mut().unwrap().remove("provenance");
        assert!(provenance.is_some());
        let other: Vec<Vec<u8>> = ["verdict.csv", "sensitivity.svg", "simulation.svg"]
            .iter()
            .map(|f| std::fs::read(out.join(f)).unwrap())
            .collect();
        (serde_json::to_string(&report).unwrap(), other)
    };
    let (a, a_files) = run(&lines, "in-order");
    let (b, b_files) = run(&shuffled, "shuffled");
    assert_eq!(a, b);
    assert_eq!(a_files, b_files);
}

/// Issue 20: a negative number given to a numeric option reaches the
/// tool's own check (exit 2, the option named, what to do) instead of the
/// parser's "unexpected argument '-1'", for every command.
#[test]
fn negative_numbers_reach_the_tools_own_checks() {
    let dir = tmp();
    let meadow = repo().join("demo-data/meadow-burrows.csv");
    let hare = repo().join("demo-data/marsh-hare-track.csv");
    let (meadow, hare) = (meadow.to_str().unwrap(), hare.to_str().unwrap());
    let out = dir.path().join("out");
    let out = out.to_str().unwrap();
    let protocol = dir.path().join("p.json");
    let protocol = protocol.to_str().unwrap();
    let cases: &[(&[&str], &str)] = &[
        (
            &["audit", meadow, "--guard", "-1"],
            "--guard -1: the guard width must be a non-negative distance",
        ),
        (
            &["audit", meadow, "--alpha", "-0.05"],
            "--alpha -0.05: the significance level",
        ),
        (
            &["audit", meadow, "--area", "-100"],
            "--area -100: the area must be a positive number",
        ),
        (
            &["audit", meadow, "--concavity", "-2"],
            "--concavity -2: must be a positive number",
        ),
        (
            &["audit", meadow, "--buffers", "-3"],
            "`-3` is not a positive distance",
        ),
        (
            &["audit", meadow, "--sims", "-5"],
            "invalid value '-5' for '--sims <SIMS>': not a whole number of 0 or more",
        ),
        (
            &["audit", meadow, "--seed", "-1"],
            "invalid value '-1' for '--seed <SEED>'",
        ),
        (
            &["audit", meadow, "--scales-sims", "-1"],
            "invalid value '-1' for '--scales-sims <N>'",
        ),
        (
            &["scales", meadow, "--steps", "-1"],
            "invalid value '-1' for '--steps <STEPS>'",
        ),
        (
            &["scales", meadow, "--rmax", "-4"],
            "--rmax -4: the largest distance must be a positive number",
        ),
        (
            &["density", hare, "--cell", "-2"],
            "--cell: -2 is not a positive cell size",
        ),
        (
            &["density", hare, "--levels", "-5"],
            "--levels: -5 is outside (0, 100)",
        ),
        (
            &["density", hare, "--bandwidths", "-2"],
            "\"-2\" is not a bandwidth",
        ),
        (
            &["protocol", "new", "--guard", "-1", "--out", protocol],
            "guard -1 is not a non-negative distance",
        ),
        (
            &["protocol", "new", "--concavity", "-1", "--out", protocol],
            "concavity -1 is not positive",
        ),
        (
            &["protocol", "new", "--min-n", "-3", "--out", protocol],
            "invalid value '-3' for '--min-n <MIN_N>'",
        ),
        (
            &[
                "sites",
                "--protocol",
                protocol,
                "--sweep-sims",
                "-1",
                meadow,
            ],
            "invalid value '-1' for '--sweep-sims <SWEEP_SIMS>'",
        ),
    ];
    for (args, want) in cases {
        let mut cmd = bin();
        cmd.args(*args);
        if args[0] != "protocol" {
            cmd.args(["--out", out]);
        }
        let o = cmd.output().unwrap();
        let e = stderr(&o);
        assert_eq!(o.status.code(), Some(2), "{args:?}: {e}");
        assert!(!e.contains("unexpected argument"), "{args:?}: {e}");
        assert!(e.contains(want), "{args:?}: expected `{want}` in {e}");
        assert!(e.contains("what to do"), "{args:?}: {e}");
        assert!(!Path::new(out).exists() && !Path::new(protocol).exists());
    }
}

/// Issue 20, item 3: every command that reads points says first, on
/// stderr, how it read them and why; stdout stays the command's own (the
/// JSON of `recheck --json` still parses), and `density --quiet` prints
/// nothing but errors.
#[test]
fn every_command_says_how_it_read_the_points() {
    let dir = tmp();
    let meadow = repo().join("demo-data/meadow-burrows.csv");
    let meadow = meadow.to_str().unwrap();
    let plots = repo().join("demo-data/plots/plot-c.csv");
    let plots = plots.to_str().unwrap();
    let protocol = dir.path().join("p.json");
    let o = bin()
        .args(["protocol", "new", "--sims", "9", "--out"])
        .arg(&protocol)
        .output()
        .unwrap();
    assert!(o.status.success(), "{}", stderr(&o));
    let out = |name: &str| dir.path().join(name).display().to_string();
    let projected = "as projected coordinates in m (the CSV columns are named x,y)";
    let runs: Vec<Vec<String>> = vec![
        vec![
            "audit".into(),
            meadow.into(),
            "--sims".into(),
            "9".into(),
            "--out".into(),
            out("a"),
        ],
        vec![
            "scales".into(),
            meadow.into(),
            "--sims".into(),
            "9".into(),
            "--out".into(),
            out("s"),
        ],
        vec![
            "density".into(),
            meadow.into(),
            "--kernels".into(),
            "gaussian".into(),
            "--bandwidths".into(),
            "scott".into(),
            "--out".into(),
            out("d"),
        ],
        vec![
            "recheck".into(),
            "--n".into(),
            "143".into(),
            "--ratio".into(),
            "0.9".into(),
            "--points".into(),
            meadow.into(),
            "--json".into(),
        ],
        vec![
            "sites".into(),
            "--protocol".into(),
            protocol.display().to_string(),
            plots.into(),
            "--sweep-sims".into(),
            "0".into(),
            "--out".into(),
            out("t"),
        ],
    ];
    for args in &runs {
        let o = bin().args(args).output().unwrap();
        let e = stderr(&o);
        assert!(o.status.success(), "{args:?}: {e}");
        let first = e.lines().next().unwrap_or_default();
        assert!(
            first.starts_with("patternproof: reading ") && first.ends_with(projected),
            "{args:?}: first line {first:?}"
        );
        if args[0] == "recheck" {
            let json: serde_json::Value = serde_json::from_slice(&o.stdout).unwrap();
            assert_eq!(json["schema"], "patternproof.recheck/2");
        }
    }
    // `-q` means what it means in every command (issue 22): no progress
    // bar and no forecast. A misreading is never silent, so the reading
    // line stays, and density, which shows neither, prints what it prints
    // without `-q`.
    let density = |quiet: bool, folder: &str| {
        let mut args = vec![
            "density",
            meadow,
            "--kernels",
            "gaussian",
            "--bandwidths",
            "scott",
        ];
        if quiet {
            args.push("--quiet");
        }
        let o = bin()
            .args(&args)
            .arg("--out")
            .arg(out(folder))
            .output()
            .unwrap();
        assert!(o.status.success(), "{}", stderr(&o));
        (stdout(&o).replace(&out(folder), "OUT"), stderr(&o))
    };
    let (quiet_out, quiet_err) = density(true, "q");
    let (loud_out, loud_err) = density(false, "l");
    assert_eq!(quiet_out, loud_out);
    assert_eq!(quiet_err, loud_err);
    assert!(
        quiet_err.starts_with("patternproof: reading "),
        "{quiet_err}"
    );
    assert_eq!(
        quiet_out.lines().last(),
        Some(
            "wrote density.json, isopleths.geojson, reference.tif, surfaces.svg, areas.svg, index.html to OUT"
        ),
        "{quiet_out}"
    );
}

/// Issue 20: `--sims 1000000000` used to run for ever, its kept results
/// growing. Now the memory it needs is estimated before anything runs, and
/// a run beyond the machine stops with exit 2, the estimate, the memory
/// available and the largest `--sims` that fits (no timing involved).
#[test]
fn a_billion_simulations_are_refused_up_front() {
    let dir = tmp();
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
