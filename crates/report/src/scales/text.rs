//! Plain-text outputs: the Markdown summary (`scales.md`), the long table
//! of every curve (`scales.csv`) and the lines printed on the terminal.

use crate::numbers::{full, p_value, sig, trimmed};
use crate::page::trusted_svg;
use maud::{Markup, html};
use patternproof_scales::ScalesRun;
use std::fmt::Write;

/// A distance in the tables and sentences: three significant digits, no
/// trailing zeros.
fn distance(x: f64) -> String {
    trimmed(x, 3)
}

/// `scales.csv`: one row per window × correction × distance, with the
/// envelope columns filled for the tested corrections. Full precision.
/// Written by the `csv` crate, so a window id with a comma or a quote (a
/// boundary's name) is quoted as RFC 4180 says.
pub fn csv(run: &ScalesRun) -> String {
    let mut w = csv::Writer::from_writer(Vec::new());
    let _ = w.write_record([
        "window",
        "correction",
        "r",
        "k",
        "l",
        "l_minus_r",
        "centre",
        "global_lo",
        "global_hi",
        "pointwise_lo",
        "pointwise_hi",
        "departure",
        "erl_lo",
        "erl_hi",
        "erl_departure",
    ]);
    for win in &run.windows {
        for c in &win.curves {
            let test = win.tests.iter().find(|t| t.correction == c.correction);
            for (k, r) in run.r.iter().enumerate() {
                let t =
                    |f: fn(&patternproof_scales::envelope::EnvelopeTest) -> &Vec<Option<f64>>| {
                        test.map_or(String::new(), |t| full(f(t)[k]))
                    };
                let rank = test.and_then(|t| t.rank.as_ref());
                let _ = w.write_record([
                    win.id.clone(),
                    c.correction.as_str().to_string(),
                    format!("{r}"),
                    full(c.k[k]),
                    full(c.l[k]),
                    full(c.l_minus_r[k]),
                    t(|t| &t.centre),
                    t(|t| &t.lo),
                    t(|t| &t.hi),
                    t(|t| &t.pointwise_lo),
                    t(|t| &t.pointwise_hi),
                    test.map_or(String::new(), |t| t.departure[k].to_string()),
                    rank.map_or(String::new(), |e| full(e.lo[k])),
                    rank.map_or(String::new(), |e| full(e.hi[k])),
                    rank.map_or(String::new(), |e| e.departure[k].to_string()),
                ]);
            }
        }
    }
    // Writing into memory cannot fail; the text is ASCII digits, names
    // and UTF-8 window ids.
    let bytes = w.into_inner().unwrap_or_default();
    String::from_utf8(bytes).unwrap_or_default()
}

/// The per-window table lines (terminal and Markdown share them).
pub fn table_rows(run: &ScalesRun) -> Vec<[String; 7]> {
    let u = &run.unit;
    let mut rows = Vec::new();
    for w in &run.windows {
        for t in &w.tests {
            let bands = w
                .tests
                .iter()
                .position(|x| x.correction == t.correction)
                .and_then(|i| w.bands.get(i))
                .map(|b| {
                    if b.is_empty() {
                        "none".to_string()
                    } else {
                        b.iter()
                            .map(|b| {
                                if b.from == b.to {
                                    format!("{} {} {u}", b.direction.word(), distance(b.from))
                                } else {
                                    format!(
                                        "{} {}–{} {u}",
                                        b.direction.word(),
                                        distance(b.from),
                                        distance(b.to)
                                    )
                                }
                            })
                            .collect::<Vec<_>>()
                            .join("; ")
                    }
                })
                .unwrap_or_default();
            rows.push([
                w.id.clone(),
                w.n.to_string(),
                t.correction.as_str().to_string(),
                sig(t.statistic, 3),
                p_value(t.p),
                t.rank.as_ref().map_or("–".to_string(), |e| p_value(e.p)),
                bands,
            ]);
        }
    }
    rows
}

