//! Whether an edge-corrected reading that reproduces the figures is one a
//! paper could plausibly have used, and what to ask its authors.
//!
//! Both corrections have a free parameter that the printed figures rarely
//! report: Donnelly's needs the window's perimeter, the guard zone the
//! number of focal points. With the parameter free, almost any z that is
//! too small in magnitude can be "explained", so a fitting reading alone
//! proves little. The rules below separate shapes and counts an ordinary
//! study could have from ones it could not.

use crate::interval::{Interval, number};
use crate::model::rectangle_shape;
use serde::Serialize;

/// Largest perimeter/sqrt(area) of a plausible study window (our choice):
/// 10 is a strip about 23 times longer than wide. A window whose outline
/// is longer than that relative to its area is a corridor, not a plot.
pub const PLAUSIBLE_SHAPE: f64 = 10.0;

/// The plausibility of one reading.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Plausibility {
    /// Whether an ordinary study could have used it.
    pub plausible: bool,
    /// Why, in words.
    pub why: String,
    /// What a reader should ask the authors.
    pub ask: String,
}

/// Donnelly's correction fits for perimeter/sqrt(area) in `shapes`.
pub fn donnelly(shapes: Interval) -> Plausibility {
    let ask = "ask the authors whether Donnelly's correction was used, and for the window's area and perimeter".to_string();
    if shapes.low <= PLAUSIBLE_SHAPE {
        Plausibility {
            plausible: true,
            why: format!(
                "a window with perimeter {} × sqrt(area) is no longer than a strip about 23 times longer than wide ({} × sqrt(area))",
                number(shapes.low),
                number(PLAUSIBLE_SHAPE)
            ),
            ask,
        }
    } else {
        Plausibility {
            plausible: false,
            why: format!(
                "it needs a perimeter of at least {} × sqrt(area), beyond a strip about 23 times longer than wide ({} × sqrt(area); a 4:1 rectangle has {}): no ordinary study area has that shape",
                number(shapes.low),
                number(PLAUSIBLE_SHAPE),
                number(rectangle_shape(4.0))
            ),
            ask,
        }
    }
}

/// Fewest focal points a guard zone plausibly leaves of `n` (our choice):
/// a guard of twice the expected nearest-neighbour distance, 0.5·sqrt(A/n),
/// in a square window keeps the points more than 1/sqrt(n) of the side
/// from every edge, n·(1 − 2/sqrt(n))² of them on average. Wider guards
/// than that are rare, and a square loses the fewest points to its edge
/// of all rectangles.
pub fn guard_zone_floor(n: usize) -> f64 {
    let n = n as f64;
    n * (1.0 - 2.0 / n.sqrt()).max(0.0).powi(2)
}

/// A guard zone fits with `focal` focal points of `n`.
pub fn guard_zone(n: usize, focal: Interval) -> Plausibility {
    let floor = guard_zone_floor(n);
    let most = focal.high.round() as usize;
    let left_out = n.saturating_sub(most);
    let share = 100.0 * left_out as f64 / n.max(1) as f64;
    let ask = format!(
        "ask the authors whether a guard zone was used, how wide it was and how many of the {n} points were focal (the paper should report that count; the figures need at most {most})"
    );
    if focal.high >= floor {
        Plausibility {
            plausible: true,
            why: format!(
                "leaving {left_out} of {n} points ({share:.0} %) out of the focal set is within what a guard of twice the expected nearest-neighbour distance does in a square window (about {} focal points)",
                floor.round()
            ),
            ask,
        }
    } else {
        Plausibility {
            plausible: false,
            why: format!(
                "it leaves at least {left_out} of {n} points ({share:.0} %) out of the focal set, more than a guard of twice the expected nearest-neighbour distance leaves out even in a square window (about {} focal points)",
                floor.round()
            ),
            ask,
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use approx::assert_abs_diff_eq;

    /// The shape bound against its own definition: a k:1 rectangle has
    /// perimeter/sqrt(area) = 2(k + 1)/sqrt(k) (worked by hand: 23:1 gives
    /// 48/4.796 = 10.01), so the bound sits between 22:1 and 23:1.
    #[test]
    fn shape_bound_is_a_23_to_1_strip() {
        assert!(rectangle_shape(22.0) < PLAUSIBLE_SHAPE);
        assert!(rectangle_shape(23.0) > PLAUSIBLE_SHAPE);
        assert_abs_diff_eq!(rectangle_shape(23.0), 48.0 / 23f64.sqrt(), epsilon = 1e-12);
        assert!(donnelly(Interval::new(4.0, 30.0)).plausible);
        assert!(!donnelly(Interval::new(18.97, 60.0)).plausible);
    }

    /// The floor by hand: n = 53 gives 53·(1 − 2/7.2801)² = 27.880; n = 100
    /// gives 100·0.8² = 64.
    #[test]
    fn guard_zone_floor_by_hand() {
        assert_abs_diff_eq!(guard_zone_floor(100), 64.0, epsilon = 1e-9);
        assert_abs_diff_eq!(guard_zone_floor(53), 27.8796, epsilon = 1e-3);
        assert_eq!(guard_zone_floor(4), 0.0);
        assert!(guard_zone(53, Interval::new(36.0, 36.0)).plausible);
        let p = guard_zone(100, Interval::new(20.0, 40.0));
        assert!(!p.plausible);
        assert!(p.why.contains("60 of 100"), "{}", p.why);
        assert!(p.ask.contains("at most 40"));
    }
}
