//! The relations between the figures under one reading of the analysis.
//!
//! Every analytic nearest-neighbour test the audit knows has the same
//! shape: the expected distance under CSR is E = a·sqrt(A), the ratio is
//! R = D/E, and z = (D − E)/SE = (R − 1)·k, where a and k depend on n and
//! on the reading, never on the scale of the window:
//!
//! | reading | a | k | source |
//! |---|---|---|---|
//! | plain (no correction; also torus distances) | 0.5/sqrt(n) | 0.5·sqrt(n)/0.26136 | Clark & Evans (1954) |
//! | Donnelly, window with perimeter s·sqrt(A) | 0.5/sqrt(n) + (0.0514 + 0.041/sqrt(n))·s/n | a / sqrt(0.0703/n² + 0.037·s/n^2.5) | Donnelly (1978) |
//! | guard zone with m focal points of n | 0.5/sqrt(n) | 0.5·sqrt(m)/0.26136 | Diggle (2003), ch. 2 |
//!
//! The p-value is the normal tail of z: two-sided P(|Z| ≥ |z|) or
//! one-sided in the direction of the departure, P(Z ≥ |z|).

use patternproof_core::clark_evans::{CE_MEAN_FACTOR, CE_SE_FACTOR};
use patternproof_core::{donnelly, normal};
use serde::Serialize;
use statrs::distribution::{ContinuousCDF, Normal};

/// Which tail the p-value is.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum Tail {
    /// P(|Z| ≥ |z|), the convention of the audit.
    TwoSided,
    /// P(Z ≥ |z|): the tail in the direction of the observed departure.
    OneSided,
}

impl Tail {
    /// `two-sided` or `one-sided`.
    pub fn as_str(self) -> &'static str {
        match self {
            Tail::TwoSided => "two-sided",
            Tail::OneSided => "one-sided",
        }
    }

    /// The p-value of |z| = `m` (decreasing in m).
    pub fn p_of_magnitude(self, m: f64) -> f64 {
        if m.is_infinite() {
            return 0.0;
        }
        match self {
            Tail::TwoSided => normal::two_sided_p(m),
            Tail::OneSided => normal::upper_p(m.abs()),
        }
    }

    /// The |z| whose p-value is `p` (decreasing in p): the inverse of
    /// [`Tail::p_of_magnitude`]; +∞ at p = 0, 0 at the largest p the tail
    /// can give (1 two-sided, 0.5 one-sided).
    pub fn magnitude_of_p(self, p: f64) -> f64 {
        let q = match self {
            Tail::TwoSided => 0.5 * p,
            Tail::OneSided => p,
        };
        if q <= 0.0 {
            f64::INFINITY
        } else if q >= 0.5 {
            0.0
        } else {
            // The lower quantile is accurate far into the tail, where
            // 1 − q would lose digits: isf(q) = −Φ⁻¹(q).
            -Normal::standard().inverse_cdf(q)
        }
    }

    /// The largest p-value this tail can give.
    pub fn max_p(self) -> f64 {
        match self {
            Tail::TwoSided => 1.0,
            Tail::OneSided => 0.5,
        }
    }
}

/// One reading of the analysis, reduced to its two factors.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Model {
    /// Number of points n.
    pub n: usize,
    /// a in E = a·sqrt(A).
    pub mean_factor: f64,
    /// k in z = k·(R − 1).
    pub z_per_ratio: f64,
}

impl Model {
    /// The plain test (Clark & Evans 1954): a = 0.5/sqrt(n),
    /// k = 0.5·sqrt(n)/0.26136. Torus distances use the same moments.
    pub fn plain(n: usize) -> Self {
        let nf = n as f64;
        Self {
            n,
            mean_factor: CE_MEAN_FACTOR / nf.sqrt(),
            z_per_ratio: CE_MEAN_FACTOR * nf.sqrt() / CE_SE_FACTOR,
        }
    }

    /// Donnelly's (1978) correction in a window whose perimeter is
    /// `shape`·sqrt(area) (4 for a square). Scale-free: both E and SE are
    /// sqrt(A) times a function of n and `shape`.
    pub fn donnelly(n: usize, shape: f64) -> Self {
        let e = donnelly::expected_mean(n, 1.0, shape);
        let se = donnelly::standard_error(n, 1.0, shape);
        Self {
            n,
            mean_factor: e,
            z_per_ratio: e / se,
        }
    }

