//! The pictures as a reader sees them: legends beside or below the plots,
//! never over the data; log axes that say so; units on areas and
//! distances; no raw backticks; the plain test's calls shaded in
//! `sensitivity.svg`; K panels legible at the width the page shows them.
//!
//! Plotting areas are framed in #999999 and legends in #555555 (the
//! `canvas` module of the report crate keeps both colours for these frames
//! alone), so the SVG itself says where each lies.

use crate::util::{read, repo_arg, run, stderr, tmp};
use std::path::Path;

/// A rectangle in SVG pixels: x, y, width, height.
type Rect = (f64, f64, f64, f64);

fn doc(svg: &str) -> roxmltree::Document<'_> {
    roxmltree::Document::parse(svg).expect("the SVG is well-formed XML")
}

fn num(n: roxmltree::Node<'_, '_>, attr: &str) -> f64 {
    n.attribute(attr)
        .and_then(|v| v.parse().ok())
        .unwrap_or_else(|| panic!("<{}> without a numeric {attr}", n.tag_name().name()))
}

/// The rectangles stroked in `colour`.
fn frames(svg: &str, colour: &str) -> Vec<Rect> {
    doc(svg)
        .descendants()
        .filter(|n| n.has_tag_name("rect"))
        .filter(|n| {
            n.attribute("stroke")
                .is_some_and(|s| s.eq_ignore_ascii_case(colour))
        })
        .map(|n| (num(n, "x"), num(n, "y"), num(n, "width"), num(n, "height")))
        .collect()
}

fn overlap(a: Rect, b: Rect) -> bool {
    a.0 < b.0 + b.2 && b.0 < a.0 + a.2 && a.1 < b.1 + b.3 && b.1 < a.1 + a.3
}

/// Every text node, trimmed.
fn texts(svg: &str) -> Vec<String> {
    doc(svg)
        .descendants()
        .filter(|n| n.has_tag_name("text"))
        .map(|n| n.text().unwrap_or("").trim().to_string())
        .collect()
}

/// One picture: at least one plotting area and one legend, no legend
/// overlapping any plotting area, no backtick in any text.
fn check_picture(path: &Path) {
    let svg = read(path);
    let plots = frames(&svg, "#999999");
    let legends = frames(&svg, "#555555");
    assert!(
        !plots.is_empty(),
        "{}: no framed plotting area",
        path.display()
    );
    assert!(!legends.is_empty(), "{}: no legend", path.display());
    for l in &legends {
        for p in &plots {
            assert!(
                !overlap(*l, *p),
                "{}: legend {l:?} lies over plotting area {p:?}",
                path.display()
            );
        }
    }
    for t in texts(&svg) {
        assert!(!t.contains('`'), "{}: backtick in {t:?}", path.display());
    }
}

/// Every SVG in `dir` and its sub-folders passes [`check_picture`];
/// returns how many there were.
pub fn check_folder(dir: &Path) -> usize {
    let mut count = 0;
    for e in std::fs::read_dir(dir).expect("folder") {
        let p = e.expect("entry").path();
        if p.is_dir() {
            count += check_folder(&p);
        } else if p.extension().is_some_and(|x| x == "svg") {
            check_picture(&p);
            count += 1;
        }
    }
    count
}

/// The K panels: no wider than the page's 1 040 pixels (so shown at the
/// size written) and no text under 11 pixels there; every panel with the
/// same y ticks (one y-scale), so each tick label occurs once per panel.
fn check_k_panels(path: &Path, panels: usize) {
    let svg = read(path);
    let d = doc(&svg);
    let root = d.root_element();
    let width = num(root, "width");
    let shown = width.min(1040.0) / width;
    for n in d.descendants().filter(|n| n.has_tag_name("text")) {
        let size = num(n, "font-size") * shown;
        assert!(
            size >= 11.0,
            "{}: {:?} at {size:.1} px",
            path.display(),
            n.text()
        );
    }
    // y tick labels are the right-anchored texts; count each label.
    let mut ticks: std::collections::BTreeMap<String, usize> = Default::default();
    for n in d.descendants().filter(|n| {
        n.has_tag_name("text")
            && n.attribute("text-anchor") == Some("end")
            && n.attribute("transform").is_none()
    }) {
        *ticks
            .entry(n.text().unwrap_or("").trim().to_string())
            .or_default() += 1;
    }
    assert!(ticks.len() >= 3, "{}: y ticks {ticks:?}", path.display());
    for (label, count) in &ticks {
        assert_eq!(
            *count,
            panels,
            "{}: y tick {label} in {count} of {panels} panels",
            path.display()
        );
    }
}

