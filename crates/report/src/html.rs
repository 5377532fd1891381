//! `index.html`: the one file to attach to a review or a co-author's mail.
//!
//! Self-contained: inline CSS and inline SVG, no script, no font and no
//! image fetched from anywhere. Every string that comes from the user's
//! files or command line (file names, boundary names, property values) goes
//! through [`escape`], so a hostile name shows as text and never runs.
//! The page is also well-formed XML (void elements self-closed), so any
//! XML parser can check it.

use crate::document::AuditReport;
use crate::numbers::{fixed, p_value, percent, sig};
use crate::table::{call_symbol, call_word, flip_lines};
use std::fmt::Write;

/// One picture for the page.
#[derive(Debug, Clone)]
pub struct Picture {
    /// Heading.
    pub title: String,
    /// The SVG document (as written to the folder).
    pub svg: String,
    /// What the picture answers.
    pub caption: String,
}

/// A section made by another analysis of the same run (e.g. the K audit
/// of `audit --scales`), placed after the flip statement. `html` is
/// trusted markup: its maker escapes every user string with [`escape`].
#[derive(Debug, Clone)]
pub struct Section {
    /// Anchor id (letters, digits and `-` only).
    pub id: String,
    /// Heading (escaped here).
    pub title: String,
    /// The body, already escaped markup.
    pub html: String,
}

/// What the page says about how the run came about.
#[derive(Debug, Clone, Default)]
pub struct Provenance {
    /// The command line, as typed (arguments joined by spaces, quoted where
    /// needed).
    pub command_line: String,
    /// The protocol the run followed, if any (its id and hash in words).
    pub protocol: Option<String>,
    /// Time of the run, only with `--stamp`.
    pub stamp: Option<String>,
}

/// Escape text for HTML element content and attribute values.
pub fn escape(s: &str) -> String {
    let mut out = String::with_capacity(s.len());
    for c in s.chars() {
        match c {
            '&' => out.push_str("&amp;"),
            '<' => out.push_str("&lt;"),
            '>' => out.push_str("&gt;"),
            '"' => out.push_str("&quot;"),
            '\'' => out.push_str("&#39;"),
            _ => out.push(c),
        }
    }
    out
}

const STYLE: &str = "body{font-family:sans-serif;max-width:1040px;margin:2em auto;padding:0 1em;color:#111;line-height:1.45}\
h1{font-size:1.5em;margin-bottom:.2em}h2{font-size:1.2em;border-bottom:1px solid #999;margin-top:2em}\
.job{font-size:1.05em;color:#333}.verdict{font-size:1.15em;font-weight:bold;padding:.6em;border-left:6px solid #0072b2;background:#f2f2f2}\
table{border-collapse:collapse;font-size:.88em;margin:.5em 0}th,td{border:1px solid #bbb;padding:.25em .5em;text-align:left;vertical-align:top}\
td.num{text-align:right;font-variant-numeric:tabular-nums}th{background:#e8e8e8}\
figure{margin:1em 0}figure svg{max-width:100%;height:auto;border:1px solid #ddd}figcaption{font-size:.9em;color:#333}\
.methods{background:#f7f7f7;padding:.8em;border:1px dashed #888}code,pre{font-family:monospace;font-size:.9em}\
pre{white-space:pre-wrap;word-break:break-all;background:#f2f2f2;padding:.5em}\
.caution{color:#5a3a00}@media print{figure{break-inside:avoid}}";