    /// The guard-zone test with `focal` of the n points at least the guard
    /// width from the outline (Diggle 2003, ch. 2): the mean is the CSR
    /// mean for intensity n/A, the standard error that of `focal` distances.
    pub fn guard_zone(n: usize, focal: usize) -> Self {
        let nf = n as f64;
        Self {
            n,
            mean_factor: CE_MEAN_FACTOR / nf.sqrt(),
            z_per_ratio: CE_MEAN_FACTOR * (focal as f64).sqrt() / CE_SE_FACTOR,
        }
    }
}

/// perimeter/sqrt(area) of an a × b rectangle: 2(a + b)/sqrt(ab).
pub fn rectangle_shape(aspect: f64) -> f64 {
    2.0 * (aspect + 1.0) / aspect.sqrt()
}

/// perimeter/sqrt(area) of a circle, the smallest any shape can have
/// (isoperimetric inequality): 2·sqrt(π).
pub fn circle_shape() -> f64 {
    2.0 * std::f64::consts::PI.sqrt()
}

#[cfg(test)]
mod tests {
    #![allow(clippy::unwrap_used)]
    use super::*;
    use approx::{assert_abs_diff_eq, relative_eq};
    use patternproof_core::NnRatioTest;

    /// z = (R − 1)·sqrt(n)·0.5/0.26136 (Clark & Evans 1954): for n = 64,
    /// k = 8·1.91306 = 15.3045.
    #[test]
    fn plain_factors() {
        let m = Model::plain(64);
        assert_abs_diff_eq!(m.mean_factor, 0.0625, epsilon = 1e-15);
        assert_abs_diff_eq!(m.z_per_ratio, 15.304_5, epsilon = 1e-4);
        let t = NnRatioTest::uncorrected(4.5, 64, 10_000.0).unwrap();
        assert_abs_diff_eq!(m.z_per_ratio * (t.ratio - 1.0), t.z, epsilon = 1e-9);
    }

    /// The Donnelly reading reproduces the core's corrected test for a
    /// 100 × 50 rectangle (A = 5000, P = 300, so shape = 300/sqrt(5000)).
    #[test]
    fn donnelly_factors_are_scale_free() {
        let t = donnelly::test(5.0, 49, 5000.0, 300.0).unwrap();
        let m = Model::donnelly(49, 300.0 / 5000f64.sqrt());
        assert_abs_diff_eq!(m.mean_factor * 5000f64.sqrt(), t.expected, epsilon = 1e-12);
        assert_abs_diff_eq!(m.z_per_ratio * (t.ratio - 1.0), t.z, epsilon = 1e-9);
        assert_abs_diff_eq!(
            rectangle_shape(2.0),
            300.0 / 5000f64.sqrt(),
            epsilon = 1e-12
        );
        assert_abs_diff_eq!(rectangle_shape(1.0), 4.0, epsilon = 1e-15);
    }

    /// Inverse tails against printed normal tables (Abramowitz & Stegun
    /// 1964, table 26.1): two-sided p = 0.05 at |z| = 1.959964,
    /// one-sided p = 0.05 at 1.644854.
    #[test]
    fn tails_invert() {
        assert_abs_diff_eq!(
            Tail::TwoSided.magnitude_of_p(0.05),
            1.959_964,
            epsilon = 1e-6
        );
        assert_abs_diff_eq!(
            Tail::OneSided.magnitude_of_p(0.05),
            1.644_854,
            epsilon = 1e-6
        );
        assert_eq!(Tail::OneSided.magnitude_of_p(0.7), 0.0);
        assert!(Tail::TwoSided.magnitude_of_p(0.0).is_infinite());
        for z in [0.1, 1.0, 2.5, 4.9, 8.0] {
            for t in [Tail::TwoSided, Tail::OneSided] {
                let back = t.magnitude_of_p(t.p_of_magnitude(z));
                assert!(
                    relative_eq!(back, z, epsilon = 1e-7, max_relative = 1e-7),
                    "{t:?} {z} {back}"
                );
            }
        }
    }
}
