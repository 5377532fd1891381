//! `index.html` of a multi-site run: self-contained, every user string
//! escaped, the protocol hash in the header.

use super::files::summary_line;
use crate::html::escape;
use crate::numbers::{p_value, sig};
use crate::table::{call_symbol, call_word};
use patternproof_sites::document::SitesDocument;
use std::fmt::Write;

/// Render the page; `forest` is the SVG of [`super::forest`], `folders`
/// maps each site to its report folder (relative link).
pub fn index_html(
    doc: &SitesDocument<'_>,
    forest: Option<&str>,
    folders: &[(String, String)],
) -> String {
    let e = escape;
    let mut h = String::new();
    let _ = write!(
        h,
        "<!DOCTYPE html>\n<html lang=\"en\">\n<head>\n<meta charset=\"utf-8\"/>\n<title>patternproof sites</title>\n<style>body{{font-family:sans-serif;max-width:1040px;margin:2em auto;padding:0 1em;line-height:1.45}}table{{border-collapse:collapse;font-size:.88em}}th,td{{border:1px solid #bbb;padding:.25em .5em;text-align:left}}td.num{{text-align:right}}svg{{max-width:100%;height:auto}}.flag{{font-weight:bold}}</style>\n</head>\n<body>\n"
    );
    let _ = writeln!(
        h,
        "<h1>One protocol, every site</h1>\n<p><b>{}.</b></p>\n<p>Protocol SHA-256: <code>{}</code></p>\n<ul>",
        e(&summary_line(doc)),
        e(&doc.protocol_sha256)
    );
    for l in doc.protocol.describe() {
        let _ = writeln!(h, "<li>{}</li>", e(&l));
    }
    h.push_str("</ul>\n");
    for n in &doc.notes {
        let _ = writeln!(h, "<p><b>Caution:</b> {}.</p>", e(n));
    }
    if let Some(svg) = forest {
        let _ = writeln!(h, "<figure>\n{}\n</figure>", svg.trim());
    }
    h.push_str("<table>\n<tr><th>site</th><th>n</th><th>window</th><th>area</th><th>R</th><th>95 % interval</th><th>z</th><th>p</th><th>adjusted p</th><th>call</th><th>window-sensitive</th><th>note</th></tr>\n");
    for r in &doc.sites {
        let folder = folders
            .iter()
            .find(|(s, _)| s == &r.site)
            .map(|(_, f)| f.as_str());
        let name = match folder {
            Some(f) => format!("<a href=\"{}/index.html\">{}</a>", e(f), e(&r.site)),
            None => e(&r.site),
        };
        let note = match (&r.reason, r.window_sensitive) {
            (Some(why), _) => e(why),
            (None, Some(true)) => format!("flips: {}", e(&r.flips.join(", "))),
            _ => String::new(),
        };
        let _ = writeln!(
            h,
            "<tr><td>{name}</td><td class=\"num\">{}</td><td>{}</td><td class=\"num\">{}</td><td class=\"num\">{}</td><td class=\"num\">{}</td><td class=\"num\">{}</td><td class=\"num\">{}</td><td class=\"num\">{}</td><td>{}</td><td{}>{}</td><td>{note}</td></tr>",
            r.n,
            r.window.as_deref().map_or("—".into(), e),
            r.window_area.map_or("—".into(), |a| sig(a, 5)),
            r.ratio.map_or("—".into(), |x| format!("{x:.3}")),
            match (r.ratio_low, r.ratio_high) {
                (Some(a), Some(b)) => format!("{a:.3}–{b:.3}"),
                _ => "—".into(),
            },
            r.z.map_or("—".into(), |z| format!("{z:.2}")),
            e(&r.p.map_or("—".into(), p_value)),
            e(&r.p_adjusted.map_or("—".into(), p_value)),
            r.call.map_or("not tested".to_string(), |c| format!(
                "{} {}",
                call_symbol(Some(c)),
                call_word(Some(c))
            )),
            if r.window_sensitive == Some(true) {
                " class=\"flag\""
            } else {
                ""
            },
            match r.window_sensitive {
                Some(true) => "yes",
                Some(false) => "no",
                None => "—",
            }
        );
    }
    h.push_str("</table>\n");
    let _ = writeln!(
        h,
        "<h2>What this does and does not show</h2>\n<ul>\n<li>The protocol makes the sites comparable: every row used the same window rule and edge handling, fixed in advance (the hash above proves which). It does not make each call robust: a window-sensitive site's call changes under some other defensible choice, listed in its note and in its own report.</li>\n<li>A significant test rules out CSR in that window; it does not identify a process.</li>\n<li>Point locations of people are personal data: keep inputs and the per-site folders under the protection the data require.</li>\n</ul>\n<p>patternproof {} · schema {}</p>\n</body>\n</html>",
        doc.tool_version, doc.schema
    );
    h
}
