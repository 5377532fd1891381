//! What several commands share: reading the inputs with the shared flags
//! and saying how they were read, and the command line for a report's
//! page.

use crate::args::InputArgs;
use crate::fail::Failure;
use patternproof::Dataset;
use patternproof::options::{GpkgChoice, LoadOptions, parse_filter};
use patternproof_report::{OutputFolder, html};
use std::path::Path;

/// The command line as typed, quoted where needed, for the report's page.
/// The program is named `patternproof` whatever path it was started by,
/// so a page names no folder of the machine it was made on and every
/// command's page begins alike.
pub fn command_line() -> String {
    std::iter::once("patternproof".to_string())
        .chain(
            std::env::args_os()
                .skip(1)
                .map(|s| html::shell_quote(&s.to_string_lossy())),
        )
        .collect::<Vec<_>>()
        .join(" ")
}

/// Load points and boundaries with the shared input flags.
pub fn load(input: &InputArgs) -> Result<Dataset, Failure> {
    Ok(patternproof::load(
        &input.points,
        &input.boundaries,
        &LoadOptions {
            coords: input.coords.choice(),
            unit: input.coords.unit.clone(),
            drop_duplicates: input.drop_duplicates,
            field: None,
            gpkg: gpkg_choice(
                input.layer.clone(),
                input.boundary_layer.clone(),
                input.filter.as_deref(),
            )?,
        },
    )?)
}

/// Say how the points were read, first thing: which coordinate system and
/// why (column names, a format's default, the file's own declaration or
/// `--coords`). On stderr, beside the warnings, so that a table or JSON on
/// stdout stays clean; a misreading is never silent.
pub fn print_reading(data: &Dataset) {
    eprintln!("{}", reading_line(&data.points_file, &data.reading, 0));
}

/// The reading line of one file, or of `others` more read the same way.
pub fn reading_line(file: &std::path::Path, reading: &str, others: usize) -> String {
    let more = match others {
        0 => String::new(),
        1 => " and 1 more file".to_string(),
        n => format!(" and {n} more files"),
    };
    format!(
        "patternproof: reading {}{more} as {reading}",
        file.display()
    )
}

/// `--layer`, `--boundary-layer` and `--where` as the reader wants them.
pub fn gpkg_choice(
    layer: Option<String>,
    boundary_layer: Option<String>,
    filter: Option<&str>,
) -> Result<GpkgChoice, Failure> {
    Ok(GpkgChoice {
        layer,
        boundary_layer,
        filter: filter.map(parse_filter).transpose()?,
    })
}

/// The closing line of every command that writes a report folder:
/// `wrote a, b, c to DIR`, naming the files at the top of the folder in
/// the order they were made and each sub-folder once (`figures/`, or
/// `site/*/` for a folder of folders).
pub fn wrote_line(folder: &OutputFolder, out: &Path) -> String {
    let mut shown: Vec<String> = Vec::new();
    for name in folder.names() {
        let entry = match name.split_once('/') {
            None => name.to_string(),
            Some((top, rest)) if rest.contains('/') => format!("{top}/*/"),
            Some((top, _)) => format!("{top}/"),
        };
        if !shown.contains(&entry) {
            shown.push(entry);
        }
    }
    format!("wrote {} to {}", shown.join(", "), out.display())
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn the_closing_line_names_top_files_and_each_sub_folder_once() {
        let mut folder = OutputFolder::default();
        folder.add("sites.csv", Vec::new());
        folder.add("index.html", Vec::new());
        folder.add("site/a/report.json", Vec::new());
        folder.add("site/b/report.json", Vec::new());
        folder.add("figures/one.png", Vec::new());
        assert_eq!(
            wrote_line(&folder, Path::new("out")),
            "wrote sites.csv, index.html, site/*/, figures/ to out"
        );
    }
}
