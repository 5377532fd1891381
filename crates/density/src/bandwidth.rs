//! Bandwidth selectors: Scott's rule, likelihood cross-validation, and
//! fixed values.
//!
//! **Scott's rule in two dimensions** (Scott 1992, eq. 6.42 with `d = 2`):
//! `h = σ · n^(−1/6)`, where `σ = sqrt((s_x² + s_y²)/2)` and `s_x²`, `s_y²` are
//! the sample variances (denominator `n − 1`) of the two coordinates. This
//! is a Gaussian standard deviation; for a compact kernel the rule's value
//! is converted to the same canonical smoothing ([`Kernel::from_gaussian`]).
//!
//! **Likelihood cross-validation** (Habbema, Hermans & van den Broek 1974;
//! Duin 1976) picks the bandwidth that maximises the leave-one-out log
//! density `L(h) = Σᵢ log f̂₋ᵢ(xᵢ)`, with `f̂₋ᵢ(xᵢ) = Σ_{j≠i} K_h(xᵢ − xⱼ)/(n − 1)`,
//! over the grid `h_k = h_S · 2^(k/8 − 3)`, `k = 0 … 40`, i.e. 41
//! log-spaced values from `h_S/8` to `4·h_S`, where `h_S` is Scott's value for
//! that kernel. A point with no neighbour within a compact kernel's radius
//! makes `L(h) = −∞`: that bandwidth cannot be chosen. Up to
//! [`EXACT_MAX`] points the sum is exact; above, `f̂₋ᵢ(xᵢ)` is approximated
//! from the binned surface (bilinear interpolation at `xᵢ`, the point's own
//! sampled kernel peak removed), which is accurate when the bandwidth spans
//! several cells.

use crate::convolve::{centre_value, convolve};
use crate::grid::Grid;
use crate::kernels::Kernel;
use patternproof_core::Xy;
use rayon::prelude::*;
use serde::Serialize;

/// Largest `n` for the exact leave-one-out sum.
pub const EXACT_MAX: usize = 2000;

/// Steps of the cross-validation grid.
pub const LCV_STEPS: usize = 41;

/// Fixed bandwidths accepted, in the unit: the smallest spread and the
/// largest coordinate the readers accept. Beyond them the kernel's height
/// (1/h²) under- or overflows and the surface comes out empty.
pub const FIXED_RANGE: (f64, f64) = (1e-12, 1e13);

/// Multiples of Scott's value accepted: a millionth to a million times
/// the rule's bandwidth already spans every surface from a spike per point
/// to a flat plane.
pub const MULTIPLE_RANGE: (f64, f64) = (1e-6, 1e6);

/// A bandwidth as asked for on the command line.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum BandwidthSpec {
    /// Scott's rule.
    Scott,
    /// Likelihood cross-validation.
    Lcv,
    /// A multiple of Scott's value (`0.5x`).
    ScottTimes(f64),
    /// A fixed value in the unit, in each kernel's own parametrisation.
    Fixed(f64),
}

impl BandwidthSpec {
    /// Parse `scott`, `lcv`, `Fx` (F within [`MULTIPLE_RANGE`]) or a number
    /// within [`FIXED_RANGE`].
    pub fn parse(s: &str) -> Option<BandwidthSpec> {
        let t = s.trim().to_ascii_lowercase();
        let within = |v: f64, (lo, hi): (f64, f64)| v.is_finite() && v >= lo && v <= hi;
        match t.as_str() {
            "scott" => Some(BandwidthSpec::Scott),
            "lcv" | "cv" => Some(BandwidthSpec::Lcv),
            _ => {
                if let Some(m) = t.strip_suffix('x') {
                    m.parse::<f64>()
                        .ok()
                        .filter(|v| within(*v, MULTIPLE_RANGE))
                        .map(BandwidthSpec::ScottTimes)
                } else {
                    t.parse::<f64>()
                        .ok()
                        .filter(|v| within(*v, FIXED_RANGE))
                        .map(BandwidthSpec::Fixed)
                }
            }
        }
    }

    /// A short label (`scott`, `lcv`, `0.5x`, `120`).
    pub fn label(&self) -> String {
        match self {
            BandwidthSpec::Scott => "scott".into(),
            BandwidthSpec::Lcv => "lcv".into(),
            BandwidthSpec::ScottTimes(m) => format!("{m}x"),
            BandwidthSpec::Fixed(v) => format!("{v}"),
        }
    }
}

