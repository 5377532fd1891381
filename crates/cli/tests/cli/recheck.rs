//! End-to-end tests of `patternproof recheck`: the binary on the issue's
//! example, on figures printed from an audit of the (invented) demo
//! meadow, and on bad input.

use crate::util::{bin, repo_arg, stderr, stdout, tmp};
use approx::{assert_abs_diff_eq, assert_relative_eq};
use serde_json::Value;
use std::process::Output;

fn burrows() -> String {
    repo_arg("demo-data/meadow-burrows.csv")
}

fn boundary() -> String {
    repo_arg("demo-data/meadow-boundary.geojson")
}

fn recheck(args: &[&str]) -> Output {
    bin()
        .arg("recheck")
        .args(args)
        .output()
        .expect("binary runs")
}

fn json(args: &[&str]) -> Value {
    let mut a = args.to_vec();
    a.push("--json");
    let o = recheck(&a);
    assert_eq!(o.status.code(), Some(0), "stderr: {}", stderr(&o));
    serde_json::from_str(&stdout(&o)).unwrap()
}

/// The demo audit's uncorrected rows (sims 0), from its report.json.
fn audit_rows() -> Vec<Value> {
    let dir = tmp();
    let out = dir.path().join("report");
    let o = bin()
        .args(["audit", &burrows(), "--boundary", &boundary()])
        .args([
            "--sims",
            "0",
            "--edges",
            "none,donnelly",
            "--quiet",
            "--out",
        ])
        .arg(&out)
        .output()
        .unwrap();
    assert_eq!(o.status.code(), Some(0), "audit failed: {}", stderr(&o));
    let text = std::fs::read_to_string(out.join("report.json")).unwrap();
    let v: Value = serde_json::from_str(&text).unwrap();
    v["results"].as_array().unwrap().clone()
}

fn row<'a>(rows: &'a [Value], window: &str, edge: &str) -> &'a Value {
    rows.iter()
        .find(|r| r["window"] == window && r["edge"] == edge)
        .unwrap_or_else(|| panic!("no row {window} × {edge}"))
}

/// The figures of a row as a paper prints them: R 3 decimals, z 2, p 3.
fn printed(r: &Value) -> Vec<String> {
    let p = r["p"].as_f64().unwrap();
    vec![
        "--n".into(),
        r["n_used"].as_u64().unwrap().to_string(),
        "--ratio".into(),
        format!("{:.3}", r["ratio"].as_f64().unwrap()),
        "--z".into(),
        format!("{:.2}", r["z"].as_f64().unwrap()),
        "--p".into(),
        if p < 0.001 {
            "<0.001".into()
        } else {
            format!("{p:.3}")
        },
    ]
}

fn matches(v: &Value) -> Vec<(String, String)> {
    v["matches"]
        .as_array()
        .unwrap()
        .iter()
        .map(|m| {
            (
                m["window"].as_str().unwrap().to_string(),
                m["edge"].as_str().unwrap().to_string(),
            )
        })
        .collect()
}

