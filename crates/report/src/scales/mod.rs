//! The outputs of a K audit (`scales`, `audit --scales`): `scales.json`,
//! `scales.csv`, `scales.md`, the two pictures, the page section, the
//! `index.html` of `scales` and the terminal lines.
//!
//! | module | writes |
//! |---|---|
//! | [`plot`] | `scales.svg` and `corrections.svg` |
//! | [`text`] | `scales.csv`, `scales.md`, the table rows and the page section |

pub mod plot;
pub mod text;

use crate::OutputFolder;
use crate::document::{FileDigest, InputSummary};
use crate::html::{input_table, provenance_block};
use crate::numbers::trimmed;
use crate::page::{page, prose, trusted_svg};
use crate::run::{RenderError, RunContext};
use crate::terminal_layout::{Column, Grid, wrap};
use maud::html;
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

/// What the page of `patternproof scales` says about where the run came
/// from, beside the run itself.
#[derive(Debug, Clone, Copy)]
pub struct Source<'a> {
    /// The input as the audit's page describes it.
    pub input: &'a InputSummary,
    /// SHA-256 of every input file.
    pub digests: &'a [FileDigest],
    /// Why windows were left out of the sweep.
    pub notes: &'a [String],
}

/// The folder of `patternproof scales`: the K files and `index.html`.
pub fn folder(
    run: &ScalesRun,
    source: Source<'_>,
    context: &RunContext,
) -> Result<OutputFolder, RenderError> {
    let mut folder = OutputFolder::default();
    add_files(&mut folder, run)?;
    folder.add("index.html", index_html(run, source, context).into_bytes());
    Ok(folder)
}

/// The `index.html` of `patternproof scales`, in the one layout of
/// [`crate::page`]: the job, the input, the K section the audit's page
/// also carries, both pictures, and the provenance (input checksums, the
/// command line, the seed). Self-contained: inline SVG, no script.
pub fn index_html(run: &ScalesRun, source: Source<'_>, context: &RunContext) -> String {
    let i = source.input;
    let provenance = context.provenance();
    let scales_svg = plot::scales_svg(run);
    let corrections_svg = plot::corrections_svg(run);
    let body = html! {
        h1 { "Does the claim at a given distance survive the choice of study area?" }
        p.job {
            "Ripley's K audit of " code { (i.points_file) } ": " (i.n) " points, "
            (run.windows.len()) " windows × " (run.corrections.len()) " edge corrections, "
            (run.sims) " CSR simulations per window, α = " (run.alpha.to_string()) "."
        }
        h2 id="input" { "Input" }
        (input_table(i))
        h2 id="scales" { "Ripley's K and L across the windows" }
        (text::html_section(run, scales_svg.as_deref()))
        @if !source.notes.is_empty() {
            p { "Windows of the sweep:" }
            ul {
                @for n in source.notes {
                    li { (prose(n)) }
                }
            }
        }
        @if let Some(svg) = &corrections_svg {
            h2 id="corrections" { "The corrections side by side" }
            figure {
                (trusted_svg(svg))
                figcaption { "Does the edge correction change the curve? One panel per correction, L(r) − r of every window." }
            }
        }
        (provenance_block(source.digests, &provenance.command_line))
        p {
            "patternproof " (env!("CARGO_PKG_VERSION")) " · scales schema " (run.schema)
            " · seed " (run.seed)
            @if let Some(t) = &provenance.stamp {
                " · run at " (t)
            }
        }
    };
    page(&format!("patternproof scales of {}", i.points_file), body)
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
