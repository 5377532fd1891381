//! How robust is the call? Counts, unanimity, which choices disagree, and
//! a verdict in plain words with the cautions a reviewer would raise.

use crate::edge::Edge;
use crate::sweep::ResultRow;
use crate::window::Window;
use patternproof_core::Call;
use patternproof_core::clark_evans::{MIN_N_ANALYTIC, SMALL_SAMPLE_N};
use serde::Serialize;

/// Rows per call.
#[derive(Debug, Clone, Copy, Default, PartialEq, Eq, Serialize)]
pub struct CallCounts {
    /// Rows calling `clustered`.
    pub clustered: usize,
    /// Rows calling `dispersed`.
    pub dispersed: usize,
    /// Rows calling `not-significant`.
    #[serde(rename = "not-significant")]
    pub not_significant: usize,
}

impl CallCounts {
    fn add(&mut self, c: Call) {
        match c {
            Call::Clustered => self.clustered += 1,
            Call::Dispersed => self.dispersed += 1,
            Call::NotSignificant => self.not_significant += 1,
        }
    }

    /// Rows with a call.
    pub fn total(&self) -> usize {
        self.clustered + self.dispersed + self.not_significant
    }

    /// The most frequent call (ties: `not-significant` first, then
    /// `clustered`), `None` when there are no rows.
    pub fn majority(&self) -> Option<Call> {
        if self.total() == 0 {
            return None;
        }
        let mut best = (Call::NotSignificant, self.not_significant);
        for (c, k) in [
            (Call::Clustered, self.clustered),
            (Call::Dispersed, self.dispersed),
        ] {
            if k > best.1 {
                best = (c, k);
            }
        }
        Some(best.0)
    }

    fn distinct(&self) -> usize {
        [self.clustered, self.dispersed, self.not_significant]
            .iter()
            .filter(|&&k| k > 0)
            .count()
    }
}

/// The calls within one window.
#[derive(Debug, Clone, Serialize)]
pub struct WindowSummary {
    /// Window id.
    pub window: String,
    /// Rows per call.
    pub calls: CallCounts,
    /// All rows of this window agree.
    pub unanimous: bool,
}

/// A row whose call differs from the majority.
#[derive(Debug, Clone, Serialize)]
pub struct Departure {
    /// Window id.
    pub window: String,
    /// Edge handling.
    pub edge: Edge,
    /// Its call.
    pub call: Call,
}

/// The robustness summary of one audit.
#[derive(Debug, Clone, Serialize)]
pub struct Summary {
    /// (window, edge) choices that produced a call.
    pub choices_examined: usize,
    /// Rows per call, whole table.
    pub calls: CallCounts,
    /// Every row agrees.
    pub unanimous: bool,
    /// The most frequent call.
    pub majority: Option<Call>,
    /// Rows with a call whose false-alarm rate under CSR is at most
    /// [`INFLATED_SIZE`] × α (the simulation rows hold α by construction).
    pub trustworthy: usize,
    /// Analytic rows whose false-alarm rate under CSR exceeds
    /// [`INFLATED_SIZE`] × α: their p-values are not to be trusted.
    pub inflated: usize,
    /// Single choices that give a different call from the majority.
    pub departures: Vec<Departure>,
    /// Per window.
    pub per_window: Vec<WindowSummary>,
    /// One sentence for the terminal and the report.
    pub verdict: String,
    /// What a careful reader should weigh.
    pub cautions: Vec<String>,
}

/// A window that leaves out more than this share of the points gets a
/// caution of its own (our choice: a few stray points are common, a
/// twentieth of the data is a different pattern).
pub const LEFT_OUT_SHARE: f64 = 0.05;

/// A row whose false-alarm rate under CSR exceeds this multiple of α is
/// marked as not trustworthy (our choice: twice the nominal rate is an
/// error a reader would not accept if it were stated).
pub const INFLATED_SIZE: f64 = 2.0;

