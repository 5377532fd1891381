//! Which window and edge handling of the audit reproduce the figures.
//!
//! The audit's sweep ([`patternproof_audit::run_audit`]) is run on the
//! points with the analytic edge handlings only (no simulations: a Monte
//! Carlo p-value depends on the seed and cannot be matched to a printed
//! one). A row reproduces the figures when n equals the points it covers
//! and every reported figure's rounding range holds the row's value: R,
//! z, D (`mean_nn`), E (`expected_nn`), the window's area, and p read as
//! two-sided or (unless declared) one-sided.
//!
//! When no row does, the nearest one is named, and the area a window
//! would need for these points to give the reported R: A = n·(2D/R)²
//! without correction (Clark & Evans 1954), A = (D/(R·a))² with Donnelly's
//! a for the window's shape (Donnelly 1978; the shape kept, the size
//! scaled).

use crate::Figures;
use crate::checks::Check;
use crate::interval::{Interval, number};
use crate::model::{Model, Tail};
use crate::reported::Quantity;
use patternproof_audit::window::WindowOptions;
use patternproof_audit::{Audit, AuditOptions, Edge, ResultRow};
use serde::Serialize;

/// The sweep a recheck runs: the audit's default windows (plus the bare
/// `area` window when `area` is given), edges none, Donnelly, guard zone
/// and torus, no simulations.
pub fn sweep_options(area: Option<f64>) -> AuditOptions {
    AuditOptions {
        windows: WindowOptions {
            area,
            ..WindowOptions::default()
        },
        edges: vec![Edge::None, Edge::Donnelly, Edge::Border, Edge::Toroidal],
        sims: 0,
        ..AuditOptions::default()
    }
}

/// A (window, edge) pair.
#[derive(Debug, Clone, PartialEq, Eq, Serialize)]
pub struct Match {
    /// Window id (`bbox`, `hull`, …).
    pub window: String,
    /// Edge handling (`none`, `donnelly`, `border`, `toroidal`).
    pub edge: String,
}

/// One row of the sweep against the reported figures.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct RowComparison {
    /// Window id.
    pub window: String,
    /// Edge handling.
    pub edge: String,
    /// Points the window covers.
    pub n_used: usize,
    /// Focal points (guard zone only).
    pub focal: Option<usize>,
    /// Window area.
    pub area: f64,
    /// The row's R.
    pub ratio: Option<f64>,
    /// The row's z.
    pub z: Option<f64>,
    /// The row's two-sided p.
    pub p: Option<f64>,
    /// The row's mean nearest-neighbour distance.
    pub mean_nn: Option<f64>,
    /// The row's expected distance under CSR.
    pub expected_nn: Option<f64>,
    /// Whether every reported figure fits.
    pub matches: bool,
    /// For a match with a reported p: the tail it fits (two-sided preferred).
    pub tail: Option<Tail>,
    /// The figures that do not fit, in words.
    pub differs: Vec<String>,
    /// Their symbols (`n`, `R`, `z`, `p`, `D`, `E`, `A`).
    pub mismatched: Vec<String>,
    /// How far off the row is (sum of relative misses; 0 for a match).
    pub gap: f64,
    /// The area at which this window's shape (none/toroidal: any shape)
    /// would give the reported R with these points; `null` for the guard
    /// zone or when R is not fixed.
    pub area_needed: Option<Interval>,
}

/// The nearest row when none matches.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Nearest {
    /// Window id.
    pub window: String,
    /// Edge handling.
    pub edge: String,
    /// What differs, and the area it would need.
    pub detail: String,
}

/// The comparison with the audit of the points.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Attribution {
    /// Points in the file (after the loader's duplicate handling).
    pub points: usize,
    /// Unit of distances (areas in its square).
    pub unit: String,
    /// Every row of the sweep.
    pub rows: Vec<RowComparison>,
    /// The rows that reproduce the figures.
    pub matches: Vec<Match>,
    /// The nearest row, when none matches.
    pub nearest: Option<Nearest>,
    /// Pairs the sweep could not evaluate, with the reason.
    pub skipped: Vec<String>,
    /// One sentence: what matches, or what comes nearest.
    pub summary: String,
}

/// "no edge correction", "Donnelly's edge correction", …
pub fn edge_words(edge: &str) -> &'static str {
    match edge {
        "none" => "no edge correction",
        "donnelly" => "Donnelly's edge correction",
        "border" => "a guard zone",
        "toroidal" => "torus distances",
        "simulation" => "simulations",
        _ => "an edge handling",
    }
}

fn relative_gap(iv: &Interval, v: f64) -> f64 {
    iv.distance_to(v) / iv.mid().abs().max(1e-12)
}

