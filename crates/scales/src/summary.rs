//! Plain-text outputs: the Markdown summary (`scales.md`), the long table
//! of every curve (`scales.csv`) and the lines printed on the terminal.

use crate::scales::ScalesRun;
use crate::verdict::distance;
use patternproof_report::numbers::{p_value, sig};
use std::fmt::Write;

fn opt(v: Option<f64>) -> String {
    v.map_or(String::new(), |x| format!("{x}"))
}

/// `scales.csv`: one row per window × correction × distance, with the
/// envelope columns filled for the tested corrections. Full precision.
pub fn csv(run: &ScalesRun) -> String {
    let mut s = String::from(
        "window,correction,r,k,l,l_minus_r,centre,global_lo,global_hi,pointwise_lo,pointwise_hi,departure\n",
    );
    for w in &run.windows {
        for c in &w.curves {
            let test = w.tests.iter().find(|t| t.correction == c.correction);
            for (k, r) in run.r.iter().enumerate() {
                let t = |f: fn(&crate::envelope::EnvelopeTest) -> &Vec<Option<f64>>| {
                    test.map_or(String::new(), |t| opt(f(t)[k]))
                };
                let _ = writeln!(
                    s,
                    "{},{},{r},{},{},{},{},{},{},{},{},{}",
                    w.id,
                    c.correction.as_str(),
                    opt(c.k[k]),
                    opt(c.l[k]),
                    opt(c.l_minus_r[k]),
                    t(|t| &t.centre),
                    t(|t| &t.lo),
                    t(|t| &t.hi),
                    t(|t| &t.pointwise_lo),
                    t(|t| &t.pointwise_hi),
                    test.map_or(String::new(), |t| t.departure[k].to_string()),
                );
            }
        }
    }
    s
}

/// The per-window table lines (terminal and Markdown share them).
pub fn table_rows(run: &ScalesRun) -> Vec<[String; 6]> {
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
                bands,
            ]);
        }
    }
    rows
}

/// `scales.md`.
pub fn markdown(run: &ScalesRun) -> String {
    let mut s = String::from("# Multi-scale audit: L(r) − r across windows\n\n");
    let _ = writeln!(
        s,
        "{} points; distances up to {} {} ({}), {} grid steps; {} CSR simulations per window, seed {}, α = {}.\n",
        run.n_points,
        distance(run.rmax),
        run.unit,
        run.rmax_rule,
        run.r.len(),
        run.sims,
        run.seed,
        run.alpha
    );
    s.push_str("## Verdict\n\n");
    for v in &run.verdicts {
        let _ = writeln!(s, "- {} correction: {}.", v.correction.as_str(), v.sentence);
    }
    if run.verdicts.is_empty() {
        s.push_str("- no envelope test was run (`--sims 0`).\n");
    }
    s.push_str("\n## Global test per window (maximum absolute deviation, Diggle 2003)\n\n");
    s.push_str("| window | n | correction | MAD T | p | bands outside the global envelope |\n|---|---:|---|---:|---:|---|\n");
    for r in table_rows(run) {
        let _ = writeln!(
            s,
            "| `{}` | {} | {} | {} | {} | {} |",
            r[0], r[1], r[2], r[3], r[4], r[5]
        );
    }
    for k in &run.skipped {
        let _ = writeln!(s, "\nSkipped `{}`: {}.", k.window, k.reason);
    }
    s.push_str("\n## What this does and does not show\n\n");
    for c in &run.cautions {
        let _ = writeln!(s, "- {c}");
    }
    s
}
