//! Closed intervals of real numbers, possibly unbounded, with the few
//! monotone operations the recheck needs.
//!
//! A reported figure is an interval (its rounding range); every relation
//! between figures is monotone in each argument, so the image of an
//! interval is the interval between the images of its ends (interval
//! arithmetic, Moore 1966, *Interval Analysis*; common practice).
//!
//! Comparisons allow a relative slack of [`REL_TOL`] so that a value that
//! sits exactly on a rounding boundary is not lost to floating-point noise.

use patternproof_core::numbers::figure;
use serde::{Serialize, Serializer};
use std::fmt;

/// Relative slack used when intersecting or testing membership.
pub const REL_TOL: f64 = 1e-9;

/// A closed interval `[low, high]`; either end may be infinite.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Interval {
    /// Lower end (may be −∞).
    pub low: f64,
    /// Upper end (may be +∞).
    pub high: f64,
}

fn tol(a: f64, b: f64) -> f64 {
    let m = [a, b]
        .into_iter()
        .filter(|x| x.is_finite())
        .map(f64::abs)
        .fold(0.0, f64::max);
    REL_TOL * m.max(1e-300)
}

impl Interval {
    /// `[low, high]`; the ends are swapped if given in the wrong order.
    pub fn new(low: f64, high: f64) -> Self {
        if low <= high {
            Self { low, high }
        } else {
            Self {
                low: high,
                high: low,
            }
        }
    }

    /// The single value `x`.
    pub fn point(x: f64) -> Self {
        Self { low: x, high: x }
    }

    /// The whole real line.
    pub fn everything() -> Self {
        Self {
            low: f64::NEG_INFINITY,
            high: f64::INFINITY,
        }
    }

    /// `[0, +∞]`: the domain of distances, areas and the ratio.
    pub fn non_negative() -> Self {
        Self {
            low: 0.0,
            high: f64::INFINITY,
        }
    }

    /// Both ends finite.
    pub fn is_bounded(&self) -> bool {
        self.low.is_finite() && self.high.is_finite()
    }

    /// The midpoint (finite intervals only; otherwise the finite end or 0).
    pub fn mid(&self) -> f64 {
        match (self.low.is_finite(), self.high.is_finite()) {
            (true, true) => 0.5 * (self.low + self.high),
            (true, false) => self.low,
            (false, true) => self.high,
            (false, false) => 0.0,
        }
    }

    /// The common part, or `None` when the intervals are disjoint (beyond
    /// the slack).
    pub fn intersect(&self, other: &Interval) -> Option<Interval> {
        let lo = self.low.max(other.low);
        let hi = self.high.min(other.high);
        if lo <= hi {
            Some(Interval { low: lo, high: hi })
        } else if lo - hi <= tol(lo, hi) {
            let m = 0.5 * (lo + hi);
            Some(Interval::point(m))
        } else {
            None
        }
    }

    /// Whether the intervals share a value (within the slack).
    pub fn overlaps(&self, other: &Interval) -> bool {
        self.intersect(other).is_some()
    }

    /// Whether `x` lies inside (within the slack).
    pub fn contains(&self, x: f64) -> bool {
        self.overlaps(&Interval::point(x))
    }

    /// The smallest interval holding both.
    pub fn hull(&self, other: &Interval) -> Interval {
        Interval {
            low: self.low.min(other.low),
            high: self.high.max(other.high),
        }
    }

    /// How far `x` lies outside (0 inside).
    pub fn distance_to(&self, x: f64) -> f64 {
        if x < self.low {
            self.low - x
        } else if x > self.high {
            x - self.high
        } else {
            0.0
        }
    }

    /// Image under an increasing function.
    pub fn map_increasing(&self, f: impl Fn(f64) -> f64) -> Interval {
        Interval::new(f(self.low), f(self.high))
    }

    /// Image under a decreasing function.
    pub fn map_decreasing(&self, f: impl Fn(f64) -> f64) -> Interval {
        Interval::new(f(self.high), f(self.low))
    }

    /// Product of two non-negative intervals.
    pub fn mul_non_negative(&self, other: &Interval) -> Interval {
        Interval::new(
            safe_mul(self.low.max(0.0), other.low.max(0.0)),
            safe_mul(self.high.max(0.0), other.high.max(0.0)),
        )
    }

    /// Quotient of two non-negative intervals (`self / other`).
    pub fn div_non_negative(&self, other: &Interval) -> Interval {
        Interval::new(
            safe_div(self.low.max(0.0), other.high.max(0.0)),
            safe_div(self.high.max(0.0), other.low.max(0.0)),
        )
    }

    /// The absolute values: `{|x| : x in self}`.
    pub fn abs(&self) -> Interval {
        if self.low >= 0.0 {
            *self
        } else if self.high <= 0.0 {
            Interval::new(-self.high, -self.low)
        } else {
            Interval::new(0.0, (-self.low).max(self.high))
        }
    }