/// The figures of a `bbox` audit are attributed to `bbox` with no edge
/// correction, not to the hull (whose R differs beyond rounding); those of
/// the hull to the hull. Expected values: the audit's own rows (the same
/// Clark & Evans 1954 formulas both ways).
#[test]
fn bbox_figures_are_attributed_to_bbox_not_hull() {
    let rows = audit_rows();
    let bbox = row(&rows, "bbox", "none");
    let hull = row(&rows, "hull", "none");
    let mut args: Vec<String> = printed(bbox);
    args.extend([
        "--points".into(),
        burrows(),
        "--boundary".into(),
        boundary(),
    ]);
    let a: Vec<&str> = args.iter().map(String::as_str).collect();
    let v = json(&a);
    assert_eq!(v["consistent"], true, "{}", v["verdict"]);
    let m = matches(&v);
    assert!(m.contains(&("bbox".into(), "none".into())), "{m:?}");
    assert!(!m.iter().any(|(w, _)| w == "hull"), "{m:?}");
    let hull_cmp = v["points"]["rows"]
        .as_array()
        .unwrap()
        .iter()
        .find(|r| r["window"] == "hull" && r["edge"] == "none")
        .unwrap();
    assert_eq!(hull_cmp["matches"], false);
    assert!(
        hull_cmp["mismatched"]
            .as_array()
            .unwrap()
            .iter()
            .any(|x| x == "R")
    );
    assert_abs_diff_eq!(
        hull_cmp["ratio"].as_f64().unwrap(),
        hull["ratio"].as_f64().unwrap(),
        epsilon = 1e-12
    );

    // The text names the match and contrasts the hull.
    let o = recheck(&a);
    let out = stdout(&o);
    assert!(
        out.contains("Matches `bbox` with no edge correction"),
        "{out}"
    );
    assert!(
        out.contains(&format!(
            "the hull gives R = {:.3}",
            hull["ratio"].as_f64().unwrap()
        )),
        "{out}"
    );
    assert!(out.contains("Verdict: consistent\n"), "{out}");

    // And the other way round.
    let mut args: Vec<String> = printed(hull);
    args.extend([
        "--points".into(),
        burrows(),
        "--boundary".into(),
        boundary(),
    ]);
    let a: Vec<&str> = args.iter().map(String::as_str).collect();
    let m = matches(&json(&a));
    assert!(m.contains(&("hull".into(), "none".into())), "{m:?}");
    assert!(!m.iter().any(|(w, _)| w == "bbox"), "{m:?}");
}

/// A Donnelly row of the audit is attributed to Donnelly's correction; the
/// figures are inconsistent as printed (the plain z does not follow from R
/// and n) and consistent only under it (Donnelly 1978), a plausible
/// reading because these points reproduce it.
#[test]
fn donnelly_figures_need_donnelly() {
    let rows = audit_rows();
    let d = row(&rows, "boundary", "donnelly");
    let mut args: Vec<String> = printed(d);
    args.extend([
        "--points".into(),
        burrows(),
        "--boundary".into(),
        boundary(),
    ]);
    let a: Vec<&str> = args.iter().map(String::as_str).collect();
    let v = json(&a);
    assert_eq!(v["consistent"], false);
    assert!(
        matches(&v).contains(&("boundary".into(), "donnelly".into())),
        "{:?}",
        matches(&v)
    );
    let verdict = v["verdict"].as_str().unwrap();
    assert!(
        verdict.starts_with(
            "inconsistent as printed; consistent only if Donnelly's edge correction was used"
        ),
        "{verdict}"
    );
    let readings = v["consistent_if"].as_array().unwrap();
    let d = readings
        .iter()
        .find(|r| r["reading"] == "donnelly")
        .expect("a Donnelly reading");
    assert_eq!(d["plausible"], true);
    assert!(d["condition"].as_str().unwrap().contains("`boundary`"));
    let z = v["checks"]
        .as_array()
        .unwrap()
        .iter()
        .find(|c| c["name"] == "z from R and n")
        .unwrap();
    assert_eq!(z["ok"], false);
}

