//! The verdict matrix: one row per window, one column per edge handling,
//! each cell the call. It is the first thing the terminal, `verdict.md`
//! and `index.html` show, because a reviewer's question ("does the call
//! survive the choice?") is answered by its pattern before any number.
//!
//! Each call has a symbol as well as a colour, so the matrix reads in a
//! plain terminal and in a grey print. A `!` marks a row whose analytic
//! test raises false alarms more than twice as often as α in its window.

use crate::document::AuditReport;
use crate::markdown_escape;
use maud::{Markup, html};
use patternproof_audit::Edge;
use patternproof_audit::robustness::{INFLATED_SIZE, is_inflated};
use patternproof_core::Call;
use unicode_width::UnicodeWidthStr;

/// One cell: the row exists; its call (`None` when the row gave no test).
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct MatrixCell {
    /// The call of the row.
    pub call: Option<Call>,
    /// The row's analytic test has an inflated false-alarm rate.
    pub inflated: bool,
}

/// Windows × edge handlings of one audit.
#[derive(Debug, Clone)]
pub struct VerdictMatrix {
    /// Window ids, in the table's order.
    pub windows: Vec<String>,
    /// Edge handlings that produced at least one row, in the fixed order.
    pub edges: Vec<Edge>,
    /// `cells[w][e]`; `None` where that edge handling did not run in that
    /// window (the torus outside rectangles).
    pub cells: Vec<Vec<Option<MatrixCell>>>,
    /// The test level.
    pub alpha: f64,
}

/// The matrix's styles, part of every page's stylesheet and of the
/// fragment a notebook shows ([`glance_html`]): tints paired with the
/// symbols, never instead of them.
pub const STYLE: &str = ".matrix td{white-space:nowrap;font-weight:bold}.matrix td.m-clustered{background:#fbe7bf;color:#6b4700}\
.matrix td.m-dispersed{background:#c9eee2;color:#00513b}.matrix td.m-ns{background:#efefef;color:#444;font-weight:normal}\
.matrix td.m-none{color:#999;text-align:center}.matrix .m-flag{color:#8a2a00}.key,.counts{color:#333;font-size:.95em}";

/// The mark beside a cell whose p-value is not to be trusted.
pub const INFLATED_MARK: &str = "!";

/// Symbol and short word of a call, as the matrix shows them.
/// The symbol is the verdict table's (`table::call_symbol`), the same
/// everywhere a call is drawn.
fn cell_words(call: Option<Call>) -> (&'static str, &'static str) {
    let word = match call {
        Some(Call::Clustered) => "clustered",
        Some(Call::Dispersed) => "dispersed",
        Some(Call::NotSignificant) => "n.s.",
        None => "no test",
    };
    (crate::table::call_symbol(call), word)
}

/// The colour of a call in the terminal (24-bit), from the picture
/// palette's colour-blind-safe set: orange, bluish green, grey.
fn ansi_colour(call: Option<Call>) -> &'static str {
    match call {
        Some(Call::Clustered) => "\x1b[1;38;2;230;159;0m",
        Some(Call::Dispersed) => "\x1b[1;38;2;0;158;115m",
        _ => "\x1b[38;2;140;140;140m",
    }
}

const ANSI_RESET: &str = "\x1b[0m";

/// How a cell is written in the terminal.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
enum CellStyle {
    /// Symbol and word: "◆ clustered".
    Words,
    /// Symbol only: "◆".
    Symbols,
}

impl VerdictMatrix {
    /// Arrange the rows of `report`.
    pub fn new(report: &AuditReport) -> VerdictMatrix {
        let windows: Vec<String> = report.windows.iter().map(|w| w.id.clone()).collect();
        let edges: Vec<Edge> = Edge::ALL
            .into_iter()
            .filter(|e| report.results.iter().any(|r| r.edge == *e))
            .collect();
        let cells = windows
            .iter()
            .map(|w| {
                edges
                    .iter()
                    .map(|e| {
                        report
                            .results
                            .iter()
                            .find(|r| &r.window == w && r.edge == *e)
                            .map(|r| MatrixCell {
                                call: r.call,
                                inflated: r.call.is_some() && is_inflated(r, report.alpha),
                            })
                    })
                    .collect()
            })
            .collect();
        VerdictMatrix {
            windows,
            edges,
            cells,
            alpha: report.alpha,
        }
    }

    /// Any cell marked as inflated?
    pub fn any_inflated(&self) -> bool {
        self.cells.iter().flatten().flatten().any(|c| c.inflated)
    }