/// `scales.md`.
pub fn markdown(run: &ScalesRun) -> String {
    use crate::markdown_escape::{code, prose, text};
    let mut s = String::from("# Multi-scale audit: L(r) − r across windows\n\n");
    let _ = writeln!(
        s,
        "{} points; distances up to {} {} ({}), {} grid steps; {} CSR simulations per window, seed {}, α = {}.\n",
        run.n_points,
        distance(run.rmax),
        text(&run.unit),
        prose(&run.rmax_rule),
        run.r.len(),
        run.sims,
        run.seed,
        run.alpha
    );
    s.push_str("## Verdict\n\n");
    for v in &run.verdicts {
        let _ = writeln!(
            s,
            "- {} correction: {}.",
            v.correction.as_str(),
            prose(&v.sentence)
        );
    }
    if run.verdicts.is_empty() {
        s.push_str("- no envelope test was run (`--sims 0`).\n");
    }
    s.push_str("\n## Global tests per window\n\nMAD: maximum absolute deviation (Diggle 2003); its band gives the distance bands. ERL: the rank envelope with extreme-rank-length ordering (Myllymäki et al. 2017) on the same simulated curves.\n\n");
    s.push_str("| window | n | correction | MAD T | MAD p | ERL p | bands outside the MAD envelope |\n|---|---:|---|---:|---:|---:|---|\n");
    for r in table_rows(run) {
        let _ = writeln!(
            s,
            "| {} | {} | {} | {} | {} | {} | {} |",
            code(&r[0]),
            text(&r[1]),
            text(&r[2]),
            text(&r[3]),
            text(&r[4]),
            text(&r[5]),
            prose(&r[6])
        );
    }
    for k in &run.skipped {
        let _ = writeln!(s, "\nSkipped {}: {}.", code(&k.window), prose(&k.reason));
    }
    s.push_str("\n## What this does and does not show\n\n");
    for c in &run.cautions {
        let _ = writeln!(s, "- {}", prose(c));
    }
    s
}

/// The section of the audit's `index.html` (`audit --scales`): the
/// verdict sentences, the L(r) − r picture, the per-window test table and
/// the cautions. Every user string is escaped (maud).
pub fn html_section(run: &ScalesRun, svg: Option<&str>) -> Markup {
    let u = run.unit.as_str();
    let corrections = run
        .corrections
        .iter()
        .map(|c| c.as_str())
        .collect::<Vec<_>>()
        .join(", ");
    html! {
        p {
            "Does a clustering claim at a given distance survive the choice of study area? Ripley's K̂(r) = |W|/(n(n−1))·Σ w" sub { "ij" } "·1(d" sub { "ij" }
            " ≤ r), shown as L(r) − r = √(K̂/π) − r, in every window with the " (corrections)
            " correction(s), up to r = " (distance(run.rmax)) " " (u) " (" (run.rmax_rule) ") on "
            (run.r.len()) " distances; " (run.sims) " CSR simulations per window (seed " (run.seed)
            ") give a global envelope and the maximum absolute deviation test (Diggle 2003) at α = "
            (run.alpha.to_string()) "."
        }
        ul {
            @for v in &run.verdicts {
                li { strong { (v.correction.as_str()) " correction:" } " " (crate::page::prose(&v.sentence)) "." }
            }
            @if run.verdicts.is_empty() {
                li { "No envelope test was run (no simulations)." }
            }
        }
        @if let Some(svg) = svg {
            figure {
                (trusted_svg(svg))
                figcaption { "L(r) − r in each window with the global envelope (the test over all distances together) and, lighter, the pointwise envelope (orientation only, not a test). Above the band: clustering at that distance; below: regularity." }
            }
        }
        table {
            tr {
                th { "window" } th { "n" } th { "correction" } th { "MAD T" } th { "MAD p" }
                th { "ERL p" } th { "bands outside the MAD envelope" }
            }
            @for r in table_rows(run) {
                tr {
                    td { code { (r[0]) } }
                    td.num { (r[1]) }
                    td { (r[2]) }
                    td.num { (r[3]) }
                    td.num { (r[4]) }
                    td.num { (r[5]) }
                    td { (r[6]) }
                }
            }
        }
        @if !run.skipped.is_empty() {
            p { "Not analysed:" }
            ul {
                @for k in &run.skipped {
                    li { code { (k.window) } ": " (k.reason) }
                }
            }
        }
        ul {
            @for c in &run.cautions {
                li.caution { (crate::page::prose(c)) }
            }
        }
        p {
            "Every curve is in " code { "scales.json" } " and " code { "scales.csv" }
            "; the corrections side by side in " code { "corrections.svg" } "."
        }
    }
}
