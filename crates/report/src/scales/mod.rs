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
use patternproof_scales::ScalesRun;
use std::fmt::Write as _;

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
/// verdicts and the cautions.
pub fn terminal_text(run: &ScalesRun, notes: &[String]) -> String {
    let mut s = String::new();
    let _ = writeln!(
        s,
        "L(r) − r up to {} {} ({} steps; {}), {} CSR simulations per window, seed {}:",
        trimmed(run.rmax, 3),
        run.unit,
        run.r.len(),
        run.rmax_rule,
        run.sims,
        run.seed
    );
    let _ = writeln!(
        s,
        "{:<14} {:>5}  {:<11} {:>9} {:>7} {:>7}  bands outside the MAD envelope",
        "window", "n", "correction", "MAD T", "MAD p", "ERL p"
    );
    for r in text::table_rows(run) {
        let _ = writeln!(
            s,
            "{:<14} {:>5}  {:<11} {:>9} {:>7} {:>7}  {}",
            r[0], r[1], r[2], r[3], r[4], r[5], r[6]
        );
    }
    for n in notes {
        let _ = writeln!(s, "note: {n}");
    }
    for k in &run.skipped {
        let _ = writeln!(s, "skipped {}: {}", k.window, k.reason);
    }
    for v in &run.verdicts {
        let _ = writeln!(
            s,
            "\nVerdict ({} correction, MAD test at α = {}): {}.",
            v.correction.as_str(),
            run.alpha,
            v.sentence
        );
    }
    for c in &run.cautions {
        let _ = writeln!(s, "  caution: {c}");
    }
    s
}
