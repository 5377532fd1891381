//! The outputs of a K audit (`scales`, `audit --scales`): `scales.json`,
//! `scales.csv`, `scales.md`, the two pictures, the page section and the
//! terminal lines.
//!
//! | module | writes |
//! |---|---|
//! | [`plot`] | `scales.svg` and `corrections.svg` |
//! | [`text`] | `scales.csv`, `scales.md`, the table rows and the page section |

pub mod plot;
pub mod text;

use crate::OutputFolder;
use crate::numbers::trimmed;
use crate::run::RenderError;
use crate::terminal_layout::{Column, Grid, wrap};
use patternproof_scales::ScalesRun;

/// The files of a K audit: scales.json, scales.csv, scales.md and the
/// two pictures.
pub fn add_files(folder: &mut OutputFolder, run: &ScalesRun) -> Result<(), RenderError> {
    let json = serde_json::to_vec_pretty(run).map_err(|source| RenderError::Json {
        file: "scales.json",
        source,
    })?;
    folder.add("scales.json", json);
    folder.add("scales.csv", text::csv(run).into_bytes());
    folder.add("scales.md", text::markdown(run).into_bytes());
    if let Some(svg) = plot::scales_svg(run) {
        folder.add("scales.svg", svg.into_bytes());
    }
    if let Some(svg) = plot::corrections_svg(run) {
        folder.add("corrections.svg", svg.into_bytes());
    }
    Ok(())
}

/// The folder of `patternproof scales`.
pub fn folder(run: &ScalesRun) -> Result<OutputFolder, RenderError> {
    let mut folder = OutputFolder::default();
    add_files(&mut folder, run)?;
    Ok(folder)
}

/// The terminal text of a K audit (every line ends in a newline): the
/// grid, the per-window table, the sweep's `notes`, skipped windows, the
/// verdicts and the cautions, laid out for `width` columns (`None`:
/// piped, 100 columns) by [`terminal_layout`](crate::terminal_layout): the distance bands wrap
/// between words, and the n, MAD T and ERL p columns go, in that order
/// from the last, when they do not fit (`scales.md` has them all).
pub fn terminal_text(run: &ScalesRun, notes: &[String], width: Option<u16>) -> String {
    let mut s = String::new();
    let say = |s: &mut String, text: String, first: &str, rest: &str| {
        s.push_str(&wrap(&text, width, first, rest));
        s.push('\n');
    };
    say(
        &mut s,
        format!(
            "L(r) − r up to {} {} ({} steps; {}), {} CSR simulations per window, seed {}:",
            trimmed(run.rmax, 3),
            run.unit,
            run.r.len(),
            run.rmax_rule,
            run.sims,
            run.seed
        ),
        "",
        "  ",
    );
    let mut grid = Grid::new(
        vec![
            Column::text("window"),
            Column::number("n").rank(1),
            Column::text("correction"),
            Column::number("MAD T").rank(2),
            Column::number("MAD p"),
            Column::number("ERL p").rank(1),
            Column::prose("bands outside the MAD envelope"),
        ],
        1,
        "scales.md",
    );
    for r in text::table_rows(run) {
        grid.push(r.to_vec());
    }
    s.push_str(&grid.render(width));
    for n in notes {
        say(&mut s, format!("note: {n}"), "", "  ");
    }
    for k in &run.skipped {
        say(
            &mut s,
            format!("skipped {}: {}", k.window, k.reason),
            "",
            "  ",
        );
    }
    for v in &run.verdicts {
        s.push('\n');
        say(
            &mut s,
            format!(
                "Verdict ({} correction, MAD test at α = {}): {}.",
                v.correction.as_str(),
                run.alpha,
                v.sentence
            ),
            "",
            "  ",
        );
    }
    for c in &run.cautions {
        say(&mut s, format!("caution: {c}"), "  ", "    ");
    }
    s
}
