//! Closed-form flip thresholds for the uncorrected Clark–Evans test.
//!
//! With no edge correction z(A) = a/sqrt(A) − b, where a = n·d̄/0.26136 and
//! b = 0.5·sqrt(n)/0.26136 (Clark & Evans 1954, rearranged). z falls
//! monotonically as the area grows, so at two-sided critical value z_c:
//!
//! * the call is `clustered` for every A above (a/(b − z_c))², provided b > z_c;
//!   when b ≤ z_c (a very strict alpha for a small n) no area at all makes
//!   the data clustered;
//! * the call is `dispersed` for every A below (a/(b + z_c))².
//!
//! For the convex hull buffered outward by D, Steiner's formula gives the
//! area A_hull + P·D + π·D², so each area threshold maps to one buffer
//! distance by solving that quadratic.

use crate::clark_evans::{CE_MEAN_FACTOR, CE_SE_FACTOR};
use serde::Serialize;

/// The two area thresholds of one data set.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct FlipThresholds {
    /// Coefficient a = n·d̄/0.26136 of z(A) = a/sqrt(A) − b.
    pub a: f64,
    /// Coefficient b = 0.5·sqrt(n)/0.26136.
    pub b: f64,
    /// Two-sided critical value used.
    pub z_crit: f64,
    /// Smallest area above which the call is `clustered`; `None` when no
    /// area can make it so (b ≤ z_c).
    pub clustered_above_area: Option<f64>,
    /// Largest area below which the call is `dispersed`.
    pub dispersed_below_area: f64,
}

impl FlipThresholds {
    /// Thresholds for `n` points with observed mean nearest-neighbour distance `mean_nn`.
    ///
    /// Returns `None` for `n < 2`, a non-positive mean distance (all points
    /// coincide), or a non-positive critical value.
    ///
    /// ```
    /// use patternproof_core::FlipThresholds;
    /// let f = FlipThresholds::new(100, 0.05, 1.959964).unwrap();
    /// // z at the clustered threshold is exactly −z_c:
    /// let z = f.a / f.clustered_above_area.unwrap().sqrt() - f.b;
    /// assert!((z + 1.959964).abs() < 1e-9);
    /// ```
    pub fn new(n: usize, mean_nn: f64, z_crit: f64) -> Option<Self> {
        if n < 2 || !(mean_nn > 0.0 && mean_nn.is_finite()) || !(z_crit > 0.0) {
            return None;
        }
        let nf = n as f64;
        let a = nf * mean_nn / CE_SE_FACTOR;
        let b = CE_MEAN_FACTOR * nf.sqrt() / CE_SE_FACTOR;
        let clustered_above_area = (b > z_crit).then(|| (a / (b - z_crit)).powi(2));
        let dispersed_below_area = (a / (b + z_crit)).powi(2);
        Some(Self {
            a,
            b,
            z_crit,
            clustered_above_area,
            dispersed_below_area,
        })
    }

    /// z of the uncorrected test at area `area`.
    pub fn z_at(&self, area: f64) -> f64 {
        self.a / area.sqrt() - self.b
    }
}

/// Buffer distance D ≥ 0 at which a convex window of `area` and `perimeter`,
/// buffered outward with round joins, reaches `target_area`
/// (Steiner: A + P·D + π·D² = target). `None` when the target is not above
/// the unbuffered area.
pub fn buffer_for_area(area: f64, perimeter: f64, target_area: f64) -> Option<f64> {
    if !(target_area > area) {
        return None;
    }
    let pi = std::f64::consts::PI;
    let disc = perimeter * perimeter + 4.0 * pi * (target_area - area);
    Some((-perimeter + disc.sqrt()) / (2.0 * pi))
}

/// Steiner's formula: area of a convex polygon buffered outward by `d`.
pub fn steiner_area(area: f64, perimeter: f64, d: f64) -> f64 {
    area + perimeter * d + std::f64::consts::PI * d * d
}

#[cfg(test)]
#[allow(clippy::unwrap_used)] // a failed unwrap is a failed test
mod tests {
    use super::*;
    use crate::NnRatioTest;
    use approx::assert_abs_diff_eq;

    /// Closed form (METHODS.md): at each threshold the plain test's z equals
    /// ∓z_c exactly, and the call is on the expected side just beyond it.
    #[test]
    fn thresholds_reproduce_the_critical_z() {
        let (n, d) = (64, 4.5);
        let f = FlipThresholds::new(n, d, 1.959_964).unwrap();
        let ac = f.clustered_above_area.unwrap();
        let zc = NnRatioTest::uncorrected(d, n, ac).unwrap().z;
        assert_abs_diff_eq!(zc, -1.959_964, epsilon = 1e-9);
        let zd = NnRatioTest::uncorrected(d, n, f.dispersed_below_area)
            .unwrap()
            .z;
        assert_abs_diff_eq!(zd, 1.959_964, epsilon = 1e-9);
        assert!(NnRatioTest::uncorrected(d, n, ac * 1.001).unwrap().z < -1.959_964);
        assert!(
            NnRatioTest::uncorrected(d, n, f.dispersed_below_area * 0.999)
                .unwrap()
                .z
                > 1.959_964
        );
    }

    /// b = 0.5·sqrt(n)/0.26136 = 1.91306·sqrt(n) (closed form): b > 1.96 for
    /// every n ≥ 2, so two points can always be made `clustered`; a critical
    /// value above b (very strict alpha) leaves no clustered threshold.
    #[test]
    fn clustered_threshold_exists_only_when_b_exceeds_the_critical_value() {
        let f = FlipThresholds::new(4, 1.0, 1.959_964).unwrap();
        assert_abs_diff_eq!(f.b, 0.5 * 2.0 / CE_SE_FACTOR, epsilon = 1e-12);
        assert_abs_diff_eq!(f.b, 3.826_12, epsilon = 1e-4);
        assert!(f.clustered_above_area.is_some());
        assert!(
            FlipThresholds::new(4, 1.0, 3.9)
                .unwrap()
                .clustered_above_area
                .is_none()
        );
    }

    /// Steiner's formula inverted: the buffer found reproduces the target area.
    #[test]
    fn buffer_for_area_inverts_steiner() {
        let (a, p) = (1_000.0, 130.0);
        let d = buffer_for_area(a, p, 5_000.0).unwrap();
        assert_abs_diff_eq!(steiner_area(a, p, d), 5_000.0, epsilon = 1e-9);
        assert!(buffer_for_area(a, p, 900.0).is_none());
    }
}
