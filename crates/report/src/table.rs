//! The verdict table as CSV (full precision, for spreadsheets) and as a
//! terminal table (rounded, for reading).

use crate::document::AuditReport;
use crate::numbers::{fixed, full, opt, p_value, percent, sig};
use comfy_table::{Cell, CellAlignment, ContentArrangement, Table, presets};
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

/// The terminal table, sized to `width` columns when known.
pub fn terminal_table(report: &AuditReport, width: Option<u16>) -> String {
    let u = &report.input.unit;
    let mut t = Table::new();
    t.load_preset(presets::UTF8_BORDERS_ONLY);
    t.set_content_arrangement(ContentArrangement::Dynamic);
    if let Some(w) = width {
        t.set_width(w);
    }
    t.set_header(vec![
        "window".to_string(),
        "edge".into(),
        "n".into(),
        format!("area {u}²"),
        format!("d̄ {u}"),
        format!("E[d] {u}"),
        "R".into(),
        "z".into(),
        "p".into(),
        "call".into(),
        "false alarms".into(),
    ]);
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
        let row = vec![
            Cell::new(&r.window),
            Cell::new(r.edge.as_str()),
            Cell::new(n).set_alignment(CellAlignment::Right),
            Cell::new(opt(area, 4)).set_alignment(CellAlignment::Right),
            Cell::new(opt(r.mean_nn, 4)).set_alignment(CellAlignment::Right),
            Cell::new(opt(r.expected_nn, 4)).set_alignment(CellAlignment::Right),
            Cell::new(r.ratio.map_or("—".into(), |x| fixed(x, 3)))
                .set_alignment(CellAlignment::Right),
            Cell::new(r.z.map_or("—".into(), |x| fixed(x, 2))).set_alignment(CellAlignment::Right),
            Cell::new(r.p.map_or("—".into(), p_value)).set_alignment(CellAlignment::Right),
            Cell::new(call_word(r.call)),
            Cell::new(r.size_under_csr.map_or("—".into(), percent))
                .set_alignment(CellAlignment::Right),
        ];
        t.add_row(row);
    }
    t.to_string()
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
