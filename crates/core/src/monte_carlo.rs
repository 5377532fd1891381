//! Rank p-values and summaries for Monte Carlo tests.
//!
//! Besag & Diggle (1977), Simple Monte Carlo tests for spatial pattern,
//! *Applied Statistics* 26:327–333. With N simulations of the null and the
//! observed value counted among them, the two-sided p-value is
//! p = min(1, 2·min(1 + #{sim ≤ obs}, 1 + #{sim ≥ obs})/(N + 1)); with
//! N = 99, 999, … it is exact, whatever the window's shape.

/// Two-sided rank p-value of `observed` among `simulated`.
///
/// ```
/// use patternproof_core::monte_carlo::two_sided_rank_p;
/// let sims: Vec<f64> = (1..=99).map(f64::from).collect();
/// // Below all 99: 2·(1 + 0)/100 = 0.02.
/// assert!((two_sided_rank_p(0.5, &sims) - 0.02).abs() < 1e-12);
/// ```
pub fn two_sided_rank_p(observed: f64, simulated: &[f64]) -> f64 {
    let below = simulated.iter().filter(|&&s| s <= observed).count();
    let above = simulated.iter().filter(|&&s| s >= observed).count();
    let smaller = (1 + below).min(1 + above) as f64;
    (2.0 * smaller / (simulated.len() as f64 + 1.0)).min(1.0)
}

/// Quantile by linear interpolation between order statistics (the
/// "type 7" rule, numpy's default). `None` for an empty slice.
pub fn quantile(values: &[f64], q: f64) -> Option<f64> {
    if values.is_empty() || !(0.0..=1.0).contains(&q) {
        return None;
    }
    let mut sorted = values.to_vec();
    sorted.sort_by(f64::total_cmp);
    let h = (sorted.len() - 1) as f64 * q;
    let lo = h.floor() as usize;
    let hi = h.ceil() as usize;
    Some(sorted[lo] + (h - lo as f64) * (sorted[hi] - sorted[lo]))
}

#[cfg(test)]
#[allow(clippy::unwrap_used)] // a failed unwrap is a failed test
mod tests {
    use super::*;
    use approx::assert_abs_diff_eq;

    /// Besag & Diggle (1977) rank rule, worked by hand: observed in the
    /// middle of 1..=99 → p = 1; observed equal to the 3rd smallest →
    /// 2·(1 + 3)/100 = 0.08.
    #[test]
    fn rank_rule_by_hand() {
        let sims: Vec<f64> = (1..=99).map(f64::from).collect();
        assert_eq!(two_sided_rank_p(50.0, &sims), 1.0);
        assert_abs_diff_eq!(two_sided_rank_p(3.0, &sims), 0.08, epsilon = 1e-12);
        assert_abs_diff_eq!(two_sided_rank_p(100.0, &sims), 0.02, epsilon = 1e-12);
    }

    /// numpy.quantile([1, 2, 3, 4], 0.25) = 1.75 and 0.975 of 1..=1000 =
    /// 975.025 (numpy's default linear rule; values recalled from its
    /// definition, h = (N − 1)·q).
    #[test]
    fn quantile_matches_numpy_linear_rule() {
        assert_abs_diff_eq!(
            quantile(&[4.0, 1.0, 3.0, 2.0], 0.25).unwrap(),
            1.75,
            epsilon = 1e-12
        );
        let v: Vec<f64> = (1..=1000).map(f64::from).collect();
        assert_abs_diff_eq!(quantile(&v, 0.975).unwrap(), 975.025, epsilon = 1e-9);
    }
}