/// No window reproduces figures that are not from these points; the
/// nearest row and the area R would need are named. A = n·(2D/R)²
/// (Clark & Evans 1954) with the demo's D and n.
#[test]
fn foreign_figures_name_the_nearest_window_and_the_area_needed() {
    let v = json(&[
        "--n",
        "143",
        "--ratio",
        "0.70",
        "--z",
        "-6.86",
        "--points",
        &burrows(),
        "--boundary",
        &boundary(),
    ]);
    assert_eq!(v["consistent"], false, "{}", v["verdict"]);
    assert!(v["matches"].as_array().unwrap().is_empty());
    let nearest = v["points"]["nearest"]["detail"].as_str().unwrap();
    assert!(nearest.contains("needs an area of"), "{nearest}");
    let rows = v["points"]["rows"].as_array().unwrap();
    let bbox = rows
        .iter()
        .find(|r| r["window"] == "bbox" && r["edge"] == "none")
        .unwrap();
    let need = &bbox["area_needed"];
    let d = bbox["mean_nn"].as_f64().unwrap();
    let want = |r: f64| 143.0 * (2.0 * d / r).powi(2);
    // R as narrowed by R and z together: z = −6.86 ± 0.005 pins R to
    // 1 + z/(sqrt(143)·0.5/0.26136), inside R = 0.70's rounding range.
    let r = &v["implied"]["ratio"];
    let (r_lo, r_hi) = (r["low"].as_f64().unwrap(), r["high"].as_f64().unwrap());
    assert!(
        r_lo >= 0.695 && r_hi <= 0.705 && r_hi - r_lo < 0.001,
        "{r_lo}–{r_hi}"
    );
    assert_relative_eq!(
        need["low"].as_f64().unwrap(),
        want(r_hi),
        max_relative = 1e-6
    );
    assert_relative_eq!(
        need["high"].as_f64().unwrap(),
        want(r_lo),
        max_relative = 1e-6
    );
}

/// The issue's example "R = 0.71, z = −4.9, p < 0.001, n = 64": z from R
/// is (0.71 − 1)·8·1.91306 = −4.44 (Clark & Evans 1954), −4.51 to −4.36
/// over R's rounding range, so z = −4.9 does not follow; p < 0.001 fits
/// both tails (scipy: 2·norm.sf(4.9) = 9.6e-7).
#[test]
fn issue_example() {
    let o = recheck(&[
        "--n",
        "64",
        "--ratio",
        "0.71",
        "--z",
        "−4.9",
        "--p",
        "p < 0.001",
    ]);
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    let out = stdout(&o);
    assert!(out.contains("[-4.515, -4.362]"), "{out}");
    assert!(out.contains("not ok"), "{out}");
    assert!(
        out.contains("Verdict: inconsistent: z = -4.9 does not follow from R = 0.71 and n = 64"),
        "{out}"
    );
    assert!(out.contains("n between 74 and 82"), "{out}");
    let v = json(&[
        "--n", "64", "--ratio", "0.71", "--z", "−4.9", "--p", "<0.001",
    ]);
    assert_eq!(v["consistent"], false);
    assert_eq!(v["p_tail"], "either");
    assert!(v["implied_area"].is_null());
    assert!(v["matches"].as_array().unwrap().is_empty());
    let checks = v["checks"].as_array().unwrap();
    let z = checks
        .iter()
        .find(|c| c["name"] == "z from R and n")
        .unwrap();
    assert_eq!(z["ok"], false);
    assert!(z["detail"].is_string());
    let p = checks.iter().find(|c| c["name"] == "p from z").unwrap();
    assert_eq!(p["ok"], true);
    // The reported text is kept as typed.
    assert_eq!(v["reported"]["figures"][1]["text"], "−4.9");
}

/// Hand computation (Clark & Evans 1954): n = 64, D = 4.50, R = 0.720 give
/// A = 64·(9/0.72)² = 10 000, within [9 951, 10 049] over the rounding.
#[test]
fn implied_area_from_d_and_r() {
    let v = json(&[
        "--n",
        "64",
        "--ratio",
        "0.720",
        "--mean-nn",
        "4.50",
        "--z",
        "-4.29",
    ]);
    assert_eq!(v["consistent"], true, "{}", v["verdict"]);
    let a = &v["implied_area"];
    let (lo, hi) = (a["low"].as_f64().unwrap(), a["high"].as_f64().unwrap());
    assert!(
        lo < 10_000.0 && hi > 10_000.0 && lo > 9_900.0 && hi < 10_100.0,
        "{lo}–{hi}"
    );
    // With --area that disagrees, the area check fails.
    let v = json(&[
        "--n",
        "64",
        "--ratio",
        "0.720",
        "--mean-nn",
        "4.50",
        "--area",
        "12000",
    ]);
    assert_eq!(v["consistent"], false);
    let c = v["checks"]
        .as_array()
        .unwrap()
        .iter()
        .find(|c| c["name"] == "A from D and R")
        .unwrap();
    assert_eq!(c["ok"], false);
}

