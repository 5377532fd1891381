//! The simulation envelope test of one window.
//!
//! `sims` patterns of complete spatial randomness (CSR) with the observed
//! number of points are drawn in the same window (exact uniform sampling,
//! `patternproof_window::Sampler`), each from its own random
//! stream `patternproof_audit::streams::stream(seed, "scales:" + window id,
//! k)`, so the result is the same for any thread count. Each pattern's
//! L̂ − r is estimated with the same correction as the observed one.
//!
//! **Global test: maximum absolute deviation (MAD; Diggle 2003, §6.3).**
//! The centre c(r) is the mean of L̂ − r over the observed and the
//! simulated curves together (a symmetric function of all N + 1 curves, so
//! under CSR the observed curve's statistic is exchangeable with the
//! simulated ones and the rank p-value is exact). For every curve
//! T = max_r |L̂(r) − r − c(r)| over the whole distance grid;
//! p = (1 + #{T_sim ≥ T_obs})/(N + 1).
//!
//! **Global band.** With k* = ⌊α(N + 1)⌋ ≥ 1, t* is the k*-th largest
//! simulated T and the band is c(r) ± t*. The observed curve leaves the
//! band at some r exactly when p ≤ α, so the band *is* the test drawn on
//! the picture: one band for all distances together, not one test per
//! distance. With N + 1 < 1/α there is no band.
//!
//! **Pointwise envelope** (drawn, labelled as such): the α/2 and 1 − α/2
//! quantiles of the simulated L̂ − r at each r separately. It is *not* a
//! test over the distance range: a curve leaving it somewhere happens far
//! more often than α under CSR.

use crate::k_function::{Correction, k_curves};
use crate::k_window::KWindow;
use crate::rank_envelope::{RankEnvelope, rank_envelope};
use patternproof_audit::streams::stream;
use patternproof_core::Xy;
use patternproof_core::monte_carlo::quantile;
use patternproof_window::Sampler;
use rayon::prelude::*;
use serde::Serialize;

/// The label of a window's random streams.
pub fn stream_label(window_id: &str) -> String {
    format!("scales:{window_id}")
}

/// The simulated L̂ − r curves: `[correction][simulation][grid index]`,
/// corrections in the order of `corrections`. Only the L̂ − r curve of each
/// pattern is kept (its K̂ and L̂ are dropped as soon as it is measured):
/// both global tests need every simulated curve across the distances, so
/// this is the part of a run that grows with `sims`
/// ([`crate::memory::bytes_per_simulation`]).
// Every argument is a distinct, plain input of the simulation; bundling
// them would only move the list into a struct literal at the one caller.
#[allow(clippy::too_many_arguments)]
pub fn simulate(
    region: &KWindow,
    sampler: &Sampler,
    n: usize,
    grid: &[f64],
    corrections: &[Correction],
    sims: usize,
    seed: u64,
    label: &str,
    tick: &(dyn Fn() + Sync),
) -> Vec<Vec<Vec<Option<f64>>>> {
    let by_simulation: Vec<Vec<Vec<Option<f64>>>> = (0..sims)
        .into_par_iter()
        .map(|k| {
            let mut rng = stream(seed, label, k as u64);
            let pts: Vec<Xy> = sampler.sample(n, &mut rng);
            let (curves, _) = k_curves(&pts, region, grid, corrections, false);
            tick();
            curves.into_iter().map(|c| c.l_minus_r).collect()
        })
        .collect();
    // Regroup by correction, moving the curves (no copy).
    let mut by_correction: Vec<Vec<Vec<Option<f64>>>> = corrections
        .iter()
        .map(|_| Vec::with_capacity(sims))
        .collect();
    for curves in by_simulation {
        for (into, curve) in by_correction.iter_mut().zip(curves) {
            into.push(curve);
        }
    }
    by_correction
}

/// The test of one window and one correction.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct EnvelopeTest {
    /// The correction used for the observed and the simulated curves.
    pub correction: Correction,
    /// Always `"mad"`: maximum absolute deviation (Diggle 2003).
    pub test: &'static str,
    /// Number of CSR simulations N.
    pub sims: usize,
    /// Significance level α.
    pub alpha: f64,
    /// Centre c(r): mean L̂ − r over observed and simulated curves.
    pub centre: Vec<Option<f64>>,
    /// The observed statistic T_obs.
    pub statistic: f64,
    /// Rank p-value (1 + #{T_sim ≥ T_obs})/(N + 1).
    pub p: f64,
    /// t*: the band half-width; `None` when N + 1 < 1/α.
    pub critical: Option<f64>,
    /// Global band, lower edge c(r) − t*.
    pub lo: Vec<Option<f64>>,
    /// Global band, upper edge c(r) + t*.
    pub hi: Vec<Option<f64>>,
    /// Pointwise α/2 quantile of the simulated L̂ − r (not a test).
    pub pointwise_lo: Vec<Option<f64>>,
    /// Pointwise 1 − α/2 quantile of the simulated L̂ − r (not a test).
    pub pointwise_hi: Vec<Option<f64>>,
    /// Per grid distance: +1 above the global band (clustering), −1 below
    /// (regularity), 0 inside or undefined.
    pub departure: Vec<i8>,
    /// Grid distances left out of the statistic because some curve is
    /// undefined there (border estimator without centres).
    pub undefined_distances: usize,
    /// The second global test on the same curves: the rank envelope with
    /// ERL ordering ([`crate::rank_envelope`]). `None` from [`mad_test`]
    /// alone; [`global_tests`] fills it.
    pub rank: Option<RankEnvelope>,
}

