//! `index.html` of a multi-site run: self-contained, every user string
//! escaped, the protocol hash in the header; the shared layout
//! ([`crate::page`]).

use super::files::summary_line;
use crate::numbers::{p_value, sig};
use crate::page::{page, trusted_svg};
use crate::table::{call_symbol, call_word};
use maud::html;
use patternproof_sites::document::SitesDocument;

/// Render the page; `forest` is the SVG of [`super::forest`], `folders`
/// maps each site to its report folder (relative link).
pub fn index_html(
    doc: &SitesDocument<'_>,
    forest: Option<&str>,
    folders: &[(String, String)],
) -> String {
    let dash = || "—".to_string();
    let body = html! {
        h1 { "One protocol, every site" }
        p.verdict { (summary_line(doc)) "." }
        p { "Protocol SHA-256: " code { (doc.protocol_sha256) } }
        ul {
            @for l in doc.protocol.describe() {
                li { (l) }
            }
        }
        @for n in &doc.notes {
            p.caution { b { "Caution:" } " " (crate::page::prose(n)) "." }
        }
        @if let Some(svg) = forest {
            figure { (trusted_svg(svg.trim())) }
        }
        table {
            tr {
                th { "site" } th { "n" } th { "window" } th { "area" } th { "R" }
                th { "95 % interval" } th { "z" } th { "p" } th { "adjusted p" } th { "call" }
                th { "window-sensitive" } th { "note" }
            }
            @for r in &doc.sites {
                tr {
                    td {
                        @match folders.iter().find(|(s, _)| s == &r.site) {
                            Some((_, f)) => a href=(format!("{f}/index.html")) { (r.site) },
                            None => (r.site),
                        }
                    }
                    td.num { (r.n) }
                    td { (r.window.as_deref().unwrap_or("—")) }
                    td.num { (r.window_area.map_or_else(dash, |a| sig(a, 5))) }
                    td.num { (r.ratio.map_or_else(dash, |x| format!("{x:.3}"))) }
                    td.num {
                        (match (r.ratio_low, r.ratio_high) {
                            (Some(a), Some(b)) => format!("{a:.3}–{b:.3}"),
                            _ => dash(),
                        })
                    }
                    td.num { (r.z.map_or_else(dash, |z| format!("{z:.2}"))) }
                    td.num { (r.p.map_or_else(dash, p_value)) }
                    td.num { (r.p_adjusted.map_or_else(dash, p_value)) }
                    td {
                        (r.call.map_or("not tested".to_string(), |c| format!(
                            "{} {}",
                            call_symbol(Some(c)),
                            call_word(Some(c))
                        )))
                    }
                    td class=[(r.window_sensitive == Some(true)).then_some("flag")] {
                        (match r.window_sensitive {
                            Some(true) => "yes",
                            Some(false) => "no",
                            None => "—",
                        })
                    }
                    td {
                        @match (&r.reason, r.window_sensitive) {
                            (Some(why), _) => (why),
                            (None, Some(true)) => { "flips: " (r.flips.join(", ")) },
                            _ => {},
                        }
                    }
                }
            }
        }
        h2 { "What this does and does not show" }
        ul {
            li { "The protocol makes the sites comparable: every row used the same window rule and edge handling, fixed in advance (the hash above proves which). It does not make each call robust: a window-sensitive site's call changes under some other defensible choice, listed in its note and in its own report." }
            li { "A significant test rules out CSR in that window; it does not identify a process." }
            li { "Point locations of people are personal data: keep inputs and the per-site folders under the protection the data require." }
        }
        p { "patternproof " (doc.tool_version) " · schema " (doc.schema) }
    };
    page("patternproof sites", body)
}
