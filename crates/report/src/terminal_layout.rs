//! How every command's terminal text fits the width it is printed in.
//!
//! A table that is too wide for the terminal must lose columns, never
//! have a number cut in two: a wrapped cell that reads `1828` over `2`
//! is a wrong number, not a narrow one. So a [`Grid`] is a table whose
//! columns carry a rank (0: always shown; higher: dropped first) and,
//! optionally, a shorter header. [`Grid::render`] tries the widest layout
//! first (every column, full headers), then shorter headers, then fewer
//! columns, and prints the first one whose every line fits. Only prose
//! columns (explanations, lists of distance bands) wrap, and only between
//! words. When columns were left out a closing line names them and the
//! file that holds the full table. When even the rank-0 columns do not
//! fit, each row becomes one record (`bbox none: clustered (R 0.894, p
//! 0.015)`), wrapped between its parts.
//!
//! The width is `Some(columns)` on a terminal and `None` when the output
//! goes to a pipe or a file: piped text has one fixed layout that fits
//! [`PIPED_COLUMNS`], whatever the environment says, so the same run
//! prints the same bytes. [`wrap`] does the same for sentences.
//!
//! Widths are counted as a terminal counts them, with `unicode-width`
//! (the measure `comfy-table` uses too): `d̄` is one column, `²` one.

use comfy_table::{Cell, CellAlignment, Table, presets};
use unicode_width::UnicodeWidthStr;

/// The width of piped output: wide enough for the key columns of every
/// table and for a review tool's side-by-side view, and fixed so that
/// piped output is the same everywhere.
pub const PIPED_COLUMNS: usize = 100;

/// The narrowest terminal every table's key columns are laid out for.
pub const KEY_COLUMNS: u16 = 80;

/// The columns available for text printed at `width` (`None`: piped).
pub fn budget(width: Option<u16>) -> usize {
    width.map_or(PIPED_COLUMNS, usize::from)
}

/// The number of terminal columns of the widest line of `text`.
pub fn widest_line(text: &str) -> usize {
    text.lines().map(UnicodeWidthStr::width).max().unwrap_or(0)
}

/// Horizontal alignment of a column's cells.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
enum Align {
    Left,
    Right,
}

/// One column of a [`Grid`]: its header, how it is laid out and when it
/// may be left out.
#[derive(Clone, Debug)]
pub struct Column {
    header: String,
    short: Option<String>,
    align: Align,
    rank: u8,
    prose: bool,
    bare: bool,
}

impl Column {
    fn new(header: &str, align: Align) -> Self {
        Column {
            header: header.to_string(),
            short: None,
            align,
            rank: 0,
            prose: false,
            bare: false,
        }
    }

    /// A column of words (window ids, edge handlings, calls), left-aligned
    /// and never wrapped.
    pub fn text(header: &str) -> Self {
        Column::new(header, Align::Left)
    }

    /// A column of numbers, right-aligned and never wrapped.
    pub fn number(header: &str) -> Self {
        Column::new(header, Align::Right)
    }

    /// A column of sentences, which may wrap between words (never inside
    /// one) to fit the width left by the other columns.
    pub fn prose(header: &str) -> Self {
        Column {
            prose: true,
            ..Column::new(header, Align::Left)
        }
    }

    /// The header used when the full one makes the table too wide; a
    /// `\n` puts it on two lines (`false\nalarms`).
    pub fn short(mut self, header: &str) -> Self {
        self.short = Some(header.to_string());
        self
    }

    /// When the column is left out: 0 never, and the highest rank first.
    pub fn rank(mut self, rank: u8) -> Self {
        self.rank = rank;
        self
    }

    /// In a record (the narrowest layout) the cell is printed without its
    /// header: a call reads `clustered`, not `call clustered`.
    pub fn bare(mut self) -> Self {
        self.bare = true;
        self
    }

    fn header(&self, short: bool) -> &str {
        match (&self.short, short) {
            (Some(s), true) => s,
            _ => &self.header,
        }
    }
}

/// A table laid out for the width it is printed in (see the module
/// documentation): rows of cells under ranked [`Column`]s.
#[derive(Clone, Debug)]
pub struct Grid {
    columns: Vec<Column>,
    rows: Vec<Vec<String>>,
    labels: usize,
    elsewhere: String,
}

/// One way of laying a grid out: which columns, which headers.
struct Choice {
    visible: Vec<usize>,
    short: bool,
}

impl Grid {
    /// A grid with these columns. The first `labels` columns name a row
    /// (window and edge handling); they start each record of the
    /// narrowest layout. `elsewhere` names where every column can be read
    /// (`verdict.md and verdict.csv`), for the line printed when columns
    /// are left out.
    pub fn new(columns: Vec<Column>, labels: usize, elsewhere: &str) -> Self {
        Grid {
            columns,
            rows: Vec::new(),
            labels,
            elsewhere: elsewhere.to_string(),
        }
    }

