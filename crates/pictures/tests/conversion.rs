//! PNG and PDF copies of small SVGs: their size, their text and their
//! bytes from run to run.

use patternproof_pictures::{MAX_PIXELS, Picture, PictureError};

/// A picture like the report's: white frame, a line, a title in the
/// generic `sans-serif` family and a label in a family no machine has.
const SVG: &str = r##"<svg width="300" height="120" viewBox="0 0 300 120" xmlns="http://www.w3.org/2000/svg">
<rect x="0" y="0" width="300" height="120" fill="#FFFFFF" stroke="none"/>
<text x="10" y="10" dy="0.76em" font-family="sans-serif" font-size="24" fill="#000000">Windows × σ</text>
<text x="10" y="80" font-family="No Such Family" font-size="18" fill="#000000">L(r) − r</text>
</svg>"##;

/// Width, height, pixels per metre and RGB bytes of a PNG.
fn decode(png_bytes: &[u8]) -> (u32, u32, Option<u32>, Vec<u8>) {
    let decoder = png::Decoder::new(std::io::Cursor::new(png_bytes));
    let mut reader = decoder.read_info().expect("a PNG");
    let dims = reader.info().pixel_dims.map(|d| d.xppu);
    let mut buf = vec![0; reader.output_buffer_size().expect("size")];
    let frame = reader.next_frame(&mut buf).expect("a frame");
    assert_eq!(frame.color_type, png::ColorType::Rgb);
    buf.truncate(frame.buffer_size());
    (frame.width, frame.height, dims, buf)
}

/// Dark pixels in the rows `rows` (fractions of the height).
fn dark_pixels(png_bytes: &[u8], rows: (f64, f64)) -> usize {
    let (w, h, _, rgb) = decode(png_bytes);
    let (from, to) = (
        (rows.0 * f64::from(h)) as usize,
        (rows.1 * f64::from(h)) as usize,
    );
    rgb.chunks_exact(3)
        .enumerate()
        .filter(|(i, p)| {
            let row = i / w as usize;
            row >= from && row < to && p.iter().all(|&c| c < 128)
        })
        .count()
}

#[test]
fn png_size_is_the_svg_size_times_dpi_over_96() {
    let picture = Picture::parse(SVG.as_bytes()).expect("parses");
    assert_eq!(picture.size(), (300.0, 120.0));
    for (dpi, want) in [(96, (300, 120)), (300, (938, 375)), (600, (1875, 750))] {
        // 300 × 300/96 = 937.5 → 938; 120 × 300/96 = 375.
        let (w, h, per_metre, _) = decode(&picture.png(dpi).expect("renders"));
        assert_eq!((w, h), want, "at {dpi} dpi");
        // pHYs: dpi / 0.0254 m, rounded (300 dpi = 11811 px/m).
        assert_eq!(per_metre, Some((f64::from(dpi) / 0.0254).round() as u32));
    }
}

#[test]
fn text_is_drawn_with_the_bundled_font() {
    let png = Picture::parse(SVG.as_bytes())
        .expect("parses")
        .png(300)
        .expect("renders");
    // The title sits in the top third, the label around y = 80 of 120;
    // with no font found both bands would be white.
    let title = dark_pixels(&png, (0.05, 0.35));
    let label = dark_pixels(&png, (0.5, 0.7));
    assert!(title > 2_000, "title band has {title} dark pixels");
    assert!(label > 1_000, "label band has {label} dark pixels");
    // And nothing dark where there is no text.
    assert_eq!(dark_pixels(&png, (0.75, 1.0)), 0);
}

#[test]
fn png_and_pdf_bytes_repeat() {
    let a = Picture::parse(SVG.as_bytes()).expect("parses");
    let b = Picture::parse(SVG.as_bytes()).expect("parses");
    assert_eq!(a.png(300).expect("png"), b.png(300).expect("png"));
    assert_eq!(a.pdf().expect("pdf"), b.pdf().expect("pdf"));
}

#[test]
fn pdf_embeds_the_font_and_is_the_svg_size() {
    let pdf = Picture::parse(SVG.as_bytes())
        .expect("parses")
        .pdf()
        .expect("pdf");
    assert!(pdf.starts_with(b"%PDF-"));
    let has = |needle: &[u8]| pdf.windows(needle.len()).any(|w| w == needle);
    assert!(has(b"/FontFile2"), "no embedded TrueType font");
    assert!(has(b"DejaVuSans"), "the font is not the bundled one");
    // 300 × 120 units at 96 to the inch = 225 × 90 points.
    assert!(has(b"/MediaBox [0 0 225 90]"), "page size");
    // No date, so nothing changes from day to day.
    assert!(!has(b"/CreationDate"));
}