/// Is this row's analytic test known to raise false alarms far more often
/// than α in its window?
pub fn is_inflated(row: &ResultRow, alpha: f64) -> bool {
    row.size_under_csr
        .is_some_and(|s| s > INFLATED_SIZE * alpha)
}

/// Summarise the verdict table of `n` points.
pub fn summarise(rows: &[ResultRow], windows: &[Window], n: usize, alpha: f64) -> Summary {
    let mut calls = CallCounts::default();
    for c in rows.iter().filter_map(|r| r.call) {
        calls.add(c);
    }
    let majority = calls.majority();
    let departures: Vec<Departure> = rows
        .iter()
        .filter_map(|r| {
            let c = r.call?;
            (Some(c) != majority).then(|| Departure {
                window: r.window.clone(),
                edge: r.edge,
                call: c,
            })
        })
        .collect();
    let per_window: Vec<WindowSummary> = windows
        .iter()
        .map(|w| {
            let mut k = CallCounts::default();
            for c in rows
                .iter()
                .filter(|r| r.window == w.id)
                .filter_map(|r| r.call)
            {
                k.add(c);
            }
            WindowSummary {
                window: w.id.clone(),
                calls: k,
                unanimous: k.distinct() <= 1,
            }
        })
        .collect();
    let total = calls.total();
    let unanimous = calls.distinct() <= 1;
    let order: Vec<&str> = windows.iter().map(|w| w.id.as_str()).collect();
    let mut verdict = verdict_sentence(rows, &order, majority);
    let mut cautions = Vec::new();
    if n < SMALL_SAMPLE_N {
        verdict = format!("small sample (n = {n}): {verdict}");
        cautions.push(small_sample_caution(n));
    }
    cautions.extend(left_out_cautions(windows));

    let significant: Vec<&ResultRow> = rows
        .iter()
        .filter(|r| matches!(r.call, Some(Call::Clustered | Call::Dispersed)))
        .collect();
    if !significant.is_empty() && significant.iter().all(|r| r.edge == Edge::None) {
        cautions.push("every significant row is uncorrected (edge `none`); the corrected and simulation rows do not support the claim".into());
    }
    for edge in Edge::ALL {
        let mut k = CallCounts::default();
        for c in rows
            .iter()
            .filter(|r| r.edge == edge)
            .filter_map(|r| r.call)
        {
            k.add(c);
        }
        if k.distinct() > 1 {
            cautions.push(format!(
                "with edge `{edge}` the call depends on the window ({} clustered, {} dispersed, {} not significant): the study area decides the answer",
                k.clustered, k.dispersed, k.not_significant
            ));
            break;
        }
    }
    let inflated: Vec<String> = rows
        .iter()
        .filter_map(|r| {
            let s = r.size_under_csr?;
            (s > INFLATED_SIZE * alpha)
                .then(|| format!("{}/{} ({:.1} %)", r.window, r.edge, 100.0 * s))
        })
        .collect();
    if !inflated.is_empty() {
        cautions.push(format!(
            "false-alarm rates above twice α = {alpha} under CSR in the same window: {}; do not trust those rows' p-values",
            inflated.join(", ")
        ));
    }
    if total > 1 {
        cautions.push(format!(
            "{total} choices were examined; picking the one that is significant after seeing them is a forking-paths error: report the whole table or fix the window and edge handling in advance"
        ));
    }
    cautions.push("a significant test says the pattern is unlikely under complete spatial randomness in this window; it does not say why (habitat, sampling effort or interaction can all produce it), and at distances other than the nearest neighbour the answer may differ".into());
    let inflated_rows = rows
        .iter()
        .filter(|r| r.call.is_some() && is_inflated(r, alpha))
        .count();
    Summary {
        choices_examined: total,
        trustworthy: total - inflated_rows,
        inflated: inflated_rows,
        calls,
        unanimous,
        majority,
        departures,
        per_window,
        verdict,
        cautions,
    }
}