    /// Add a row, one cell per column (missing cells are empty).
    pub fn push(&mut self, mut cells: Vec<String>) {
        cells.resize(self.columns.len(), String::new());
        self.rows.push(cells);
    }

    /// The table laid out in `width` columns (`None`: piped, in
    /// [`PIPED_COLUMNS`]), ending with a newline; with the line that
    /// names the left-out columns when there are any.
    pub fn render(&self, width: Option<u16>) -> String {
        let budget = budget(width);
        let mut ranks: Vec<u8> = self.columns.iter().map(|c| c.rank).collect();
        ranks.sort_unstable();
        ranks.dedup();
        for &most in ranks.iter().rev() {
            let visible: Vec<usize> = (0..self.columns.len())
                .filter(|&i| self.columns[i].rank <= most)
                .collect();
            for short in [false, true] {
                let choice = Choice {
                    visible: visible.clone(),
                    short,
                };
                // The drawn table is measured too, so a wrong guess of
                // comfy-table's frame can only cost a column, never fit.
                if let Some(widths) = self.fit(&choice, budget)
                    && let table = self.draw(&choice, &widths)
                    && widest_line(&table) <= budget
                {
                    let mut out = table;
                    out.push('\n');
                    out.push_str(&self.left_out(&choice.visible, budget));
                    return out;
                }
            }
        }
        self.records(budget)
    }

    /// Column widths for `choice` within `budget`, or `None` when it
    /// does not fit. Fixed columns take their widest cell; prose columns
    /// their longest word at least and share what is left.
    fn fit(&self, choice: &Choice, budget: usize) -> Option<Vec<usize>> {
        let mut least = Vec::new();
        let mut most = Vec::new();
        for &i in &choice.visible {
            let c = &self.columns[i];
            let header = c.header(choice.short);
            let cells = self.rows.iter().map(|r| r[i].as_str());
            if c.prose {
                let word = std::iter::once(header)
                    .chain(cells.clone())
                    .flat_map(words)
                    .map(|w| w.width())
                    .max()
                    .unwrap_or(0);
                let whole = std::iter::once(widest_line(header))
                    .chain(cells.map(widest_line))
                    .max()
                    .unwrap_or(0);
                least.push(word);
                most.push(whole.max(word));
            } else {
                let w = std::iter::once(widest_line(header))
                    .chain(cells.map(widest_line))
                    .max()
                    .unwrap_or(0);
                least.push(w);
                most.push(w);
            }
        }
        // The two borders, and two blanks per cell (see `draw`).
        let frame = 2 * choice.visible.len() + 2;
        let need: usize = frame + least.iter().sum::<usize>();
        if need > budget {
            return None;
        }
        let mut spare = budget - need;
        let mut widths = least.clone();
        let wanted: usize = most.iter().zip(&least).map(|(m, l)| m - l).sum();
        if wanted > 0 {
            let share = spare.min(wanted);
            for (k, w) in widths.iter_mut().enumerate() {
                let extra = (most[k] - least[k]) * share / wanted;
                *w += extra;
                spare -= extra;
            }
            // Rounding leaves a little: the first columns that still want
            // room take it.
            for (k, w) in widths.iter_mut().enumerate() {
                let more = (most[k] - *w).min(spare);
                *w += more;
                spare -= more;
            }
        }
        Some(widths)
    }

    fn draw(&self, choice: &Choice, widths: &[usize]) -> String {
        let mut t = Table::new();
        t.load_preset(presets::UTF8_BORDERS_ONLY);
        // The layout is decided here; comfy-table only draws it and never
        // wraps a cell (the default arrangement, stated for the reader).
        t.set_content_arrangement(comfy_table::ContentArrangement::Disabled);
        let align = |i: usize| match self.columns[i].align {
            Align::Left => CellAlignment::Left,
            Align::Right => CellAlignment::Right,
        };
        t.set_header(
            choice
                .visible
                .iter()
                .map(|&i| Cell::new(self.columns[i].header(choice.short)).set_alignment(align(i)))
                .collect::<Vec<_>>(),
        );
        let cell = |text: &str, k: usize| {
            let i = choice.visible[k];
            let text = if self.columns[i].prose {
                wrap_to(text, widths[k], "", "")
            } else {
                text.to_string()
            };
            Cell::new(text).set_alignment(align(i))
        };
        // Two spaces between columns (the blank rule and one of padding),
        // not three: an 80-column terminal then holds the key columns.
        for c in t.column_iter_mut().skip(1) {
            c.set_padding((0, 1));
        }
        for r in &self.rows {
            t.add_row(
                choice
                    .visible
                    .iter()
                    .enumerate()
                    .map(|(k, &i)| cell(&r[i], k))
                    .collect::<Vec<_>>(),
            );
        }
        t.to_string()
    }

