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
    let mut verdict = verdict_sentence(majority, &calls, &departures, unanimous);
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
            (s > 2.0 * alpha).then(|| format!("{}/{} ({:.1} %)", r.window, r.edge, 100.0 * s))
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
    Summary {
        choices_examined: total,
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

fn verdict_sentence(
    majority: Option<Call>,
    calls: &CallCounts,
    departures: &[Departure],
    unanimous: bool,
) -> String {
    let Some(m) = majority else {
        return "no window produced a test".into();
    };
    let total = calls.total();
    let k = match m {
        Call::Clustered => calls.clustered,
        Call::Dispersed => calls.dispersed,
        Call::NotSignificant => calls.not_significant,
    };
    let word = match m {
        Call::NotSignificant => "not significant".to_string(),
        c => c.as_str().to_string(),
    };
    if unanimous {
        return format!("{word} under all {total} choices");
    }
    let mut s = format!("{word} under {k} of {total} choices");
    let shown: Vec<String> = departures
        .iter()
        .take(4)
        .map(|d| {
            let how = if d.edge == Edge::Simulation {
                format!("with the simulation test on `{}`", d.window)
            } else {
                format!("on `{}` with edge `{}`", d.window, d.edge)
            };
            let c = match d.call {
                Call::NotSignificant => "not significant",
                c => c.as_str(),
            };
            format!("{c} {how}")
        })
        .collect();
    s.push_str("; ");
    s.push_str(&shown.join("; "));
    if departures.len() > 4 {
        s.push_str(&format!("; and {} more", departures.len() - 4));
    }
    s
}
