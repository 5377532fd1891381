//! The report a reviewer reads: pictures, `index.html`, determinism, the
//! map switch, and a headless-browser rendering of the page.

use crate::util::{bin, chromium, read, repo, repo_arg, screenshot, stderr, tmp};
use patternproof_report::numbers::sig;
use serde_json::Value;
use std::path::Path;
use std::process::Output;

fn demo(name: &str) -> String {
    repo_arg(&format!("demo-data/{name}"))
}

fn audit(args: &[&str], out: &Path) -> Output {
    let o = bin()
        .arg("audit")
        .args(args)
        .arg("--out")
        .arg(out)
        .arg("--quiet")
        .output()
        .expect("binary runs");
    assert!(o.status.success(), "audit failed: {}", stderr(&o));
    o
}

fn demo_audit(out: &Path, extra: &[&str]) {
    let points = demo("meadow-burrows.csv");
    let boundary = demo("meadow-boundary.geojson");
    let mut args = vec![
        points.as_str(),
        "--boundary",
        boundary.as_str(),
        "--sims",
        "199",
    ];
    args.extend_from_slice(extra);
    audit(&args, out);
}

fn json(dir: &Path) -> Value {
    serde_json::from_str(&read(&dir.join("report.json"))).expect("report.json parses")
}

/// Every text node of an SVG, trimmed (plotters puts each label on its own
/// line inside `<text>`).
fn svg_texts(svg: &str) -> Vec<String> {
    let doc = roxmltree::Document::parse(svg).expect("the SVG is well-formed XML");
    doc.descendants()
        .filter(|n| n.has_tag_name("text"))
        .map(|n| n.text().unwrap_or("").trim().to_string())
        .collect()
}

/// The flip areas of the analytic edge handlings, as the picture prints
/// them (4 significant digits).
fn flip_values(report: &Value) -> Vec<String> {
    let mut out = Vec::new();
    for f in report["flip"].as_array().expect("flip list") {
        for key in ["clustered_above_area", "dispersed_below_area"] {
            if let Some(a) = f[key].as_f64() {
                out.push(sig(a, 4));
            }
        }
    }
    out
}

fn check_sensitivity(dir: &Path) {
    let report = json(dir);
    let texts = svg_texts(&read(&dir.join("sensitivity.svg")));
    // One legend entry per curve (the analytic edges with a curve).
    let curves = report["sensitivity"]["curves"].as_array().expect("curves");
    assert!(!curves.is_empty());
    for c in curves {
        let edge = c["edge"].as_str().expect("edge");
        let prefix = format!("{edge}: ");
        assert_eq!(
            texts.iter().filter(|t| t.starts_with(&prefix)).count(),
            1,
            "one legend entry for {edge}"
        );
    }
    // Every named window labelled once at the top of the R panel.
    for w in report["windows"].as_array().expect("windows") {
        let id = w["id"].as_str().expect("id");
        assert_eq!(
            texts.iter().filter(|t| *t == id).count(),
            1,
            "window label {id}"
        );
    }
    // Every flip threshold's area appears in the picture's text.
    let values = flip_values(&report);
    assert!(!values.is_empty(), "the demo has flip thresholds");
    for v in values {
        assert!(
            texts.iter().any(|t| t.contains(&v)),
            "flip threshold {v} not in the picture"
        );
    }
}

/// The pictures of the demo report: well-formed, the expected series and
/// labelled markers, the flip thresholds in the text.
#[test]
fn demo_pictures_carry_series_markers_and_thresholds() {
    let dir = tmp();
    let out = dir.path().join("r");
    demo_audit(&out, &[]);
    check_sensitivity(&out);
    let report = json(&out);
    // Three curves on the demo: none, donnelly, border (toroidal has none).
    let edges: Vec<&str> = report["sensitivity"]["curves"]
        .as_array()
        .expect("curves")
        .iter()
        .map(|c| c["edge"].as_str().expect("edge"))
        .collect();
    assert_eq!(edges, ["none", "donnelly", "border"]);

    // Simulation picture: the boundary by default, its observed mean in
    // the text, and one bar per histogram bin that holds simulations.
    let svg = read(&out.join("simulation.svg"));
    let texts = svg_texts(&svg);
    let row = report["results"]
        .as_array()
        .expect("results")
        .iter()
        .find(|r| r["window"] == "boundary" && r["edge"] == "simulation")
        .expect("simulation row");
    let observed = sig(row["mean_nn"].as_f64().expect("mean"), 4);
    assert!(
        texts
            .iter()
            .any(|t| t == &format!("observed: {observed} m")),
        "observed value {observed} in {texts:?}"
    );
    assert!(
        texts
            .iter()
            .any(|t| t.contains("in boundary:") && t.contains("199 CSR patterns"))
    );

    // Window map: every window id and the unit of the scale bar.
    let texts = svg_texts(&read(&out.join("windows.svg")));
    for w in report["windows"].as_array().expect("windows") {
        if w["kind"] != "area" {
            let id = w["id"].as_str().expect("id");
            assert!(
                texts.iter().filter(|t| *t == id).count() >= 2,
                "{id}: legend and label"
            );
        }
    }
    assert!(
        texts.iter().any(|t| t.ends_with(" m")),
        "scale bar with its unit"
    );
}