    /// The line naming the columns a layout leaves out, and where they
    /// are; empty when every column is shown.
    fn left_out(&self, visible: &[usize], budget: usize) -> String {
        let gone: Vec<String> = (0..self.columns.len())
            .filter(|i| !visible.contains(i))
            .map(|i| self.columns[i].header.replace('\n', " "))
            .collect();
        if gone.is_empty() {
            return String::new();
        }
        let line = format!(
            "Left out at this width: {}; the full table is in {}.",
            gone.join(", "),
            self.elsewhere
        );
        let mut out = wrap_to(&line, budget, "", "  ");
        out.push('\n');
        out
    }

    /// The narrowest layout: one record per row, the label columns first,
    /// then the bare cells, then the other rank-0 columns with their
    /// headers, wrapped between parts.
    fn records(&self, budget: usize) -> String {
        let mut out = String::new();
        let shown: Vec<usize> = (0..self.columns.len())
            .filter(|&i| self.columns[i].rank == 0)
            .collect();
        for r in &self.rows {
            let label: Vec<&str> = r[..self.labels.min(r.len())]
                .iter()
                .map(String::as_str)
                .collect();
            let mut head = label.join(" ");
            let bare: Vec<&str> = shown
                .iter()
                .filter(|&&i| i >= self.labels && self.columns[i].bare)
                .map(|&i| r[i].as_str())
                .collect();
            if !bare.is_empty() {
                head = format!("{head}: {}", bare.join(" "));
            }
            let named: Vec<String> = shown
                .iter()
                .filter(|&&i| i >= self.labels && !self.columns[i].bare)
                .map(|&i| format!("{} {}", self.columns[i].header.replace('\n', " "), r[i]))
                .collect();
            let mut parts = words(&head);
            let n = named.len();
            for (k, p) in named.into_iter().enumerate() {
                let open = if k == 0 { "(" } else { "" };
                let close = if k + 1 == n { ")" } else { "," };
                parts.push(format!("{open}{p}{close}"));
            }
            out.push_str(&fill(&parts, budget, "", "    "));
            out.push('\n');
        }
        let visible: Vec<usize> = shown;
        out.push_str(&self.left_out(&visible, budget));
        out
    }
}

/// The words of a text, where it may break: at spaces, except that a
/// comparison or equals sign stays with the words on both sides
/// (`p < 0.001`, `R = 0.359`, `bbox × none`), so no line starts or ends
/// with one.
fn words(text: &str) -> Vec<String> {
    let mut out: Vec<String> = Vec::new();
    let mut glue = false;
    for w in text.split(' ').filter(|w| !w.is_empty()) {
        let sign = matches!(w, "<" | ">" | "≤" | "≥" | "=" | "≈" | "×");
        match out.last_mut() {
            Some(last) if glue || sign => {
                last.push(' ');
                last.push_str(w);
            }
            _ => out.push(w.to_string()),
        }
        glue = sign;
    }
    out
}

/// Lay `parts` (each kept whole) on lines of at most `budget` columns:
/// the first line starts with `first`, the others with `rest`. A part
/// wider than a line gets a line of its own rather than being cut.
fn fill(parts: &[String], budget: usize, first: &str, rest: &str) -> String {
    let mut lines: Vec<String> = Vec::new();
    let mut line = first.to_string();
    let mut fresh = true;
    for p in parts {
        if fresh {
            line.push_str(p);
            fresh = false;
        } else if line.width() + 1 + p.width() <= budget {
            line.push(' ');
            line.push_str(p);
        } else {
            lines.push(std::mem::replace(&mut line, format!("{rest}{p}")));
        }
    }
    lines.push(line);
    lines.join("\n")
}

fn wrap_to(text: &str, budget: usize, first: &str, rest: &str) -> String {
    text.split('\n')
        .enumerate()
        .map(|(k, l)| fill(&words(l), budget, if k == 0 { first } else { rest }, rest))
        .collect::<Vec<_>>()
        .join("\n")
}

/// A sentence wrapped to `width` (`None`: piped, [`PIPED_COLUMNS`])
/// between words, never inside one: the first line starts with `first`,
/// the following ones with `rest` (a hanging indent). No final newline.
pub fn wrap(text: &str, width: Option<u16>, first: &str, rest: &str) -> String {
    wrap_to(text, budget(width), first, rest)
}