/// Render the page.
pub fn index_html(
    report: &AuditReport,
    pictures: &[Picture],
    sections: &[Section],
    provenance: &Provenance,
) -> String {
    let mut h = String::new();
    let i = &report.input;
    let u = escape(&i.unit);
    let e = escape;
    let _ = write!(
        h,
        "<!DOCTYPE html>\n<html lang=\"en\">\n<head>\n<meta charset=\"utf-8\"/>\n<meta name=\"viewport\" content=\"width=device-width, initial-scale=1\"/>\n<title>patternproof audit of {}</title>\n<style>{STYLE}</style>\n</head>\n<body>\n",
        e(&i.points_file)
    );
    let _ = writeln!(
        h,
        "<h1>Does the call survive the choice of study area?</h1>\n<p class=\"job\">Nearest-neighbour audit of <code>{}</code>: {} points, {} windows × {} edge handlings ({} choices), {} CSR simulations per window, α = {}.</p>",
        e(&i.points_file),
        i.n,
        report.windows.len(),
        report.settings.edges.len(),
        report.summary.choices_examined,
        report.settings.sims,
        report.alpha
    );
    let _ = writeln!(
        h,
        "<p class=\"verdict\">{}.</p>",
        e(&report.summary.verdict)
    );

    // Input.
    let _ = writeln!(h, "<h2 id=\"input\">Input</h2>\n<table>");
    let mut row = |k: &str, v: String| {
        let _ = writeln!(h, "<tr><th>{k}</th><td>{v}</td></tr>");
    };
    row("points file", format!("<code>{}</code>", e(&i.points_file)));
    row(
        "points",
        format!(
            "{} analysed of {} read; {} duplicate(s) {}",
            i.n,
            i.n_read,
            i.duplicates,
            if i.duplicates_dropped {
                "removed"
            } else {
                "kept"
            }
        ),
    );
    row("coordinates", e(&i.coords));
    row(
        "projection",
        i.projection
            .as_deref()
            .map_or("none (planar input)".into(), e),
    );
    row("unit", format!("{u} (areas in {u}²)"));
    for b in &i.boundaries {
        row(
            "boundary",
            format!(
                "<code>{}</code> from <code>{}</code>",
                e(&b.name),
                e(&b.file)
            ),
        );
    }
    for w in &i.warnings {
        row("warning", e(w));
    }
    h.push_str("</table>\n");

    // Pictures.
    for p in pictures {
        let _ = writeln!(
            h,
            "<h2>{}</h2>\n<figure>\n{}\n<figcaption>{}</figcaption>\n</figure>",
            e(&p.title),
            strip_xml_declaration(&p.svg),
            e(&p.caption)
        );
    }

    // Verdict table.
    let _ = writeln!(
        h,
        "<h2 id=\"table\">Verdict table</h2>\n<p>One row per window × edge handling. ◆ clustered, ◇ dispersed, ○ not significant at α = {}. “False alarms” is the share of the window's own CSR simulations that the row's analytic test calls significant: its real error rate here.</p>\n<table>\n<tr><th>window</th><th>edge</th><th>n</th><th>mean {u}</th><th>expected {u}</th><th>R</th><th>z</th><th>p</th><th>call</th><th>false alarms</th><th>note</th></tr>",
        report.alpha
    );
    for r in &report.results {
        let n = match r.focal {
            Some(f) => format!("{f}/{}", r.n_used),
            None => r.n_used.to_string(),
        };
        let _ = writeln!(
            h,
            "<tr><td><code>{}</code></td><td>{}</td><td class=\"num\">{n}</td><td class=\"num\">{}</td><td class=\"num\">{}</td><td class=\"num\">{}</td><td class=\"num\">{}</td><td class=\"num\">{}</td><td>{} {}</td><td class=\"num\">{}</td><td>{}</td></tr>",
            e(&r.window),
            r.edge,
            r.mean_nn.map_or("—".into(), |x| sig(x, 4)),
            r.expected_nn.map_or("—".into(), |x| sig(x, 4)),
            r.ratio.map_or("—".into(), |x| fixed(x, 3)),
            r.z.map_or("—".into(), |x| fixed(x, 2)),
            e(&r.p.map_or("—".into(), p_value)),
            call_symbol(r.call),
            call_word(r.call),
            r.size_under_csr.map_or("—".into(), percent),
            e(r.note.as_deref().unwrap_or(""))
        );
    }
    h.push_str("</table>\n");
    if !report.skipped.is_empty() {
        h.push_str("<p>Not computed:</p>\n<ul>\n");
        for s in &report.skipped {
            let _ = writeln!(
                h,
                "<li><code>{}</code> with <code>{}</code>: {}</li>",
                e(&s.window),
                s.edge,
                e(&s.reason)
            );
        }
        h.push_str("</ul>\n");
    }

    // Robustness.
    let s = &report.summary;
    let _ = writeln!(
        h,
        "<h2 id=\"robustness\">Robustness</h2>\n<p>Over all {} choices: {} clustered, {} dispersed, {} not significant; {}.</p>\n<table>\n<tr><th>window</th><th>clustered</th><th>dispersed</th><th>not significant</th><th>unanimous</th></tr>",
        s.choices_examined,
        s.calls.clustered,
        s.calls.dispersed,
        s.calls.not_significant,
        if s.unanimous {
            "the call is unanimous"
        } else {
            "the call is not unanimous"
        }
    );
    for w in &s.per_window {
        let _ = writeln!(
            h,
            "<tr><td><code>{}</code></td><td class=\"num\">{}</td><td class=\"num\">{}</td><td class=\"num\">{}</td><td>{}</td></tr>",
            e(&w.window),
            w.calls.clustered,
            w.calls.dispersed,
            w.calls.not_significant,
            if w.unanimous { "yes" } else { "no" }
        );
    }
    h.push_str("</table>\n");

    // Flip statement.
    h.push_str("<h2 id=\"flip\">Where the call flips</h2>\n<ul>\n");
    for l in flip_lines(report) {
        let _ = writeln!(h, "<li>{}</li>", e(&l));
    }
    h.push_str("</ul>\n");

    for sec in sections {
        let id: String = sec
            .id
            .chars()
            .filter(|c| c.is_ascii_alphanumeric() || *c == '-')
            .collect();
        let _ = writeln!(h, "<h2 id=\"{id}\">{}</h2>\n{}", e(&sec.title), sec.html);
    }

    // Methods.
    let _ = writeln!(
        h,
        "<h2 id=\"methods\">Methods paragraph</h2>\n<p>Ready to paste into a manuscript; it states every choice the result depends on.</p>\n<p class=\"methods\">{}</p>",
        e(&crate::methods::methods_paragraph(report))
    );

    // Cautions.
    h.push_str("<h2 id=\"cautions\">What this does and does not show</h2>\n<ul>\n");
    for c in &report.cautions {
        let _ = writeln!(h, "<li class=\"caution\">{}</li>", e(c));
    }
    h.push_str("</ul>\n");

    // Provenance.
    h.push_str("<h2 id=\"provenance\">Provenance</h2>\n<table>\n<tr><th>input file</th><th>SHA-256</th></tr>\n");
    for d in &report.provenance.inputs {
        let _ = writeln!(
            h,
            "<tr><td><code>{}</code></td><td><code>{}</code></td></tr>",
            e(&d.file),
            e(&d.sha256)
        );
    }
    h.push_str("</table>\n");
    let _ = writeln!(
        h,
        "<p>Command line:</p>\n<pre>{}</pre>\n<p>Protocol: {}.</p>\n<p>patternproof {} · report schema {} · seed {}{}</p>",
        e(&provenance.command_line),
        provenance
            .protocol
            .as_deref()
            .map_or("none (choices made on the command line)".into(), e),
        report.tool_version,
        report.schema,
        report.settings.seed,
        provenance
            .stamp
            .as_deref()
            .map_or(String::new(), |t| format!(" · run at {}", e(t)))
    );
    h.push_str("</body>\n</html>\n");
    h
}

