//! End-to-end tests of `patternproof scales` on the demo data: the report
//! folder, its JSON, determinism across thread counts, and refusals of
//! bad input with exit code 2.

use crate::util::{bin, repo, stderr, stdout, tmp};
use approx::{abs_diff_eq, assert_abs_diff_eq, assert_relative_eq, relative_eq};
use std::path::Path;
use std::process::Output;

fn scales(args: &[&str], out: &Path, threads: &str) -> Output {
    let root = repo();
    bin()
        .arg("scales")
        .arg(root.join("demo-data/meadow-burrows.csv"))
        .arg("--boundary")
        .arg(root.join("demo-data/meadow-boundary.geojson"))
        .args(args)
        .arg("--out")
        .arg(out)
        .arg("--quiet")
        .env("RAYON_NUM_THREADS", threads)
        .output()
        .expect("binary runs")
}

const SMALL: [&str; 10] = [
    "--sims",
    "19",
    "--steps",
    "8",
    "--buffers",
    "5",
    "--edges",
    "isotropic,border",
    "--rmax",
    "12",
];

#[test]
fn demo_run_writes_the_folder_and_the_verdict() {
    let dir = tmp();
    let out = dir.path().join("scales");
    let o = scales(&SMALL, &out, "2");
    let stdout = stdout(&o);
    assert!(o.status.success(), "{}", stderr(&o));
    assert!(stdout.contains("Verdict (isotropic correction"), "{stdout}");
    assert!(stdout.contains("personal data"), "{stdout}");
    for f in [
        "scales.json",
        "scales.csv",
        "scales.md",
        "scales.svg",
        "corrections.svg",
        "index.html",
    ] {
        assert!(out.join(f).is_file(), "{f} missing");
    }
    assert_eq!(
        stdout.lines().last(),
        Some(
            format!(
                "wrote scales.json, scales.csv, scales.md, scales.svg, corrections.svg, index.html to {}",
                out.display()
            )
            .as_str()
        )
    );
    // The page: the one layout, well-formed, self-contained, with the
    // SHA-256 of both inputs (sha2, recomputed here) and the command line.
    let page = std::fs::read_to_string(out.join("index.html")).unwrap();
    let doc = roxmltree::Document::parse_with_options(
        &page,
        roxmltree::ParsingOptions {
            allow_dtd: true,
            ..Default::default()
        },
    )
    .expect("index.html is well-formed XML");
    for tag in ["script", "img", "link", "iframe"] {
        assert!(
            !doc.descendants().any(|n| n.has_tag_name(tag)),
            "<{tag}> in index.html"
        );
    }
    for id in ["input", "scales", "corrections", "provenance"] {
        assert!(
            doc.descendants().any(|n| n.attribute("id") == Some(id)),
            "section {id}"
        );
    }
    let root = repo();
    for file in [
        "demo-data/meadow-burrows.csv",
        "demo-data/meadow-boundary.geojson",
    ] {
        let path = root.join(file);
        let digest = crate::util::sha256_hex(&path);
        assert!(
            page.contains(&format!(
                "<tr><td><code>{}</code></td><td><code>{digest}</code></td></tr>",
                path.display()
            )),
            "the SHA-256 of {file}"
        );
    }
    assert!(
        page.contains("<pre>patternproof scales "),
        "the command line"
    );
    assert!(page.contains(" · seed 1"), "the seed");
    let v: serde_json::Value =
        serde_json::from_slice(&std::fs::read(out.join("scales.json")).unwrap()).unwrap();
    assert_eq!(v["schema"], "patternproof.scales/2");
    let r = v["r"].as_array().unwrap();
    assert_eq!(r.len(), 8);
    assert_eq!(v["rmax"].as_f64(), Some(12.0));
    assert_abs_diff_eq!(r[7].as_f64().unwrap(), 12.0, epsilon = 1e-12);
    assert_abs_diff_eq!(r[0].as_f64().unwrap(), 1.5, epsilon = 1e-12);
    let ids: Vec<&str> = v["windows"]
        .as_array()
        .unwrap()
        .iter()
        .map(|w| w["id"].as_str().unwrap())
        .collect();
    assert_eq!(ids, ["bbox", "hull", "hull+5", "concave", "boundary"]);
    for w in v["windows"].as_array().unwrap() {
        assert_eq!(w["n"], 143, "every burrow lies inside every window");
        let t = &w["tests"][0];
        assert_eq!(t["correction"], "isotropic");
        let p = t["p"].as_f64().unwrap();
        // p is a rank p-value with 19 simulations: a multiple of 1/20.
        assert!(abs_diff_eq!(p * 20.0, (p * 20.0).round(), epsilon = 1e-9) && p > 0.0 && p <= 1.0);
        // K of the isotropic curve is L² π at every distance.
        let c = &w["curves"][0];
        assert_eq!(c["correction"], "isotropic");
        for k in 0..8 {
            let kk = c["k"][k].as_f64().unwrap();
            let l = c["l"][k].as_f64().unwrap();
            assert_relative_eq!(
                l * l * std::f64::consts::PI,
                kk,
                epsilon = 1e-9,
                max_relative = 1e-9
            );
        }
        assert_eq!(w["pairs"]["isotropic_capped"], 0);
    }
    // The burrows are clustered (demo data built that way): the verdict
    // names clustering, and the boundary window rejects CSR.
    let verdict = v["verdicts"][0]["sentence"].as_str().unwrap();
    assert!(verdict.starts_with("clustered"), "{verdict}");
    let boundary = &v["windows"][4]["tests"][0];
    assert_abs_diff_eq!(boundary["p"].as_f64().unwrap(), 0.05, epsilon = 1e-12);
}