/// A tiny data set (12 points on a jittered grid, just above the 10 that
/// closed-form rows need) still gets every picture, with its own
/// thresholds in the text.
#[test]
fn tiny_data_set_pictures() {
    let dir = tmp();
    let points = dir.path().join("tiny.csv");
    std::fs::write(
        &points,
        "x,y\n0,0\n10,1\n20,0\n1,10\n11,11\n21,9\n0,20\n10,21\n19,20\n1,30\n10,31\n20,30\n",
    )
    .expect("write");
    let out = dir.path().join("r");
    // A 20 m grid at the origin: numbers that fit lon/lat, so say so.
    audit(
        &[
            points.to_str().expect("path"),
            "--sims",
            "99",
            "--coords",
            "projected",
        ],
        &out,
    );
    check_sensitivity(&out);
    // Without a boundary the simulation picture shows the hull.
    let texts = svg_texts(&read(&out.join("simulation.svg")));
    assert!(
        texts
            .iter()
            .any(|t| t.contains("in hull:") && t.contains("99 CSR patterns"))
    );
}

/// index.html: well-formed, nothing fetched from the network, every
/// section present, and the SVGs inline.
#[test]
fn index_html_is_self_contained() {
    let dir = tmp();
    let out = dir.path().join("r");
    demo_audit(&out, &[]);
    let html = read(&out.join("index.html"));
    let doc = roxmltree::Document::parse_with_options(
        &html,
        roxmltree::ParsingOptions {
            allow_dtd: true,
            ..Default::default()
        },
    )
    .expect("index.html is well-formed");
    // Nothing that a browser would fetch: no script, link, external
    // image, frame or CSS import (the only URLs allowed are the SVG
    // namespace names, which are never fetched).
    for n in doc.descendants().filter(|n| n.is_element()) {
        let tag = n.tag_name().name();
        assert!(
            !["script", "link", "img", "iframe", "object", "embed"].contains(&tag),
            "<{tag}> in index.html"
        );
        for a in n.attributes() {
            let v = a.value();
            if ["src", "href", "srcset", "data"].contains(&a.name()) {
                panic!("attribute {}={v} on <{tag}>", a.name());
            }
        }
    }
    assert!(!html.contains("@import") && !html.contains("url("));
    assert_eq!(
        doc.descendants().filter(|n| n.has_tag_name("svg")).count(),
        3
    );
    for id in [
        "input",
        "table",
        "robustness",
        "flip",
        "methods",
        "cautions",
        "provenance",
    ] {
        assert!(
            doc.descendants().any(|n| n.attribute("id") == Some(id)),
            "section {id}"
        );
    }
    // Provenance: the digest of the points file (SHA-256 of the bytes,
    // recomputed here with sha2, a general-purpose library).
    let hex = crate::util::sha256_hex(Path::new(&demo("meadow-burrows.csv")));
    assert!(html.contains(&hex));
    assert_eq!(
        json(&out)["provenance"]["inputs"][0]["sha256"],
        hex.as_str()
    );
    assert!(html.contains("--sims 199"), "the command line");
    // The program by its name, not by the path it was started from.
    assert!(
        html.contains("<pre>patternproof audit "),
        "the command line"
    );
    assert!(!html.contains("run at"), "no time without --stamp");
    // The personal-data caution and the map switch are stated.
    assert!(html.contains("personal data") && html.contains("--no-map"));
}

