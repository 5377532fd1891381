//! Escaping for every Markdown file the tool writes (`verdict.md`,
//! `sites.md`, `scales.md`).
//!
//! Site names, units, file names and `--where` values come from the user
//! and end up in documents that people open in renderers which accept raw
//! HTML. A name such as `<img src=x onerror=…>` must show as text there,
//! and a `|` must not split a table row, exactly as `index.html` escapes
//! them with [`crate::html::escape`]. Three helpers cover every case:
//!
//! - [`text`] for a user string in running text or a table cell;
//! - [`code`] for an identifier shown as code (a window id, a file name);
//! - [`prose`] for a sentence the tool built around user strings, in
//!   which backtick-quoted parts are identifiers.
//!
//! ```
//! use patternproof_report::markdown_escape::{code, prose, text};
//! assert_eq!(text("<b>a|b</b>"), "&lt;b&gt;a\\|b&lt;/b&gt;");
//! assert_eq!(code("boundary:plot_3"), "`boundary:plot_3`");
//! assert_eq!(code("a`b"), "a\\`b");
//! assert_eq!(prose("on `hull` with *care*"), "on `hull` with \\*care\\*");
//! ```

/// A user string as plain text: HTML markup becomes entities, Markdown
/// punctuation is backslash-escaped, and line breaks become spaces, so the
/// string reads the same in any renderer and stays inside its table cell.
pub fn text(s: &str) -> String {
    let mut out = String::with_capacity(s.len() + 8);
    let mut chars = s.chars().peekable();
    let mut first = true;
    while let Some(c) = chars.next() {
        match c {
            '<' => out.push_str("&lt;"),
            '>' => out.push_str("&gt;"),
            // A bare `&` before a space is text everywhere; before a letter,
            // digit or `#` it could start an entity.
            '&' if chars
                .peek()
                .is_some_and(|n| n.is_ascii_alphanumeric() || *n == '#') =>
            {
                out.push_str("&amp;")
            }
            '\\' | '`' | '*' | '_' | '[' | ']' | '{' | '}' | '|' | '~' | '$' => {
                out.push('\\');
                out.push(c);
            }
            // Block markers only matter where a line could start, and only
            // before a space, the end, or another of themselves (`# x`,
            // `- x`, `---`); `-3.2` stays as it is.
            '#' | '+' | '-' | '='
                if first && chars.peek().is_none_or(|n| n.is_whitespace() || *n == c) =>
            {
                out.push('\\');
                out.push(c);
            }
            c if c.is_control() => out.push(' '),
            _ => out.push(c),
        }
        first = false;
    }
    // `1. ` or `1)` at the start (before a space or the end) would open a
    // numbered list; `3.81` would not.
    let digits = out.bytes().take_while(u8::is_ascii_digit).count();
    let bytes = out.as_bytes();
    if digits > 0
        && matches!(bytes.get(digits), Some(b'.' | b')'))
        && bytes
            .get(digits + 1)
            .is_none_or(|b| b.is_ascii_whitespace())
    {
        out.insert(digits, '\\');
    }
    out
}

/// An identifier as a code span when it can be one safely; otherwise (a
/// backtick, a `|`, markup or a line break inside) as escaped [`text`].
pub fn code(s: &str) -> String {
    let plain = !s.is_empty()
        && !s.starts_with(' ')
        && !s.ends_with(' ')
        && !s
            .chars()
            .any(|c| matches!(c, '`' | '|' | '<' | '>' | '&') || c.is_control());
    if plain { format!("`{s}`") } else { text(s) }
}

/// A sentence of the tool's own, with user strings inside: the parts
/// between backticks go through [`code`], the rest through [`text`]. A
/// user string that brings its own backticks can only shift which parts
/// count as code; every part is escaped either way.
pub fn prose(s: &str) -> String {
    let parts: Vec<&str> = s.split('`').collect();
    let mut out = String::with_capacity(s.len() + 8);
    for (k, part) in parts.iter().enumerate() {
        if k % 2 == 0 {
            out.push_str(&text(part));
        } else if k + 1 < parts.len() {
            out.push_str(&code(part));
        } else {
            // An unpaired backtick.
            out.push_str("\\`");
            out.push_str(&text(part));
        }
    }
    out
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn markup_and_markdown_in_a_name_become_text() {
        assert_eq!(
            text("<img src=x onerror=alert(1)>"),
            "&lt;img src=x onerror=alert(1)&gt;"
        );
        assert_eq!(text("a|b\nc"), "a\\|b c");
        assert_eq!(text("[click](javascript:x)"), "\\[click\\](javascript:x)");
        assert_eq!(
            text("**bold** _it_ ~x~ $m$"),
            "\\*\\*bold\\*\\* \\_it\\_ \\~x\\~ \\$m\\$"
        );
        assert_eq!(
            text("Clark & Evans &amp; &#60;"),
            "Clark & Evans &amp;amp; &amp;#60;"
        );
        assert_eq!(text("back\\slash `tick`"), "back\\\\slash \\`tick\\`");
    }

    #[test]
    fn a_name_cannot_open_a_block() {
        assert_eq!(text("# title"), "\\# title");
        assert_eq!(text("- item"), "\\- item");
        assert_eq!(text("12. item"), "12\\. item");
        assert_eq!(text("3) item"), "3\\) item");
        assert_eq!(text("> quote"), "&gt; quote");
        assert_eq!(text("---"), "\\---");
        assert_eq!(text("1."), "1\\.");
        // Elsewhere, or without the space, the same characters are left alone.
        assert_eq!(text("plot-3 #2 12.5"), "plot-3 #2 12.5");
        assert_eq!(text("-3.25"), "-3.25");
        assert_eq!(text("3.81"), "3.81");
        assert_eq!(text("#2"), "#2");
    }

    #[test]
    fn code_spans_only_for_plain_identifiers() {
        assert_eq!(code("boundary:meadow"), "`boundary:meadow`");
        assert_eq!(code("hull+0.5x"), "`hull+0.5x`");
        assert_eq!(code("data/points_1.csv"), "`data/points_1.csv`");
        assert_eq!(code("boundary:<b>x</b>"), "boundary:&lt;b&gt;x&lt;/b&gt;");
        assert_eq!(code("a|b"), "a\\|b");
        assert_eq!(code(""), "");
    }

    #[test]
    fn prose_keeps_the_tool_s_code_spans_and_escapes_the_rest() {
        assert_eq!(
            prose("dispersed on `boundary:<i>x</i>` with edge `none`; 12 m²"),
            "dispersed on boundary:&lt;i&gt;x&lt;/i&gt; with edge `none`; 12 m²"
        );
        // A user backtick unbalances the pairs: still nothing raw.
        let s = prose("on `boundary:a`b` with edge `none`");
        assert!(!s.contains('<'));
        assert_eq!(s, "on `boundary:a`b with edge none\\`");
    }
}