/// Scott's rule and its ingredients.
#[derive(Debug, Clone, Copy, Serialize)]
pub struct Scott {
    /// Sample standard deviation of x.
    pub sd_x: f64,
    /// Sample standard deviation of y.
    pub sd_y: f64,
    /// `sqrt((s_x² + s_y²)/2)`.
    pub sigma: f64,
    /// Points used.
    pub n: usize,
    /// `σ · n^(−1/6)`: the Gaussian standard deviation.
    pub bandwidth: f64,
}

/// Scott's rule for `points` (at least two).
pub fn scott(points: &[Xy]) -> Scott {
    let n = points.len();
    let nf = n as f64;
    let mx = points.iter().map(|p| p[0]).sum::<f64>() / nf;
    let my = points.iter().map(|p| p[1]).sum::<f64>() / nf;
    let d = (nf - 1.0).max(1.0);
    let vx = points.iter().map(|p| (p[0] - mx).powi(2)).sum::<f64>() / d;
    let vy = points.iter().map(|p| (p[1] - my).powi(2)).sum::<f64>() / d;
    let sigma = ((vx + vy) / 2.0).sqrt();
    Scott {
        sd_x: vx.sqrt(),
        sd_y: vy.sqrt(),
        sigma,
        n,
        bandwidth: sigma * nf.powf(-1.0 / 6.0),
    }
}

/// One likelihood cross-validation.
#[derive(Debug, Clone, Serialize)]
pub struct Lcv {
    /// The kernel.
    pub kernel: Kernel,
    /// `exact` or `binned`.
    pub method: &'static str,
    /// Bandwidths tried.
    pub grid: Vec<f64>,
    /// `L(h)` for each (`null` when −∞).
    pub scores: Vec<Option<f64>>,
    /// The maximiser.
    pub chosen: f64,
    /// Whether the maximum is at either end of the grid (then the true
    /// maximiser may lie outside it).
    pub at_grid_edge: bool,
}

/// The cross-validation grid around Scott's value `h_s` for a kernel.
pub fn lcv_grid(h_s: f64) -> Vec<f64> {
    (0..LCV_STEPS)
        .map(|k| h_s * 2f64.powf(k as f64 / 8.0 - 3.0))
        .collect()
}

/// Exact leave-one-out log density at bandwidth `h`.
pub fn loo_log_density(points: &[Xy], kernel: Kernel, h: f64) -> f64 {
    let n = points.len();
    let d = (n as f64 - 1.0).max(1.0);
    let mut total = 0.0;
    for (i, p) in points.iter().enumerate() {
        let mut s = 0.0;
        for (j, q) in points.iter().enumerate() {
            if i != j {
                let r2 = (p[0] - q[0]).powi(2) + (p[1] - q[1]).powi(2);
                s += kernel.value(r2, h);
            }
        }
        if s <= 0.0 {
            return f64::NEG_INFINITY;
        }
        total += (s / d).ln();
    }
    total
}

fn binned_loo(points: &[Xy], grid: &Grid, bins: &[f64], kernel: Kernel, h: f64) -> f64 {
    let n = points.len() as f64;
    let surface = convolve(bins, grid.nx, grid.ny, grid.cell, kernel, h);
    let own = centre_value(kernel, h, grid.cell);
    let mut total = 0.0;
    for p in points {
        // `surface` sums weights (not divided by n): remove the point's own peak.
        let s = grid.interpolate(&surface, *p) - own;
        if s <= 1e-300 {
            return f64::NEG_INFINITY;
        }
        total += (s / (n - 1.0)).ln();
    }
    total
}

