//! `verdict.md`: the table, the flip thresholds and the verdict in a form
//! that pastes into a manuscript's supplement or a review. Every string
//! that comes from the user (file names, `--unit`, boundary names inside
//! window ids, warnings) goes through [`crate::markdown_escape`].

use crate::document::AuditReport;
use crate::markdown_escape::{code, prose, text};
use crate::numbers::{fixed, opt, p_value, percent, sig};
use crate::table::{call_word, flip_lines};
use std::io;

/// Write `verdict.md`.
pub fn write_markdown<W: io::Write>(report: &AuditReport, mut out: W) -> io::Result<()> {
    let u = &text(&report.input.unit);
    let i = &report.input;
    writeln!(
        out,
        "# Nearest-neighbour audit of {}\n",
        code(&i.points_file)
    )?;
    writeln!(
        out,
        "{}",
        crate::matrix::VerdictMatrix::new(report).markdown()
    )?;
    writeln!(out, "**Verdict:** {}.\n", prose(&report.summary.verdict))?;
    writeln!(out, "{}.\n", text(&crate::matrix::counts_line(report)))?;
    writeln!(
        out,
        "{} points analysed ({} read, {} duplicate(s){}); coordinates {}; distances in {u}, areas in {u}²; α = {} (two-sided, critical |z| = {:.4}); observed mean nearest-neighbour distance {} {u}.\n",
        i.n,
        i.n_read,
        i.duplicates,
        if i.duplicates_dropped {
            " removed"
        } else {
            " kept"
        },
        text(&i.coords),
        report.alpha,
        report.settings.z_crit,
        sig(report.mean_nn, 5),
    )?;
    if let Some(p) = &i.projection {
        writeln!(out, "Projection: {}.\n", text(p))?;
    }
    writeln!(out, "## Windows\n")?;
    writeln!(
        out,
        "| id | kind | buffer {u} | area {u}² | perimeter {u} | points outside |"
    )?;
    writeln!(out, "|---|---|--:|--:|--:|--:|")?;
    for w in &report.windows {
        writeln!(
            out,
            "| {} | {} | {} | {} | {} | {} |",
            code(&w.id),
            serde_json::to_value(w.kind)
                .ok()
                .and_then(|v| v.as_str().map(String::from))
                .unwrap_or_default(),
            opt(w.buffer, 4),
            sig(w.area, 5),
            opt(w.perimeter, 5),
            w.points_outside
        )?;
    }
    for n in &report.window_notes {
        writeln!(out, "\n- {}", prose(n))?;
    }
    writeln!(out, "\n## Verdict table\n")?;
    writeln!(
        out,
        "| window | edge | n | d̄ {u} | E[d] {u} | R | z | p | call | false alarms under CSR | note |"
    )?;
    writeln!(out, "|---|---|--:|--:|--:|--:|--:|--:|---|--:|---|")?;
    for r in &report.results {
        let n = match r.focal {
            Some(f) => format!("{f}/{}", r.n_used),
            None => r.n_used.to_string(),
        };
        writeln!(
            out,
            "| {} | {} | {} | {} | {} | {} | {} | {} | {} | {} | {} |",
            code(&r.window),
            r.edge,
            n,
            opt(r.mean_nn, 4),
            opt(r.expected_nn, 4),
            r.ratio.map_or("—".into(), |x| fixed(x, 3)),
            r.z.map_or("—".into(), |x| fixed(x, 2)),
            r.p.map_or("—".into(), p_value),
            call_word(r.call),
            r.size_under_csr.map_or("—".into(), percent),
            prose(r.note.as_deref().unwrap_or_default()),
        )?;
    }
    if !report.skipped.is_empty() {
        writeln!(out, "\nNot computed:\n")?;
        for s in &report.skipped {
            writeln!(
                out,
                "- {} with `{}`: {}",
                code(&s.window),
                s.edge,
                prose(&s.reason)
            )?;
        }
    }
    writeln!(
        out,
        "\n`border` rows show focal/total points. `simulation` rows: E[d] is the mean of {} simulated CSR patterns in the exact window (seed {}), p the two-sided rank p-value. \"False alarms under CSR\" is the share of those simulated patterns the row's analytic test would call significant at α.\n",
        report.settings.sims, report.settings.seed
    )?;
    writeln!(out, "## Robustness\n")?;
    let sm = &report.summary;
    writeln!(
        out,
        "Over all {} choices: {} clustered, {} dispersed, {} not significant.\n",
        sm.choices_examined, sm.calls.clustered, sm.calls.dispersed, sm.calls.not_significant
    )?;
    writeln!(
        out,
        "| window | clustered | dispersed | not significant | unanimous |"
    )?;
    writeln!(out, "|---|--:|--:|--:|---|")?;
    for w in &sm.per_window {
        writeln!(
            out,
            "| {} | {} | {} | {} | {} |",
            code(&w.window),
            w.calls.clustered,
            w.calls.dispersed,
            w.calls.not_significant,
            if w.unanimous { "yes" } else { "no" }
        )?;
    }
    writeln!(out)?;
    writeln!(out, "## Where the call flips\n")?;
    for line in flip_lines(report) {
        writeln!(out, "- {}", prose(&line))?;
    }
    writeln!(out, "\n## Methods paragraph\n")?;
    writeln!(out, "{}", prose(&crate::methods::methods_paragraph(report)))?;
    writeln!(out, "\n## Cautions\n")?;
    for c in &report.cautions {
        writeln!(out, "- {}", prose(c))?;
    }
    if !i.warnings.is_empty() {
        writeln!(out, "\n## Input warnings\n")?;
        for wn in &i.warnings {
            writeln!(out, "- {}", prose(wn))?;
        }
    }
    writeln!(
        out,
        "\n---\npatternproof {} · schema {}",
        report.tool_version, report.schema
    )?;
    Ok(())
}
