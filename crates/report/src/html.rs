//! `index.html`: the one file to attach to a review or a co-author's mail,
//! in the shared layout of [`crate::page`].
//!
//! Every string that comes from the user's files or command line (file
//! names, boundary names, property values) is escaped by maud, so a
//! hostile name shows as text and never runs. [`escape`] does the same for
//! the hand-built SVG pictures.

use crate::document::{AuditReport, FileDigest, InputSummary};
use crate::numbers::{fixed, p_value, percent, sig};
use crate::page::{page, prose, trusted_svg};
use crate::table::{call_symbol, call_word, flip_lines};
use maud::{Markup, html};

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
/// markup built with maud, so every user string in it is escaped.
#[derive(Debug, Clone)]
pub struct Section {
    /// Anchor id (letters, digits and `-` only).
    pub id: String,
    /// Heading (escaped here).
    pub title: String,
    /// The body.
    pub html: Markup,
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

/// Render the page.
pub fn index_html(
    report: &AuditReport,
    pictures: &[Picture],
    sections: &[Section],
    provenance: &Provenance,
) -> String {
    let i = &report.input;
    let u = i.unit.as_str();
    let s = &report.summary;
    let dash = || "—".to_string();
    let body = html! {
        h1 { "Does the call survive the choice of study area?" }
        (crate::matrix::glance(report))
        p.job {
            "Nearest-neighbour audit of " code { (i.points_file) } ": "
            (i.n) " points, " (report.windows.len()) " windows × "
            (report.settings.edges.len()) " edge handlings (" (s.choices_examined)
            " choices), " (report.settings.sims) " CSR simulations per window, α = "
            (report.alpha.to_string()) "."
        }

        h2 id="input" { "Input" }
        (input_table(i))

        @for p in pictures {
            h2 { (prose(&p.title)) }
            figure {
                (trusted_svg(&p.svg))
                figcaption { (p.caption) }
            }
        }

        h2 id="table" { "Verdict table" }
        p {
            "One row per window × edge handling. ◆ clustered, ◇ dispersed, ○ not significant at α = "
            (report.alpha.to_string())
            ". “False alarms” is the share of the window's own CSR simulations that the row's analytic test calls significant: its real error rate here."
        }
        table {
            tr {
                th { "window" } th { "edge" } th { "n" } th { "mean " (u) } th { "expected " (u) }
                th { "R" } th { "z" } th { "p" } th { "call" } th { "false alarms" } th { "note" }
            }
            @for r in &report.results {
                tr {
                    td { code { (r.window) } }
                    td { (r.edge.to_string()) }
                    td.num {
                        @match r.focal {
                            Some(f) => { (f) "/" (r.n_used) }
                            None => { (r.n_used) }
                        }
                    }
                    td.num { (r.mean_nn.map_or_else(dash, |x| sig(x, 4))) }
                    td.num { (r.expected_nn.map_or_else(dash, |x| sig(x, 4))) }
                    td.num { (r.ratio.map_or_else(dash, |x| fixed(x, 3))) }
                    td.num { (r.z.map_or_else(dash, |x| fixed(x, 2))) }
                    td.num { (r.p.map_or_else(dash, p_value)) }
                    td { (call_symbol(r.call)) " " (call_word(r.call)) }
                    td.num { (r.size_under_csr.map_or_else(dash, percent)) }
                    td { (prose(r.note.as_deref().unwrap_or(""))) }
                }
            }
        }
        @if !report.skipped.is_empty() {
            p { "Not computed:" }
            ul {
                @for k in &report.skipped {
                    li { code { (k.window) } " with " code { (k.edge.to_string()) } ": " (prose(&k.reason)) }
                }
            }
        }

        h2 id="robustness" { "Robustness" }
        p {
            "Over all " (s.choices_examined) " choices: " (s.calls.clustered) " clustered, "
            (s.calls.dispersed) " dispersed, " (s.calls.not_significant) " not significant; "
            (if s.unanimous { "the call is unanimous" } else { "the call is not unanimous" }) "."
        }
        table {
            tr {
                th { "window" } th { "clustered" } th { "dispersed" } th { "not significant" }
                th { "unanimous" }
            }
            @for w in &s.per_window {
                tr {
                    td { code { (w.window) } }
                    td.num { (w.calls.clustered) }
                    td.num { (w.calls.dispersed) }
                    td.num { (w.calls.not_significant) }
                    td { (if w.unanimous { "yes" } else { "no" }) }
                }
            }
        }

        h2 id="flip" { "Where the call flips" }
        ul {
            @for l in flip_lines(report) {
                li { (prose(&l)) }
            }
        }

        @for sec in sections {
            h2 id=(section_id(&sec.id)) { (sec.title) }
            (sec.html)
        }

        h2 id="methods" { "Methods paragraph" }
        p { "Ready to paste into a manuscript; it states every choice the result depends on." }
        p.methods { (prose(&crate::methods::methods_paragraph(report))) }

        h2 id="cautions" { "What this does and does not show" }
        ul {
            @for c in &report.cautions {
                li.caution { (prose(c)) }
            }
        }

        (provenance_block(&report.provenance.inputs, &provenance.command_line))
        p {
            "Protocol: "
            (provenance.protocol.as_deref().unwrap_or("none (choices made on the command line)"))
            "."
        }
        p {
            "patternproof " (report.tool_version) " · report schema " (report.schema)
            " · seed " (report.settings.seed)
            @if let Some(t) = &provenance.stamp {
                " · run at " (t)
            }
        }
    };
    page(&format!("patternproof audit of {}", i.points_file), body)
}

/// The input table of a page: the points file, how many points were
/// analysed, how the coordinates were read, the unit, the boundaries and
/// the warnings (the audit's and the K audit's pages).
pub fn input_table(i: &InputSummary) -> Markup {
    let u = i.unit.as_str();
    html! {
        table {
            tr { th { "points file" } td { code { (i.points_file) } } }
            tr {
                th { "points" }
                td {
                    (i.n) " analysed of " (i.n_read) " read; " (i.duplicates) " duplicate(s) "
                    (if i.duplicates_dropped { "removed" } else { "kept" })
                }
            }
            tr { th { "coordinates" } td { (i.coords) } }
            tr {
                th { "projection" }
                td { (i.projection.as_deref().unwrap_or("none (planar input)")) }
            }
            tr { th { "unit" } td { (u) " (areas in " (u) "²)" } }
            @for b in &i.boundaries {
                tr { th { "boundary" } td { code { (b.name) } " from " code { (b.file) } } }
            }
            @for w in &i.warnings {
                tr { th { "warning" } td { (prose(w)) } }
            }
        }
    }
}

/// The provenance heading every page ends with: the SHA-256 of each input
/// file, so a reader can tell which bytes the page was made from, and the
/// command line as typed.
pub fn provenance_block(inputs: &[FileDigest], command_line: &str) -> Markup {
    html! {
        h2 id="provenance" { "Provenance" }
        table {
            tr { th { "input file" } th { "SHA-256" } }
            @for d in inputs {
                tr { td { code { (d.file) } } td { code { (d.sha256) } } }
            }
        }
        p { "Command line:" }
        pre { (command_line) }
    }
}

/// An anchor id of letters, digits and `-` only.
fn section_id(id: &str) -> String {
    id.chars()
        .filter(|c| c.is_ascii_alphanumeric() || *c == '-')
        .collect()
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
