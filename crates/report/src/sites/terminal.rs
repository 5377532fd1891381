//! The terminal text of a `sites` run: one row per site, the summary and
//! the cautions, laid out for the width it is printed in.

use crate::numbers::p_value;
use crate::table::call_word;
use crate::terminal_layout::{Column, Grid, wrap};
use patternproof_sites::document::SitesDocument;

/// The sites table (site, R, adjusted p, call, window-sensitive; an
/// untested site's call cell says why), the summary sentence and the
/// cautions, for `width` columns (`None`: piped, 100 columns). Reasons
/// wrap between words; no number is ever cut. Every line ends in a
/// newline.
pub fn terminal_text(doc: &SitesDocument<'_>, width: Option<u16>) -> String {
    let mut grid = Grid::new(
        vec![
            Column::text("site"),
            Column::number("R"),
            Column::number("adjusted p").short("adjusted\np"),
            Column::prose("call").bare(),
            Column::text("window-sensitive").short("window-\nsensitive"),
        ],
        1,
        "sites.md and sites.csv",
    );
    for r in &doc.sites {
        let (call, sensitive) = match &r.reason {
            Some(why) => (format!("not tested: {why}"), "—"),
            None => (
                call_word(r.call).to_string(),
                match r.window_sensitive {
                    Some(true) => "yes",
                    Some(false) => "no",
                    None => "—",
                },
            ),
        };
        grid.push(vec![
            r.site.clone(),
            r.ratio.map_or("—".into(), |x| format!("{x:.3}")),
            r.p_adjusted.map_or("—".into(), p_value),
            call,
            sensitive.to_string(),
        ]);
    }
    let mut s = grid.render(width);
    s.push('\n');
    s.push_str(&wrap(
        &format!("{}.", super::files::summary_line(doc)),
        width,
        "",
        "  ",
    ));
    s.push('\n');
    for n in &doc.notes {
        s.push_str(&wrap(&format!("caution: {n}"), width, "  ", "    "));
        s.push('\n');
    }
    s
}
