//! The verdict table as CSV (full precision, for spreadsheets) and as a
//! terminal table (rounded, for reading).

use crate::document::AuditReport;
use crate::numbers::{fixed, full, opt, p_value, percent, sig};
use crate::terminal_layout::{Column, Grid};
use patternproof_core::Call;
use std::io;

/// CSV header, in column order.
pub const CSV_COLUMNS: [&str; 18] = [
    "window",
    "edge",
    "n_used",
    "focal",
    "area",
    "perimeter",
    "mean_nn",
    "expected_nn",
    "ratio",
    "se",
    "z",
    "p",
    "call",
    "size_under_csr",
    "sims",
    "sim_q025",
    "sim_q975",
    "note",
];

/// Write `verdict.csv`.
pub fn write_csv<W: io::Write>(report: &AuditReport, out: W) -> io::Result<()> {
    let mut w = csv::Writer::from_writer(out);
    w.write_record(CSV_COLUMNS)?;
    for r in &report.results {
        let win = report.windows.iter().find(|w| w.id == r.window);
        w.write_record([
            r.window.clone(),
            r.edge.as_str().to_string(),
            r.n_used.to_string(),
            r.focal.map(|f| f.to_string()).unwrap_or_default(),
            full(win.map(|w| w.area)),
            full(win.and_then(|w| w.perimeter)),
            full(r.mean_nn),
            full(r.expected_nn),
            full(r.ratio),
            full(r.se),
            full(r.z),
            full(r.p),
            r.call.map(|c| c.as_str().to_string()).unwrap_or_default(),
            full(r.size_under_csr),
            r.sims.map(|s| s.to_string()).unwrap_or_default(),
            full(r.sim_q025),
            full(r.sim_q975),
            r.note.clone().unwrap_or_default(),
        ])?;
    }
    w.flush()
}

pub use patternproof_core::call::call_word;

/// A symbol for each call, used beside the word (never instead of it).
pub fn call_symbol(c: Option<Call>) -> &'static str {
    match c {
        Some(Call::Clustered) => "◆",
        Some(Call::Dispersed) => "◇",
        Some(Call::NotSignificant) => "○",
        None => "—",
    }
}

/// The terminal table, laid out for `width` columns (`None`: piped, in
/// the fixed 100-column layout) by [`terminal_layout`](crate::terminal_layout):
/// every column when they fit; else without d̄ and `E[d]`, then without
/// the area and z, keeping window, edge, n, R, p, the call and the
/// false-alarm rate (which fit 80 columns), each time with a line saying
/// that `verdict.md` and `verdict.csv` hold the full table. No cell is
/// ever wrapped. Ends with a newline.
pub fn terminal_table(report: &AuditReport, width: Option<u16>) -> String {
    let u = &report.input.unit;
    let area_header = format!("area {u}²");
    let mean_header = format!("d̄ {u}");
    let expected_header = format!("E[d] {u}");
    let mut grid = Grid::new(
        vec![
            Column::text("window"),
            Column::text("edge"),
            Column::number("n").rank(1),
            Column::number(&area_header)
                .short(&format!("area\n{u}²"))
                .rank(2),
            Column::number(&mean_header).rank(3),
            Column::number(&expected_header).rank(3),
            Column::number("R"),
            Column::number("z").rank(2),
            Column::number("p"),
            Column::text("call").bare(),
            Column::number("false alarms")
                .short("false\nalarms")
                .rank(1),
        ],
        2,
        "verdict.md and verdict.csv",
    );
    for r in &report.results {
        let area = report
            .windows
            .iter()
            .find(|w| w.id == r.window)
            .map(|w| w.area);
        let mut n = r.n_used.to_string();
        if let Some(f) = r.focal {
            n = format!("{f}/{n}");
        }
        grid.push(vec![
            r.window.clone(),
            r.edge.as_str().to_string(),
            n,
            opt(area, 4),
            opt(r.mean_nn, 4),
            opt(r.expected_nn, 4),
            r.ratio.map_or("—".into(), |x| fixed(x, 3)),
            r.z.map_or("—".into(), |x| fixed(x, 2)),
            r.p.map_or("—".into(), p_value),
            call_word(r.call).to_string(),
            r.size_under_csr.map_or("—".into(), percent),
        ]);
    }
    grid.render(width)
}

/// The flip statement in words, one line per analytic edge handling.
pub fn flip_lines(report: &AuditReport) -> Vec<String> {
    let u = &report.input.unit;
    report
        .flip
        .iter()
        .map(|f| {
            let mut parts = Vec::new();
            match (f.clustered_above_area, f.clustered_above_hull_multiple) {
                (Some(a), Some(m)) => parts.push(format!(
                    "clustered for any window above {} {u}² ({}× the hull)",
                    sig(a, 4),
                    sig(m, 3)
                )),
                (Some(a), None) => {
                    parts.push(format!("clustered for any window above {} {u}²", sig(a, 4)))
                }
                (None, _) if f.dispersed_below_area.is_some() => {
                    parts.push("no window size makes it clustered".into())
                }
                _ => {}
            }
            match (f.dispersed_below_area, f.dispersed_below_hull_multiple) {
                (Some(a), Some(m)) => parts.push(format!(
                    "dispersed below {} {u}² ({}× the hull)",
                    sig(a, 4),
                    sig(m, 3)
                )),
                (Some(a), None) => parts.push(format!("dispersed below {} {u}²", sig(a, 4))),
                _ => {}
            }
            if let Some(b) = f.flip_buffer {
                parts.push(format!(
                    "the buffered hull turns clustered at a buffer of {} {u}",
                    sig(b, 4)
                ));
            }
            if let Some(b) = f.dispersed_flip_buffer {
                parts.push(format!(
                    "it stops being dispersed at a buffer of {} {u}",
                    sig(b, 4)
                ));
            }
            if let Some(n) = &f.note {
                parts.push(n.clone());
            }
            format!("{}: {}", f.edge, parts.join("; "))
        })
        .collect()
}
