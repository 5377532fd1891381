//! The global rank envelope test with extreme-rank-length ordering (ERL;
//! Myllymäki, Mrkvička, Grabarnik, Seijo & Hahn 2017, "Global envelope
//! tests for spatial processes", JRSS B 79, 381–404; the definitions below
//! are written from that paper as recalled from memory).
//!
//! Why a second global test next to MAD: the MAD statistic is a maximum
//! over distances of raw deviations, so the distances where L̂ − r varies
//! most (usually the largest) decide it, and a departure at short range
//! can go unseen. Ranks put every distance on the same footing.
//!
//! With s = N + 1 curves T_1 (observed), …, T_s (simulated) on the
//! distances where all are defined:
//! - pointwise two-sided rank R_i(r) = min(#{j: T_j(r) ≤ T_i(r)},
//!   #{j: T_j(r) ≥ T_i(r)}): 1 for the most extreme value at r; tied values
//!   share the larger (less extreme) rank, so ties count against a
//!   departure;
//! - extreme rank R_i = min_r R_i(r);
//! - ERL order: curve i is more extreme than j when the ascending sorted
//!   vector of i's pointwise ranks is lexicographically smaller than j's;
//! - p = #{j: vector_j ≤ vector_1}/s (the observed curve counts itself), an
//!   exact rank p-value under exchangeability, conservative with ties;
//! - global band (the ERL envelope): with k = ⌊α·s⌋, a curve is set
//!   aside when at most k curves (itself included) are at least as extreme
//!   in the ERL order; the band at r runs from the lowest to the highest
//!   value of the other curves. The observed curve can leave the band only
//!   if it was set aside, and then p ≤ k/s ≤ α, so a departure drawn on the
//!   picture is always a rejection. The converse can fail: a curve set
//!   aside may still lie inside the others' range at every r.
//!
//! Why the band is not drawn from extreme ranks alone (the plain rank
//! envelope): with 50 distances and a few hundred simulations many curves
//! share extreme rank 1 or 2, and a band of those is nearly the range of
//! all curves; the lexicographic order separates them.

use serde::Serialize;
use std::cmp::Ordering;

/// The ERL test of one window and correction.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct RankEnvelope {
    /// Always `"erl"`.
    pub test: &'static str,
    /// Extreme rank R_1 of the observed curve.
    pub extreme_rank: usize,
    /// ERL p-value #{j: vector_j ≤ vector_1}/s.
    pub p: f64,
    /// Curves set aside from the band, k = ⌊α·s⌋ at most; 0 when there
    /// are too few simulations for α (no band).
    pub set_aside: usize,
    /// Band, lower edge (None where a curve is undefined or no band).
    pub lo: Vec<Option<f64>>,
    /// Band, upper edge.
    pub hi: Vec<Option<f64>>,
    /// Per distance: +1 above the band, −1 below, 0 inside or undefined.
    pub departure: Vec<i8>,
}

