//! PNG: the picture rasterised by `resvg` at `dpi / 96` device pixels per
//! SVG unit, on white (a journal's page is white; a transparent PNG shows
//! black in some viewers), written as 8-bit RGB by the `png` crate with
//! the resolution in its `pHYs` chunk so that layout programs place it at
//! its size.

use crate::{CSS_DPI, PictureError};
use resvg::tiny_skia::{Color, Pixmap, Transform};
use resvg::usvg::Tree;

/// The most pixels a PNG may have: 64 million (256 MB while drawn), about
/// a 25 × 20 cm picture at 1000 dpi; a larger one is refused with advice
/// rather than exhausting the memory.
pub const MAX_PIXELS: u64 = 64_000_000;

/// The PNG size of an SVG `width` × `height` units at `dpi`: each side
/// times `dpi / 96`, rounded to the nearest pixel (at least one).
pub fn pixel_size(width: f64, height: f64, dpi: u32) -> (u64, u64) {
    let scale = f64::from(dpi) / CSS_DPI;
    let side = |v: f64| ((v * scale).round() as u64).max(1);
    (side(width), side(height))
}

pub fn png(tree: &Tree, dpi: u32) -> Result<Vec<u8>, PictureError> {
    let size = tree.size();
    let (w, h) = pixel_size(f64::from(size.width()), f64::from(size.height()), dpi);
    if w.saturating_mul(h) > MAX_PIXELS {
        return Err(PictureError::TooLarge {
            width: w,
            height: h,
            dpi,
        });
    }
    let (w, h) = (
        u32::try_from(w).map_err(|_| PictureError::Empty)?,
        u32::try_from(h).map_err(|_| PictureError::Empty)?,
    );
    let mut pixmap = Pixmap::new(w, h).ok_or(PictureError::Empty)?;
    pixmap.fill(Color::WHITE);
    let scale = (f64::from(dpi) / CSS_DPI) as f32;
    resvg::render(
        tree,
        Transform::from_scale(scale, scale),
        &mut pixmap.as_mut(),
    );
    // On an opaque background every pixel is opaque, so the premultiplied
    // colours are the colours: drop alpha.
    let rgb: Vec<u8> = pixmap
        .data()
        .chunks_exact(4)
        .flat_map(|p| [p[0], p[1], p[2]])
        .collect();
    let mut out = Vec::new();
    let mut encoder = png::Encoder::new(&mut out, w, h);
    encoder.set_color(png::ColorType::Rgb);
    encoder.set_depth(png::BitDepth::Eight);
    let per_metre = (f64::from(dpi) / 0.0254).round() as u32;
    encoder.set_pixel_dims(Some(png::PixelDimensions {
        xppu: per_metre,
        yppu: per_metre,
        unit: png::Unit::Meter,
    }));
    let bad = |e: png::EncodingError| PictureError::Png(e.to_string());
    let mut writer = encoder.write_header().map_err(bad)?;
    writer.write_image_data(&rgb).map_err(bad)?;
    writer.finish().map_err(bad)?;
    Ok(out)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn sides_scale_by_dpi_over_96_and_round() {
        // 1090 × 680 units at 300 dpi: 3406.25 → 3406, 2125 exactly.
        assert_eq!(pixel_size(1090.0, 680.0, 300), (3406, 2125));
        assert_eq!(pixel_size(96.0, 48.0, 96), (96, 48));
        assert_eq!(pixel_size(0.1, 0.1, 72), (1, 1));
    }
}