/// What a small n does to the table.
fn small_sample_caution(n: usize) -> String {
    if n < MIN_N_ANALYTIC {
        format!(
            "small sample: only {n} points. Closed-form rows are not given below {MIN_N_ANALYTIC} points (common practice for the normal approximation), and the simulation rows have little power. Windows drawn around the points themselves (bbox, hull, concave) have the points on their outline, which leans every test towards `dispersed`; with so few points only a window fixed without looking at the data (--boundary, --area) gives a test worth reporting"
        )
    } else {
        format!(
            "small sample: n = {n} is below {SMALL_SAMPLE_N}; the closed-form rows rest on a normal approximation that is rough at this size (common practice); prefer the simulation rows"
        )
    }
}

/// One caution per window that leaves out more than [`LEFT_OUT_SHARE`] of
/// the points: its rows describe another pattern than the other windows'.
fn left_out_cautions(windows: &[Window]) -> Vec<String> {
    windows
        .iter()
        .filter_map(|w| {
            let total = w.inside.len() + w.points_outside;
            let share = w.points_outside as f64 / total.max(1) as f64;
            (share > LEFT_OUT_SHARE).then(|| {
                format!(
                    "window `{}` leaves out {} of {} points ({:.0} %): its rows test a different pattern from the other windows' rows; check that the boundary and the points belong together, or say in the paper why those points are excluded",
                    w.id,
                    w.points_outside,
                    total,
                    100.0 * share
                )
            })
        })
        .collect()
}

/// The verdict in one sentence that says what decides the call.
///
/// The choices that disagree with the majority call are grouped by window
/// or by edge handling, whichever names fewer groups, and every group is
/// named: a reader must see the only dissenting call of its kind.
fn verdict_sentence(rows: &[ResultRow], windows: &[&str], majority: Option<Call>) -> String {
    let Some(m) = majority else {
        return "no window produced a test".into();
    };
    let called: Vec<(&str, Edge, Call)> = rows
        .iter()
        .filter_map(|r| Some((r.window.as_str(), r.edge, r.call?)))
        .collect();
    let total = called.len();
    if called.iter().all(|&(_, _, c)| c == m) {
        return format!(
            "{} in every window with every edge handling ({total} choices)",
            call_phrase(m)
        );
    }
    let window_ids: Vec<&str> = windows
        .iter()
        .copied()
        .filter(|id| called.iter().any(|&(w, _, _)| w == *id))
        .collect();
    let edges: Vec<Edge> = Edge::ALL
        .into_iter()
        .filter(|e| called.iter().any(|&(_, x, _)| x == *e))
        .collect();
    let dissent_windows: Vec<&str> = window_ids
        .iter()
        .copied()
        .filter(|id| called.iter().any(|&(w, _, c)| w == *id && c != m))
        .collect();
    let dissent_edges: Vec<Edge> = edges
        .iter()
        .copied()
        .filter(|e| called.iter().any(|&(_, x, c)| x == *e && c != m))
        .collect();
    // Group by what leaves something agreeing throughout; when both do
    // (or neither), by whichever names fewer groups.
    let edge_agrees = dissent_edges.len() < edges.len();
    let window_agrees = dissent_windows.len() < window_ids.len();
    let by_edge = match (edge_agrees, window_agrees) {
        (true, false) => true,
        (false, true) => false,
        _ => dissent_edges.len() < dissent_windows.len(),
    };
    let word = call_phrase(m);
    let k = called.iter().filter(|&&(_, _, c)| c == m).count();
    let mut s = if by_edge {
        let agree = edges.len() - dissent_edges.len();
        let names: Vec<String> = dissent_edges.iter().map(|e| edge_name(*e)).collect();
        if agree == 0 {
            format!(
                "{word} under {k} of {total} choices, but under no edge handling in every window"
            )
        } else {
            format!(
                "{word} with every edge handling except {}",
                and_list(&names)
            )
        }
    } else {
        let agree = window_ids.len() - dissent_windows.len();
        let names: Vec<String> = dissent_windows.iter().map(|w| w.to_string()).collect();
        if agree == 0 {
            format!(
                "{word} under {k} of {total} choices, but in no window with every edge handling"
            )
        } else if agree >= dissent_windows.len() {
            format!("{word} in every window except {}", and_list(&names))
        } else {
            let agreeing: Vec<String> = window_ids
                .iter()
                .filter(|w| !dissent_windows.contains(w))
                .map(|w| w.to_string())
                .collect();
            format!(
                "{word} with every edge handling only in {}",
                and_list(&agreeing)
            )
        }
    };
    let mut clauses = Vec::new();
    if by_edge {
        for &e in &dissent_edges {
            let cells: Vec<(&str, Call)> = called
                .iter()
                .filter(|&&(_, x, _)| x == e)
                .map(|&(w, _, c)| (w, c))
                .collect();
            clauses.push(format!(
                "{} gives {}",
                edge_name(e),
                grouped(&cells, m, "in every window", |ws| format!(
                    "in {}",
                    and_list(ws)
                ))
            ));
        }
    } else {
        for &w in &dissent_windows {
            let cells: Vec<(String, Call)> = called
                .iter()
                .filter(|&&(x, _, _)| x == w)
                .map(|&(_, e, c)| (edge_name(e), c))
                .collect();
            let cells: Vec<(&str, Call)> = cells.iter().map(|(e, c)| (e.as_str(), *c)).collect();
            clauses.push(format!(
                "{w} is {}",
                grouped(&cells, m, "with every edge handling", |es| format!(
                    "with {}",
                    and_list(es)
                ))
            ));
        }
    }
    s.push_str(": ");
    s.push_str(&clauses.join("; "));
    s
}

