//! The Clark & Evans (1954) test: observed against expected nearest-neighbour spacing.
//!
//! Clark, P. J. & Evans, F. C. (1954). Distance to nearest neighbor as a
//! measure of spatial relationships in populations. *Ecology* 35:445–453.
//!
//! Under complete spatial randomness (CSR) with intensity λ = n/A the
//! nearest-neighbour distance has mean 1/(2·sqrt(λ)) and variance
//! (4 − π)/(4πλ). So the mean of n such distances has
//!
//! * expected value E = 0.5·sqrt(A/n), and
//! * standard error SE = sqrt((4 − π)/(4π))·sqrt(A)/n ≈ 0.26136·sqrt(A)/n.
//!
//! R = d̄/E and z = (d̄ − E)/SE. Because both E and SE scale with sqrt(A),
//! z depends only on R and n: z = (R − 1)·sqrt(n)·0.5/0.26136. The area is
//! therefore the one choice that moves the verdict, which is why the audit
//! sweeps it.
//!
//! Units: `mean_nn`, `expected` and `se` are in the input's distance unit,
//! `area` in its square.

use crate::normal;
use serde::Serialize;

/// The factor 0.5 in E = 0.5·sqrt(A/n): the mean of the CSR nearest-neighbour
/// distance at unit intensity.
pub const CE_MEAN_FACTOR: f64 = 0.5;

/// sqrt((4 − π)/(4π)) ≈ 0.26136: the standard deviation of the CSR
/// nearest-neighbour distance at unit intensity. Kept at full precision
/// rather than the printed five digits.
pub const CE_SE_FACTOR: f64 = 0.261_361_600_438_531_7;

/// Fewest points for which a closed-form (normal-approximation) row is
/// given. The z statistic leans on the central limit theorem for the mean
/// of n distances; below about ten points the approximation is widely
/// treated as unusable (common practice, a rule of thumb rather than a
/// derived bound), and only the Monte Carlo test, exact for any n, is
/// reported.
pub const MIN_N_ANALYTIC: usize = 10;

/// Below this many points a result is called a small sample in the
/// verdict (common practice: the normal approximation of a mean is
/// usually trusted from about thirty terms).
pub const SMALL_SAMPLE_N: usize = 30;

/// One evaluated nearest-neighbour test: observed mean, its null moments and
/// the standardised difference.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct NnRatioTest {
    /// Observed mean nearest-neighbour distance d̄.
    pub mean_nn: f64,
    /// Expected mean spacing under the null (CSR).
    pub expected: f64,
    /// d̄ / E.
    pub ratio: f64,
    /// Standard error of d̄ under the null.
    pub se: f64,
    /// (d̄ − E) / SE.
    pub z: f64,
    /// Two-sided normal tail probability of z.
    pub p: f64,
}

impl NnRatioTest {
    /// The plain (uncorrected) test for `n` points with mean distance
    /// `mean_nn` in a window of `area`.
    ///
    /// Returns `None` when `n < 2` or the area is not a positive finite number.
    ///
    /// ```
    /// use patternproof_core::NnRatioTest;
    /// // 100 points, d̄ = 0.05 in the unit square: exactly the CSR expectation.
    /// let t = NnRatioTest::uncorrected(0.05, 100, 1.0).unwrap();
    /// assert!((t.ratio - 1.0).abs() < 1e-12 && t.z.abs() < 1e-9);
    /// ```
    pub fn uncorrected(mean_nn: f64, n: usize, area: f64) -> Option<Self> {
        if n < 2 || !(area.is_finite() && area > 0.0) || !mean_nn.is_finite() {
            return None;
        }
        let nf = n as f64;
        let expected = CE_MEAN_FACTOR * (area / nf).sqrt();
        let se = CE_SE_FACTOR * area.sqrt() / nf;
        Self::from_moments(mean_nn, expected, se)
    }

    /// A test from any null mean and standard error (used by edge
    /// corrections that change the moments, such as Donnelly's).
    pub fn from_moments(mean_nn: f64, expected: f64, se: f64) -> Option<Self> {
        if !(expected > 0.0 && se > 0.0 && mean_nn.is_finite()) {
            return None;
        }
        let z = (mean_nn - expected) / se;
        Some(Self {
            mean_nn,
            expected,
            ratio: mean_nn / expected,
            se,
            z,
            p: normal::two_sided_p(z),
        })
    }
}

/// z implied by R and n alone for the uncorrected test:
/// z = (R − 1)·sqrt(n)·0.5/0.26136.
pub fn z_from_ratio(ratio: f64, n: usize) -> f64 {
    (ratio - 1.0) * (n as f64).sqrt() * CE_MEAN_FACTOR / CE_SE_FACTOR
}

#[cfg(test)]
#[allow(clippy::unwrap_used)] // a failed unwrap is a failed test
mod tests {
    use super::*;
    use approx::assert_abs_diff_eq;

    /// Clark & Evans (1954): the constants 0.5 and 0.26136, the latter equal
    /// to sqrt((4 − π)/(4π)) (closed form).
    #[test]
    fn constants_match_the_closed_form_and_the_printed_value() {
        let pi = std::f64::consts::PI;
        assert_abs_diff_eq!(
            CE_SE_FACTOR,
            ((4.0 - pi) / (4.0 * pi)).sqrt(),
            epsilon = 1e-15
        );
        assert_eq!((CE_SE_FACTOR * 1e5).round() / 1e5, 0.26136);
        assert_eq!(CE_MEAN_FACTOR, 0.5);
    }

    /// z = (R − 1)·sqrt(n)·0.5/0.26136 ≈ 1.91306·(R − 1)·sqrt(n) (closed form,
    /// METHODS.md): the area cancels.
    #[test]
    fn z_depends_on_ratio_and_n_only() {
        let a = NnRatioTest::uncorrected(3.0, 64, 5_000.0).unwrap();
        let b = NnRatioTest::uncorrected(3.0 * 2.0, 64, 20_000.0).unwrap();
        assert_abs_diff_eq!(a.ratio, b.ratio, epsilon = 1e-12);
        assert_abs_diff_eq!(a.z, b.z, epsilon = 1e-9);
        assert_abs_diff_eq!(a.z, z_from_ratio(a.ratio, 64), epsilon = 1e-9);
        assert_abs_diff_eq!(z_from_ratio(0.0, 1), -1.91306, epsilon = 1e-5);
    }

    /// Worked value computed by hand from the closed form: n = 64, A = 10 000,
    /// d̄ = 4.5 → E = 6.25, SE = 0.261362·100/64 = 0.408378, z = −4.28525.
    #[test]
    fn worked_example() {
        let t = NnRatioTest::uncorrected(4.5, 64, 10_000.0).unwrap();
        assert_abs_diff_eq!(t.expected, 6.25, epsilon = 1e-12);
        assert_abs_diff_eq!(t.ratio, 0.72, epsilon = 1e-12);
        assert_abs_diff_eq!(t.se, 0.408_377_5, epsilon = 1e-6);
        assert_abs_diff_eq!(t.z, -4.285_25, epsilon = 1e-4);
    }

    #[test]
    fn rejects_degenerate_input() {
        assert!(NnRatioTest::uncorrected(1.0, 1, 1.0).is_none());
        assert!(NnRatioTest::uncorrected(1.0, 10, 0.0).is_none());
        assert!(NnRatioTest::uncorrected(1.0, 10, f64::NAN).is_none());
    }
}