/// Only n and one figure: nothing to compare, `consistent` is null.
#[test]
fn nothing_to_check_is_null() {
    let v = json(&["--n", "64", "--ratio", "0.71"]);
    assert!(v["consistent"].is_null(), "{}", v["verdict"]);
    assert!(v["verdict"].as_str().unwrap().starts_with("cannot tell"));
    // The implied z is still reported: (0.71 − 1)·15.3045 ± 0.077.
    let z = &v["implied"]["z"];
    assert_abs_diff_eq!(z["low"].as_f64().unwrap(), -4.515, epsilon = 1e-3);
}

fn assert_refused(args: &[&str], must_mention: &[&str]) {
    let o = recheck(args);
    let e = stderr(&o);
    assert_eq!(o.status.code(), Some(2), "{args:?}: {e}");
    assert!(stdout(&o).is_empty(), "{args:?} printed a result");
    for m in must_mention {
        assert!(e.contains(m), "{args:?}: expected `{m}` in: {e}");
    }
}

/// Impossible values stop with exit code 2 and say what to do.
#[test]
fn bad_input_exits_2() {
    let cases: &[(&[&str], &[&str])] = &[
        (
            &["--n", "64", "--ratio", "-0.3"],
            &["--ratio -0.3", "the ratio must be positive", "what to do"],
        ),
        (
            &["--n", "64", "--ratio", "0"],
            &["--ratio 0", "positive", "what to do"],
        ),
        (
            &["--n", "64", "--p", "1.5"],
            &["--p 1.5", "between 0 and 1", "what to do"],
        ),
        (
            &["--n", "64", "--p", "-0.01"],
            &["--p -0.01", "between 0 and 1"],
        ),
        (
            &["--n", "1", "--ratio", "0.7"],
            &["--n 1", "at least 2", "what to do"],
        ),
        (
            &["--n", "64.5", "--ratio", "0.7"],
            &["--n 64.5", "whole number"],
        ),
        (
            &["--n", "64", "--area", "0", "--ratio", "0.7"],
            &["--area 0", "positive"],
        ),
        (
            &["--n", "64", "--area", "-100", "--ratio", "0.7"],
            &["--area -100", "positive"],
        ),
        (
            &["--n", "64", "--mean-nn", "-2", "--ratio", "0.7"],
            &["--mean-nn -2", "positive"],
        ),
        (
            &["--n", "64", "--z", "abc"],
            &["--z abc", "not a number", "what to do"],
        ),
        (&["--n", "64"], &["nothing to recheck", "what to do"]),
        (
            &[
                "--n",
                "64",
                "--ratio",
                "0.7",
                "--points",
                "/nonexistent/points.csv",
            ],
            &["points.csv"],
        ),
    ];
    for (args, mention) in cases {
        assert_refused(args, mention);
    }
    for (args, _) in cases.iter().take(11) {
        let e = stderr(&recheck(args));
        assert!(e.starts_with("patternproof: error: "), "{e}");
        assert!(e.contains("what to do"), "{e}");
    }
    // A boundary without points is a usage error (clap, also exit 2).
    assert_refused(
        &["--n", "64", "--ratio", "0.7", "--boundary", &boundary()],
        &["--points"],
    );
}