/// `audit --scales` and `scales` with the same settings (simulations,
/// seed, r_max, steps: both at their defaults but the simulations, kept
/// small here) give the same K audit of the demo: the same windows, the
/// same departure bands and test values, the same verdict.
#[test]
fn audit_scales_and_scales_give_the_same_bands() {
    let dir = tmp();
    let root = repo();
    let alone = dir.path().join("alone");
    let o = bin()
        .arg("scales")
        .arg(root.join("demo-data/meadow-burrows.csv"))
        .arg("--boundary")
        .arg(root.join("demo-data/meadow-boundary.geojson"))
        .args(["--sims", "19", "--seed", "3", "--quiet", "--out"])
        .arg(&alone)
        .output()
        .unwrap();
    assert!(o.status.success(), "{}", stderr(&o));
    let joint = dir.path().join("joint");
    let o = bin()
        .arg("audit")
        .arg(root.join("demo-data/meadow-burrows.csv"))
        .arg("--boundary")
        .arg(root.join("demo-data/meadow-boundary.geojson"))
        .args([
            "--sims",
            "0",
            "--seed",
            "3",
            "--scales",
            "--scales-sims",
            "19",
            "--quiet",
            "--out",
        ])
        .arg(&joint)
        .output()
        .unwrap();
    assert!(o.status.success(), "{}", stderr(&o));
    let read = |dir: &Path| -> serde_json::Value {
        serde_json::from_slice(&std::fs::read(dir.join("scales.json")).unwrap()).unwrap()
    };
    let (a, j) = (read(&alone), read(&joint));
    assert_eq!(a["windows"].as_array().unwrap().len(), 7);
    for key in ["rmax", "r", "sims", "seed", "alpha", "verdicts"] {
        assert_eq!(a[key], j[key], "{key}");
    }
    let bands = |v: &serde_json::Value| -> Vec<(String, serde_json::Value, serde_json::Value)> {
        v["windows"]
            .as_array()
            .unwrap()
            .iter()
            .map(|w| {
                (
                    w["id"].as_str().unwrap().to_string(),
                    w["bands"].clone(),
                    w["tests"].clone(),
                )
            })
            .collect()
    };
    let (ba, bj) = (bands(&a), bands(&j));
    assert_eq!(ba, bj);
    // Real bands: the boundary window departs (the burrows are clustered).
    let boundary = ba.iter().find(|(id, _, _)| id == "boundary").unwrap();
    assert!(
        !boundary.1[0].as_array().unwrap().is_empty(),
        "{:?}",
        boundary.1
    );
    assert_eq!(
        boundary.1[0][0]["direction"], "clustered",
        "{:?}",
        boundary.1
    );
}

