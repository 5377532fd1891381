//! Where the call changes: flip thresholds per analytic edge handling.
//!
//! * `none` — closed form (Clark & Evans 1954 rearranged; see
//!   `patternproof_core::flip`): z(A) = a/sqrt(A) − b.
//! * `donnelly` — over the family of windows of the hull's shape scaled by
//!   s (area s²·A_h, perimeter s·P_h), Donnelly's mean and standard error
//!   are both proportional to s, so z(s) = a'/s − b' is again closed form.
//!   Over the buffered-hull family (area A_h + P_h·D + π·D², perimeter
//!   P_h + 2πD) the buffer distance is found by bisection.
//! * `border`, `toroidal` — the statistic itself changes with the window's
//!   outline (which points are focal, where the torus wraps), so no single
//!   area threshold exists; the entry says so and the rows speak instead.

use crate::edge::Edge;
use crate::window::{Window, WindowKind};
use patternproof_core::FlipThresholds;
use patternproof_core::clark_evans::MIN_N_ANALYTIC;
use patternproof_core::donnelly;
use patternproof_core::flip::buffer_for_area;
use serde::Serialize;

/// Flip thresholds of one edge handling.
#[derive(Debug, Clone, Serialize)]
pub struct FlipEntry {
    /// Edge handling.
    pub edge: Edge,
    /// Every window larger than this (of the hull's shape) gives `clustered`.
    pub clustered_above_area: Option<f64>,
    /// Every window smaller than this gives `dispersed`.
    pub dispersed_below_area: Option<f64>,
    /// `clustered_above_area` / hull area.
    pub clustered_above_hull_multiple: Option<f64>,
    /// `dispersed_below_area` / hull area.
    pub dispersed_below_hull_multiple: Option<f64>,
    /// Area of the convex hull.
    pub hull_area: Option<f64>,
    /// Buffer distance beyond which the buffered hull gives `clustered`.
    pub flip_buffer: Option<f64>,
    /// Buffer distance below which the buffered hull gives `dispersed`.
    pub dispersed_flip_buffer: Option<f64>,
    /// How to read the entry.
    pub note: Option<String>,
}

/// One entry per analytic edge handling in `edges`.
pub fn flip_entries(
    n: usize,
    mean_nn: f64,
    z_crit: f64,
    windows: &[Window],
    edges: &[Edge],
) -> Vec<FlipEntry> {
    let hull = windows.iter().find(|w| w.kind == WindowKind::Hull);
    let hull_area = hull.map(|h| h.area);
    let hull_perimeter = hull.and_then(|h| h.perimeter);
    edges
        .iter()
        .filter(|e| e.is_analytic())
        .map(|&edge| {
            let mut entry = FlipEntry {
                edge,
                clustered_above_area: None,
                dispersed_below_area: None,
                clustered_above_hull_multiple: None,
                dispersed_below_hull_multiple: None,
                hull_area,
                flip_buffer: None,
                dispersed_flip_buffer: None,
                note: None,
            };
            if n < MIN_N_ANALYTIC {
                entry.note = Some(format!(
                    "only {n} points: no closed-form threshold below {MIN_N_ANALYTIC} points, as for the closed-form rows"
                ));
                return entry;
            }
            match edge {
                Edge::None => {
                    if let Some(f) = FlipThresholds::new(n, mean_nn, z_crit) {
                        entry.clustered_above_area = f.clustered_above_area;
                        entry.dispersed_below_area = Some(f.dispersed_below_area);
                    }
                    if let (Some(a), Some(p)) = (hull_area, hull_perimeter) {
                        entry.flip_buffer = entry.clustered_above_area.and_then(|t| buffer_for_area(a, p, t));
                        entry.dispersed_flip_buffer = entry.dispersed_below_area.and_then(|t| buffer_for_area(a, p, t));
                    }
                }
                Edge::Donnelly => match (hull_area, hull_perimeter) {
                    (Some(a), Some(p)) => {
                        let (c, d) = donnelly_scaled(n, mean_nn, z_crit, a, p);
                        entry.clustered_above_area = c;
                        entry.dispersed_below_area = d;
                        entry.flip_buffer = donnelly_buffer(n, mean_nn, -z_crit, a, p);
                        entry.dispersed_flip_buffer = donnelly_buffer(n, mean_nn, z_crit, a, p);
                        entry.note = Some("areas are for windows of the hull's shape scaled up or down".into());
                    }
                    _ => entry.note = Some("no convex hull, so no family of windows to scale".into()),
                },
                Edge::Border | Edge::Toroidal | Edge::Simulation => {
                    entry.note = Some(format!(
                        "with {edge} the statistic depends on the window's outline, not only its area: no single threshold; read the rows"
                    ));
                }
            }
            if let Some(h) = hull_area {
                entry.clustered_above_hull_multiple = entry.clustered_above_area.map(|t| t / h);
                entry.dispersed_below_hull_multiple = entry.dispersed_below_area.map(|t| t / h);
            }
            if edge == Edge::None || edge == Edge::Donnelly {
                let already = match (entry.clustered_above_hull_multiple, entry.flip_buffer) {
                    (Some(m), None) if m <= 1.0 => Some("the hull itself already gives `clustered`, and so does every larger window"),
                    _ => None,
                };
                if let Some(text) = already {
                    entry.note = Some(match entry.note.take() {
                        Some(n0) => format!("{n0}; {text}"),
                        None => text.to_string(),
                    });
                }
            }
            entry
        })
        .collect()
}