/// The audit with its K panels: every picture keeps its legend off the
/// plots; `sensitivity.svg` says its axis is logarithmic, shades the plain
/// test's calls with their names, and explains every marker it draws.
#[test]
fn audit_pictures_keep_legends_off_the_data() {
    let dir = tmp();
    let out = dir.path().join("r");
    let o = run(&[
        "audit",
        &repo_arg("demo-data/meadow-burrows.csv"),
        "--boundary",
        &repo_arg("demo-data/meadow-boundary.geojson"),
        "--sims",
        "99",
        "--scales",
        "--scales-sims",
        "19",
        "--quiet",
        "--out",
        out.to_str().expect("path"),
    ]);
    assert!(o.status.success(), "{}", stderr(&o));
    assert_eq!(check_folder(&out), 5, "five pictures");

    let svg = read(&out.join("sensitivity.svg"));
    let t = texts(&svg);
    assert_eq!(
        t.iter()
            .filter(|x| *x == "window area, m² (log scale)")
            .count(),
        2,
        "both panels name their log axis"
    );
    // The demo's plain test runs from dispersed (small windows) through
    // not significant to clustered: three bands, each named in the strip
    // and the legend, each a rectangle of its tint in the strip and both
    // panels.
    for (name, fill) in [
        ("clustered", "#FAECCC"),
        ("not significant", "#F3F3F3"),
        ("dispersed", "#CCECE3"),
    ] {
        assert!(t.contains(&format!("{name} (none)")), "strip names {name}");
        assert!(t.contains(&format!("shaded: plain test (none) {name}")));
        let shaded = doc(&svg)
            .descendants()
            .filter(|n| n.has_tag_name("rect") && n.attribute("fill") == Some(fill))
            .count();
        assert_eq!(shaded, 3 + 1, "{name}: strip, two panels, legend swatch");
    }
    // Every marker kind drawn has its legend entry: the demo has rows of
    // every edge handling.
    for edge in ["none", "donnelly", "border", "toroidal"] {
        assert!(
            t.contains(&format!("row at a named window, {edge}")),
            "{edge} marker explained"
        );
    }
    assert!(
        t.iter()
            .any(|x| x.starts_with("row at a named window, simulation"))
    );
    // No empty band under the notes: the last note sits within 30 pixels
    // of the bottom.
    let d = doc(&svg);
    let height = num(d.root_element(), "height");
    let last = d
        .descendants()
        .filter(|n| n.has_tag_name("text"))
        .map(|n| num(n, "y"))
        .fold(0.0, f64::max);
    assert!(height - last <= 30.0, "{last} of {height}");

    check_k_panels(&out.join("scales.svg"), 7);
}

/// `scales`: both pictures legible at the page's width, their panels on
/// one y-scale, the legends under the panels.
#[test]
fn scales_panels_are_legible_and_share_their_scale() {
    let dir = tmp();
    let out = dir.path().join("k");
    let o = run(&[
        "scales",
        &repo_arg("demo-data/meadow-burrows.csv"),
        "--boundary",
        &repo_arg("demo-data/meadow-boundary.geojson"),
        "--sims",
        "19",
        "--quiet",
        "--out",
        out.to_str().expect("path"),
    ]);
    assert!(o.status.success(), "{}", stderr(&o));
    assert_eq!(check_folder(&out), 2);
    check_k_panels(&out.join("scales.svg"), 7);
    check_k_panels(&out.join("corrections.svg"), 3);
}

/// `density`: areas in km² where the summary says km², the log bandwidth
/// axis named so, bandwidths with their unit, legends off the panels.
#[test]
fn density_pictures_carry_units_and_log_axis() {
    let dir = tmp();
    let out = dir.path().join("d");
    let o = run(&[
        "density",
        &repo_arg("demo-data/marsh-hare-track.csv"),
        "--cell",
        "25",
        "--kernels",
        "gaussian,quartic",
        "--bandwidths",
        "scott,2x",
        "--out",
        out.to_str().expect("path"),
    ]);
    assert!(o.status.success(), "{}", stderr(&o));
    let summary = String::from_utf8_lossy(&o.stdout).to_string();
    assert!(summary.contains("km²"), "the summary reads km²: {summary}");
    assert_eq!(check_folder(&out), 2);
    let t = texts(&read(&out.join("areas.svg")));
    assert_eq!(t.iter().filter(|x| *x == "area (km²)").count(), 2, "{t:?}");
    assert_eq!(
        t.iter()
            .filter(|x| x.ends_with("canonical scaling; log scale)"))
            .count(),
        2
    );
    let t = texts(&read(&out.join("surfaces.svg")));
    assert!(
        t.iter()
            .any(|x| x.starts_with("h = ") && x.contains(" m (σ-equiv. ") && x.ends_with(" m)")),
        "{t:?}"
    );
}

/// A GeoPackage layer's name reaches the title as a quoted name, not as a
/// code span with backticks.
#[test]
fn layer_names_reach_the_pictures_without_backticks() {
    let dir = tmp();
    let out = dir.path().join("g");
    let o = run(&[
        "audit",
        &repo_arg("reference/gpkg/survey.gpkg"),
        "--layer",
        "plots_utm",
        "--sims",
        "39",
        "--quiet",
        "--out",
        out.to_str().expect("path"),
    ]);
    assert!(o.status.success(), "{}", stderr(&o));
    assert_eq!(check_folder(&out), 3);
    let t = texts(&read(&out.join("sensitivity.svg")));
    assert!(
        t.iter().any(|x| x.contains("(layer \"plots_utm\")")),
        "{t:?}"
    );
}
