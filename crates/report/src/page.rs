//! The one layout and stylesheet of every `index.html` (the audit's, each
//! site's, the multi-site run's and the density audit's), built with
//! `maud`, which escapes every interpolated string unless it is marked as
//! trusted markup ([`trusted_svg`]).
//!
//! Self-contained: inline CSS and inline SVG, no script, no font and no
//! image fetched from anywhere. The page is also well-formed XML, so any
//! XML parser can check it: the two void elements of the head are written
//! self-closed by hand, since maud writes `<meta …>` as HTML does.

use maud::{DOCTYPE, Markup, PreEscaped, html};

/// The one stylesheet.
pub const STYLE: &str = "body{font-family:sans-serif;max-width:1040px;margin:2em auto;padding:0 1em;color:#111;line-height:1.45}\
h1{font-size:1.5em;margin-bottom:.2em}h2{font-size:1.2em;border-bottom:1px solid #999;margin-top:2em}\
.job{font-size:1.05em;color:#333}.verdict{font-size:1.15em;font-weight:bold;padding:.6em;border-left:6px solid #0072b2;background:#f2f2f2}\
table{border-collapse:collapse;font-size:.88em;margin:.5em 0}th,td{border:1px solid #bbb;padding:.25em .5em;text-align:left;vertical-align:top}\
td.num{text-align:right;font-variant-numeric:tabular-nums}th{background:#e8e8e8}\
figure{margin:1em 0}figure svg{max-width:100%;height:auto;border:1px solid #ddd}figcaption{font-size:.9em;color:#333}\
.methods{background:#f7f7f7;padding:.8em;border:1px dashed #888}code,pre{font-family:monospace;font-size:.9em}\
pre{white-space:pre-wrap;word-break:break-all;background:#f2f2f2;padding:.5em}\
.caution{color:#5a3a00}.flag{font-weight:bold}@media print{figure{break-inside:avoid}}";

/// A sentence the tool wrote, whose ids and choices are marked as code
/// spans (`hull`, `none`): each span becomes a `<code>` element and the
/// rest escaped text, so no raw backtick reaches the page. An unpaired
/// backtick (from a name in a user's file) stays as text.
pub fn prose(s: &str) -> Markup {
    let parts: Vec<&str> = s.split('`').collect();
    let last = parts.len() - 1;
    html! {
        @for (k, part) in parts.iter().enumerate() {
            @if k % 2 == 1 && k < last {
                code { (part) }
            } @else if k % 2 == 1 {
                "`" (part)
            } @else {
                (part)
            }
        }
    }
}

/// A whole page: the head with `title` and the stylesheet, then `body`.
pub fn page(title: &str, body: Markup) -> String {
    let mut s = html! {
        (DOCTYPE)
        html lang="en" {
            head {
                (PreEscaped("<meta charset=\"utf-8\"/>"))
                (PreEscaped("<meta name=\"viewport\" content=\"width=device-width, initial-scale=1\"/>"))
                title { (title) }
                style { (PreEscaped(STYLE)) (PreEscaped(crate::matrix::STYLE)) }
            }
            body { (body) }
        }
    }
    .into_string();
    s.push('\n');
    s
}

/// An SVG picture made by this crate, inline, without its XML
/// declaration. Trusted markup: the pictures escape every user string
/// in their labels (plotters does; the hand-built ones use
/// [`crate::html::escape`]).
pub fn trusted_svg(svg: &str) -> PreEscaped<&str> {
    PreEscaped(crate::html::strip_xml_declaration(svg))
}

#[cfg(test)]
mod tests {
    use super::*;

    /// maud escapes `&`, `<`, `>` and `"` in text and attribute values
    /// (what the HTML Living Standard's serialisation escapes), and the
    /// head keeps its void elements self-closed so the page parses as XML.
    #[test]
    fn strings_are_escaped_and_the_head_is_xml() {
        let hostile = "<script>alert(\"x\")</script> & co";
        let s = page(hostile, html! { p title=(hostile) { (hostile) } });
        assert!(!s.contains("<script>"));
        assert_eq!(
            s.matches("&lt;script&gt;alert(&quot;x&quot;)&lt;/script&gt; &amp; co")
                .count(),
            3,
            "title, attribute and text"
        );
        assert!(s.starts_with(
            "<!DOCTYPE html><html lang=\"en\"><head><meta charset=\"utf-8\"/><meta name=\"viewport\" content=\"width=device-width, initial-scale=1\"/>"
        ));
        assert!(s.ends_with("</body></html>\n"));
    }
}

#[cfg(test)]
mod prose_tests {
    use super::prose;

    #[test]
    fn code_spans_become_code_and_the_rest_is_escaped() {
        assert_eq!(
            prose("not significant on `hull` with edge `none` <b>").into_string(),
            "not significant on <code>hull</code> with edge <code>none</code> &lt;b&gt;"
        );
        // An unpaired backtick (a user's name) stays as text.
        assert_eq!(prose("on `a`b` x").into_string(), "on <code>a</code>b` x");
        assert_eq!(prose("plain").into_string(), "plain");
    }
}
