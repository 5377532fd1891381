//! Constraint propagation: the tightest interval of every figure that is
//! compatible with the reported ones under one reading.
//!
//! The relations (see [`crate::model`]) are D = R·E, E = a·sqrt(A),
//! z = k·(R − 1) and p = tail(|z|). Each is monotone in each variable, so
//! narrowing every variable by every relation in turn (interval constraint
//! propagation, e.g. Benhamou et al. 1999, "Revising hull and box
//! consistency"; common practice) reaches a fixed point. The relations form
//! a tree (D–R–E, E–A, R–z, z–p share one variable pairwise and no cycle),
//! so the fixed point is exact: each interval is the set of values that
//! some choice of all the others, inside their intervals, satisfies. An
//! empty interval means no choice does: the figures contradict each other.

use crate::interval::Interval;
use crate::model::{Model, Tail};
use crate::reported::Quantity;
use serde::Serialize;

/// The current interval of every figure.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct Domains {
    /// R.
    pub ratio: Interval,
    /// z.
    pub z: Interval,
    /// p.
    pub p: Interval,
    /// D, the mean nearest-neighbour distance.
    pub mean_nn: Interval,
    /// E, the expected distance under CSR.
    pub expected_nn: Interval,
    /// A, the study area.
    pub area: Interval,
}

impl Default for Domains {
    fn default() -> Self {
        Self {
            ratio: Quantity::Ratio.domain(),
            z: Quantity::Z.domain(),
            p: Quantity::P.domain(),
            mean_nn: Quantity::MeanNn.domain(),
            expected_nn: Quantity::ExpectedNn.domain(),
            area: Quantity::Area.domain(),
        }
    }
}

impl Domains {
    /// The interval of one figure.
    pub fn get(&self, q: Quantity) -> Interval {
        match q {
            Quantity::Ratio => self.ratio,
            Quantity::Z => self.z,
            Quantity::P => self.p,
            Quantity::MeanNn => self.mean_nn,
            Quantity::ExpectedNn => self.expected_nn,
            Quantity::Area => self.area,
        }
    }

    /// Narrow one figure to `iv`; `None` if that empties it.
    pub fn restrict(mut self, q: Quantity, iv: &Interval) -> Option<Self> {
        let slot = match q {
            Quantity::Ratio => &mut self.ratio,
            Quantity::Z => &mut self.z,
            Quantity::P => &mut self.p,
            Quantity::MeanNn => &mut self.mean_nn,
            Quantity::ExpectedNn => &mut self.expected_nn,
            Quantity::Area => &mut self.area,
        };
        *slot = slot.intersect(iv)?;
        Some(self)
    }

    /// The smallest domains holding both.
    pub fn hull(&self, o: &Domains) -> Domains {
        Domains {
            ratio: self.ratio.hull(&o.ratio),
            z: self.z.hull(&o.z),
            p: self.p.hull(&o.p),
            mean_nn: self.mean_nn.hull(&o.mean_nn),
            expected_nn: self.expected_nn.hull(&o.expected_nn),
            area: self.area.hull(&o.area),
        }
    }

    fn ends(&self) -> [f64; 12] {
        let q = |i: Interval| [i.low, i.high];
        let [a, b] = q(self.ratio);
        let [c, d] = q(self.z);
        let [e, f] = q(self.p);
        let [g, h] = q(self.mean_nn);
        let [i, j] = q(self.expected_nn);
        let [k, l] = q(self.area);
        [a, b, c, d, e, f, g, h, i, j, k, l]
    }
}

fn narrowed(before: &Domains, after: &Domains) -> bool {
    before.ends().iter().zip(after.ends()).any(|(x, y)| {
        if x == &y {
            false
        } else if x.is_finite() && y.is_finite() {
            (x - y).abs() > 1e-13 * x.abs().max(y.abs()).max(1e-300)
        } else {
            true
        }
    })
}

