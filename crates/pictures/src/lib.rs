//! Print copies of the SVG pictures patternproof draws: a PNG at a chosen
//! resolution and a PDF, for a journal that wants one or the other.
//!
//! Each SVG is parsed once with `usvg` ([`Picture::parse`]); [`Picture::png`]
//! rasterises it with `resvg` (`raster.rs`) and [`Picture::pdf`] writes it
//! as vector PDF with `svg2pdf` (`vector.rs`). Text is drawn with one
//! bundled font, DejaVu Sans, and never with the machine's fonts
//! (`font.rs`): a fresh machine may have none, and two machines with
//! different fonts would give different bytes. So the same SVG gives the
//! same PNG and PDF bytes everywhere.
//!
//! The crate knows nothing of the analyses or of report folders; the
//! command line hands it each picture's bytes and files what comes back.
//!
//! ```
//! use patternproof_pictures::Picture;
//! let svg = br#"<svg xmlns="http://www.w3.org/2000/svg" width="96" height="48">
//!   <text x="4" y="30" font-family="sans-serif" font-size="20">K(r)</text></svg>"#;
//! let picture = Picture::parse(svg)?;
//! let png = picture.png(300)?; // 300 dots per inch: 96 px → 300 pixels
//! assert_eq!(&png[1..4], b"PNG");
//! let pdf = picture.pdf()?;
//! assert!(pdf.starts_with(b"%PDF"));
//! # Ok::<(), patternproof_pictures::PictureError>(())
//! ```

mod font;
mod raster;
mod vector;

pub use raster::{MAX_PIXELS, pixel_size};

/// The CSS resolution: an SVG's user unit (px) is 1/96 inch, so a
/// picture 96 units wide is one inch wide on paper, in the PNG at any
/// resolution and in the PDF alike.
pub const CSS_DPI: f64 = 96.0;

/// Why a picture could not be converted.
#[derive(Debug, thiserror::Error)]
pub enum PictureError {
    /// The SVG could not be parsed (patternproof's own SVG: a bug).
    #[error("the SVG could not be read: {0}")]
    Parse(String),
    /// The PNG would have more pixels than [`MAX_PIXELS`] at this
    /// resolution: the user can ask for fewer dots per inch.
    #[error(
        "a {width} × {height}-pixel PNG at {dpi} dpi is more than the {max} pixels allowed",
        max = MAX_PIXELS
    )]
    TooLarge {
        /// Width in pixels.
        width: u64,
        /// Height in pixels.
        height: u64,
        /// The resolution asked for.
        dpi: u32,
    },
    /// The SVG has no area (zero width or height).
    #[error("the picture has no area")]
    Empty,
    /// The PNG encoder failed.
    #[error("the PNG could not be encoded: {0}")]
    Png(String),
    /// `svg2pdf` refused the picture.
    #[error("the PDF could not be written: {0}")]
    Pdf(String),
}

/// One parsed SVG picture, ready to be written as PNG or PDF.
pub struct Picture {
    tree: resvg::usvg::Tree,
}

impl Picture {
    /// Parse `svg` with every text set in the bundled font. Images may
    /// only be embedded as data URLs: a reference to a file is left out,
    /// so a picture can never pull a file from the disk into its copies.
    pub fn parse(svg: &[u8]) -> Result<Self, PictureError> {
        use resvg::usvg::{ImageHrefResolver, Options, Tree};
        let options = Options {
            font_family: font::FAMILY.to_string(),
            fontdb: font::database(),
            image_href_resolver: ImageHrefResolver {
                resolve_data: ImageHrefResolver::default_data_resolver(),
                resolve_string: Box::new(|_, _| None),
            },
            ..Options::default()
        };
        let tree =
            Tree::from_data(svg, &options).map_err(|e| PictureError::Parse(e.to_string()))?;
        Ok(Self { tree })
    }

    /// Width and height in SVG units (CSS pixels, [`CSS_DPI`] to the inch).
    pub fn size(&self) -> (f64, f64) {
        let s = self.tree.size();
        (f64::from(s.width()), f64::from(s.height()))
    }

    /// The picture as a PNG at `dpi` dots per inch, on white, with the
    /// resolution written into its `pHYs` chunk.
    pub fn png(&self, dpi: u32) -> Result<Vec<u8>, PictureError> {
        raster::png(&self.tree, dpi)
    }

    /// The picture as a one-page vector PDF the size of the SVG
    /// ([`CSS_DPI`] units to the inch), its text as text in an embedded
    /// subset of the bundled font.
    pub fn pdf(&self) -> Result<Vec<u8>, PictureError> {
        vector::pdf(&self.tree)
    }
}