/// `cells` (a label and its call) as "not significant in c, clustered in a
/// and b", the calls other than the majority first; `all` when one call
/// covers every cell.
fn grouped(
    cells: &[(&str, Call)],
    majority: Call,
    all: &str,
    some: impl Fn(&[String]) -> String,
) -> String {
    let mut order = vec![Call::Clustered, Call::Dispersed, Call::NotSignificant];
    // The dissenting calls first: they are what the clause is about.
    order.retain(|&c| c != majority);
    order.push(majority);
    let mut parts = Vec::new();
    for c in order {
        let labels: Vec<String> = cells
            .iter()
            .filter(|&&(_, x)| x == c)
            .map(|&(l, _)| l.to_string())
            .collect();
        if labels.is_empty() {
            continue;
        }
        let place = if labels.len() == cells.len() {
            all.to_string()
        } else {
            some(&labels)
        };
        parts.push(format!("{} {place}", call_phrase(c)));
    }
    parts.join(", ")
}

/// A call in running text.
fn call_phrase(c: Call) -> &'static str {
    match c {
        Call::NotSignificant => "not significant",
        Call::Clustered => "clustered",
        Call::Dispersed => "dispersed",
    }
}

/// An edge handling in running text.
fn edge_name(e: Edge) -> String {
    match e {
        Edge::Simulation => "the simulation test".into(),
        e => format!("edge {e}"),
    }
}

