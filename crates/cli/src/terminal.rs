//! The width standard output is printed in, which decides the layout of
//! every table and sentence (`patternproof_report::terminal_layout`).

use std::io::IsTerminal;

/// `Some(columns)` when standard output is a terminal, `None` when it
/// goes to a pipe or a file (which then gets the fixed 100-column layout,
/// whatever `COLUMNS` says, so piped output is the same everywhere). A
/// terminal whose size cannot be asked gets `COLUMNS` if set, else 80.
pub fn stdout_width() -> Option<u16> {
    let out = std::io::stdout();
    if !out.is_terminal() {
        return None;
    }
    if let Some((terminal_size::Width(w), _)) = terminal_size::terminal_size_of(&out)
        && w > 0
    {
        return Some(w);
    }
    let columns = std::env::var("COLUMNS").ok().and_then(|c| c.parse().ok());
    Some(columns.unwrap_or(patternproof_report::terminal_layout::KEY_COLUMNS))
}

/// The columns a layout for `width` may fill: the terminal's, or the
/// fixed width of piped output.
pub fn layout_width(width: Option<u16>) -> usize {
    width.map_or(
        patternproof_report::terminal_layout::PIPED_COLUMNS,
        usize::from,
    )
}

/// Colours may be used: standard output is a terminal and `NO_COLOR` is
/// not set (no-color.org).
pub fn colour() -> bool {
    std::io::stdout().is_terminal() && std::env::var_os("NO_COLOR").is_none_or(|v| v.is_empty())
}

/// Print `text` wrapped to `width` between words, the first line starting
/// with `first` and the next ones with `rest`. Backtick spans lose their
/// backticks: a terminal has no code markup.
pub fn say(text: &str, width: Option<u16>, first: &str, rest: &str) {
    println!(
        "{}",
        patternproof_report::terminal_layout::wrap(
            &patternproof_report::matrix::plain(text),
            width,
            first,
            rest
        )
    );
}
