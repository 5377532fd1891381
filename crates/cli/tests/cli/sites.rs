//! End-to-end: `protocol new|show` and `sites` on the invented demo plots.

use crate::util::{bin, repo_arg, run, stderr, stdout, tmp};
use serde_json::Value;
use std::path::{Path, PathBuf};
use std::process::Output;

fn plots() -> Vec<String> {
    ["a", "b", "c", "d", "e", "f"]
        .iter()
        .map(|k| repo_arg(&format!("demo-data/plots/plot-{k}.csv")))
        .collect()
}

fn boundaries() -> String {
    repo_arg("demo-data/plots-boundaries.geojson")
}

fn new_protocol(dir: &Path, extra: &[&str]) -> PathBuf {
    std::fs::create_dir_all(dir).unwrap();
    let p = dir.join("protocol.json");
    let mut args = vec!["protocol", "new", "--out", p.to_str().unwrap()];
    args.extend_from_slice(extra);
    let o = run(&args);
    assert!(o.status.success(), "{}", stderr(&o));
    p
}

/// `sites` on the demo plots. Their survey grid starts at the first plot's
/// corner, so plot-a and plot-b hold only numbers within the lon/lat
/// ranges: `--coords projected` says they are metres.
fn sites(protocol: &Path, out: &Path, extra: &[&str]) -> Output {
    let mut args: Vec<String> = vec![
        "sites".into(),
        "--protocol".into(),
        protocol.display().to_string(),
        "--coords".into(),
        "projected".into(),
    ];
    args.extend(extra.iter().map(|s| s.to_string()));
    args.extend(["--out".into(), out.display().to_string()]);
    bin().args(&args).output().expect("binary runs")
}