/// Run the ERL test on `observed` against `simulated` (L̂ − r curves on
/// one grid). Distances where any curve is undefined are left out.
pub fn rank_envelope(
    observed: &[Option<f64>],
    simulated: &[Vec<Option<f64>>],
    alpha: f64,
) -> RankEnvelope {
    let steps = observed.len();
    let curves: Vec<&[Option<f64>]> = std::iter::once(observed)
        .chain(simulated.iter().map(Vec::as_slice))
        .collect();
    let s = curves.len();
    let defined: Vec<usize> = (0..steps)
        .filter(|&k| curves.iter().all(|c| c[k].is_some()))
        .collect();
    let value = |i: usize, k: usize| curves[i][k].unwrap_or(f64::NAN);
    // Pointwise ranks, curve by curve, over the defined distances; held as
    // u32 (half the memory of usize: this table grows with the
    // simulations), saturating only beyond 4·10⁹ curves, far more than
    // any machine holds.
    // (Each list allocated at its final length: `vec![v; s]` would clone
    // empty lists and let them grow by doubling.)
    let mut ranks: Vec<Vec<u32>> = (0..s).map(|_| Vec::with_capacity(defined.len())).collect();
    let mut column: Vec<f64> = Vec::with_capacity(s);
    for &k in &defined {
        column.clear();
        column.extend((0..s).map(|i| value(i, k)));
        let mut sorted = column.clone();
        sorted.sort_by(f64::total_cmp);
        for (i, &v) in column.iter().enumerate() {
            // #{≤ v} and #{≥ v} from the sorted column.
            let at_most = sorted.partition_point(|&x| x <= v);
            let at_least = s - sorted.partition_point(|&x| x < v);
            ranks[i].push(u32::try_from(at_most.min(at_least)).unwrap_or(u32::MAX));
        }
    }
    let extreme: Vec<usize> = ranks
        .iter()
        .map(|r| r.iter().copied().min().map_or(s, |v| v as usize))
        .collect();
    for r in &mut ranks {
        r.sort_unstable();
    }
    let as_extreme = ranks
        .iter()
        .filter(|r| r.as_slice().cmp(ranks[0].as_slice()) != Ordering::Greater)
        .count();
    let p = as_extreme as f64 / s as f64;
    // Curve i is set aside when #{j: vector_j ≤ vector_i} ≤ k.
    let k_alpha = (alpha * s as f64 + 1e-9).floor() as usize;
    let mut order: Vec<usize> = (0..s).collect();
    order.sort_by(|&a, &b| ranks[a].cmp(&ranks[b]).then(a.cmp(&b)));
    let mut aside = vec![false; s];
    let mut at = 0;
    while at < s {
        // The run of curves tied with order[at] in the ERL order.
        let mut end = at + 1;
        while end < s && ranks[order[end]] == ranks[order[at]] {
            end += 1;
        }
        if end > k_alpha {
            break;
        }
        for &i in &order[at..end] {
            aside[i] = true;
        }
        at = end;
    }
    let set_aside = aside.iter().filter(|&&a| a).count();
    let mut lo = vec![None; steps];
    let mut hi = vec![None; steps];
    if set_aside > 0 && !defined.is_empty() {
        for &k in &defined {
            let kept = (0..s).filter(|&i| !aside[i]).map(|i| value(i, k));
            let (a, b) = kept.fold((f64::INFINITY, f64::NEG_INFINITY), |(a, b), v| {
                (a.min(v), b.max(v))
            });
            if a <= b {
                lo[k] = Some(a);
                hi[k] = Some(b);
            }
        }
    }
    let departure = (0..steps)
        .map(|k| match (observed[k], lo[k], hi[k]) {
            (Some(v), _, Some(h)) if v > h => 1,
            (Some(v), Some(l), _) if v < l => -1,
            _ => 0,
        })
        .collect();
    RankEnvelope {
        test: "erl",
        extreme_rank: extreme[0],
        p,
        set_aside,
        lo,
        hi,
        departure,
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::test_curves::bump_and_flat_curves;
    use approx::assert_abs_diff_eq;

    /// By hand from the definitions: 19 flat simulated curves at heights
    /// ±0.1·k (k = 1…19, odd k below zero) and an observed curve at 0 with
    /// a bump of 5 at distance 1; s = 20. At 0.0 among the heights there
    /// are 10 values below and 9 above, so #{≤ 0} = 11, #{≥ 0} = 10: rank
    /// 10; at the bump the observed value is the largest: rank 1, which
    /// pushes +1.8 to rank 2 there. Sorted vectors: −1.9 [1,1,1,1], +1.8
    /// [1,1,1,2], observed [1,10,10,10], −1.7 [2,2,2,2], +1.6 [2,2,2,3], …
    /// So p = 3/20. With α = 0.05, k = 1: only −1.9 is set aside, the band
    /// at the bump reaches the observed 5 itself, and nothing departs.
    /// With α = 0.2, k = 4: −1.9, +1.8, the observed curve and −1.7 are set
    /// aside; the band at the bump is [−1.5, +1.6] and the bump leaves it
    /// upward.
    #[test]
    fn erl_by_hand() {
        let (obs, sims) = bump_and_flat_curves();
        let t = rank_envelope(&obs, &sims, 0.05);
        assert_eq!(t.extreme_rank, 1);
        assert_abs_diff_eq!(t.p, 3.0 / 20.0, epsilon = 1e-15);
        assert_eq!(t.set_aside, 1);
        assert_eq!(t.hi[1], Some(5.0));
        assert_eq!(t.lo[1], sims[16][1], "−1.7");
        assert_eq!(t.departure, vec![0, 0, 0, 0]);
        let t = rank_envelope(&obs, &sims, 0.2);
        assert_eq!(t.set_aside, 4);
        assert_eq!(t.hi[1], sims[15][1], "+1.6");
        assert_eq!(t.lo[1], sims[14][1], "−1.5");
        assert_eq!(t.departure, vec![0, 1, 0, 0]);
    }

    /// An observed curve beyond every simulated one at every distance has
    /// rank 1 everywhere, the lexicographically smallest vector on its
    /// own: p = 1/s, the smallest possible, and it leaves the band (built
    /// from curves of extreme rank ≥ 2) everywhere, upward.
    #[test]
    fn a_curve_above_all_others_has_the_smallest_p() {
        let sims: Vec<Vec<Option<f64>>> = (0..39)
            .map(|k| {
                (0..6)
                    .map(|r| Some(((k * 7 + r * 3) % 11) as f64 * 0.1 + 0.01 * k as f64))
                    .collect()
            })
            .collect();
        let obs = vec![Some(10.0); 6];
        let t = rank_envelope(&obs, &sims, 0.05);
        assert_eq!(t.extreme_rank, 1);
        assert_abs_diff_eq!(t.p, 1.0 / 40.0, epsilon = 1e-15);
        assert!(t.set_aside >= 1 && t.set_aside <= 2);
        assert_eq!(t.departure, vec![1; 6]);
        // Two observed points pushed down instead: −1 there.
        let mut obs = vec![Some(0.5); 6];
        obs[2] = Some(-3.0);
        obs[4] = Some(-3.0);
        let t = rank_envelope(&obs, &sims, 0.05);
        assert_eq!(t.extreme_rank, 1);
        assert_eq!(t.departure[2], -1);
        assert_eq!(t.departure[4], -1);
    }

    /// Ties count against a departure: with every curve identical, each
    /// has rank s at every distance, p = 1, all vectors tie, so none can be
    /// set aside and there is no band. The distance where the simulated
    /// curves are undefined is left out (the observed 4.0 there is not
    /// counted).
    #[test]
    fn ties_and_gaps() {
        let sims = vec![vec![Some(1.0), None, Some(2.0)]; 19];
        let obs = vec![Some(1.0), Some(4.0), Some(2.0)];
        let t = rank_envelope(&obs, &sims, 0.05);
        assert_eq!(t.extreme_rank, 20);
        assert_eq!(t.p, 1.0);
        assert_eq!(t.set_aside, 0);
        assert_eq!(t.departure, vec![0, 0, 0]);
        assert_eq!(t.lo, vec![None; 3]);
    }
}
