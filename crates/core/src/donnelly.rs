//! Donnelly's (1978) edge-corrected moments for the nearest-neighbour mean.
//!
//! Donnelly, K. P. (1978). Simulations to determine the variance and edge
//! effect of total nearest-neighbour distance. In I. Hodder (ed.),
//! *Simulation Methods in Archaeology*, Cambridge University Press, 91–95.
//!
//! Points near the edge of a window have their true nearest neighbour
//! outside it, so the observed mean is too long; Donnelly fitted, by
//! simulation in rectangles, a perimeter term to the expected mean and the
//! variance:
//!
//! * E = 0.5·sqrt(A/n) + (0.0514 + 0.041/sqrt(n))·P/n
//! * Var(d̄) = 0.0703·A/n² + 0.037·P·sqrt(A/n⁵)
//!
//! The fit was made for rectangles and n ≥ 7. For other shapes the audit
//! uses the window's own perimeter and marks the row as an approximation.

use crate::clark_evans::NnRatioTest;

/// Smallest n inside the range Donnelly fitted.
pub const DONNELLY_MIN_N: usize = 7;

/// Donnelly's expected mean nearest-neighbour distance.
pub fn expected_mean(n: usize, area: f64, perimeter: f64) -> f64 {
    let nf = n as f64;
    0.5 * (area / nf).sqrt() + (0.0514 + 0.041 / nf.sqrt()) * perimeter / nf
}

/// Donnelly's standard error of the mean nearest-neighbour distance.
pub fn standard_error(n: usize, area: f64, perimeter: f64) -> f64 {
    let nf = n as f64;
    (0.0703 * area / (nf * nf) + 0.037 * perimeter * (area / nf.powi(5)).sqrt()).sqrt()
}

/// The Donnelly-corrected test; `None` for n < 2 or a degenerate window.
///
/// ```
/// use patternproof_core::donnelly;
/// // Unit square, n = 100: E = 0.05 + (0.0514 + 0.0041)·4/100 = 0.05222.
/// let t = donnelly::test(0.05222, 100, 1.0, 4.0).unwrap();
/// assert!(t.z.abs() < 1e-9);
/// ```
pub fn test(mean_nn: f64, n: usize, area: f64, perimeter: f64) -> Option<NnRatioTest> {
    if n < 2 || !(area > 0.0 && area.is_finite() && perimeter > 0.0 && perimeter.is_finite()) {
        return None;
    }
    NnRatioTest::from_moments(
        mean_nn,
        expected_mean(n, area, perimeter),
        standard_error(n, area, perimeter),
    )
}

#[cfg(test)]
#[allow(clippy::unwrap_used)] // a failed unwrap is a failed test
mod tests {
    use super::*;
    use approx::abs_diff_eq;

    /// Hand-computed from Donnelly's (1978) formulas for a 100 × 50
    /// rectangle with n = 49: A = 5000, P = 300.
    /// E = 0.5·sqrt(5000/49) + (0.0514 + 0.041/7)·300/49
    ///   = 5.050763 + 0.0572571·6.122449 = 5.401316;
    /// Var = 0.0703·5000/2401 + 0.037·300·sqrt(5000/282475249)
    ///     = 0.146397 + 11.1·0.00420725 = 0.193097; SE = 0.439428.
    #[test]
    fn rectangle_values_match_hand_computation() {
        let e = expected_mean(49, 5000.0, 300.0);
        assert!(abs_diff_eq!(e, 5.401_316, epsilon = 2e-6), "{e}");
        let se = standard_error(49, 5000.0, 300.0);
        assert!(abs_diff_eq!(se, 0.439_428, epsilon = 2e-6), "{se}");
    }

    /// The correction only ever lengthens the expected mean (positive
    /// perimeter term), so for the same data it moves z towards `clustered`.
    #[test]
    fn correction_lengthens_the_expectation() {
        let plain = NnRatioTest::uncorrected(5.0, 49, 5000.0).unwrap();
        let corrected = test(5.0, 49, 5000.0, 300.0).unwrap();
        assert!(corrected.expected > plain.expected);
        assert!(corrected.z < plain.z);
    }
}
