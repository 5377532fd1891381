//! `--figures` and `--dpi`: print copies of every SVG picture of a report
//! folder, added to the folder before it is written, so that they go in
//! with it (listed in its marker, replaced by `--force`, never half
//! written). `index.html` keeps embedding the SVGs.

use crate::fail::Failure;
use patternproof::words::PictureFormat;
use patternproof_pictures::{Picture, PictureError};
use patternproof_report::OutputFolder;
use rayon::prelude::*;

/// Add `NAME.png` and/or `NAME.pdf` beside each `NAME.svg` of `folder`,
/// as `formats` asks, PNGs at `dpi`. The copies are made in parallel and
/// added in the order of the SVGs, so the folder is the same for any
/// number of threads.
pub fn add_copies(
    folder: &mut OutputFolder,
    formats: &[PictureFormat],
    dpi: u32,
) -> Result<(), Failure> {
    let png = formats.contains(&PictureFormat::Png);
    let pdf = formats.contains(&PictureFormat::Pdf);
    if !png && !pdf {
        return Ok(());
    }
    let svgs: Vec<(&str, &[u8])> = folder
        .files()
        .filter_map(|(name, bytes)| Some((name.strip_suffix(".svg")?, bytes)))
        .collect();
    let copies: Vec<Vec<(String, Vec<u8>)>> = svgs
        .par_iter()
        .map(|&(stem, svg)| copies_of(stem, svg, png.then_some(dpi), pdf))
        .collect::<Result<_, _>>()?;
    for (name, bytes) in copies.into_iter().flatten() {
        folder.add(&name, bytes);
    }
    Ok(())
}

/// The copies of one picture, `stem.svg`.
fn copies_of(
    stem: &str,
    svg: &[u8],
    png_dpi: Option<u32>,
    pdf: bool,
) -> Result<Vec<(String, Vec<u8>)>, Failure> {
    let fail = |e: PictureError| match e {
        PictureError::TooLarge { width, height, dpi } => Failure::Input(format!(
            "--dpi {dpi}: {stem}.png would be {width} × {height} pixels, more than the {} this program draws\n  what to do: give a lower --dpi (e.g. --dpi 300), or leave png out of --figures and use the PDF",
            patternproof_pictures::MAX_PIXELS
        )),
        e => Failure::Internal(format!("{stem}.svg: {e}")),
    };
    let picture = Picture::parse(svg).map_err(fail)?;
    let mut out = Vec::new();
    if let Some(dpi) = png_dpi {
        out.push((format!("{stem}.png"), picture.png(dpi).map_err(fail)?));
    }
    if pdf {
        out.push((format!("{stem}.pdf"), picture.pdf().map_err(fail)?));
    }
    Ok(out)
}
