//! End-to-end: `patternproof density` on the invented marsh hare track
//! (small raster for speed), and bad input exiting 2.

use crate::util::{repo_arg, run, stderr, tmp};
use approx::{abs_diff_eq, assert_abs_diff_eq};

fn track() -> String {
    repo_arg("demo-data/marsh-hare-track.csv")
}

#[test]
fn density_on_the_demo_track() {
    let dir = tmp();
    let out = dir.path().join("d");
    let o = run(&[
        "density",
        &track(),
        "--cell",
        "25",
        "--kernels",
        "gaussian,quartic,uniform",
        "--bandwidths",
        "scott,lcv,2x",
        "--edges",
        "none,diggle",
        "--quiet",
        "--out",
        out.to_str().expect("path"),
    ]);
    assert!(o.status.success(), "{}", stderr(&o));
    let doc: serde_json::Value =
        serde_json::from_str(&std::fs::read_to_string(out.join("density.json")).expect("json"))
            .expect("parse");
    assert_eq!(doc["schema"], "patternproof.density/1");
    let surfaces = doc["surfaces"].as_array().expect("surfaces");
    assert_eq!(surfaces.len(), 3 * 3 * 2);
    for s in surfaces {
        let iso = s["isopleths"].as_array().expect("isopleths");
        let (a50, a95) = (
            iso[0]["area"].as_f64().expect("a"),
            iso[1]["area"].as_f64().expect("a"),
        );
        assert!(a50 > 0.0 && a95 > a50, "{s}");
        assert!(iso[0]["patches"].as_u64().expect("patches") >= 1);
        if s["edge"] == "none" {
            let m = s["mass_outside"].as_f64().expect("mass outside");
            assert!(m > 0.0 && m < 0.9, "{m}");
        } else {
            assert_abs_diff_eq!(
                s["mass_inside"].as_f64().expect("mass"),
                1.0,
                epsilon = 1e-3
            );
        }
    }
    // The reference (gaussian, Scott, first edge) overlaps itself fully.
    let r = &doc["reference"];
    assert_eq!(r["kernel"], "gaussian");
    assert_eq!(
        r["overlap_with_reference"][1]["jaccard"].as_f64(),
        Some(1.0)
    );
    // Scott's value in the document follows its formula.
    let sc = &doc["bandwidth_selection"]["scott"];
    let want =
        sc["sigma"].as_f64().expect("sigma") * (sc["n"].as_f64().expect("n")).powf(-1.0 / 6.0);
    assert_abs_diff_eq!(sc["bandwidth"].as_f64().expect("h"), want, epsilon = 1e-9);
    let sentence = doc["verdict"]["sentence"].as_str().expect("sentence");
    assert!(sentence.contains("95 % area ranges from"), "{sentence}");
    for f in [
        "index.html",
        "isopleths.geojson",
        "reference.tif",
        "surfaces.svg",
        "areas.svg",
    ] {
        assert!(out.join(f).is_file(), "{f}");
    }
    let html = std::fs::read_to_string(out.join("index.html")).expect("html");
    assert!(html.contains("id=\"density\"") && html.contains("personal data"));
    // The provenance of every page: the SHA-256 of the input (recomputed
    // here with sha2, a general-purpose library) and the command line.
    let digest =
        crate::util::sha256_hex(&crate::util::repo().join("demo-data/marsh-hare-track.csv"));
    assert!(
        html.contains(&format!(
            "<tr><td><code>{}</code></td><td><code>{digest}</code></td></tr>",
            track()
        )),
        "the input's SHA-256"
    );
    assert!(
        html.contains("<pre>patternproof density "),
        "the command line"
    );
    // -q means what it means everywhere: no progress bar and no forecast,
    // but the reading line, the verdict and the closing line still print.
    assert!(
        stderr(&o).contains("patternproof: reading "),
        "{}",
        stderr(&o)
    );
    let printed = crate::util::stdout(&o);
    let lines: Vec<&str> = printed.lines().collect();
    // The sentence, wrapped between words at the piped width, then the
    // closing line.
    let (closing, text) = lines.split_last().expect("lines");
    let text: Vec<&str> = text.iter().map(|l| l.trim()).collect();
    assert_eq!(text.join(" "), sentence, "{printed}");
    let lines = [text[0], closing];
    assert_eq!(
        lines[1],
        format!(
            "wrote density.json, isopleths.geojson, reference.tif, surfaces.svg, areas.svg, index.html to {}",
            out.display()
        )
    );
    let gj: serde_json::Value =
        serde_json::from_str(&std::fs::read_to_string(out.join("isopleths.geojson")).expect("gj"))
            .expect("parse");
    assert_eq!(
        gj["features"].as_array().expect("features").len(),
        (18 + 1) * 2
    );
}