/// Inline SVG must not carry an XML declaration.
pub fn strip_xml_declaration(svg: &str) -> &str {
    let t = svg.trim_start();
    if t.starts_with("<?xml") {
        t.find("?>").map_or(t, |k| t[k + 2..].trim_start())
    } else {
        t
    }
}

/// Quote one command-line argument for display (POSIX shell style).
pub fn shell_quote(arg: &str) -> String {
    let plain = !arg.is_empty()
        && arg
            .chars()
            .all(|c| c.is_ascii_alphanumeric() || "-_./=:,+@%".contains(c));
    if plain {
        arg.to_string()
    } else {
        format!("'{}'", arg.replace('\'', "'\\''"))
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    /// The five characters HTML gives meaning to are replaced by their
    /// entities (HTML Living Standard, "escapingString" — common practice).
    #[test]
    fn escapes_markup() {
        assert_eq!(
            escape("<script>alert('x')</script> & \"q\""),
            "&lt;script&gt;alert(&#39;x&#39;)&lt;/script&gt; &amp; &quot;q&quot;"
        );
    }

    #[test]
    fn quotes_arguments_like_a_shell() {
        assert_eq!(shell_quote("demo-data/a.csv"), "demo-data/a.csv");
        assert_eq!(shell_quote("my file.csv"), "'my file.csv'");
        assert_eq!(shell_quote("it's"), "'it'\\''s'");
    }

    #[test]
    fn strips_the_declaration_only() {
        assert_eq!(
            strip_xml_declaration("<?xml version=\"1.0\"?>\n<svg/>"),
            "<svg/>"
        );
        assert_eq!(strip_xml_declaration("<svg/>"), "<svg/>");
    }
}