#[test]
fn same_bytes_for_one_and_two_threads() {
    let dir = tmp();
    let (a, b) = (dir.path().join("a"), dir.path().join("b"));
    let args = [
        "--sims",
        "9",
        "--steps",
        "5",
        "--buffers",
        "5",
        "--alpha",
        "0.1",
        "--rmax",
        "8",
    ];
    assert!(scales(&args, &a, "1").status.success());
    assert!(scales(&args, &b, "2").status.success());
    for f in ["scales.json", "scales.csv", "scales.svg"] {
        assert_eq!(
            std::fs::read(a.join(f)).unwrap(),
            std::fs::read(b.join(f)).unwrap(),
            "{f} differs"
        );
    }
}

#[test]
fn bad_input_exits_2_with_advice() {
    let dir = tmp();
    let cases: [(&[&str], &str); 6] = [
        (&["--rmax", "-3"], "--rmax"),
        (&["--steps", "0"], "--steps"),
        (&["--edges", "ripley"], "--edges"),
        (&["--test-edges", "none"], "--test-edges"),
        (&["--alpha", "1.5"], "--alpha"),
        (&["--buffers=-1"], "--buffers"),
    ];
    for (args, flag) in cases {
        let out = dir.path().join("never");
        let o = scales(args, &out, "1");
        let e = stderr(&o);
        assert_eq!(o.status.code(), Some(2), "{args:?}: {e}");
        assert!(
            e.contains(flag) && e.contains("what to do"),
            "{args:?}: {e}"
        );
        assert!(!out.exists(), "{args:?} wrote a folder");
    }
    // A missing point file: exit 2 naming the file.
    let out = dir.path().join("never");
    let o = bin()
        .args(["scales", "no-such-file.csv", "--quiet", "--out"])
        .arg(&out)
        .output()
        .unwrap();
    assert_eq!(o.status.code(), Some(2));
    assert!(stderr(&o).contains("no-such-file.csv"));
}

/// Issue 20: `scales --sims 1000000000` used to abort on a 24 GB
/// allocation. Both global tests need every simulated curve, so the run's
/// memory is estimated first, and one beyond the machine stops with exit
/// 2, the estimate and the largest `--sims` that fits.
#[test]
fn a_billion_simulations_are_refused_up_front() {
    let dir = tmp();
    let out = dir.path().join("never");
    let o = scales(&["--sims", "1000000000"], &out, "2");
    let e = stderr(&o);
    assert_eq!(o.status.code(), Some(2), "{e}");
    for words in [
        "--sims 1000000000: the run needs about",
        "TiB of memory",
        "1240 bytes per simulation for the L(r) − r curves",
        "available",
        "use at most --sims ",
        "what to do",
    ] {
        assert!(e.contains(words), "`{words}` missing: {e}");
    }
    assert!(!e.contains("panicked"), "{e}");
    assert!(!out.exists(), "a folder was written");
}

/// Too few simulations for α cannot show a departure; the run says so
/// and names the fewest that can (⌊α(N + 1)⌋ ≥ 1: 19 at α = 0.05, 99 at
/// α = 0.01), instead of a bare "no departure".
#[test]
fn too_few_simulations_for_alpha_are_named() {
    let dir = tmp();
    let mut args = SMALL.to_vec();
    args[1] = "5";
    let o = scales(&args, &dir.path().join("five"), "1");
    let printed = stdout(&o);
    assert!(o.status.success());
    assert!(
        printed.contains("5 simulations are too few for a test at α = 0.05")
            && printed.contains("1/6 = 0.167")
            && printed.contains("Use at least 19 (--sims 19)"),
        "{printed}"
    );
    let o = scales(&SMALL, &dir.path().join("enough"), "1");
    assert!(!stdout(&o).contains("too few"));
    args.extend(["--alpha", "0.01"]);
    args[1] = "98";
    let o = scales(&args, &dir.path().join("strict"), "1");
    assert!(stdout(&o).contains("Use at least 99 (--sims 99)"));
}

