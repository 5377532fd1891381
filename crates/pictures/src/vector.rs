//! PDF: the picture as vector graphics by `svg2pdf`, one page the size of
//! the SVG at 96 units to the inch, text kept as text in an embedded
//! subset of the bundled font (a `FontFile2` stream), so it prints sharp
//! at any size and can be searched.
//!
//! `svg2pdf` 0.13 writes no creation date and no document ID, and names
//! font subsets by a hash of their glyphs. Two things of it still depend
//! on the order of a hash map, which changes from run to run: the order in
//! which several fonts are written (so `font.rs` loads one face), and the
//! order of the entries of each resource dictionary, which
//! [`sort_resource_entries`] puts right afterwards. So the same tree gives
//! the same bytes; the tests check it.

use crate::{CSS_DPI, PictureError};
use resvg::usvg::Tree;
use svg2pdf::{ConversionOptions, PageOptions};

pub fn pdf(tree: &Tree) -> Result<Vec<u8>, PictureError> {
    let mut pdf = svg2pdf::to_pdf(
        tree,
        ConversionOptions::default(),
        PageOptions {
            dpi: CSS_DPI as f32,
        },
    )
    .map_err(|e| PictureError::Pdf(e.to_string()))?;
    sort_resource_entries(&mut pdf);
    Ok(pdf)
}

/// The resource sub-dictionaries whose entries `svg2pdf` writes in hash
/// order, as `pdf-writer` opens them (one key per line).
const RESOURCE_KEYS: [&[u8]; 6] = [
    b"/XObject <<",
    b"/ExtGState <<",
    b"/Pattern <<",
    b"/Shading <<",
    b"/Font <<",
    b"/ColorSpace <<",
];

/// Sort the lines of every resource sub-dictionary outside the streams.
/// The lines only change places, so every object keeps its byte offset
/// and the cross-reference table stays right. A dictionary whose entries
/// are not one per line is left as it is.
fn sort_resource_entries(pdf: &mut [u8]) {
    let mut at = 0;
    while let Some(end) = line_end(pdf, at) {
        let line = &pdf[at..end];
        let key = trim_start(line);
        if key == b"stream" {
            // Skip the stream's data by the length its dictionary gives.
            let Some(length) = stream_length(&pdf[..at]) else {
                return;
            };
            at = end + 1 + length;
            continue;
        }
        if RESOURCE_KEYS.contains(&key) {
            at = sort_block(pdf, end + 1).unwrap_or(end + 1);
            continue;
        }
        at = end + 1;
    }
}

/// The index of the newline ending the line that starts at `at`.
fn line_end(pdf: &[u8], at: usize) -> Option<usize> {
    pdf.get(at..)?
        .iter()
        .position(|&b| b == b'\n')
        .map(|n| at + n)
}

fn trim_start(line: &[u8]) -> &[u8] {
    let n = line.iter().take_while(|&&b| b == b' ').count();
    &line[n..]
}

/// Sort the entry lines from `start` up to the line `>>`; the index after
/// that line, or `None` (nothing changed) if an entry spans lines.
fn sort_block(pdf: &mut [u8], start: usize) -> Option<usize> {
    let mut lines: Vec<Vec<u8>> = Vec::new();
    let mut at = start;
    loop {
        let end = line_end(pdf, at)?;
        let line = &pdf[at..end];
        let entry = trim_start(line);
        if entry == b">>" {
            break;
        }
        if !entry.starts_with(b"/") || entry.ends_with(b"<<") || entry.ends_with(b"[") {
            return None;
        }
        lines.push(line.to_vec());
        at = end + 1;
    }
    lines.sort();
    let sorted: Vec<u8> = lines
        .iter()
        .flat_map(|l| l.iter().chain(b"\n"))
        .copied()
        .collect();
    pdf[start..start + sorted.len()].copy_from_slice(&sorted);
    line_end(pdf, at).map(|end| end + 1)
}

/// The `/Length` of the dictionary just before a `stream` keyword: the
/// last one after the last `obj` (the stream's own dictionary ends there).
fn stream_length(before: &[u8]) -> Option<usize> {
    let object = before.windows(4).rposition(|w| w == b" obj")?;
    let dict = &before[object..];
    let key = dict.windows(8).rposition(|w| w == b"/Length ")?;
    let digits: Vec<u8> = dict[key + 8..]
        .iter()
        .take_while(|b| b.is_ascii_digit())
        .copied()
        .collect();
    // `/Length 5 0 R` (an indirect length) is not a length here.
    let after = dict.get(key + 8 + digits.len()..key + 8 + digits.len() + 4)?;
    if after.starts_with(b" 0 R") {
        return None;
    }
    std::str::from_utf8(&digits).ok()?.parse().ok()
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn entries_are_sorted_in_place_and_streams_skipped() {
        let before = b"1 0 obj\n<<\n  /Length 22\n>>\nstream\n  /Font <<\n  /b 2\n  /a\nendstream\nendobj\n2 0 obj\n<<\n  /Resources <<\n    /XObject <<\n      /xo1 10 0 R\n      /xo0 8 0 R\n    >>\n    /ProcSet [/PDF]\n  >>\n>>\nendobj\n";
        let mut pdf = before.to_vec();
        sort_resource_entries(&mut pdf);
        let want = String::from_utf8_lossy(before).replace(
            "      /xo1 10 0 R\n      /xo0 8 0 R\n",
            "      /xo0 8 0 R\n      /xo1 10 0 R\n",
        );
        // The stream's bytes (which look like a dictionary) are untouched.
        assert_eq!(String::from_utf8_lossy(&pdf), want);
        assert_eq!(pdf.len(), before.len());
    }

    #[test]
    fn a_nested_entry_is_left_alone() {
        let before =
            b"1 0 obj\n<<\n  /Font <<\n    /f1 <<\n    >>\n    /f0 3 0 R\n  >>\n>>\nendobj\n";
        let mut pdf = before.to_vec();
        sort_resource_entries(&mut pdf);
        assert_eq!(pdf, before.to_vec());
    }
}