    /// The matrix as terminal lines, at most `width` columns wide when it
    /// can be (the words are dropped for symbols first; a window id is
    /// never cut). `colour` adds ANSI colours beside the symbols.
    pub fn terminal(&self, width: usize, colour: bool) -> String {
        let words = self.terminal_with(CellStyle::Words, colour);
        let fits = words
            .lines()
            .all(|l| UnicodeWidthStr::width(strip_ansi(l).as_str()) <= width);
        let mut s = if fits {
            words
        } else {
            self.terminal_with(CellStyle::Symbols, colour)
        };
        let key = self.legend(!fits);
        let columns = u16::try_from(width).unwrap_or(u16::MAX);
        for line in key.lines() {
            s.push_str(&crate::terminal_layout::wrap(
                &plain(line),
                Some(columns),
                "",
                "  ",
            ));
            s.push('\n');
        }
        s
    }

    fn terminal_with(&self, style: CellStyle, colour: bool) -> String {
        let text = |c: &Option<MatrixCell>| -> (String, Option<Call>) {
            match c {
                None => ("·".to_string(), None),
                Some(c) => {
                    let (sym, word) = cell_words(c.call);
                    let mark = if c.inflated { INFLATED_MARK } else { "" };
                    match style {
                        CellStyle::Words => (format!("{sym} {word}{mark}"), c.call),
                        CellStyle::Symbols => (format!("{sym}{mark}"), c.call),
                    }
                }
            }
        };
        let first = self
            .windows
            .iter()
            .map(|w| w.width())
            .chain(["window".width()])
            .max()
            .unwrap_or(6);
        let widths: Vec<usize> = self
            .edges
            .iter()
            .enumerate()
            .map(|(k, e)| {
                self.cells
                    .iter()
                    .map(|row| text(&row[k]).0.width())
                    .chain([e.as_str().width()])
                    .max()
                    .unwrap_or(0)
            })
            .collect();
        let mut out = String::new();
        out.push_str(&pad("window", first));
        for (e, w) in self.edges.iter().zip(&widths) {
            out.push_str("  ");
            out.push_str(&pad(e.as_str(), *w));
        }
        out = out.trim_end().to_string();
        out.push('\n');
        for (id, row) in self.windows.iter().zip(&self.cells) {
            let mut line = pad(id, first);
            for (c, w) in row.iter().zip(&widths) {
                let (t, call) = text(c);
                line.push_str("  ");
                let padded = pad(&t, *w);
                if colour && c.is_some() {
                    let visible = t.len();
                    line.push_str(ansi_colour(call));
                    line.push_str(&padded[..visible]);
                    line.push_str(ANSI_RESET);
                    line.push_str(&padded[visible..]);
                } else {
                    line.push_str(&padded);
                }
            }
            out.push_str(line.trim_end());
            out.push('\n');
        }
        out
    }

    /// The key under the terminal matrix.
    fn legend(&self, symbols_only: bool) -> String {
        let mut s = String::from(if symbols_only {
            "◆ clustered, ◇ dispersed, ○ not significant"
        } else {
            "◆ clustered, ◇ dispersed, ○ n.s. = not significant"
        });
        s.push_str(&format!(" at α = {}", self.alpha));
        if self.cells.iter().flatten().any(Option::is_none) {
            s.push_str("; · not run");
        }
        s.push('\n');
        if self.any_inflated() {
            s.push_str(&inflated_key(self.alpha));
            s.push('\n');
        }
        s
    }

    /// The matrix as a Markdown table for `verdict.md`.
    pub fn markdown(&self) -> String {
        let mut s = String::from("| window |");
        for e in &self.edges {
            s.push_str(&format!(" {e} |"));
        }
        s.push_str("\n|---|");
        for _ in &self.edges {
            s.push_str("---|");
        }
        s.push('\n');
        for (id, row) in self.windows.iter().zip(&self.cells) {
            s.push_str(&format!("| {} |", markdown_escape::code(id)));
            for c in row {
                let t = match c {
                    None => "·".to_string(),
                    Some(c) => {
                        let (sym, word) = cell_words(c.call);
                        let word = if c.call == Some(Call::NotSignificant) {
                            "not significant"
                        } else {
                            word
                        };
                        let mark = if c.inflated { " !" } else { "" };
                        format!("{sym} {word}{mark}")
                    }
                };
                s.push_str(&format!(" {t} |"));
            }
            s.push('\n');
        }
        s.push_str(&format!(
            "\n◆ clustered, ◇ dispersed, ○ not significant at α = {}",
            self.alpha
        ));
        if self.cells.iter().flatten().any(Option::is_none) {
            s.push_str("; · not run");
        }
        s.push('.');
        if self.any_inflated() {
            s.push(' ');
            s.push_str(&inflated_key(self.alpha));
        }
        s.push('\n');
        s
    }

