//! `sites.csv`, `sites.md` and `sites.json`: one line per site, every
//! output carrying the protocol's hash.

use crate::markdown_escape::{code, prose, text};
use crate::numbers::{full, p_value, sig};
use crate::table::call_word;
use patternproof_sites::Status;
use patternproof_sites::document::SitesDocument;
use std::io;

/// Write `sites.json` (pretty, full precision, trailing newline).
pub fn write_json<W: io::Write>(doc: &SitesDocument<'_>, mut out: W) -> io::Result<()> {
    serde_json::to_writer_pretty(&mut out, doc)?;
    out.write_all(b"\n")
}

/// Write `sites.csv`: full precision, one row per site.
pub fn write_csv<W: io::Write>(doc: &SitesDocument<'_>, out: W) -> io::Result<()> {
    let mut w = csv::Writer::from_writer(out);
    w.write_record([
        "site",
        "n",
        "status",
        "window",
        "window_area",
        "mean_nn",
        "ratio",
        "ratio_low95",
        "ratio_high95",
        "z",
        "p",
        "p_adjusted",
        "call",
        "window_sensitive",
        "reason",
        "protocol_sha256",
    ])?;
    for r in &doc.sites {
        w.write_record([
            r.site.clone(),
            r.n.to_string(),
            match r.status {
                Status::Tested => "tested".into(),
                Status::NotTested => "not-tested".into(),
            },
            r.window.clone().unwrap_or_default(),
            full(r.window_area),
            full(r.mean_nn),
            full(r.ratio),
            full(r.ratio_low),
            full(r.ratio_high),
            full(r.z),
            full(r.p),
            full(r.p_adjusted),
            r.call
                .map_or(String::new(), |c| call_word(Some(c)).to_string()),
            r.window_sensitive.map_or(String::new(), |b| b.to_string()),
            r.reason.clone().unwrap_or_default(),
            doc.protocol_sha256.clone(),
        ])?;
    }
    w.flush()
}

/// The summary sentence of a run.
pub fn summary_line(doc: &SitesDocument<'_>) -> String {
    let count = |c: patternproof_core::Call| doc.sites.iter().filter(|r| r.call == Some(c)).count();
    format!(
        "{} site(s) tested, {} listed without a test; after adjustment {} clustered, {} dispersed, {} not significant; {} window-sensitive",
        doc.tested,
        doc.not_tested,
        count(patternproof_core::Call::Clustered),
        count(patternproof_core::Call::Dispersed),
        count(patternproof_core::Call::NotSignificant),
        doc.window_sensitive
    )
}

/// Write `sites.md`; site names, window ids, reasons and the protocol's
/// note are escaped ([`crate::markdown_escape`]).
pub fn write_markdown<W: io::Write>(doc: &SitesDocument<'_>, mut out: W) -> io::Result<()> {
    writeln!(out, "# Multi-site run under one protocol\n")?;
    writeln!(out, "**{}.**\n", summary_line(doc))?;
    writeln!(out, "Protocol SHA-256: `{}`\n", doc.protocol_sha256)?;
    for n in &doc.notes {
        writeln!(out, "**Caution:** {}.\n", prose(n))?;
    }
    for l in doc.protocol.describe() {
        writeln!(out, "- {}", prose(&l))?;
    }
    writeln!(
        out,
        "- window sensitivity: each site's own sweep (every window × edge handling, {} simulations per window) is compared with its protocol row\n",
        doc.sweep_sims
    )?;
    writeln!(
        out,
        "| site | n | window | area | R (95 % interval) | z | p | adjusted p | call | window-sensitive | note |"
    )?;
    writeln!(out, "|---|--:|---|--:|---|--:|--:|--:|---|---|---|")?;
    for r in &doc.sites {
        let interval = match (r.ratio, r.ratio_low, r.ratio_high) {
            (Some(x), Some(lo), Some(hi)) => format!("{x:.3} ({lo:.3}–{hi:.3})"),
            (Some(x), _, _) => format!("{x:.3}"),
            _ => "—".into(),
        };
        let note = match (&r.reason, r.window_sensitive) {
            (Some(why), _) => why.clone(),
            (None, Some(true)) => format!("flips: {}", r.flips.join(", ")),
            _ => String::new(),
        };
        writeln!(
            out,
            "| {} | {} | {} | {} | {interval} | {} | {} | {} | {} | {} | {} |",
            text(&r.site),
            r.n,
            r.window.as_deref().map_or("—".into(), code),
            r.window_area.map_or("—".into(), |a| sig(a, 5)),
            r.z.map_or("—".into(), |z| format!("{z:.2}")),
            r.p.map_or("—".into(), p_value),
            r.p_adjusted.map_or("—".into(), p_value),
            r.call.map_or("not tested", |c| call_word(Some(c))),
            match r.window_sensitive {
                Some(true) => "**yes**",
                Some(false) => "no",
                None => "—",
            },
            prose(&note)
        )?;
    }
    writeln!(
        out,
        "\nR's interval is the normal approximation R ± 1.96·SE/E of the protocol row. \"Window-sensitive\" means that some other defensible window or edge handling in the site's own sweep gives a different call than the protocol row: the protocol makes sites comparable, it does not make each call robust.\n"
    )?;
    writeln!(
        out,
        "Point locations of people are personal data: keep per-site inputs and report folders under the protection the data require.\n"
    )?;
    writeln!(
        out,
        "---\npatternproof {} · schema {}",
        doc.tool_version, doc.schema
    )?;
    Ok(())
}
