//! End-to-end: `protocol new|show` and `sites` on the invented demo plots.

#![allow(clippy::unwrap_used, missing_docs)]

use serde_json::Value;
use std::path::{Path, PathBuf};
use std::process::{Command, Output};

fn bin(args: &[&str]) -> Output {
    Command::new(env!("CARGO_BIN_EXE_patternproof"))
        .args(args)
        .output()
        .expect("binary runs")
}

fn repo() -> PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR")).join("../..")
}

fn plots() -> Vec<String> {
    ["a", "b", "c", "d", "e", "f"]
        .iter()
        .map(|k| {
            repo()
                .join(format!("demo-data/plots/plot-{k}.csv"))
                .display()
                .to_string()
        })
        .collect()
}

fn boundaries() -> String {
    repo()
        .join("demo-data/plots-boundaries.geojson")
        .display()
        .to_string()
}

fn new_protocol(dir: &Path, extra: &[&str]) -> PathBuf {
    std::fs::create_dir_all(dir).unwrap();
    let p = dir.join("protocol.json");
    let mut args = vec!["protocol", "new", "--out", p.to_str().unwrap()];
    args.extend_from_slice(extra);
    let o = bin(&args);
    assert!(o.status.success(), "{}", String::from_utf8_lossy(&o.stderr));
    p
}

fn sites(protocol: &Path, out: &Path, extra: &[&str]) -> Output {
    let mut args: Vec<String> = vec![
        "sites".into(),
        "--protocol".into(),
        protocol.display().to_string(),
    ];
    args.extend(extra.iter().map(|s| s.to_string()));
    args.extend(["--out".into(), out.display().to_string()]);
    Command::new(env!("CARGO_BIN_EXE_patternproof"))
        .args(&args)
        .output()
        .expect("binary runs")
}

/// `show` verifies the hash; a hand edit is reported as a change (exit 2),
/// and `sites` refuses the edited protocol without writing anything.
#[test]
fn protocol_show_detects_an_edit() {
    let dir = tempfile::tempdir().unwrap();
    let p = new_protocol(dir.path(), &["--window", "hull+1nn", "--sims", "19"]);
    let o = bin(&["protocol", "show", p.to_str().unwrap()]);
    assert!(o.status.success());
    assert!(String::from_utf8_lossy(&o.stdout).contains("intact"));

    // The same choices give the same hash in a second file.
    let q = dir.path().join("again.json");
    let o = bin(&[
        "protocol",
        "new",
        "--window",
        "hull+1nn",
        "--sims",
        "19",
        "--out",
        q.to_str().unwrap(),
    ]);
    assert!(o.status.success());
    let hash = |f: &Path| {
        let v: Value = serde_json::from_str(&std::fs::read_to_string(f).unwrap()).unwrap();
        v["sha256"].as_str().unwrap().to_string()
    };
    assert_eq!(hash(&p), hash(&q));

    // Refuses to overwrite.
    let o = bin(&["protocol", "new", "--out", p.to_str().unwrap()]);
    assert_eq!(o.status.code(), Some(2));

    let text = std::fs::read_to_string(&p).unwrap();
    std::fs::write(&p, text.replace("\"sims\": 19", "\"sims\": 18")).unwrap();
    let o = bin(&["protocol", "show", p.to_str().unwrap()]);
    assert_eq!(o.status.code(), Some(2));
    let e = String::from_utf8_lossy(&o.stderr);
    assert!(e.contains("CHANGED") && e.contains("what to do"), "{e}");

    let out = dir.path().join("run");
    let mut args = plots();
    args.truncate(2);
    let refs: Vec<&str> = args.iter().map(String::as_str).collect();
    let o = sites(&p, &out, &refs);
    assert_eq!(o.status.code(), Some(2));
    assert!(!out.exists(), "no output for a changed protocol");

    // Too few simulations for Holm to reach α over five sites: said plainly.
    let few = new_protocol(
        &dir.path().join("few"),
        &["--window", "boundary", "--sims", "99"],
    );
    let mut args = plots();
    args.extend([
        "--boundaries".into(),
        boundaries(),
        "--sweep-sims".into(),
        "0".into(),
    ]);
    let refs: Vec<&str> = args.iter().map(String::as_str).collect();
    let o = sites(&few, &dir.path().join("few-run"), &refs);
    assert!(o.status.success());
    assert!(String::from_utf8_lossy(&o.stdout).contains("no site can be significant"));
}