#[cfg(test)]
mod tests {
    use super::*;

    fn sample() -> Grid {
        let mut g = Grid::new(
            vec![
                Column::text("window"),
                Column::text("edge"),
                Column::number("area m²").rank(2),
                Column::number("p"),
                Column::text("call").bare(),
                Column::number("false alarms")
                    .short("false\nalarms")
                    .rank(1),
            ],
            2,
            "verdict.md and verdict.csv",
        );
        g.push(vec![
            "bbox".into(),
            "none".into(),
            "18282".into(),
            "0.015".into(),
            "clustered".into(),
            "15.0 %".into(),
        ]);
        g.push(vec![
            "hull+10.1".into(),
            "simulation".into(),
            "20702".into(),
            "< 0.001".into(),
            "not significant".into(),
            "—".into(),
        ]);
        g
    }

    /// Every cell of the sample, whole, in `text`.
    fn whole(text: &str, cells: &[&str]) {
        for c in cells {
            assert!(text.contains(c), "{c:?} missing from\n{text}");
        }
    }

    #[test]
    fn a_wide_terminal_shows_every_column_and_no_pointer() {
        let t = sample().render(Some(200));
        whole(&t, &["18282", "20702", "0.015", "< 0.001", "15.0 %"]);
        assert!(t.contains("false alarms"));
        assert!(!t.contains("full table"), "{t}");
    }

    #[test]
    fn columns_go_by_rank_and_the_pointer_names_them() {
        let full = widest_line(&sample().render(Some(200)));
        // One column narrower than the full table: short headers first.
        let t = sample().render(Some(u16::try_from(full - 1).unwrap_or(u16::MAX)));
        assert!(t.contains("false ") && t.contains("alarms"), "{t}");
        assert!(t.contains("18282"), "{t}");
        // Narrower still: the area (rank 2) goes before the false alarms.
        let t = sample().render(Some(64));
        assert!(widest_line(&t) <= 64, "{t}");
        assert!(!t.contains("18282"), "{t}");
        whole(&t, &["0.015", "< 0.001", "15.0 %", "not significant"]);
        assert!(
            t.replace("\n  ", " ").contains(
                "Left out at this width: area m²; the full table is in verdict.md and verdict.csv."
            ),
            "{t}"
        );
    }

    #[test]
    fn the_narrowest_layout_is_one_record_per_row() {
        let t = sample().render(Some(30));
        assert!(widest_line(&t) <= 30, "{t}");
        assert!(t.starts_with("bbox none: clustered (p 0.015)\n"), "{t}");
        // The record wraps between its parts; `< 0.001` stays together.
        assert!(
            t.contains("hull+10.1 simulation: not\n    significant (p < 0.001)\n"),
            "{t}"
        );
        assert!(!t.contains("<\n") && !t.contains("\n0.001"), "{t}");
        assert!(t.contains("false alarms;"), "{t}");
    }

    #[test]
    fn piped_output_has_one_layout_of_at_most_100_columns() {
        let t = sample().render(None);
        assert!(widest_line(&t) <= PIPED_COLUMNS);
        assert_eq!(t, sample().render(Some(100)));
    }

    #[test]
    fn prose_columns_wrap_between_words_only() {
        let mut g = Grid::new(
            vec![Column::text("window"), Column::prose("bands")],
            1,
            "scales.md",
        );
        g.push(vec![
            "hull".into(),
            "clustered 1.7 m; clustered 3.39–28.3 m; dispersed 40.5–60 m".into(),
        ]);
        let t = g.render(Some(30));
        assert!(widest_line(&t) <= 30, "{t}");
        whole(&t, &["1.7", "3.39–28.3", "40.5–60"]);
        assert!(!t.contains("Left out"), "{t}");
    }

    #[test]
    fn wrap_never_splits_a_word_and_indents_what_follows() {
        let s = "clustered for any window above 17461 m² (1.12× the hull); p < 0.001";
        let w = wrap(s, Some(24), "  ", "    ");
        for l in w.lines() {
            assert!(l.width() <= 24, "{w}");
        }
        assert!(w.starts_with("  clustered"), "{w}");
        assert!(w.lines().skip(1).all(|l| l.starts_with("    ")), "{w}");
        assert!(w.contains("17461") && w.contains("p < 0.001"), "{w}");
        // A word wider than the line keeps its own line, whole.
        let long = "see d775ca715095c1822b8eac30caf50c987f812ae3a52014a93498bacefe2bcc28 now";
        assert_eq!(
            wrap(long, Some(20), "", ""),
            "see\nd775ca715095c1822b8eac30caf50c987f812ae3a52014a93498bacefe2bcc28\nnow"
        );
    }
}