/// `audit --scales` runs the same K audit as `scales` with the audit's
/// seed and α: identical scales.json bytes, its files in the audit folder,
/// and a section of index.html with the verdict sentence and the picture.
#[test]
fn audit_with_scales_adds_the_same_k_audit() {
    let root = repo();
    let dir = tmp();
    let alone = dir.path().join("alone");
    let o = scales(
        &[
            "--sims", "19", "--seed", "7", "--rmax", "12", "--steps", "10",
        ],
        &alone,
        "2",
    );
    assert!(o.status.success(), "{}", stderr(&o));
    let joint = dir.path().join("joint");
    let o = bin()
        .arg("audit")
        .arg(root.join("demo-data/meadow-burrows.csv"))
        .arg("--boundary")
        .arg(root.join("demo-data/meadow-boundary.geojson"))
        .args([
            "--sims",
            "39",
            "--seed",
            "7",
            "--scales",
            "--scales-sims",
            "19",
            "--scales-rmax",
            "12",
            "--quiet",
            "--out",
        ])
        .arg(&joint)
        .output()
        .unwrap();
    assert!(o.status.success(), "{}", stderr(&o));
    let stdout = stdout(&o);
    assert!(
        stdout.contains("Ripley's K across the same windows"),
        "{stdout}"
    );
    // --steps is fixed at the default 50 under audit: compare the windows'
    // curves at the shared grid points r = 12·k/10 = 12·5k/50.
    let a: serde_json::Value =
        serde_json::from_slice(&std::fs::read(alone.join("scales.json")).unwrap()).unwrap();
    let j: serde_json::Value =
        serde_json::from_slice(&std::fs::read(joint.join("scales.json")).unwrap()).unwrap();
    assert_eq!(j["r"].as_array().unwrap().len(), 50);
    assert_eq!(j["sims"], 19);
    let ids = |v: &serde_json::Value| -> Vec<String> {
        v["windows"]
            .as_array()
            .unwrap()
            .iter()
            .map(|w| w["id"].as_str().unwrap().to_string())
            .collect()
    };
    assert_eq!(ids(&a), ids(&j));
    let report: serde_json::Value =
        serde_json::from_slice(&std::fs::read(joint.join("report.json")).unwrap()).unwrap();
    let audit_ids: Vec<String> = report["windows"]
        .as_array()
        .unwrap()
        .iter()
        .map(|w| w["id"].as_str().unwrap().to_string())
        .collect();
    assert_eq!(ids(&j), audit_ids, "the K audit covers the audit's windows");
    for (wa, wj) in a["windows"]
        .as_array()
        .unwrap()
        .iter()
        .zip(j["windows"].as_array().unwrap())
    {
        assert_eq!(wa["area"], wj["area"]);
        for (ca, cj) in wa["curves"]
            .as_array()
            .unwrap()
            .iter()
            .zip(wj["curves"].as_array().unwrap())
        {
            // Same pairs and weights; the cumulative sums group the bins
            // differently, so allow the last bits.
            for k in 0..10 {
                let (x, y) = (
                    ca["k"][k].as_f64().unwrap(),
                    cj["k"][5 * k + 4].as_f64().unwrap(),
                );
                assert!(
                    relative_eq!(x, y, epsilon = 0.0, max_relative = 1e-12),
                    "{} {}: {x} vs {y}",
                    wa["id"],
                    ca["correction"]
                );
            }
        }
    }
    let page = std::fs::read_to_string(joint.join("index.html")).unwrap();
    roxmltree::Document::parse_with_options(
        &page,
        roxmltree::ParsingOptions {
            allow_dtd: true,
            ..Default::default()
        },
    )
    .expect("index.html is well-formed XML");
    // The section's heading and verdict sentence, HTML-escaped (maud
    // escapes &, <, > and ", which is all that text content needs).
    assert!(page.contains("<h2 id=\"scales\">Ripley's K and L across the same windows</h2>"));
    let sentence = j["verdicts"][0]["sentence"]
        .as_str()
        .unwrap()
        .replace('&', "&amp;")
        .replace('<', "&lt;")
        .replace('>', "&gt;")
        .replace('"', "&quot;");
    // The tool's code spans (`hull`) are code elements on the page.
    let sentence: String = sentence
        .split('`')
        .enumerate()
        .map(|(k, part)| match k % 2 {
            1 => format!("<code>{part}</code>"),
            _ => part.to_string(),
        })
        .collect();
    assert!(page.contains(&sentence), "{sentence}");
    assert_eq!(
        page.matches("<svg").count(),
        4,
        "three audit pictures and scales.svg"
    );
    for f in ["scales.csv", "scales.md", "scales.svg", "corrections.svg"] {
        assert!(joint.join(f).is_file(), "{f}");
    }
}