/// The demo plots under a boundary protocol: the two plots built to be
/// window-sensitive are flagged, the three robust ones are not, the small
/// plot is listed with its reason, and every output carries the hash.
#[test]
fn demo_plots_flag_the_window_sensitive_ones() {
    let dir = tempfile::tempdir().unwrap();
    let p = new_protocol(dir.path(), &["--window", "boundary", "--sims", "499"]);
    let hash = {
        let v: Value = serde_json::from_str(&std::fs::read_to_string(&p).unwrap()).unwrap();
        v["sha256"].as_str().unwrap().to_string()
    };
    let out = dir.path().join("run");
    let mut args = plots();
    args.extend([
        "--boundaries".into(),
        boundaries(),
        "--sweep-sims".into(),
        "19".into(),
    ]);
    let refs: Vec<&str> = args.iter().map(String::as_str).collect();
    let o = sites(&p, &out, &refs);
    assert!(o.status.success(), "{}", String::from_utf8_lossy(&o.stderr));
    let doc: Value =
        serde_json::from_str(&std::fs::read_to_string(out.join("sites.json")).unwrap()).unwrap();
    assert_eq!(doc["schema"], "patternproof.sites/1");
    assert_eq!(doc["protocol_sha256"], hash.as_str());
    assert!(
        doc["notes"].as_array().unwrap().is_empty(),
        "499 simulations suffice for Holm over 5 sites"
    );
    let row = |name: &str| {
        doc["sites"]
            .as_array()
            .unwrap()
            .iter()
            .find(|s| s["site"] == name)
            .unwrap()
            .clone()
    };
    for name in ["plot-a", "plot-b"] {
        assert_eq!(row(name)["call"], "clustered", "{name}");
        assert_eq!(row(name)["window_sensitive"], false, "{name}");
    }
    assert_eq!(row("plot-c")["call"], "dispersed");
    assert_eq!(row("plot-c")["window_sensitive"], false);
    for name in ["plot-d", "plot-e"] {
        assert_eq!(row(name)["window_sensitive"], true, "{name}");
        assert!(!row(name)["flips"].as_array().unwrap().is_empty());
    }
    let f = row("plot-f");
    assert_eq!(f["status"], "not-tested");
    assert!(f["reason"].as_str().unwrap().contains("fewer than"));
    // Holm over the five tested sites: each adjusted p is at least the raw p.
    for s in doc["sites"].as_array().unwrap() {
        if let (Some(p), Some(pa)) = (s["p"].as_f64(), s["p_adjusted"].as_f64()) {
            assert!(pa >= p && pa <= 1.0);
        }
    }
    for f in [
        "sites.csv",
        "sites.md",
        "index.html",
        "site/plot-d/report.json",
        "site/plot-d/index.html",
    ] {
        let text = std::fs::read_to_string(out.join(f)).unwrap();
        assert!(text.contains(&hash), "{f} lacks the protocol hash");
    }
    assert!(out.join("sites.svg").exists());
    assert!(
        !out.join("site/plot-f").exists(),
        "no sweep for a site too small to test"
    );
}