fn compare_row(
    f: &Figures,
    r: &ResultRow,
    area: f64,
    perimeter: Option<f64>,
    target: Option<Interval>,
) -> RowComparison {
    let mut differs = Vec::new();
    let mut mismatched: Vec<String> = Vec::new();
    let mut gap = 0.0;
    if r.n_used != f.n {
        mismatched.push("n".into());
        differs.push(format!("n = {} against {}", r.n_used, f.n));
        gap += (r.n_used as f64 - f.n as f64).abs() / f.n as f64;
    }
    let value = |q: Quantity| match q {
        Quantity::Ratio => r.ratio,
        Quantity::Z => r.z,
        Quantity::P => r.p,
        Quantity::MeanNn => r.mean_nn,
        Quantity::ExpectedNn => r.expected_nn,
        Quantity::Area => Some(area),
    };
    let mut tail = None;
    for rep in &f.figures {
        let q = rep.quantity;
        let Some(v) = value(q) else {
            mismatched.push(q.symbol().into());
            differs.push(format!("{}: the row has no value", q.symbol()));
            gap += 1.0;
            continue;
        };
        if q == Quantity::P {
            let two = (!f.one_sided && rep.interval.contains(v)).then_some(Tail::TwoSided);
            let one = rep.interval.contains(0.5 * v).then_some(Tail::OneSided);
            tail = two.or(one);
            if tail.is_none() {
                mismatched.push("p".into());
                let shown = if f.one_sided { 0.5 * v } else { v };
                differs.push(format!("p = {} against {}", number(shown), rep.shown()));
                let near = shown.clamp(rep.interval.low.max(1e-300), rep.interval.high.max(1e-300));
                gap += (shown.max(1e-300).log10() - near.log10()).abs();
            }
        } else if !rep.interval.contains(v) {
            mismatched.push(q.symbol().into());
            differs.push(format!(
                "{} = {} against {}",
                q.symbol(),
                number(v),
                rep.shown()
            ));
            gap += relative_gap(&rep.interval, v);
        }
    }
    let area_needed = target.and_then(|t| {
        let d = r.mean_nn?;
        let n = r.n_used as f64;
        match r.edge {
            Edge::None | Edge::Toroidal => Some(t.map_decreasing(|x| n * (2.0 * d / x).powi(2))),
            Edge::Donnelly => {
                let s = perimeter? / area.sqrt();
                let a = Model::donnelly(r.n_used, s).mean_factor;
                Some(t.map_decreasing(|x| (d / (x * a)).powi(2)))
            }
            _ => None,
        }
        .filter(|iv| iv.is_bounded())
    });
    RowComparison {
        window: r.window.clone(),
        edge: r.edge.as_str().to_string(),
        n_used: r.n_used,
        focal: r.focal,
        area,
        ratio: r.ratio,
        z: r.z,
        p: r.p,
        mean_nn: r.mean_nn,
        expected_nn: r.expected_nn,
        matches: differs.is_empty(),
        tail: if differs.is_empty() { tail } else { None },
        differs,
        mismatched,
        gap,
        area_needed,
    }
}

/// Compare every row of `audit` with `f`. `target_ratio` is the R the
/// figures fix (for the area needed).
pub fn attribute(
    f: &Figures,
    audit: &Audit,
    target_ratio: Option<Interval>,
    unit: &str,
) -> Attribution {
    let rows: Vec<RowComparison> = audit
        .results
        .iter()
        .filter_map(|r| {
            let w = audit.windows.iter().find(|w| w.id == r.window)?;
            Some(compare_row(f, r, w.area, w.perimeter, target_ratio))
        })
        .collect();
    let matches: Vec<Match> = rows
        .iter()
        .filter(|r| r.matches)
        .map(|r| Match {
            window: r.window.clone(),
            edge: r.edge.clone(),
        })
        .collect();
    let skipped = audit
        .skipped
        .iter()
        .map(|s| format!("{} × {}: {}", s.window, s.edge, s.reason))
        .chain(audit.notes.iter().cloned())
        .collect();
    let nearest = if matches.is_empty() {
        nearest(f, &rows, target_ratio, unit)
    } else {
        None
    };
    let summary = summary(f, &rows, &matches, nearest.as_ref(), unit);
    Attribution {
        points: audit.n,
        unit: unit.to_string(),
        rows,
        matches,
        nearest,
        skipped,
        summary,
    }
}

/// The figure a reader looks at first, for contrasts: R, else z, else p.
fn lead(f: &Figures) -> Option<Quantity> {
    [
        Quantity::Ratio,
        Quantity::Z,
        Quantity::P,
        Quantity::MeanNn,
        Quantity::ExpectedNn,
    ]
    .into_iter()
    .find(|q| f.has(*q))
}

fn row_value(r: &RowComparison, q: Quantity) -> Option<String> {
    let v = match q {
        Quantity::Ratio => r.ratio.map(|x| format!("{x:.3}")),
        Quantity::Z => r.z.map(|x| format!("{x:.2}")),
        Quantity::P => r.p.map(number),
        Quantity::MeanNn => r.mean_nn.map(number),
        Quantity::ExpectedNn => r.expected_nn.map(number),
        Quantity::Area => Some(number(r.area)),
    }?;
    Some(format!("{} = {v}", q.symbol()))
}