    /// `{x in self : |x| in magnitude}` as one interval (the hull of the
    /// negative and the positive part).
    pub fn with_magnitude(&self, magnitude: &Interval) -> Option<Interval> {
        let neg = Interval::new(-magnitude.high, -magnitude.low);
        let pos = *magnitude;
        match (self.intersect(&neg), self.intersect(&pos)) {
            (Some(a), Some(b)) => Some(a.hull(&b)),
            (Some(a), None) => Some(a),
            (None, Some(b)) => Some(b),
            (None, None) => None,
        }
    }

    /// The interval in words, with about four significant digits.
    pub fn describe(&self) -> String {
        match (self.low.is_finite(), self.high.is_finite()) {
            (true, true) if self.low == self.high => number(self.low),
            (true, true) if number(self.low) == number(self.high) => {
                format!("[{}, {}]", figure(self.low, 7), figure(self.high, 7))
            }
            (true, true) => format!("[{}, {}]", number(self.low), number(self.high)),
            (true, false) => format!("[{}, ∞)", number(self.low)),
            (false, true) => format!("(-∞, {}]", number(self.high)),
            (false, false) => "(-∞, ∞)".to_string(),
        }
    }
}

fn safe_mul(a: f64, b: f64) -> f64 {
    if a == 0.0 || b == 0.0 { 0.0 } else { a * b }
}

fn safe_div(a: f64, b: f64) -> f64 {
    if a == 0.0 {
        0.0
    } else if b == 0.0 {
        f64::INFINITY
    } else {
        a / b
    }
}

/// A number for people: four significant digits (trailing zeros dropped),
/// scientific notation below 0.001, no decimals from 10 000 up
/// ([`figure`]).
pub fn number(x: f64) -> String {
    figure(x, 4)
}

impl fmt::Display for Interval {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(&self.describe())
    }
}

/// JSON form: `{"low": …, "high": …}`, an infinite end written as `null`.
impl Serialize for Interval {
    fn serialize<S: Serializer>(&self, s: S) -> Result<S::Ok, S::Error> {
        use serde::ser::SerializeStruct;
        let mut st = s.serialize_struct("Interval", 2)?;
        st.serialize_field("low", &self.low.is_finite().then_some(self.low))?;
        st.serialize_field("high", &self.high.is_finite().then_some(self.high))?;
        st.end()
    }
}

#[cfg(test)]
mod tests {
    #![allow(clippy::unwrap_used)]
    use super::*;

    /// Interval arithmetic by hand (Moore 1966): [1, 2]·[3, 4] = [3, 8],
    /// [1, 2]/[4, 8] = [0.125, 0.5].
    #[test]
    fn products_and_quotients() {
        let a = Interval::new(1.0, 2.0);
        let b = Interval::new(3.0, 4.0);
        assert_eq!(a.mul_non_negative(&b), Interval::new(3.0, 8.0));
        assert_eq!(
            a.div_non_negative(&Interval::new(4.0, 8.0)),
            Interval::new(0.125, 0.5)
        );
        assert_eq!(
            a.div_non_negative(&Interval::non_negative()),
            Interval::non_negative()
        );
    }

    #[test]
    fn intersections_and_slack() {
        let a = Interval::new(0.705, 0.715);
        assert!(a.intersect(&Interval::new(0.72, 0.8)).is_none());
        assert_eq!(
            a.intersect(&Interval::new(0.71, 0.8)).unwrap(),
            Interval::new(0.71, 0.715)
        );
        // A hair outside from floating-point noise still touches.
        assert!(a.contains(0.715 * (1.0 + 1e-12)));
        assert!(!a.contains(0.7151));
    }

    #[test]
    fn magnitudes_keep_the_sign_information() {
        let z = Interval::new(-5.0, -1.0);
        let m = Interval::new(2.0, 3.0);
        assert_eq!(z.with_magnitude(&m).unwrap(), Interval::new(-3.0, -2.0));
        assert!(z.with_magnitude(&Interval::new(6.0, 7.0)).is_none());
        let both = Interval::new(-4.0, 4.0).with_magnitude(&m).unwrap();
        assert_eq!(both, Interval::new(-3.0, 3.0));
        assert_eq!(Interval::new(-3.0, 1.0).abs(), Interval::new(0.0, 3.0));
    }

    #[test]
    fn numbers_for_people() {
        assert_eq!(number(0.705), "0.705");
        assert_eq!(number(-4.515_23), "-4.515");
        assert_eq!(number(18_282.4), "18282");
        assert_eq!(number(9.6e-7), "9.60e-7");
        assert_eq!(number(5.0), "5");
        assert_eq!(Interval::new(0.0, f64::INFINITY).describe(), "[0, ∞)");
        assert_eq!(
            Interval::new(1.04501, 1.04512).describe(),
            "[1.04501, 1.04512]"
        );
    }
}