/// `show` verifies the hash; a hand edit is reported as a change (exit 2),
/// and `sites` refuses the edited protocol without writing anything.
#[test]
fn protocol_show_detects_an_edit() {
    let dir = tmp();
    let p = new_protocol(dir.path(), &["--window", "hull+1nn", "--sims", "19"]);
    let o = run(&["protocol", "show", p.to_str().unwrap()]);
    assert!(o.status.success());
    assert!(stdout(&o).contains("intact"));

    // The same choices give the same hash in a second file.
    let q = dir.path().join("again.json");
    let o = run(&[
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
    let o = run(&["protocol", "new", "--out", p.to_str().unwrap()]);
    assert_eq!(o.status.code(), Some(2));

    let text = std::fs::read_to_string(&p).unwrap();
    std::fs::write(&p, text.replace("\"sims\": 19", "\"sims\": 18")).unwrap();
    let o = run(&["protocol", "show", p.to_str().unwrap()]);
    assert_eq!(o.status.code(), Some(2));
    let e = stderr(&o);
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
    assert!(stdout(&o).contains("no site can be significant"));
}

/// The demo plots under a boundary protocol: the two plots built to be
/// window-sensitive are flagged, the three robust ones are not, the small
/// plot is listed with its reason, and every output carries the hash.
#[test]
fn demo_plots_flag_the_window_sensitive_ones() {
    let dir = tmp();
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
    assert!(o.status.success(), "{}", stderr(&o));
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
    // sites.svg and each tested site's three pictures, legends off the data.
    assert_eq!(crate::pictures::check_folder(&out), 1 + 5 * 3);
    // The closing line of every folder-writing command: the files at the
    // top, in the order they were made, and the folder of site folders.
    let printed = stdout(&o);
    assert_eq!(
        printed.lines().last(),
        Some(
            format!(
                "wrote sites.json, sites.csv, sites.md, sites.svg, index.html, protocol.json, site/*/ to {}",
                out.display()
            )
            .as_str()
        ),
        "{printed}"
    );
    assert!(
        !out.join("site/plot-f").exists(),
        "no sweep for a site too small to test"
    );
}

/// One file with a site column gives the same rows as one file per site.
#[test]
fn site_field_matches_one_file_per_site() {
    let dir = tmp();
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
        assert!(o.status.success(), "{}", stderr(&o));
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
    let dir = tmp();
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
    assert!(o.status.success(), "{}", stderr(&o));
    let html = std::fs::read_to_string(out.join("index.html")).unwrap();
    assert!(!html.contains("<script"));
    assert!(html.contains("&lt;script&gt;x&lt;/script&gt;"));
    // Safe folder name, with a hash of the full name (docs/sites-schema.md).
    assert!(
        out.join("site/_script_x_script_~4cd698ac54/report.json")
            .exists()
    );
    // Issue 20: the Markdown files escape it too.
    let md = std::fs::read_to_string(out.join("sites.md")).unwrap();
    assert!(!md.contains("<script"), "{md}");
    assert!(md.contains("| &lt;script&gt;x&lt;/script&gt; |"), "{md}");
    let verdict =
        std::fs::read_to_string(out.join("site/_script_x_script_~4cd698ac54/verdict.md")).unwrap();
    assert!(!verdict.contains("<script"), "{verdict}");
    assert!(
        verdict.contains("(site &lt;script&gt;x&lt;/script&gt;)"),
        "{verdict}"
    );
}

/// Issue 20: a 300-character site name runs through: the folder name is
/// cut and hashed, the full name stays in the outputs.
#[test]
fn a_very_long_site_name_gets_a_short_folder() {
    let dir = tmp();
    let p = new_protocol(
        dir.path(),
        &["--window", "hull", "--edge", "none", "--sims", "9"],
    );
    let long = format!("{}-plot", "north meadow ".repeat(23));
    assert!(long.len() >= 300);
    let mut text = String::from("site,x,y\n");
    for (k, f) in plots().iter().enumerate().take(2) {
        let name = if k == 0 { long.as_str() } else { "plot-b" };
        for line in std::fs::read_to_string(f).unwrap().lines().skip(1) {
            let parts: Vec<&str> = line.split(',').collect();
            text.push_str(&format!("{name},{},{}\n", parts[1], parts[2]));
        }
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
    assert!(o.status.success(), "{}", stderr(&o));
    let mut folders: Vec<String> = std::fs::read_dir(out.join("site"))
        .unwrap()
        .map(|e| e.unwrap().file_name().to_string_lossy().into_owned())
        .collect();
    folders.sort();
    assert_eq!(folders.len(), 2);
    assert_eq!(folders[1], "plot-b");
    assert!(
        folders[0].starts_with("north_meadow_north_meadow_") && folders[0].len() == 71,
        "{folders:?}"
    );
    let doc: Value =
        serde_json::from_str(&std::fs::read_to_string(out.join("sites.json")).unwrap()).unwrap();
    assert_eq!(doc["sites"][0]["site"], long.as_str());
    let report: Value = serde_json::from_str(
        &std::fs::read_to_string(out.join("site").join(&folders[0]).join("report.json")).unwrap(),
    )
    .unwrap();
    assert!(
        report["input"]["points_file"]
            .as_str()
            .unwrap()
            .ends_with(&format!("(site {long})"))
    );
}

/// A boundary protocol with no `--boundaries`, or with boundaries whose
/// names match no site, cannot test a single site: exit 2 with a hint and
/// no output folder, instead of "0 site(s) tested" and exit 0.
#[test]
fn boundary_protocol_without_matching_boundaries_is_refused() {
    let dir = tmp();
    let p = new_protocol(dir.path(), &["--window", "boundary", "--sims", "19"]);
    let mut args = plots();
    args.truncate(3);
    let refs: Vec<&str> = args.iter().map(String::as_str).collect();
    let out = dir.path().join("none");
    let o = sites(&p, &out, &refs);
    assert_eq!(o.status.code(), Some(2));
    let e = stderr(&o);
    assert!(
        e.contains("no --boundaries file") && e.contains("what to do"),
        "{e}"
    );
    assert!(!out.exists());

    let mut args = plots();
    args.truncate(3);
    args.extend([
        "--boundaries".into(),
        boundaries(),
        "--boundary-field".into(),
        "nonexistent_field".into(),
    ]);
    let refs: Vec<&str> = args.iter().map(String::as_str).collect();
    let out = dir.path().join("unmatched");
    let o = sites(&p, &out, &refs);
    assert_eq!(o.status.code(), Some(2));
    let e = stderr(&o);
    assert!(
        e.contains("--boundary-field") && e.contains("what to do"),
        "{e}"
    );
    assert!(!out.exists());
}

/// A protocol file edited to a value `protocol new` refuses (no
/// simulations under the simulation edge handling), with its hash
/// recomputed so that it looks intact, is still refused on every read.
#[test]
fn protocol_content_is_validated_on_read() {
    let dir = tmp();
    let p = new_protocol(dir.path(), &["--edge", "none", "--sims", "0"]);
    let text = std::fs::read_to_string(&p).unwrap();
    let mut v: Value = serde_json::from_str(&text).unwrap();
    let m = v.as_object_mut().unwrap();
    m.remove("sha256");
    m.insert("edge".into(), Value::String("simulation".into()));
    // The canonical form is compact JSON in schema order (pinned by the
    // protocol crate's own test against Python's hashlib).
    let canonical = serde_json::to_vec(&v).unwrap();
    let hash: String = sha2_hex(&canonical);
    v.as_object_mut()
        .unwrap()
        .insert("sha256".into(), Value::String(hash));
    let edited = dir.path().join("edited.json");
    std::fs::write(&edited, serde_json::to_string_pretty(&v).unwrap()).unwrap();
    let o = run(&["protocol", "show", edited.to_str().unwrap()]);
    assert_eq!(o.status.code(), Some(2));
    assert!(stderr(&o).contains("needs sims above 0"));
    let mut args = plots();
    args.truncate(2);
    let refs: Vec<&str> = args.iter().map(String::as_str).collect();
    let out = dir.path().join("run");
    let o = sites(&edited, &out, &refs);
    assert_eq!(o.status.code(), Some(2));
    assert!(stderr(&o).contains("needs sims above 0"));
    assert!(!out.exists());
}

fn sha2_hex(bytes: &[u8]) -> String {
    use sha2::Digest;
    sha2::Sha256::digest(bytes)
        .iter()
        .map(|b| format!("{b:02x}"))
        .collect()
}
/// Issue 20: without `--coords`, the demo plots whose numbers all fit the
/// lon/lat ranges stop the run with exit 2, naming the file, saying what
/// the numbers look like and which flag answers; no folder is written.
#[test]
fn degree_like_plots_ask_how_to_read_them() {
    let dir = tmp();
    let p = new_protocol(dir.path(), &["--sims", "9"]);
    let out = dir.path().join("run");
    let mut args = vec![
        "sites".to_string(),
        "--protocol".into(),
        p.display().to_string(),
    ];
    args.extend(plots());
    args.extend(["--out".into(), out.display().to_string()]);
    let o = bin().args(&args).output().unwrap();
    let e = stderr(&o);
    assert_eq!(o.status.code(), Some(2), "{e}");
    for want in [
        "plot-a.csv",
        "the CSV columns are named x,y",
        "every x lies within −180..180 and every y within −90..90",
        "--coords lonlat",
        "--coords projected",
    ] {
        assert!(e.contains(want), "expected `{want}` in {e}");
    }
    assert!(!out.exists());
}

/// Issue 20: `sites --sweep-sims 1000000000` used to run silently for
/// ever. Every site's sweep keeps its simulated means until the folders
/// are written, so the memory is estimated first, and a run beyond the
/// machine stops with exit 2, the estimate and the largest value that
/// fits, before any site runs.
#[test]
fn a_billion_sweep_simulations_are_refused_up_front() {
    let dir = tmp();
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
    let e = stderr(&o);
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

/// Issue 20: a protocol saved with a byte-order mark still reads intact;
/// one with a key written twice is refused with the line, even when the
/// last value (the one a JSON reader keeps) leaves the hash unchanged.
#[test]
fn protocol_with_a_bom_reads_and_a_repeated_key_is_refused() {
    let dir = tmp();
    let p = new_protocol(dir.path(), &["--window", "hull", "--sims", "19"]);
    let text = std::fs::read_to_string(&p).unwrap();
    std::fs::write(&p, format!("\u{feff}{text}")).unwrap();
    let o = run(&["protocol", "show", p.to_str().unwrap()]);
    assert!(o.status.success(), "{}", stderr(&o));
    assert!(stdout(&o).contains("intact"));

    let twice = text.replacen("\"alpha\": 0.05", "\"alpha\": 0.5,\n  \"alpha\": 0.05", 1);
    assert_ne!(twice, text);
    std::fs::write(&p, twice).unwrap();
    let o = run(&["protocol", "show", p.to_str().unwrap()]);
    assert_eq!(o.status.code(), Some(2));
    let e = stderr(&o);
    assert!(
        e.contains("line 8, column 9: the key `alpha` appears twice") && e.contains("what to do"),
        "{e}"
    );
}

/// Issue 20: `sites` prints each input's warnings in the terminal, naming
/// the file, as `audit` does (they went only into each site's
/// `verdict.md`): here the demo plot-c written twice, so each of its
/// points repeats an earlier one.
#[test]
fn sites_prints_the_warnings_of_each_input() {
    let dir = tmp();
    let p = new_protocol(dir.path(), &["--window", "hull", "--sims", "19"]);
    let text = std::fs::read_to_string(&plots()[2]).unwrap();
    let mut lines = text.lines();
    let header = lines.next().unwrap();
    let rows: Vec<&str> = lines.filter(|l| !l.trim().is_empty()).collect();
    let twice = dir.path().join("plot-c-twice.csv");
    std::fs::write(
        &twice,
        format!("{header}\n{}\n{}\n", rows.join("\n"), rows.join("\n")),
    )
    .unwrap();
    let a = plots()[0].clone();
    let out = dir.path().join("run");
    let o = sites(
        &p,
        &out,
        &[a.as_str(), twice.to_str().unwrap(), "--sweep-sims", "0"],
    );
    assert!(o.status.success(), "{}", stderr(&o));
    let e = stderr(&o);
    let want = format!(
        "patternproof: warning: {}: {} point(s) repeat an earlier point exactly",
        twice.display(),
        rows.len()
    );
    assert!(e.contains(&want), "{e}");
    assert_eq!(e.matches("patternproof: warning:").count(), 1, "{e}");
}