/// A hostile file name and boundary name are shown as text, never as
/// markup.
#[test]
fn hostile_names_are_escaped() {
    let dir = tmp();
    let points = dir.path().join("<script>alert(1)<script>.csv");
    std::fs::copy(demo("meadow-burrows.csv"), &points).expect("copy");
    let boundary = dir.path().join("b.geojson");
    let mut geojson: Value =
        serde_json::from_str(&read(Path::new(&demo("meadow-boundary.geojson")))).expect("demo");
    geojson["features"][0]["properties"]["name"] = "<script>alert('x')</script>".into();
    let hostile = geojson.to_string();
    std::fs::write(&boundary, hostile).expect("write");
    let out = dir.path().join("r");
    audit(
        &[
            points.to_str().expect("path"),
            "--boundary",
            boundary.to_str().expect("path"),
            "--sims",
            "19",
        ],
        &out,
    );
    let html = read(&out.join("index.html"));
    assert!(!html.to_lowercase().contains("<script"), "unescaped markup");
    assert!(html.contains("&lt;script&gt;alert(1)&lt;script&gt;.csv"));
    assert!(html.contains("&lt;script&gt;alert('x')&lt;/script&gt;"));
}

/// Issue 20: user strings in every Markdown file (file name, `--unit`,
/// `--where` value, boundary name) come out as text: no raw markup, and no
/// `|` that splits a table row.
#[test]
fn markdown_files_escape_user_strings() {
    let dir = tmp();
    let points = dir.path().join("<img src=x onerror=alert(1)>.csv");
    let mut csv = String::from("burrow,x,y,survey\n");
    for line in read(Path::new(&demo("meadow-burrows.csv"))).lines().skip(1) {
        csv.push_str(&format!("{line},<i>first|pass</i>\n"));
    }
    std::fs::write(&points, csv).expect("write");
    let boundary = dir.path().join("b.geojson");
    let mut geojson: Value =
        serde_json::from_str(&read(Path::new(&demo("meadow-boundary.geojson")))).expect("demo");
    geojson["features"][0]["properties"]["name"] = "<b>north|field</b> `x`".into();
    std::fs::write(&boundary, geojson.to_string()).expect("write");
    let out = dir.path().join("r");
    audit(
        &[
            points.to_str().expect("path"),
            "--boundary",
            boundary.to_str().expect("path"),
            // Two boundaries: window ids carry the names.
            "--boundary",
            &demo("meadow-boundary.geojson"),
            "--where",
            "survey=<i>first|pass</i>",
            "--unit",
            "<u>m</u>|x",
            "--sims",
            "19",
            "--scales",
            "--scales-sims",
            "9",
        ],
        &out,
    );
    for file in ["verdict.md", "scales.md"] {
        let md = read(&out.join(file));
        for raw in ["<img", "<i>", "<b>", "<u>"] {
            assert!(!md.contains(raw), "{file}: raw `{raw}` in\n{md}");
        }
        assert!(
            md.contains("&lt;u&gt;m&lt;/u&gt;\\|x"),
            "{file}: the unit\n{md}"
        );
        // Every table row has as many cells as its header.
        let cells = |line: &str| line.replace("\\|", "").matches('|').count();
        let mut header = None;
        for line in md.lines() {
            if line.starts_with('|') {
                let n = cells(line);
                let h = *header.get_or_insert(n);
                assert_eq!(n, h, "{file}: row splits its table: {line}");
            } else {
                header = None;
            }
        }
    }
    let md = read(&out.join("verdict.md"));
    assert!(
        md.contains("&lt;img src=x onerror=alert(1)&gt;.csv"),
        "{md}"
    );
    assert!(
        md.contains("| boundary:&lt;b&gt;north\\|field&lt;/b&gt; \\`x\\` | boundary |"),
        "{md}"
    );
}

/// Same seed, same bytes: report.json, verdict.md and every SVG.
#[test]
fn reruns_give_identical_files() {
    let dir = tmp();
    let (a, b) = (dir.path().join("a"), dir.path().join("b"));
    demo_audit(&a, &[]);
    demo_audit(&b, &[]);
    for f in [
        "report.json",
        "verdict.md",
        "verdict.csv",
        "sensitivity.svg",
        "simulation.svg",
        "windows.svg",
    ] {
        assert_eq!(
            std::fs::read(a.join(f)).expect("a"),
            std::fs::read(b.join(f)).expect("b"),
            "{f} differs between runs"
        );
    }
}

/// `--no-map` leaves the point map out of the folder and the page;
/// `--stamp` adds the time to the page only.
#[test]
fn no_map_and_stamp() {
    let dir = tmp();
    let out = dir.path().join("r");
    demo_audit(&out, &["--no-map", "--stamp"]);
    assert!(!out.join("windows.svg").exists());
    let html = read(&out.join("index.html"));
    assert!(!html.contains("Windows of "), "map title in the page");
    assert!(html.contains("run at 20"), "RFC 3339 time with --stamp");
    assert!(!read(&out.join("report.json")).contains("run at"));
}