fn window_words(id: &str) -> String {
    match id {
        "bbox" => "the bounding box".into(),
        "hull" => "the hull".into(),
        "concave" => "the concave hull".into(),
        "boundary" => "the boundary".into(),
        "area" => "the bare area".into(),
        other => format!("`{other}`"),
    }
}

fn summary(
    f: &Figures,
    rows: &[RowComparison],
    matches: &[Match],
    nearest: Option<&Nearest>,
    _unit: &str,
) -> String {
    if matches.is_empty() {
        return match nearest {
            Some(n) => format!(
                "no window and edge handling reproduces the figures; {}",
                n.detail
            ),
            None => "no window and edge handling reproduces the figures".into(),
        };
    }
    let listed: Vec<String> = matches
        .iter()
        .map(|m| format!("`{}` with {}", m.window, edge_words(&m.edge)))
        .collect();
    let mut s = format!("matches {}", listed.join("; "));
    // Contrast with the hull (or the bounding box when the hull matches).
    let matched = |w: &str| matches.iter().any(|m| m.window == w);
    let contrast = ["hull", "bbox"]
        .into_iter()
        .filter(|w| !matched(w))
        .find_map(|w| rows.iter().find(|r| r.window == w && r.edge == "none"));
    if let (Some(c), Some(q)) = (contrast, lead(f))
        && let Some(v) = row_value(c, q)
    {
        s.push_str(&format!("; {} gives {v}", window_words(&c.window)));
    }
    s
}

fn nearest(
    f: &Figures,
    rows: &[RowComparison],
    target: Option<Interval>,
    unit: &str,
) -> Option<Nearest> {
    let best = rows
        .iter()
        .filter(|r| r.gap.is_finite())
        .min_by(|a, b| a.gap.total_cmp(&b.gap))?;
    let mut detail = format!(
        "the nearest is `{}` with {} ({})",
        best.window,
        edge_words(&best.edge),
        best.differs.join(", ")
    );
    // The area the plain test would need with these points.
    let plain_need = rows
        .iter()
        .filter(|r| r.edge == "none" && r.n_used == f.n)
        .find_map(|r| r.area_needed.map(|a| (r, a)));
    if let (Some(t), Some((r, need))) = (target, plain_need) {
        let areas: Vec<f64> = rows
            .iter()
            .filter(|r| r.edge == "none")
            .map(|r| r.area)
            .collect();
        let lo = areas.iter().copied().fold(f64::INFINITY, f64::min);
        let hi = areas.iter().copied().fold(f64::NEG_INFINITY, f64::max);
        detail.push_str(&format!(
            "; with these points (D = {} {unit}, n = {}) R in {t} needs an area of {} {unit}² without edge correction (the windows tried span {}–{} {unit}²)",
            r.mean_nn.map_or("?".into(), number),
            r.n_used,
            need,
            number(lo),
            number(hi)
        ));
    } else if let Some(need) = best.area_needed {
        detail.push_str(&format!("; it would need an area of {need} {unit}²"));
    }
    Some(Nearest {
        window: best.window.clone(),
        edge: best.edge.clone(),
        detail,
    })
}

/// The checks that need the points: n against the windows' counts, and
/// whether some row reproduces the figures.
pub fn checks(f: &Figures, at: &Attribution) -> Vec<Check> {
    let mut out = Vec::new();
    let counts: Vec<usize> = {
        let mut c: Vec<usize> = at.rows.iter().map(|r| r.n_used).collect();
        c.sort_unstable();
        c.dedup();
        c
    };
    let n_ok = counts.contains(&f.n);
    let covering: Vec<String> = at
        .rows
        .iter()
        .filter(|r| r.n_used == f.n && r.edge == "none")
        .map(|r| format!("`{}`", r.window))
        .collect();
    let count_words = counts
        .iter()
        .map(|c| c.to_string())
        .collect::<Vec<_>>()
        .join(", ");
    out.push(Check {
        name: "n from the points".into(),
        ok: Some(n_ok),
        reported: Some(format!("n = {}", f.n)),
        recomputed: None,
        recomputed_text: format!("{} in the file; windows cover {count_words}", at.points),
        detail: if n_ok {
            format!(
                "the file has {} points; {} cover exactly n = {}",
                at.points,
                if covering.is_empty() { "some windows".to_string() } else { covering.join(", ") },
                f.n
            )
        } else {
            format!(
                "the file has {} points and the windows cover {count_words}; none covers n = {}: the figures are for a different set of points",
                at.points, f.n
            )
        },
        condition: None,
        short: format!(
            "n = {} matches no window of these points (the file has {})",
            f.n, at.points
        ),
    });
    let ok = !at.matches.is_empty();
    out.push(Check {
        name: "a window reproduces the figures".into(),
        ok: Some(ok),
        reported: None,
        recomputed: None,
        recomputed_text: if ok {
            at.matches
                .iter()
                .map(|m| format!("{} × {}", m.window, m.edge))
                .collect::<Vec<_>>()
                .join(", ")
        } else {
            "none".into()
        },
        detail: at.summary.clone(),
        condition: None,
        short: at.summary.clone(),
    });
    out
}