/// One file with a site column gives the same rows as one file per site.
#[test]
fn site_field_matches_one_file_per_site() {
    let dir = tempfile::tempdir().unwrap();
    let p = new_protocol(
        dir.path(),
        &["--window", "hull", "--edge", "none", "--sims", "9"],
    );
    let mut combined = String::from("site,x,y\n");
    for (k, f) in plots().iter().enumerate().take(3) {
        let name = format!("plot-{}", ["a", "b", "c"][k]);
        for line in std::fs::read_to_string(f).unwrap().lines().skip(1) {
            let parts: Vec<&str> = line.split(',').collect();
            combined.push_str(&format!("{name},{},{}\n", parts[1], parts[2]));
        }
    }
    let file = dir.path().join("all.csv");
    std::fs::write(&file, combined).unwrap();
    let run = |args: Vec<String>, out: &Path| -> Value {
        let refs: Vec<&str> = args.iter().map(String::as_str).collect();
        let o = sites(&p, out, &refs);
        assert!(o.status.success(), "{}", String::from_utf8_lossy(&o.stderr));
        serde_json::from_str(&std::fs::read_to_string(out.join("sites.json")).unwrap()).unwrap()
    };
    let one = run(
        vec![
            file.display().to_string(),
            "--site-field".into(),
            "site".into(),
            "--sweep-sims".into(),
            "0".into(),
        ],
        &dir.path().join("one"),
    );
    let many = run(
        {
            let mut v: Vec<String> = plots().into_iter().take(3).collect();
            v.extend(["--sweep-sims".into(), "0".into()]);
            v
        },
        &dir.path().join("many"),
    );
    for k in 0..3 {
        for key in [
            "site",
            "n",
            "ratio",
            "z",
            "p",
            "p_adjusted",
            "call",
            "window_area",
        ] {
            assert_eq!(
                one["sites"][k][key], many["sites"][k][key],
                "site {k} {key}"
            );
        }
    }
}

/// A hostile site name is escaped in the run's page and gets a safe folder.
#[test]
fn hostile_site_name_is_escaped() {
    let dir = tempfile::tempdir().unwrap();
    let p = new_protocol(
        dir.path(),
        &["--window", "hull", "--edge", "none", "--sims", "9"],
    );
    let mut text = String::from("site,x,y\n");
    for line in std::fs::read_to_string(&plots()[0])
        .unwrap()
        .lines()
        .skip(1)
    {
        let parts: Vec<&str> = line.split(',').collect();
        text.push_str(&format!(
            "\"<script>x</script>\",{},{}\n",
            parts[1], parts[2]
        ));
    }
    let file = dir.path().join("all.csv");
    std::fs::write(&file, text).unwrap();
    let out = dir.path().join("run");
    let o = sites(
        &p,
        &out,
        &[
            file.to_str().unwrap(),
            "--site-field",
            "site",
            "--sweep-sims",
            "0",
        ],
    );
    assert!(o.status.success(), "{}", String::from_utf8_lossy(&o.stderr));
    let html = std::fs::read_to_string(out.join("index.html")).unwrap();
    assert!(!html.contains("<script"));
    assert!(html.contains("&lt;script&gt;x&lt;/script&gt;"));
    assert!(out.join("site/_script_x__script_/report.json").exists());
}

/// Issue 20: `sites --sweep-sims 1000000000` used to run silently for
/// ever. Every site's sweep keeps its simulated means until the folders
/// are written, so the memory is estimated first, and a run beyond the
/// machine stops with exit 2, the estimate and the largest value that
/// fits, before any site runs.
#[test]
fn a_billion_sweep_simulations_are_refused_up_front() {
    let dir = tempfile::tempdir().unwrap();
    let p = new_protocol(dir.path(), &["--window", "boundary", "--sims", "99"]);
    let out = dir.path().join("run");
    let mut args = plots();
    args.extend([
        "--boundaries".into(),
        boundaries(),
        "--sweep-sims".into(),
        "1000000000".into(),
    ]);
    let refs: Vec<&str> = args.iter().map(String::as_str).collect();
    let o = sites(&p, &out, &refs);
    let e = String::from_utf8_lossy(&o.stderr);
    assert_eq!(o.status.code(), Some(2), "{e}");
    for words in [
        "--sweep-sims 1000000000: the run needs about",
        "for 6 site(s)",
        "available",
        "use at most --sweep-sims ",
        "what to do",
    ] {
        assert!(e.contains(words), "`{words}` missing: {e}");
    }
    assert!(!out.exists(), "a folder was written");
}