/// Donnelly z over windows of the hull's shape scaled by s: both moments
/// are proportional to s, so z(s) = mean_nn/(s·se1) − e1/se1.
fn donnelly_scaled(
    n: usize,
    mean_nn: f64,
    z_crit: f64,
    hull_area: f64,
    hull_perimeter: f64,
) -> (Option<f64>, Option<f64>) {
    let e1 = donnelly::expected_mean(n, hull_area, hull_perimeter);
    let se1 = donnelly::standard_error(n, hull_area, hull_perimeter);
    let a = mean_nn / se1;
    let b = e1 / se1;
    // z(s) = a/s − b = −z_c  ⇒  s = a/(b − z_c); area = s²·A_h.
    let clustered = (b > z_crit && a > 0.0).then(|| (a / (b - z_crit)).powi(2) * hull_area);
    let dispersed = (a > 0.0).then(|| (a / (b + z_crit)).powi(2) * hull_area);
    (clustered, dispersed)
}

/// Buffer D ≥ 0 at which the Donnelly z of the buffered hull reaches
/// `target` (−z_c for clustered, +z_c for dispersed), by bisection; `None`
/// when the hull itself is already beyond it or nothing reaches it.
fn donnelly_buffer(
    n: usize,
    mean_nn: f64,
    target: f64,
    hull_area: f64,
    hull_perimeter: f64,
) -> Option<f64> {
    let z = |d: f64| {
        let a = hull_area + hull_perimeter * d + std::f64::consts::PI * d * d;
        let p = hull_perimeter + 2.0 * std::f64::consts::PI * d;
        donnelly::test(mean_nn, n, a, p).map(|t| t.z - target)
    };
    let z0 = z(0.0)?;
    if z0 <= 0.0 {
        return None;
    }
    let mut hi = hull_area.sqrt().max(mean_nn).max(1e-12);
    let mut steps = 0;
    while z(hi)? > 0.0 {
        hi *= 2.0;
        steps += 1;
        if steps > 200 {
            return None;
        }
    }
    let mut lo = 0.0;
    for _ in 0..200 {
        let mid = 0.5 * (lo + hi);
        if z(mid)? > 0.0 {
            lo = mid;
        } else {
            hi = mid;
        }
    }
    Some(0.5 * (lo + hi))
}

#[cfg(test)]
#[allow(clippy::unwrap_used)] // a failed unwrap is a failed test
mod tests {
    use super::*;
    use approx::{abs_diff_eq, assert_abs_diff_eq};
    use patternproof_core::NnRatioTest;

    /// The scaled-family closed form reproduces Donnelly's z = −z_c exactly
    /// at the threshold (Donnelly 1978 formulas evaluated directly).
    #[test]
    fn donnelly_scaled_threshold_hits_the_critical_value() {
        let (n, d, a, p, zc) = (64, 4.0, 10_000.0, 400.0, 1.959_964);
        let (c, disp) = donnelly_scaled(n, d, zc, a, p);
        let c = c.unwrap();
        let s = (c / a).sqrt();
        let t = donnelly::test(d, n, c, s * p).unwrap();
        assert!(abs_diff_eq!(t.z, -zc, epsilon = 1e-9), "{}", t.z);
        let disp = disp.unwrap();
        let s = (disp / a).sqrt();
        let t = donnelly::test(d, n, disp, s * p).unwrap();
        assert_abs_diff_eq!(t.z, zc, epsilon = 1e-9);
    }

    /// Bisection root: at the buffer found, Donnelly's z of the buffered hull
    /// (Steiner area and perimeter) is −z_c; and the plain test's buffer
    /// matches Steiner inverted.
    #[test]
    fn buffers_hit_the_critical_value() {
        let (n, d, a, p, zc) = (64, 6.0, 10_000.0, 400.0, 1.959_964);
        let b = donnelly_buffer(n, d, -zc, a, p).unwrap();
        let pi = std::f64::consts::PI;
        let t = donnelly::test(d, n, a + p * b + pi * b * b, p + 2.0 * pi * b).unwrap();
        assert_abs_diff_eq!(t.z, -zc, epsilon = 1e-9);
        let f = FlipThresholds::new(n, d, zc).unwrap();
        let plain = buffer_for_area(a, p, f.clustered_above_area.unwrap()).unwrap();
        let t = NnRatioTest::uncorrected(d, n, a + p * plain + pi * plain * plain).unwrap();
        assert_abs_diff_eq!(t.z, -zc, epsilon = 1e-9);
    }
}