/// "a", "a and b", "a, b and c".
fn and_list(items: &[String]) -> String {
    match items {
        [] => String::new(),
        [one] => one.clone(),
        [head @ .., last] => format!("{} and {last}", head.join(", ")),
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    /// A row with only what the sentence reads.
    fn row(window: &str, edge: Edge, call: Call) -> ResultRow {
        let mut r = ResultRow::empty(window, edge, 50);
        r.call = Some(call);
        r
    }

    fn sentence(rows: &[ResultRow], order: &[&str]) -> String {
        let mut k = CallCounts::default();
        for r in rows {
            k.add(r.call.expect("every test row has a call"));
        }
        verdict_sentence(rows, order, k.majority())
    }

    use Call::{Clustered as C, Dispersed as D, NotSignificant as N};
    use Edge::{Border, Donnelly, None as Plain, Simulation, Toroidal};

    #[test]
    fn unanimous_table_says_so_once() {
        let rows = [
            row("bbox", Plain, C),
            row("hull", Plain, C),
            row("hull", Simulation, C),
        ];
        assert_eq!(
            sentence(&rows, &["bbox", "hull"]),
            "clustered in every window with every edge handling (3 choices)"
        );
    }

    /// The demo meadow's calls: three windows dissent, four edge handlings
    /// do, so the sentence groups by window and names every dissenting
    /// call, the single dispersed one included.
    #[test]
    fn groups_by_window_when_fewer_windows_dissent() {
        let mut rows = Vec::new();
        let calls = [
            ("bbox", [C, C, C, C]),
            ("hull", [N, N, N, N]),
            ("hull+2.53", [N, C, C, C]),
            ("hull+5.05", [C, C, C, C]),
            ("hull+10.1", [C, C, C, C]),
            ("concave", [D, N, N, N]),
            ("boundary", [C, C, C, C]),
        ];
        for (w, cs) in calls {
            for (e, c) in [Plain, Donnelly, Border, Simulation].into_iter().zip(cs) {
                rows.push(row(w, e, c));
            }
        }
        rows.push(row("bbox", Toroidal, C));
        let order = [
            "bbox",
            "hull",
            "hull+2.53",
            "hull+5.05",
            "hull+10.1",
            "concave",
            "boundary",
        ];
        assert_eq!(
            sentence(&rows, &order),
            "clustered in every window except hull, hull+2.53 and concave: \
             hull is not significant with every edge handling; \
             hull+2.53 is not significant with edge none, clustered with edge donnelly, edge border and the simulation test; \
             concave is dispersed with edge none, not significant with edge donnelly, edge border and the simulation test"
        );
    }

    /// One edge handling dissents in many windows: the sentence names the
    /// edge handling once instead of every window.
    #[test]
    fn groups_by_edge_when_fewer_edges_dissent() {
        let mut rows = Vec::new();
        for w in ["a", "b", "c"] {
            rows.push(row(w, Plain, if w == "b" { D } else { C }));
            rows.push(row(w, Donnelly, N));
            rows.push(row(w, Simulation, N));
        }
        assert_eq!(
            sentence(&rows, &["a", "b", "c"]),
            "not significant with every edge handling except edge none: \
             edge none gives clustered in a and c, dispersed in b"
        );
    }

    /// No window agrees throughout: the sentence says so instead of
    /// "every window except" all of them.
    #[test]
    fn no_window_agrees_throughout() {
        let rows = [
            row("area", Plain, C),
            row("area", Donnelly, N),
            row("area", Border, N),
        ];
        assert_eq!(
            sentence(&rows, &["area"]),
            "not significant with every edge handling except edge none: \
             edge none gives clustered in every window"
        );
    }

    /// More dissenting windows than agreeing ones: the agreeing ones are
    /// named instead, and no "and N more" hides any.
    #[test]
    fn names_the_agreeing_windows_when_they_are_few() {
        let mut rows = Vec::new();
        for (w, cs) in [
            ("w1", [C, C]),
            ("w2", [C, N]),
            ("w3", [N, C]),
            ("w4", [D, C]),
            ("w5", [N, D]),
            ("w6", [C, C]),
            ("w7", [C, C]),
        ] {
            for (e, c) in [Plain, Donnelly].into_iter().zip(cs) {
                rows.push(row(w, e, c));
            }
        }
        let s = sentence(&rows, &["w1", "w2", "w3", "w4", "w5", "w6", "w7"]);
        assert!(
            s.starts_with("clustered with every edge handling only in w1, w6 and w7: "),
            "{s}"
        );
        for w in ["w2", "w3", "w4", "w5"] {
            assert!(s.contains(&format!("{w} is ")), "{w} missing: {s}");
        }
        assert!(!s.contains("more"), "{s}");
    }
}
