//! The verdict: how far the isopleth areas spread across the choices,
//! which choice moves them most, and whether the main hotspot stays put.
//!
//! - The spread of each level's area is its range over every surface and the
//!   factor `max/min`.
//! - "Moves it most": for each factor (kernel, bandwidth, edge handling) with
//!   at least two values, the surfaces are grouped with the other two factors
//!   held fixed and the largest `max/min` of the highest level's area within
//!   a group is taken; the factor with the largest such ratio moves it most.
//! - The main hotspot of a surface is the patch of its lowest-level region
//!   (default 50 %) that holds its highest cell. It "stays in place" when its
//!   Jaccard overlap with the reference surface's main hotspot is at least
//!   [`crate::HOTSPOT_OVERLAP`] (0.5: the shared cells outnumber those in
//!   either hotspot alone) in every surface.

use crate::{HOTSPOT_OVERLAP, Surface};
use patternproof_core::numbers::sig;
use serde::Serialize;

/// The spread of one level's area.
#[derive(Debug, Clone, Serialize)]
pub struct Spread {
    /// Level, as a percentage.
    pub level_percent: f64,
    /// Smallest area.
    pub min_area: f64,
    /// Surface with the smallest area.
    pub min_surface: String,
    /// Largest area.
    pub max_area: f64,
    /// Surface with the largest area.
    pub max_surface: String,
    /// `max/min`.
    pub factor: f64,
}

/// How much one factor moves the highest level's area.
#[derive(Debug, Clone, Serialize)]
pub struct FactorEffect {
    /// `kernel`, `bandwidth` or `edge`.
    pub factor: &'static str,
    /// Largest `max/min` with the others held fixed.
    pub ratio: f64,
}

/// The verdict.
#[derive(Debug, Clone, Serialize)]
pub struct Verdict {
    /// Per level, ascending.
    pub spreads: Vec<Spread>,
    /// Per factor with two or more values, largest effect first.
    pub effects: Vec<FactorEffect>,
    /// Whether the main hotspot stays in place in every surface.
    pub hotspot_stays: bool,
    /// Surfaces whose main hotspot overlaps the reference's by less than the threshold.
    pub hotspot_moves_in: Vec<String>,
    /// Threshold used.
    pub hotspot_threshold: f64,
    /// One sentence.
    pub sentence: String,
}

/// Three significant figures, without a decimal point for large values.
pub fn sig3(x: f64) -> String {
    if x.is_finite() && x.abs() >= 1000.0 {
        let mag = x.abs().log10().floor() as i32;
        let f = 10f64.powi(mag - 2);
        format!("{:.0}", (x / f).round() * f)
    } else {
        sig(x, 3)
    }
}

/// Two areas in words: km² for metre data from 0.01 km² up, else unit².
pub fn area_words(a: f64, b: f64, unit: &str) -> (String, String, String) {
    if crate::is_metre(unit) && a >= 1e4 {
        (sig(a / 1e6, 3), sig(b / 1e6, 3), "km²".into())
    } else {
        (sig3(a), sig3(b), format!("{unit}²"))
    }
}

fn pct(l: f64) -> f64 {
    (l * 1000.0).round() / 10.0
}

/// Sum up `surfaces`.
pub fn verdict(surfaces: &[Surface], levels: &[f64], unit: &str) -> Verdict {
    let mut spreads = Vec::new();
    for (li, l) in levels.iter().enumerate() {
        let mut lo: Option<(f64, String)> = None;
        let mut hi: Option<(f64, String)> = None;
        for s in surfaces {
            let a = s.levels[li].region.area;
            if lo.as_ref().is_none_or(|(v, _)| a < *v) {
                lo = Some((a, s.label()));
            }
            if hi.as_ref().is_none_or(|(v, _)| a > *v) {
                hi = Some((a, s.label()));
            }
        }
        if let (Some((a, sa)), Some((b, sb))) = (lo, hi) {
            spreads.push(Spread {
                level_percent: pct(*l),
                min_area: a,
                min_surface: sa,
                max_area: b,
                max_surface: sb,
                factor: if a > 0.0 { b / a } else { f64::INFINITY },
            });
        }
    }
    let top = levels.len().saturating_sub(1);
    let mut effects = Vec::new();
    type Key = fn(&Surface) -> String;
    let keys: [(&'static str, Key, Key); 3] = [
        (
            "kernel",
            |s| s.kernel.name().to_string(),
            |s| format!("{}|{}", s.spec.label(), s.edge.name()),
        ),
        (
            "bandwidth",
            |s| s.spec.label(),
            |s| format!("{}|{}", s.kernel.name(), s.edge.name()),
        ),
        (
            "edge handling",
            |s| s.edge.name().to_string(),
            |s| format!("{}|{}", s.kernel.name(), s.spec.label()),
        ),
    ];
    for (name, own, rest) in keys {
        let mut values: Vec<String> = surfaces.iter().map(own).collect();
        values.sort();
        values.dedup();
        if values.len() < 2 || levels.is_empty() {
            continue;
        }
        let mut groups: std::collections::BTreeMap<String, (f64, f64)> = Default::default();
        for s in surfaces {
            let a = s.levels[top].region.area;
            let e = groups.entry(rest(s)).or_insert((f64::INFINITY, 0.0));
            e.0 = e.0.min(a);
            e.1 = e.1.max(a);
        }
        let ratio = groups
            .values()
            .map(|(a, b)| if *a > 0.0 { b / a } else { f64::INFINITY })
            .fold(1.0, f64::max);
        effects.push(FactorEffect {
            factor: name,
            ratio,
        });
    }
    effects.sort_by(|a, b| b.ratio.total_cmp(&a.ratio));
    let moves: Vec<String> = surfaces
        .iter()
        .filter(|s| s.hotspot_overlap < HOTSPOT_OVERLAP)
        .map(|s| s.label())
        .collect();
    let stays = moves.is_empty();
    let mut parts = Vec::new();
    for s in spreads.iter().rev() {
        let (lo, hi, u) = area_words(s.min_area, s.max_area, unit);
        parts.push(format!(
            "{} % area ranges from {lo} to {hi} {u}, a factor of {}",
            s.level_percent,
            sig(s.factor, 2)
        ));
    }
    if let Some(e) = effects.first() {
        parts.push(format!(
            "{} moves it most (up to ×{} with the other choices held fixed)",
            e.factor,
            sig(e.ratio, 2)
        ));
    }
    parts.push(if stays {
        format!(
            "the main hotspot stays in place in every surface (overlap ≥ {HOTSPOT_OVERLAP} with the reference)"
        )
    } else {
        format!(
            "the main hotspot moves in {} of {} surfaces (overlap < {HOTSPOT_OVERLAP} with the reference)",
            moves.len(),
            surfaces.len()
        )
    });
    let mut sentence = parts.join("; ");
    sentence.push('.');
    Verdict {
        spreads,
        effects,
        hotspot_stays: stays,
        hotspot_moves_in: moves,
        hotspot_threshold: HOTSPOT_OVERLAP,
        sentence,
    }
}
