//! How many CSR simulations a run makes when the user names no number:
//! one rule for every command and every front end.
//!
//! A rank test with N simulations can give p-values down to 1/(N + 1)
//! (Besag & Diggle 1977), so N is chosen by how finely its p-value is
//! read: N = 10^d − 1 for p-values read to d decimals.
//!
//! - [`TEST_SIMS`] = 999 (d = 3) where the simulation test's p-value is
//!   the run's result: the audit's `simulation` row and the false-alarm
//!   rates beside it, and a protocol's per-site test. The smallest p is
//!   0.001, and at p = 0.05 the Monte Carlo standard error of p,
//!   √(p(1 − p)/(N + 1)), is under 0.007.
//! - [`SCREEN_SIMS`] = 99 (d = 2) where simulations only say whether a
//!   curve or a call leaves its band at α, repeated over many windows or
//!   distances: the K envelope tests (`scales`, `audit --scales`) and each
//!   site's window-sensitivity sweep (`sites`). The smallest p is 0.01;
//!   a simulated K pattern costs every pair within r_max in every window,
//!   so a tenth of the simulations keeps those runs short.
//!
//! Both make α·(N + 1) whole at α = 0.05 and 0.01, so the rank test has
//! exactly the size α there, whatever the window's shape.

/// Simulations per window for a test whose p-value is the result (999).
pub const TEST_SIMS: usize = 999;

/// Simulations per window for envelopes and sweeps that screen at α (99).
pub const SCREEN_SIMS: usize = 99;

/// The count of the rule for p-values read to `decimals` decimals:
/// 10^decimals − 1 (saturating).
pub const fn sims_for_decimals(decimals: u32) -> usize {
    match 10usize.checked_pow(decimals) {
        Some(n) => n - 1,
        None => usize::MAX,
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use approx::assert_abs_diff_eq;

    /// The two defaults follow the rule, and the properties the module
    /// doc claims hold: smallest p 1/(N + 1) (Besag & Diggle 1977), whole
    /// α·(N + 1) at α = 0.05 and 0.01, and the binomial standard error of
    /// a p-value of 0.05 (0.05 · 0.95 / 1000, square-rooted: 0.00689).
    #[test]
    fn the_defaults_follow_the_rule() {
        assert_eq!(TEST_SIMS, sims_for_decimals(3));
        assert_eq!(SCREEN_SIMS, sims_for_decimals(2));
        assert_abs_diff_eq!(1.0 / (TEST_SIMS as f64 + 1.0), 0.001, epsilon = 1e-15);
        assert_abs_diff_eq!(1.0 / (SCREEN_SIMS as f64 + 1.0), 0.01, epsilon = 1e-15);
        for n in [TEST_SIMS, SCREEN_SIMS] {
            for alpha in [0.05, 0.01] {
                let ranks = alpha * (n as f64 + 1.0);
                assert_abs_diff_eq!(ranks, ranks.round(), epsilon = 1e-9);
            }
        }
        let se = (0.05f64 * 0.95 / (TEST_SIMS as f64 + 1.0)).sqrt();
        assert_abs_diff_eq!(se, 0.006892, epsilon = 1e-6);
        assert_eq!(sims_for_decimals(30), usize::MAX);
    }
}