#[test]
fn bad_density_input_exits_2() {
    let dir = tmp();
    let out = dir.path().join("d");
    let o = out.to_str().expect("path");
    let t = track();
    for (args, needle) in [
        (vec!["--kernels", "triweight"], "--kernels"),
        (vec!["--bandwidths", "wide"], "--bandwidths"),
        (vec!["--levels", "120"], "--levels"),
        (vec!["--edges", "mirror"], "--edges"),
        (vec!["--reference", "gaussian"], "--reference"),
        (vec!["--cell", "0"], "--cell"),
    ] {
        let mut a = vec!["density", t.as_str(), "--out", o];
        a.extend(args);
        let r = run(&a);
        assert_eq!(r.status.code(), Some(2), "{a:?}");
        let err = stderr(&r);
        assert!(err.contains(needle) && err.contains("what to do"), "{err}");
    }
    let one = dir.path().join("one.csv");
    std::fs::write(&one, "x,y\n1,2\n").expect("write");
    let r = run(&[
        "density",
        one.to_str().expect("p"),
        "--coords",
        "projected",
        "--out",
        o,
    ]);
    assert_eq!(r.status.code(), Some(2));
    assert!(!out.exists(), "nothing written on failure");
}

/// Issue 20: the demo track in kilometres gives the isopleths of the track
/// in metres divided by 1000 (to a thousandth of a cell), not outlines
/// rounded onto 1 m steps; `isopleths.geojson` names its plane in a crs
/// member, so a GIS does not read planar numbers as lon/lat.
#[test]
fn isopleths_in_small_units_keep_their_shape() {
    let dir = tmp();
    let text = std::fs::read_to_string(track()).expect("track");
    let mut km = String::from("x,y\n");
    for line in text.lines().skip(1) {
        // fix,x,y
        let v: Vec<f64> = line
            .split(',')
            .skip(1)
            .take(2)
            .map(|f| f.trim().parse().expect("number"))
            .collect();
        km.push_str(&format!("{},{}\n", v[0] / 1000.0, v[1] / 1000.0));
    }
    let km_file = dir.path().join("track-km.csv");
    std::fs::write(&km_file, km).expect("write");
    let run = |file: &str, unit: &str, cell: &str, out: &std::path::Path| {
        let o = run(&[
            "density",
            file,
            "--coords",
            "projected",
            "--unit",
            unit,
            "--cell",
            cell,
            "--kernels",
            "gaussian",
            "--bandwidths",
            "scott",
            "--edges",
            "none",
            "--quiet",
            "--out",
            out.to_str().expect("path"),
        ]);
        assert!(o.status.success(), "{}", stderr(&o));
        let gj: serde_json::Value = serde_json::from_str(
            &std::fs::read_to_string(out.join("isopleths.geojson")).expect("gj"),
        )
        .expect("parse");
        gj
    };
    let m = run(&track(), "m", "25", &dir.path().join("m"));
    let k = run(
        km_file.to_str().expect("path"),
        "km",
        "0.025",
        &dir.path().join("km"),
    );
    assert_eq!(
        k["crs"]["properties"]["name"].as_str().expect("crs name"),
        format!("planar coordinates of {}, unit km", km_file.display())
    );
    let coords = |gj: &serde_json::Value| -> Vec<f64> {
        let mut v = Vec::new();
        for f in gj["features"].as_array().expect("features") {
            for p in f["geometry"]["coordinates"].as_array().expect("polygons") {
                for r in p.as_array().expect("rings") {
                    for c in r.as_array().expect("positions") {
                        v.push(c[0].as_f64().expect("x"));
                        v.push(c[1].as_f64().expect("y"));
                    }
                }
            }
        }
        v
    };
    let (cm, ck) = (coords(&m), coords(&k));
    assert!(cm.len() > 100, "{}", cm.len());
    assert_eq!(cm.len(), ck.len());
    for (a, b) in cm.iter().zip(&ck) {
        // A thousandth of the 25 m cell, in km.
        assert!(
            abs_diff_eq!(a / 1000.0, b, epsilon = 0.025e-3 + 1e-9),
            "{a} m vs {b} km"
        );
    }
}