/// The figures of the trust report: R = 0.34 with n = 53 gives z near −9.2,
/// not the printed −7.57. A guard zone with 36 focal points, or Donnelly's
/// correction in a window 19–60 × sqrt(area) round, could reproduce z, but
/// neither makes the figures consistent: `consistent` is false, each
/// reading is rated (the strip implausible, the guard zone plausible by the
/// n·(1 − 2/sqrt(n))² rule: 53·(1 − 2/7.28)² = 27.9 ≤ 36), and the line says
/// "inconsistent as printed; consistent only if …".
#[test]
fn a_free_edge_correction_does_not_make_figures_consistent() {
    let v = json(&[
        "--n", "53", "--ratio", "0.34", "--z", "-7.57", "--p", "<0.001",
    ]);
    assert_eq!(v["schema"], "patternproof.recheck/2");
    assert_eq!(v["consistent"], false);
    let verdict = v["verdict"].as_str().unwrap();
    assert!(
        verdict.starts_with("inconsistent as printed; consistent only if a guard zone was used, leaving 36 of the 53 points focal (plausible), or Donnelly"),
        "{verdict}"
    );
    assert!(verdict.ends_with("(implausible)"), "{verdict}");
    let readings = v["consistent_if"].as_array().unwrap();
    assert_eq!(readings.len(), 2);
    let donnelly = readings
        .iter()
        .find(|r| r["reading"] == "donnelly")
        .unwrap();
    assert_eq!(donnelly["plausible"], false);
    assert!(
        donnelly["ask"]
            .as_str()
            .unwrap()
            .contains("area and perimeter")
    );
    let guard = readings
        .iter()
        .find(|r| r["reading"] == "guard-zone")
        .unwrap();
    assert_eq!(guard["plausible"], true);
    assert!(guard["ask"].as_str().unwrap().contains("at most 36"));

    // The plain reading fits: consistent, with nothing to rate.
    // z = (0.90 − 1)·sqrt(100)·0.5/0.26136 = −1.913 (Clark & Evans 1954).
    let v = json(&["--n", "100", "--ratio", "0.90", "--z", "-1.91"]);
    assert_eq!(v["consistent"], true);
    assert_eq!(v["verdict"], "consistent");
    assert!(v["consistent_if"].as_array().unwrap().is_empty());

    // Far too small a z for an ordinary guard: R = 0.5 with n = 400 gives
    // z = −19.1; z = −9.6 needs about a quarter of the points focal, far
    // below the floor 400·(1 − 2/20)² = 324.
    let v = json(&["--n", "400", "--ratio", "0.50", "--z", "-9.6"]);
    assert_eq!(v["consistent"], false);
    let readings = v["consistent_if"].as_array().unwrap();
    assert_eq!(readings.len(), 1);
    assert_eq!(readings[0]["reading"], "guard-zone");
    assert_eq!(readings[0]["plausible"], false);
    assert!(
        v["verdict"]
            .as_str()
            .unwrap()
            .ends_with("of the 400 points focal (implausible)")
    );
}

/// Issue 20: with fewer than 10 points the sweep has no closed-form row,
/// and a boundary would not change that: the message says so and points to
/// the figures alone, instead of asking for `--boundary` (and for "the
/// simulation row", which recheck does not run).
#[test]
fn too_few_points_say_what_helps() {
    let dir = tmp();
    let pts = dir.path().join("six.csv");
    std::fs::write(
        &pts,
        "x,y\n512001,5600001\n512004,5600002\n512002,5600007\n512008,5600003\n512005,5600005\n512009,5600009\n",
    )
    .expect("write");
    let o = recheck(&[
        "--n",
        "6",
        "--ratio",
        "0.9",
        "--points",
        pts.to_str().expect("path"),
    ]);
    assert_eq!(o.status.code(), Some(2));
    let e = stderr(&o);
    assert!(
        e.contains("only 6 point(s): the sweep gives no closed-form row below 10 points"),
        "{e}"
    );
    assert!(e.contains("what to do: leave out --points"), "{e}");
    assert!(
        !e.contains("--boundary") && !e.contains("simulation row"),
        "{e}"
    );
}
