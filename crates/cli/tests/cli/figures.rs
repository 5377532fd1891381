//! `--figures` and `--dpi`: print copies of every picture in the report
//! folder, listed in its marker, the same bytes on every run, and bad
//! values refused before anything runs.

use crate::util::{bin, read, repo_arg, stderr, tmp};
use std::path::Path;
use std::process::Output;

const PICTURES: [&str; 3] = ["sensitivity", "simulation", "windows"];

fn audit(out: &Path, extra: &[&str]) -> Output {
    bin()
        .arg("audit")
        .arg(repo_arg("demo-data/meadow-burrows.csv"))
        .args(["--boundary", &repo_arg("demo-data/meadow-boundary.geojson")])
        .args(["--sims", "19", "--quiet"])
        .args(extra)
        .arg("--out")
        .arg(out)
        .output()
        .expect("binary runs")
}

/// Width and height of an SVG's root element.
fn svg_size(svg: &str) -> (f64, f64) {
    let doc = roxmltree::Document::parse(svg).expect("SVG parses");
    let attr = |name| {
        doc.root_element()
            .attribute(name)
            .and_then(|v: &str| v.parse::<f64>().ok())
            .expect("numeric size")
    };
    (attr("width"), attr("height"))
}

/// The SVG with every `<text …>…</text>` element taken out.
fn without_text(svg: &str) -> String {
    let mut out = String::new();
    let mut rest = svg;
    while let Some(start) = rest.find("<text") {
        out.push_str(&rest[..start]);
        let end = rest[start..].find("</text>").expect("closed text") + start;
        rest = &rest[end + "</text>".len()..];
    }
    out.push_str(rest);
    out
}

/// Width, height and RGB rows of a PNG.
fn decode(bytes: &[u8]) -> (u32, u32, Vec<u8>) {
    let mut reader = png::Decoder::new(std::io::Cursor::new(bytes))
        .read_info()
        .expect("a PNG");
    let mut buf = vec![0; reader.output_buffer_size().expect("size")];
    let frame = reader.next_frame(&mut buf).expect("a frame");
    assert_eq!(frame.color_type, png::ColorType::Rgb);
    buf.truncate(frame.buffer_size());
    (frame.width, frame.height, buf)
}

#[test]
fn png_and_pdf_copies_of_every_picture() {
    let dir = tmp();
    let (a, b) = (dir.path().join("a"), dir.path().join("b"));
    for out in [&a, &b] {
        let o = audit(out, &["--figures", "svg,png,pdf", "--dpi", "72"]);
        assert!(o.status.success(), "{}", stderr(&o));
    }
    let marker = read(&a.join(".patternproof"));
    let html = read(&a.join("index.html"));
    for name in PICTURES {
        let (w, h) = svg_size(&read(&a.join(format!("{name}.svg"))));
        let png = std::fs::read(a.join(format!("{name}.png"))).expect("png written");
        let (pw, ph, rgb) = decode(&png);
        // 72 dpi: each side × 72/96, rounded.
        assert_eq!(
            (pw, ph),
            ((w * 0.75).round() as u32, (h * 0.75).round() as u32),
            "{name}.png"
        );
        // Text is drawn: the same picture without its text elements
        // differs in many pixels (with no font found it would not).
        let svg = read(&a.join(format!("{name}.svg")));
        let bare = patternproof_pictures::Picture::parse(without_text(&svg).as_bytes())
            .and_then(|p| p.png(72))
            .expect("renders");
        let (_, _, bare_rgb) = decode(&bare);
        let text_pixels = rgb
            .chunks_exact(3)
            .zip(bare_rgb.chunks_exact(3))
            .filter(|(x, y)| x != y)
            .count();
        assert!(
            text_pixels > 2_000,
            "{name}.png: {text_pixels} pixels of text"
        );
        let pdf = std::fs::read(a.join(format!("{name}.pdf"))).expect("pdf written");
        assert!(pdf.starts_with(b"%PDF-"), "{name}.pdf");
        assert!(
            pdf.windows(10).any(|w| w == b"/FontFile2"),
            "{name}.pdf embeds its font"
        );
        for copy in [format!("{name}.png"), format!("{name}.pdf")] {
            assert!(marker.lines().any(|l| l == copy), "the marker lists {copy}");
            assert!(!html.contains(&copy), "index.html does not refer to {copy}");
            assert_eq!(
                std::fs::read(a.join(&copy)).expect("a"),
                std::fs::read(b.join(&copy)).expect("b"),
                "{copy} differs between two runs"
            );
        }
    }
    assert!(html.contains("<svg"), "index.html embeds the SVGs");
}

#[test]
fn by_default_only_svg_and_force_takes_the_copies_away() {
    let dir = tmp();
    let out = dir.path().join("r");
    let o = audit(&out, &["--figures", "pdf", "--no-map"]);
    assert!(o.status.success(), "{}", stderr(&o));
    assert!(out.join("sensitivity.pdf").exists());
    assert!(
        !out.join("sensitivity.png").exists(),
        "png was not asked for"
    );
    assert!(!out.join("windows.pdf").exists(), "no map, no copy of it");
    // The earlier report's copies are its own files: --force replaces them.
    let o = audit(&out, &["--force"]);
    assert!(o.status.success(), "{}", stderr(&o));
    assert!(out.join("sensitivity.svg").exists());
    assert!(!out.join("sensitivity.pdf").exists(), "svg only by default");
    assert!(!read(&out.join(".patternproof")).contains(".pdf"));
}

#[test]
fn bad_figures_and_dpi_are_refused_before_anything_runs() {
    let dir = tmp();
    let out = dir.path().join("r");
    for (args, words) in [
        (
            &["--figures", "svg,tiff"][..],
            &["--figures", "tiff", "not a picture format", "svg, png, pdf"][..],
        ),
        (
            &["--dpi", "20"],
            &[
                "--dpi",
                "20",
                "between 72 and 600 dots per inch",
                "what to do",
            ],
        ),
        (&["--dpi", "601"], &["--dpi", "601", "between 72 and 600"]),
        (
            &["--dpi", "high"],
            &[
                "--dpi",
                "high",
                "not a whole number of dots per inch",
                "e.g. --dpi 300",
            ],
        ),
    ] {
        let o = audit(&out, args);
        let err = stderr(&o);
        assert_eq!(o.status.code(), Some(2), "{args:?}: {err}");
        for w in words {
            assert!(err.contains(w), "{args:?}: `{w}` missing from {err}");
        }
        assert!(!out.exists(), "{args:?} left a folder");
    }
}