/// Likelihood cross-validation for one kernel. `h_s` is Scott's value in
/// that kernel's parametrisation; `grid`/`bins` (the points binned on the
/// analysis raster) are used above [`EXACT_MAX`] points.
pub fn lcv(points: &[Xy], kernel: Kernel, h_s: f64, grid: &Grid, bins: &[f64]) -> Option<Lcv> {
    let hs = lcv_grid(h_s);
    let exact = points.len() <= EXACT_MAX;
    let raw: Vec<f64> = hs
        .par_iter()
        .map(|&h| {
            if exact {
                loo_log_density(points, kernel, h)
            } else {
                binned_loo(points, grid, bins, kernel, h)
            }
        })
        .collect();
    let mut best: Option<usize> = None;
    for (k, s) in raw.iter().enumerate() {
        if s.is_finite() && best.is_none_or(|b| *s > raw[b]) {
            best = Some(k);
        }
    }
    let b = best?;
    Some(Lcv {
        kernel,
        method: if exact { "exact" } else { "binned" },
        chosen: hs[b],
        at_grid_edge: b == 0 || b + 1 == hs.len(),
        scores: raw.iter().map(|s| s.is_finite().then_some(*s)).collect(),
        grid: hs,
    })
}

#[cfg(test)]
#[allow(clippy::unwrap_used)]
mod tests {
    use super::*;
    use approx::abs_diff_eq;

    fn pattern() -> Vec<Xy> {
        // A small deterministic pattern: two loose groups.
        let mut v = Vec::new();
        let mut s: u64 = 7;
        let mut next = || {
            s = s
                .wrapping_mul(6364136223846793005)
                .wrapping_add(1442695040888963407);
            ((s >> 11) as f64) / ((1u64 << 53) as f64)
        };
        for k in 0..40 {
            let (cx, cy) = if k % 2 == 0 {
                (10.0, 10.0)
            } else {
                (30.0, 18.0)
            };
            v.push([cx + 8.0 * (next() - 0.5), cy + 8.0 * (next() - 0.5)]);
        }
        v
    }

    /// Source: Scott (1992) rule, d = 2, σ as defined in the module docs;
    /// checked against the formula computed by hand here.
    #[test]
    fn scott_matches_formula() {
        let p = vec![[0.0, 0.0], [2.0, 0.0], [0.0, 4.0], [2.0, 4.0]];
        let s = scott(&p);
        // s_x² = 4/3, s_y² = 16/3 → σ² = 10/3.
        let want = (10.0f64 / 3.0).sqrt() * 4f64.powf(-1.0 / 6.0);
        assert!(
            abs_diff_eq!(s.bandwidth, want, epsilon = 1e-12),
            "{} vs {want}",
            s.bandwidth
        );
    }

    /// Source: definition of the maximiser; brute force over the same grid
    /// with an independent loop.
    #[test]
    fn lcv_picks_the_maximiser() {
        let p = pattern();
        let g = Grid {
            x0: -10.0,
            y0: -10.0,
            cell: 0.4,
            nx: 150,
            ny: 100,
        };
        let bins = g.bin(&p, None);
        for kernel in [Kernel::Gaussian, Kernel::Epanechnikov] {
            let h_s = kernel.from_gaussian(scott(&p).bandwidth);
            let r = lcv(&p, kernel, h_s, &g, &bins).unwrap();
            let mut best = (f64::NEG_INFINITY, 0.0);
            for h in lcv_grid(h_s) {
                let mut l = 0.0;
                for i in 0..p.len() {
                    let mut s = 0.0;
                    for j in 0..p.len() {
                        if j != i {
                            let d2 = (p[i][0] - p[j][0]).powi(2) + (p[i][1] - p[j][1]).powi(2);
                            s += kernel.value(d2, h);
                        }
                    }
                    l += (s / (p.len() - 1) as f64).ln();
                }
                if l > best.0 {
                    best = (l, h);
                }
            }
            assert_eq!(r.chosen, best.1, "{}", kernel.name());
            assert!(!r.at_grid_edge);
            // The binned approximation lands on the same or a neighbouring grid step.
            let ke = r.grid.iter().position(|h| *h == r.chosen).unwrap();
            let near: Vec<usize> = (ke.saturating_sub(3)..(ke + 4).min(r.grid.len())).collect();
            let raw: Vec<f64> = near
                .iter()
                .map(|&k| binned_loo(&p, &g, &bins, kernel, r.grid[k]))
                .collect();
            let kb = near[(0..raw.len())
                .max_by(|a, b| raw[*a].total_cmp(&raw[*b]))
                .unwrap()];
            assert!(kb.abs_diff(ke) <= 1, "binned {kb} exact {ke}");
        }
    }
}