/// Headless Chromium renders the page to a PNG that is not blank: the
/// expected size and many distinct colours. `.ci/run` installs Debian's
/// `chromium`. Without it the test fails under CI (`CI=true`) or when
/// `PATTERNPROOF_REQUIRE_BROWSER` is set, and elsewhere says loudly that
/// it was skipped.
#[test]
fn browser_renders_the_page() {
    let Some(browser) = chromium("browser_renders_the_page") else {
        return;
    };
    let dir = tmp();
    let out = dir.path().join("r");
    demo_audit(&out, &[]);
    let (width, height, channels, buf) = screenshot(
        browser,
        &out.join("index.html"),
        (1100, 1600),
        &dir.path().join("page.png"),
    );
    assert_eq!((width, height), (1100, 1600));
    let mut colours = std::collections::HashSet::new();
    for px in buf.chunks(channels) {
        colours.insert(px[..3.min(channels)].to_vec());
    }
    // A blank or error page has a handful of colours; text, tables and the
    // first picture give hundreds (anti-aliasing).
    assert!(
        colours.len() > 100,
        "only {} distinct colours",
        colours.len()
    );
}

/// RFC 7946 §3.1.9 (issue 20): `windows.geojson` of points across ±180°
/// and around the north pole. No ring may jump more than 180° of
/// longitude between neighbouring vertices (a GIS would draw it across the
/// globe), except along the pole; the outlines that cross are cut, so some part ends on +180° and
/// another on −180°; the pole's outlines reach 90° N.
#[test]
fn window_outlines_are_cut_at_the_antimeridian() {
    let dir = tmp();
    for (file, pole) in [("antimeridian.csv", false), ("around-the-pole.csv", true)] {
        let out = dir.path().join(file);
        let points = repo().join("tests/bad-inputs").join(file);
        audit(
            &[points.to_str().expect("utf-8 path"), "--sims", "19"],
            &out,
        );
        let gj: Value =
            serde_json::from_str(&read(&out.join("windows.geojson"))).expect("geojson parses");
        let (mut west, mut east, mut north) = (false, false, f64::MIN);
        for f in gj["features"].as_array().expect("features") {
            assert_eq!(f["geometry"]["type"], "MultiPolygon");
            for polygon in f["geometry"]["coordinates"].as_array().expect("polygons") {
                for ring in polygon.as_array().expect("rings") {
                    let ring: Vec<(f64, f64)> = ring
                        .as_array()
                        .expect("positions")
                        .iter()
                        .map(|p| (p[0].as_f64().expect("lon"), p[1].as_f64().expect("lat")))
                        .collect();
                    for w in ring.windows(2) {
                        // Along the pole itself every longitude is one point.
                        let at_pole = w[0].1.abs() == 90.0 && w[1].1 == w[0].1;
                        assert!(
                            at_pole || (w[1].0 - w[0].0).abs() <= 180.0,
                            "{file}: {} jumps from {:?} to {:?}",
                            f["properties"]["id"],
                            w[0],
                            w[1]
                        );
                    }
                    for &(lon, lat) in &ring {
                        assert!((-180.0..=180.0).contains(&lon), "{lon}");
                        west |= lon == -180.0;
                        east |= lon == 180.0;
                        north = north.max(lat);
                    }
                }
            }
        }
        assert!(west && east, "{file}: no part ends on ±180°");
        if pole {
            assert_eq!(north, 90.0, "{file}");
        } else {
            assert!(north < -15.0, "{file}: {north}");
        }
    }
}

/// Issue 22: the page and the pictures show ids as code, never as raw
/// Markdown backticks, and the methods paragraph says where the torus ran
/// (in rectangles only: on the demo, `bbox`).
#[test]
fn pages_and_pictures_carry_no_raw_backticks_and_the_methods_say_where_the_torus_ran() {
    let dir = tmp();
    let out = dir.path().join("r");
    demo_audit(&out, &["--scales", "--scales-sims", "19"]);
    for name in [
        "index.html",
        "sensitivity.svg",
        "simulation.svg",
        "windows.svg",
        "scales.svg",
        "corrections.svg",
    ] {
        let text = read(&out.join(name));
        assert!(!text.contains('`'), "{name} shows a raw backtick");
    }
    let page = read(&out.join("index.html"));
    assert!(
        page.contains("<code>bbox</code>"),
        "ids are code in the page"
    );
    let md = read(&out.join("verdict.md"));
    assert!(
        md.contains("`toroidal` (in `bbox` only: torus distances need an axis-aligned rectangle)"),
        "{md}"
    );
    assert!(!md.contains("handled in each window"), "{md}");
}