/// A boundary whose name holds a comma and a quote keeps `scales.csv` a
/// table: the window id is quoted as RFC 4180 says, and every row has as
/// many fields as the header (read back with the `csv` crate).
#[test]
fn window_ids_with_commas_are_quoted_in_the_csv() {
    let dir = tmp();
    let odd = dir.path().join("north, \"upper\" field.wkt");
    std::fs::write(&odd, "POLYGON((0 0,160 0,160 160,0 160,0 0))").unwrap();
    let out = dir.path().join("out");
    let mut args: Vec<&str> = SMALL.to_vec();
    args.extend(["--boundary", odd.to_str().unwrap()]);
    let o = scales(&args, &out, "2");
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    let mut reader = csv::Reader::from_path(out.join("scales.csv")).unwrap();
    let width = reader.headers().unwrap().len();
    let mut ids = std::collections::BTreeSet::new();
    for record in reader.records() {
        let record = record.unwrap();
        assert_eq!(record.len(), width);
        ids.insert(record[0].to_string());
    }
    assert!(ids.contains("boundary:north, \"upper\" field"), "{ids:?}");
}

/// An r_max beyond every window's diagonal gets a caution: no two points
/// are that far apart, so "no departure" up to it says nothing there. The
/// demo windows are at most a few hundred metres across; the default
/// r_max (a quarter of the shortest side) gets no such caution.
#[test]
fn an_rmax_beyond_every_window_is_named() {
    let dir = tmp();
    let caution = |out: &Path| -> bool {
        let v: serde_json::Value =
            serde_json::from_slice(&std::fs::read(out.join("scales.json")).unwrap()).unwrap();
        v["cautions"]
            .as_array()
            .unwrap()
            .iter()
            .any(|c| c.as_str().unwrap().contains("is beyond the widest window"))
    };
    let far = dir.path().join("far");
    let o = scales(
        &["--sims", "19", "--steps", "8", "--rmax", "100000"],
        &far,
        "2",
    );
    assert_eq!(o.status.code(), Some(0));
    assert!(caution(&far));
    let near = dir.path().join("near");
    let o = scales(&["--sims", "19", "--steps", "8"], &near, "2");
    assert_eq!(o.status.code(), Some(0));
    assert!(!caution(&near));
}

/// Issue 28: `scales.svg` in the project's own look. The band, the
/// pointwise envelope, the centre and the observed curve in the palette,
/// labelled in words; the distances where the curve leaves the global band
/// are named on the panel, one label per stretch, recounted here from the
/// `departure` arrays of `scales.json`.
#[test]
fn envelope_pictures_name_their_parts_and_their_departures() {
    let dir = tmp();
    let out = dir.path().join("k");
    let o = scales(&["--sims", "19", "--steps", "20"], &out, "2");
    assert!(o.status.success(), "{}", stderr(&o));
    let svg = std::fs::read_to_string(out.join("scales.svg")).expect("scales.svg");
    for words in [
        "global band: the MAD test, α = 0.05",
        "pointwise envelope, not a test",
        "centre of 19 simulated curves",
        "observed L(r) − r, isotropic correction",
    ] {
        assert!(svg.contains(words), "{words}");
    }
    // Band fill (light sky blue), band edges (blue), observed (vermillion).
    for colour in [
        "fill=\"#D4ECFA\"",
        "stroke=\"#0072B2\"",
        "stroke=\"#D55E00\"",
    ] {
        assert!(svg.contains(colour), "{colour}");
    }
    let doc: serde_json::Value =
        serde_json::from_str(&std::fs::read_to_string(out.join("scales.json")).expect("json"))
            .expect("parses");
    let mut stretches = [0usize; 2];
    for w in doc["windows"].as_array().expect("windows") {
        let Some(t) = w["tests"].as_array().and_then(|t| t.first()) else {
            continue;
        };
        let d: Vec<i64> = t["departure"]
            .as_array()
            .expect("departure")
            .iter()
            .map(|v| v.as_i64().expect("sign"))
            .collect();
        for (k, sign) in [1i64, -1].into_iter().enumerate() {
            stretches[k] += d
                .iter()
                .enumerate()
                .filter(|&(i, &s)| s == sign && (i == 0 || d[i - 1] != sign))
                .count();
        }
    }
    assert!(stretches[0] > 0, "the demo departs above the band");
    assert_eq!(svg.matches("clustered, r ").count(), stretches[0]);
    assert_eq!(svg.matches("regular, r ").count(), stretches[1]);
    assert_eq!(
        svg.contains("◆ above the global band: clustered at r"),
        stretches[0] > 0
    );
}