/// Narrow `start` by every relation of `model` with p read as `tail`,
/// until nothing moves. `None` when the figures contradict each other.
///
/// ```
/// use patternproof_recheck::interval::Interval;
/// use patternproof_recheck::model::{Model, Tail};
/// use patternproof_recheck::propagate::{Domains, propagate};
/// use patternproof_recheck::reported::Quantity;
/// // R in [0.705, 0.715] with n = 64 gives z in [-4.515, -4.362].
/// let d = Domains::default().restrict(Quantity::Ratio, &Interval::new(0.705, 0.715)).unwrap();
/// let out = propagate(&d, &Model::plain(64), Tail::TwoSided).unwrap();
/// assert!((out.z.low + 4.5148).abs() < 1e-3 && (out.z.high + 4.3618).abs() < 1e-3);
/// ```
pub fn propagate(start: &Domains, model: &Model, tail: Tail) -> Option<Domains> {
    let a = model.mean_factor;
    let k = model.z_per_ratio;
    let mut d = *start;
    d.p = d.p.intersect(&Interval::new(0.0, tail.max_p()))?;
    for _ in 0..100 {
        let before = d;
        // D = R·E
        d.mean_nn = d
            .mean_nn
            .intersect(&d.ratio.mul_non_negative(&d.expected_nn))?;
        d.ratio = d
            .ratio
            .intersect(&d.mean_nn.div_non_negative(&d.expected_nn))?;
        d.expected_nn = d
            .expected_nn
            .intersect(&d.mean_nn.div_non_negative(&d.ratio))?;
        // E = a·sqrt(A)
        d.expected_nn = d
            .expected_nn
            .intersect(&d.area.map_increasing(|x| a * x.max(0.0).sqrt()))?;
        d.area = d
            .area
            .intersect(&d.expected_nn.map_increasing(|e| (e / a).powi(2)))?;
        // z = k·(R − 1)
        d.z = d.z.intersect(&d.ratio.map_increasing(|r| k * (r - 1.0)))?;
        d.ratio = d.ratio.intersect(&d.z.map_increasing(|z| 1.0 + z / k))?;
        // p = tail(|z|)
        let m = d.z.abs();
        d.p =
            d.p.intersect(&m.map_decreasing(|x| tail.p_of_magnitude(x)))?;
        // A p that underflows to 0 stands for every |z| beyond about 37.5,
        // not for |z| = ∞: floor the upper end of p at the smallest normal
        // number before inverting it.
        let m_from_p = Interval::new(
            tail.magnitude_of_p(d.p.high.max(f64::MIN_POSITIVE)),
            tail.magnitude_of_p(d.p.low),
        );
        d.z = d.z.with_magnitude(&m_from_p)?;
        if !narrowed(&before, &d) {
            break;
        }
    }
    Some(d)
}

#[cfg(test)]
mod tests {
    #![allow(clippy::unwrap_used)]
    use super::*;
    use approx::assert_abs_diff_eq;
    use patternproof_core::NnRatioTest;

    fn with(pairs: &[(Quantity, Interval)]) -> Domains {
        pairs
            .iter()
            .fold(Domains::default(), |d, (q, iv)| d.restrict(*q, iv).unwrap())
    }

    /// Hand-computed (Clark & Evans 1954 formulas): n = 64, A = 10 000,
    /// D = 4.5 give E = 6.25, R = 0.72, z = −4.28525.
    #[test]
    fn point_values_reproduce_the_worked_example() {
        let t = NnRatioTest::uncorrected(4.5, 64, 10_000.0).unwrap();
        let d = with(&[
            (Quantity::MeanNn, Interval::point(4.5)),
            (Quantity::Area, Interval::point(10_000.0)),
        ]);
        let out = propagate(&d, &Model::plain(64), Tail::TwoSided).unwrap();
        assert_abs_diff_eq!(out.expected_nn.mid(), 6.25, epsilon = 1e-9);
        assert_abs_diff_eq!(out.ratio.mid(), 0.72, epsilon = 1e-9);
        assert_abs_diff_eq!(out.z.mid(), t.z, epsilon = 1e-8);
        assert_abs_diff_eq!(out.p.mid(), t.p, epsilon = 1e-12);
    }

    /// The example of issue 5: R = 0.71 and z = −4.9 with n = 64 cannot
    /// both hold (z from R is −4.44 ± 0.08).
    #[test]
    fn contradiction_is_empty() {
        let d = with(&[
            (Quantity::Ratio, Interval::new(0.705, 0.715)),
            (Quantity::Z, Interval::new(-4.95, -4.85)),
        ]);
        assert!(propagate(&d, &Model::plain(64), Tail::TwoSided).is_none());
        assert!(propagate(&d, &Model::plain(80), Tail::TwoSided).is_some());
    }

    /// p alone gives |z| but not its sign; R then gives the sign.
    #[test]
    fn p_narrows_z_and_r() {
        let d = with(&[(Quantity::P, Interval::new(0.0495, 0.0505))]);
        let out = propagate(&d, &Model::plain(100), Tail::TwoSided).unwrap();
        assert!(out.z.low < -1.95 && out.z.high > 1.95);
        let d = d
            .restrict(Quantity::Ratio, &Interval::new(0.5, 0.99))
            .unwrap();
        let out = propagate(&d, &Model::plain(100), Tail::TwoSided).unwrap();
        // |z| in [1.9566, 1.9633] (normal quantiles), negative because R < 1.
        assert!(out.z.high < 0.0);
        assert_abs_diff_eq!(out.z.low, -1.9633, epsilon = 1e-3);
        assert_abs_diff_eq!(
            out.ratio.mid(),
            1.0 - 1.96 / (10.0 * 1.913_06),
            epsilon = 1e-3
        );
        // One-sided: p ≤ 0.5, and a larger p is impossible.
        let d = with(&[(Quantity::P, Interval::new(0.6, 0.7))]);
        assert!(propagate(&d, &Model::plain(100), Tail::OneSided).is_none());
    }

    /// Very large n: z = (0.99 − 1)·10⁴·1.91306 ≈ −191, whose normal tail
    /// underflows to 0; that must not read as |z| = ∞.
    #[test]
    fn underflowing_p_is_not_infinite_z() {
        let d = with(&[
            (Quantity::Ratio, Interval::new(0.985, 0.995)),
            (Quantity::Z, Interval::new(-191.5, -190.5)),
        ]);
        let out = propagate(&d, &Model::plain(100_000_000), Tail::TwoSided).unwrap();
        assert_eq!(out.p.high, 0.0);
        assert!(out.z.contains(-191.0));
    }
}