/// Both global tests on the same curves: MAD (whose band decides the
/// distance bands and the verdict sentence, as before) and ERL.
pub fn global_tests(
    correction: Correction,
    observed: &[Option<f64>],
    simulated: &[Vec<Option<f64>>],
    alpha: f64,
) -> EnvelopeTest {
    let mut t = mad_test(correction, observed, simulated, alpha);
    t.rank = Some(rank_envelope(observed, simulated, alpha));
    t
}

/// Run the MAD test on the observed curve `observed` against `simulated`
/// (each a L̂ − r curve on the same grid).
pub fn mad_test(
    correction: Correction,
    observed: &[Option<f64>],
    simulated: &[Vec<Option<f64>>],
    alpha: f64,
) -> EnvelopeTest {
    let steps = observed.len();
    let defined: Vec<bool> = (0..steps)
        .map(|k| observed[k].is_some() && simulated.iter().all(|s| s[k].is_some()))
        .collect();
    let total = (simulated.len() + 1) as f64;
    let centre: Vec<Option<f64>> = (0..steps)
        .map(|k| {
            defined[k].then(|| {
                let mut s = observed[k].unwrap_or(0.0);
                for sim in simulated {
                    s += sim[k].unwrap_or(0.0);
                }
                s / total
            })
        })
        .collect();
    let stat = |curve: &[Option<f64>]| -> f64 {
        (0..steps)
            .filter_map(|k| match (curve[k], centre[k]) {
                (Some(v), Some(c)) => Some((v - c).abs()),
                _ => None,
            })
            .fold(0.0, f64::max)
    };
    let t_obs = stat(observed);
    let mut t_sim: Vec<f64> = simulated.iter().map(|s| stat(s)).collect();
    let exceed = t_sim.iter().filter(|&&t| t >= t_obs).count();
    let p = (1 + exceed) as f64 / total;
    t_sim.sort_by(|a, b| b.total_cmp(a));
    let kstar = (alpha * total + 1e-9).floor() as usize;
    let critical = (kstar >= 1 && kstar <= t_sim.len()).then(|| t_sim[kstar - 1]);
    let band = |sign: f64| -> Vec<Option<f64>> {
        centre
            .iter()
            .map(|c| match (c, critical) {
                (Some(c), Some(t)) => Some(c + sign * t),
                _ => None,
            })
            .collect()
    };
    let pointwise = |q: f64| -> Vec<Option<f64>> {
        (0..steps)
            .map(|k| {
                let v: Vec<f64> = simulated.iter().filter_map(|s| s[k]).collect();
                if v.len() == simulated.len() {
                    quantile(&v, q)
                } else {
                    None
                }
            })
            .collect()
    };
    let departure = (0..steps)
        .map(|k| match (observed[k], centre[k], critical) {
            (Some(v), Some(c), Some(t)) if v - c > t => 1,
            (Some(v), Some(c), Some(t)) if c - v > t => -1,
            _ => 0,
        })
        .collect();
    EnvelopeTest {
        correction,
        test: "mad",
        sims: simulated.len(),
        alpha,
        statistic: t_obs,
        p,
        critical,
        lo: band(-1.0),
        hi: band(1.0),
        pointwise_lo: pointwise(alpha / 2.0),
        pointwise_hi: pointwise(1.0 - alpha / 2.0),
        departure,
        undefined_distances: defined.iter().filter(|d| !**d).count(),
        centre,
        rank: None,
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::test_curves::{bump_and_flat_curves, height};
    use approx::assert_abs_diff_eq;

    /// By hand: 19 flat simulated curves at heights ±0.1·k and an observed
    /// curve with a bump of 5 at one distance. The centre is the mean of
    /// all 20; the observed T is the largest, so p = 1/20; k* = ⌊0.05·20⌋
    /// = 1, so t* is the largest simulated T; the observed curve leaves the
    /// band upward at the bump only.
    #[test]
    fn mad_by_hand() {
        let (obs, sims) = bump_and_flat_curves();
        let t = mad_test(Correction::Isotropic, &obs, &sims, 0.05);
        let sum_sims: f64 = (1..=19).map(height).sum();
        let c0 = sum_sims / 20.0;
        let c1 = (sum_sims + 5.0) / 20.0;
        assert_abs_diff_eq!(t.centre[0].unwrap_or(f64::NAN), c0, epsilon = 1e-12);
        assert_abs_diff_eq!(t.centre[1].unwrap_or(f64::NAN), c1, epsilon = 1e-12);
        assert_abs_diff_eq!(t.p, 0.05, epsilon = 1e-12);
        assert_abs_diff_eq!(t.statistic, 5.0 - c1, epsilon = 1e-12);
        // Largest simulated T: the curve at −1.9 measured at distance 1.
        assert_abs_diff_eq!(t.critical.unwrap_or(f64::NAN), 1.9 + c1, epsilon = 1e-12);
        assert_eq!(t.departure, vec![0, 1, 0, 0]);
        // Too few simulations for α = 0.01: no band.
        let t = mad_test(Correction::Isotropic, &obs, &sims, 0.01);
        assert!(t.critical.is_none());
        assert_eq!(t.departure, vec![0, 0, 0, 0]);
    }
}