    /// The matrix as an HTML table for `index.html` (classes styled by
    /// the shared page style).
    pub fn html(&self) -> Markup {
        let class = |c: Option<Call>| match c {
            Some(Call::Clustered) => "m-clustered",
            Some(Call::Dispersed) => "m-dispersed",
            _ => "m-ns",
        };
        html! {
            table.matrix {
                tr {
                    th { "window" }
                    @for e in &self.edges { th { (e.as_str()) } }
                }
                @for (id, row) in self.windows.iter().zip(&self.cells) {
                    tr {
                        th { code { (id) } }
                        @for c in row {
                            @match c {
                                None => { td.m-none title="not run in this window" { "·" } }
                                Some(c) => {
                                    td class=(class(c.call)) {
                                        (cell_words(c.call).0) " "
                                        (if c.call == Some(Call::NotSignificant) { "not significant" } else { cell_words(c.call).1 })
                                        @if c.inflated { " " span.m-flag title="false alarms above twice α" { (INFLATED_MARK) } }
                                    }
                                }
                            }
                        }
                    }
                }
            }
            p.key {
                "◆ clustered, ◇ dispersed, ○ not significant at α = " (self.alpha.to_string())
                @if self.cells.iter().flatten().any(Option::is_none) { "; · not run" }
                "."
                @if self.any_inflated() { " " (inflated_key(self.alpha)) }
            }
        }
    }
}

/// The answer at a glance, as `index.html` opens: the matrix, the
/// sentence under it and the counts.
pub fn glance(report: &AuditReport) -> Markup {
    html! {
        (VerdictMatrix::new(report).html())
        p.verdict { (crate::page::prose(&report.summary.verdict)) "." }
        p.counts { (counts_line(report)) "." }
    }
}

/// [`glance`] with its styles, for a notebook cell (no page around it).
pub fn glance_html(report: &AuditReport) -> String {
    html! {
        style { (maud::PreEscaped(STYLE)) }
        (glance(report))
    }
    .into_string()
}

/// What the `!` mark means.
fn inflated_key(alpha: f64) -> String {
    format!(
        "{INFLATED_MARK} false alarms: the row's analytic test calls more than {} % of CSR patterns in this window significant ({INFLATED_SIZE}×α); do not trust its p-value",
        (1e6 * 100.0 * INFLATED_SIZE * alpha).round() / 1e6
    )
}

/// The counts line under the sentence: how many rows give each call and
/// how many are trustworthy.
pub fn counts_line(report: &AuditReport) -> String {
    let s = &report.summary;
    let c = &s.calls;
    let mut parts = Vec::new();
    for (k, word) in [
        (c.clustered, "clustered"),
        (c.dispersed, "dispersed"),
        (c.not_significant, "not significant"),
    ] {
        if k > 0 {
            parts.push(format!("{k} {word}"));
        }
    }
    let mut line = format!("{} of {} choices", parts.join(", "), s.choices_examined);
    if s.inflated > 0 {
        line.push_str(&format!(
            "; {} of {} rows trustworthy ({} analytic {} marked {INFLATED_MARK})",
            s.trustworthy,
            s.choices_examined,
            s.inflated,
            if s.inflated == 1 { "row" } else { "rows" }
        ));
    } else {
        line.push_str(&format!(
            "; all {} rows trustworthy (no false-alarm rate above {INFLATED_SIZE}×α)",
            s.choices_examined
        ));
    }
    line
}

/// Pad with spaces to `width` display columns.
fn pad(s: &str, width: usize) -> String {
    let w = s.width();
    format!("{s}{}", " ".repeat(width.saturating_sub(w)))
}

/// Drop ANSI colour sequences (to measure what the reader sees).
pub fn strip_ansi(s: &str) -> String {
    let mut out = String::with_capacity(s.len());
    let mut chars = s.chars();
    while let Some(c) = chars.next() {
        if c == '\x1b' {
            for d in chars.by_ref() {
                if d == 'm' {
                    break;
                }
            }
        } else {
            out.push(c);
        }
    }
    out
}

/// Text for a terminal: backtick spans lose their backticks (the page
/// renders them as code; a terminal has no such markup).
pub fn plain(s: &str) -> String {
    let parts: Vec<&str> = s.split('`').collect();
    if parts.len().is_multiple_of(2) {
        // An unpaired backtick (from a user's name) stays as written.
        return s.to_string();
    }
    parts.concat()
}