#[test]
fn an_embedded_png_image_is_drawn() {
    // A 1 × 1 black PNG as a data URL, stretched over the left half.
    let mut pixel = Vec::new();
    {
        let mut e = png::Encoder::new(&mut pixel, 1, 1);
        e.set_color(png::ColorType::Rgb);
        let mut w = e.write_header().expect("header");
        w.write_image_data(&[0, 0, 0]).expect("data");
    }
    let b64 = base64_encode(&pixel);
    let svg = format!(
        r#"<svg xmlns="http://www.w3.org/2000/svg" xmlns:xlink="http://www.w3.org/1999/xlink" width="96" height="96"><image x="0" y="0" width="48" height="96" preserveAspectRatio="none" xlink:href="data:image/png;base64,{b64}"/></svg>"#
    );
    let png = Picture::parse(svg.as_bytes())
        .expect("parses")
        .png(96)
        .expect("png");
    let (w, _, _, rgb) = decode(&png);
    let at = |x: usize, y: usize| rgb[3 * (y * w as usize + x)];
    assert_eq!((at(10, 50), at(80, 50)), (0, 255));
    let pdf = Picture::parse(svg.as_bytes())
        .expect("parses")
        .pdf()
        .expect("pdf");
    assert!(pdf.windows(13).any(|w| w == b"/Subtype /Ima"));
}

#[test]
fn a_file_reference_is_never_read() {
    let svg = br#"<svg xmlns="http://www.w3.org/2000/svg" width="96" height="96"><image x="0" y="0" width="96" height="96" href="/etc/hostname"/></svg>"#;
    let png = Picture::parse(svg).expect("parses").png(96).expect("png");
    let (_, _, _, rgb) = decode(&png);
    assert!(rgb.iter().all(|&c| c == 255), "only the white background");
}

#[test]
fn too_many_pixels_are_refused() {
    let svg = br#"<svg xmlns="http://www.w3.org/2000/svg" width="20000" height="20000"/>"#;
    // 20000 × 20000 = 4·10⁸ pixels, over the 6.4·10⁷ allowed.
    assert_eq!(MAX_PIXELS, 64_000_000);
    let err = Picture::parse(svg)
        .expect("parses")
        .png(96)
        .expect_err("too large");
    assert!(matches!(
        err,
        PictureError::TooLarge {
            width: 20000,
            height: 20000,
            dpi: 96
        }
    ));
}

/// Standard base64 (RFC 4648), enough for a test image.
fn base64_encode(bytes: &[u8]) -> String {
    const ABC: &[u8; 64] = b"ABCDEFGHIJKLMNOPQRSTUVWXYZabcdefghijklmnopqrstuvwxyz0123456789+/";
    let mut out = String::new();
    for chunk in bytes.chunks(3) {
        let b = [
            chunk[0],
            *chunk.get(1).unwrap_or(&0),
            *chunk.get(2).unwrap_or(&0),
        ];
        let n = (u32::from(b[0]) << 16) | (u32::from(b[1]) << 8) | u32::from(b[2]);
        for i in 0..4 {
            if i <= chunk.len() {
                out.push(ABC[(n >> (18 - 6 * i) & 63) as usize] as char);
            } else {
                out.push('=');
            }
        }
    }
    out
}

#[test]
fn pdf_bytes_repeat_with_many_resources() {
    // Several opacities and images: svg2pdf keeps each kind of resource in
    // a hash map, whose order changes from map to map.
    let mut svg =
        String::from(r#"<svg xmlns="http://www.w3.org/2000/svg" width="200" height="200">"#);
    for i in 0..8 {
        svg.push_str(&format!(
            r##"<rect x="{x}" y="{x}" width="20" height="20" fill="#0072B2" opacity="0.{o}"/><text x="{x}" y="150" font-size="9" fill-opacity="0.{o}">{i}</text>"##,
            x = 10 + 20 * i,
            o = i + 1
        ));
    }
    svg.push_str("</svg>");
    let picture = Picture::parse(svg.as_bytes()).expect("parses");
    let first = picture.pdf().expect("pdf");
    for _ in 0..20 {
        assert!(picture.pdf().expect("pdf") == first, "PDF bytes changed");
    }
}
