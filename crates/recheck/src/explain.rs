//! Other readings and likely slips, tried when the plain reading fails.
//!
//! Readings (the analysis may have done this on purpose):
//! * Donnelly's (1978) edge correction, for every window shape from a
//!   circle to a very long strip (perimeter/sqrt(area) from 2·sqrt(π) to
//!   [`MAX_SHAPE`]); without the points the shape is unknown, so the
//!   result is the range of shapes that fit.
//! * A guard zone (Diggle 2003, ch. 2) with m of the n points focal, for
//!   m from [`patternproof_audit::sweep::MIN_FOCAL`] to n − 1.
//!
//! Slips (the figures would agree after a correction to one of them):
//! * a different n;
//! * the sign of z flipped;
//! * one figure left out ("odd one out"): the others then agree, and the
//!   interval they imply for the left-out figure is shown.
//!
//! A fitting reading makes the verdict "consistent only if …"; a fitting
//! slip only says where the disagreement probably sits.

use crate::interval::Interval;
use crate::model::{Model, Tail, circle_shape, rectangle_shape};
use crate::plausible::{self, Plausibility};
use crate::reported::Quantity;
use crate::{Figures, Joint, joint, joint_with};
use patternproof_audit::sweep::MIN_FOCAL;
use patternproof_core::donnelly::DONNELLY_MIN_N;
use serde::Serialize;

/// Largest perimeter/sqrt(area) tried for Donnelly's correction (a
/// rectangle about 900 times longer than wide).
pub const MAX_SHAPE: f64 = 60.0;

/// Shapes tried between a circle and [`MAX_SHAPE`] (log-spaced).
const SHAPE_STEPS: usize = 1200;

/// A reading or a slip.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum Kind {
    /// A legitimate analysis choice that would explain the figures.
    Reading,
    /// A correction to one figure that would make them agree.
    Slip,
}

/// One thing tried.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Explanation {
    /// `donnelly`, `guard-zone`, `other-n`, `z-sign`, `without-R`, …
    pub name: String,
    /// Reading or slip.
    pub kind: Kind,
    /// Whether it makes all figures agree.
    pub fits: bool,
    /// What was tried and what came out.
    pub detail: String,
    /// The range of the free parameter that fits (perimeter/sqrt(area),
    /// focal points, n, or the left-out figure), or `null`.
    pub range: Option<Interval>,
    /// For a fitting reading: the condition for the verdict line.
    #[serde(skip)]
    pub condition: Option<String>,
    /// For a fitting reading: whether an ordinary study could have used it,
    /// and what to ask the authors.
    pub plausibility: Option<Plausibility>,
}

/// Try every reading and slip on `f`.
pub fn explain(f: &Figures) -> Vec<Explanation> {
    let mut out = vec![donnelly(f)];
    if f.n > MIN_FOCAL {
        out.push(guard_zone(f));
    }
    out.push(other_n(f));
    if let Some(e) = z_sign(f) {
        out.push(e);
    }
    out.extend(odd_one_out(f));
    out
}

fn all(f: &Figures) -> Vec<Quantity> {
    f.given()
}

fn tail_note(f: &Figures, j: &Joint) -> &'static str {
    if !f.one_sided && f.has(Quantity::P) && j.tails == [Tail::OneSided] {
        " and the p-value is one-sided"
    } else {
        ""
    }
}

fn donnelly(f: &Figures) -> Explanation {
    let lo = circle_shape();
    let ratio = (MAX_SHAPE / lo).powf(1.0 / (SHAPE_STEPS - 1) as f64);
    let mut fit: Option<(f64, f64)> = None;
    let mut one_sided_only = true;
    let figures = all(f);
    for i in 0..SHAPE_STEPS {
        let s = lo * ratio.powi(i as i32);
        if let Some(j) = joint(f, &Model::donnelly(f.n, s), &figures) {
            fit = Some(fit.map_or((s, s), |(a, _)| (a, s)));
            if tail_note(f, &j).is_empty() {
                one_sided_only = false;
            }
        }
    }
    let range_note = if f.n < DONNELLY_MIN_N {
        format!(
            " (n = {} is below the n ≥ 7 the formula was fitted for)",
            f.n
        )
    } else {
        String::new()
    };
    match fit {
        Some((a, b)) => {
            let tail = if one_sided_only && f.has(Quantity::P) && !f.one_sided {
                " and the p-value is one-sided"
            } else {
                ""
            };
            let shape = shape_words(a, b);
            Explanation {
                name: "donnelly".into(),
                kind: Kind::Reading,
                fits: true,
                detail: format!(
                    "Donnelly's edge correction reproduces the figures in a window whose perimeter is {shape}{tail}{range_note}"
                ),
                range: Some(Interval::new(a, b)),
                condition: Some(format!(
                    "Donnelly's edge correction was used, in a window whose perimeter is {shape}{tail}"
                )),
                plausibility: Some(plausible::donnelly(Interval::new(a, b))),
            }
        }
        None => Explanation {
            name: "donnelly".into(),
            kind: Kind::Reading,
            fits: false,
            detail: format!(
                "Donnelly's edge correction does not reproduce the figures for any window shape from a circle to a very long strip (perimeter {} to {} × sqrt(area)){range_note}",
                crate::interval::number(lo),
                crate::interval::number(MAX_SHAPE)
            ),
            range: None,
            condition: None,
            plausibility: None,
        },
    }
}

/// "4.1–4.6 × sqrt(area) (a square has 4, a 2:1 rectangle 4.24, …)".
fn shape_words(a: f64, b: f64) -> String {
    use crate::interval::number;
    let span = if (b - a) <= 1e-9 * b {
        format!("{} × sqrt(area)", number(a))
    } else {
        format!("{}–{} × sqrt(area)", number(a), number(b))
    };
    format!(
        "{span} (a circle has {}, a square 4, a 2:1 rectangle {}, a 4:1 rectangle {})",
        number(circle_shape()),
        number(rectangle_shape(2.0)),
        number(rectangle_shape(4.0))
    )
}

fn guard_zone(f: &Figures) -> Explanation {
    let figures = all(f);
    let mut one_sided_only = true;
    let range = integer_range(MIN_FOCAL, f.n - 1, |m| {
        match joint(f, &Model::guard_zone(f.n, m), &figures) {
            Some(j) => {
                if tail_note(f, &j).is_empty() {
                    one_sided_only = false;
                }
                true
            }
            None => false,
        }
    });
    match range {
        Some((a, b)) => {
            let tail = if one_sided_only && f.has(Quantity::P) && !f.one_sided {
                " and the p-value is one-sided"
            } else {
                ""
            };
            let span = if a == b {
                format!("{a}")
            } else {
                format!("{a}–{b}")
            };
            Explanation {
                name: "guard-zone".into(),
                kind: Kind::Reading,
                fits: true,
                detail: format!(
                    "a guard-zone test with {span} of the {} points as focal points reproduces the figures{tail}",
                    f.n
                ),
                range: Some(Interval::new(a as f64, b as f64)),
                condition: Some(format!(
                    "a guard zone was used, leaving {span} of the {} points focal{tail}",
                    f.n
                )),
                plausibility: Some(plausible::guard_zone(
                    f.n,
                    Interval::new(a as f64, b as f64),
                )),
            }
        }
        None => Explanation {
            name: "guard-zone".into(),
            kind: Kind::Reading,
            fits: false,
            detail: format!(
                "no guard zone ({MIN_FOCAL} to {} focal points) reproduces the figures",
                f.n - 1
            ),
            range: None,
            condition: None,
            plausibility: None,
        },
    }
}

fn other_n(f: &Figures) -> Explanation {
    let figures = all(f);
    let hi = f.n.saturating_mul(100).max(10_000);
    let range = integer_range(2, hi, |n| {
        n != f.n && joint(&Figures { n, ..f.clone() }, &Model::plain(n), &figures).is_some()
    });
    match range {
        Some((a, b)) => {
            let span = if a == b {
                format!("{a}")
            } else if b == hi {
                format!("{a} or more (up to the {hi} tried)")
            } else {
                format!("{a}–{b}")
            };
            Explanation {
                name: "other-n".into(),
                kind: Kind::Slip,
                fits: true,
                detail: format!(
                    "the figures agree if n were {span} instead of {} (points removed or added, or a typo)",
                    f.n
                ),
                range: Some(Interval::new(a as f64, b as f64)),
                condition: None,
                plausibility: None,
            }
        }
        None => Explanation {
            name: "other-n".into(),
            kind: Kind::Slip,
            fits: false,
            detail: format!("no n between 2 and {hi} makes the figures agree"),
            range: None,
            condition: None,
            plausibility: None,
        },
    }
}

fn z_sign(f: &Figures) -> Option<Explanation> {
    let z = f.get(Quantity::Z)?;
    if z.interval.contains(0.0) || f.given().len() < 2 {
        return None;
    }
    let flipped = Interval::new(-z.interval.high, -z.interval.low);
    let fits = joint_with(f, &Model::plain(f.n), &all(f), &[(Quantity::Z, flipped)]).is_some();
    Some(Explanation {
        name: "z-sign".into(),
        kind: Kind::Slip,
        fits,
        detail: if fits {
            format!(
                "with the sign of z flipped ({flipped}) the figures agree: a typo, or z computed as (E − D)/SE"
            )
        } else {
            "flipping the sign of z does not make the figures agree".into()
        },
        range: fits.then_some(flipped),
        condition: None,
        plausibility: None,
    })
}

fn odd_one_out(f: &Figures) -> Vec<Explanation> {
    let given = f.given();
    if given.len() < 2 {
        return Vec::new();
    }
    let plain = Model::plain(f.n);
    given
        .iter()
        .filter_map(|&q| {
            let rest: Vec<Quantity> = given.iter().copied().filter(|x| *x != q).collect();
            let j = joint(f, &plain, &rest)?;
            // Only informative when the others pin the left-out figure down.
            let iv = j.domains.get(q);
            let pinned = match q {
                Quantity::P => iv.high < 1.0 || iv.low > 0.0,
                _ => iv.is_bounded(),
            };
            if !pinned {
                return None;
            }
            let r = f.get(q)?;
            Some(Explanation {
                name: format!("without-{}", q.symbol()),
                kind: Kind::Slip,
                fits: true,
                detail: format!(
                    "without {} the other figures agree; they imply {} in {iv}",
                    r.quoted(),
                    q.symbol()
                ),
                range: Some(iv),
                condition: None,
                plausibility: None,
            })
        })
        .collect()
}

/// The smallest and largest k in `lo..=hi` with `ok(k)`, assuming the set
/// where `ok` holds is one run of integers. Every k is tried when the
/// range is short; otherwise a log-spaced grid is tried and its ends are
/// refined by bisection.
pub fn integer_range(
    lo: usize,
    hi: usize,
    mut ok: impl FnMut(usize) -> bool,
) -> Option<(usize, usize)> {
    if lo > hi {
        return None;
    }
    if hi - lo <= 4000 {
        let mut first = None;
        let mut last = None;
        for k in lo..=hi {
            if ok(k) {
                first.get_or_insert(k);
                last = Some(k);
            }
        }
        return first.zip(last);
    }
    let steps = 4000usize;
    let ratio = (hi as f64 / lo as f64).powf(1.0 / steps as f64);
    let mut grid: Vec<usize> = (0..=steps)
        .map(|i| ((lo as f64) * ratio.powi(i as i32)).round() as usize)
        .map(|k| k.clamp(lo, hi))
        .collect();
    grid.dedup();
    let hits: Vec<usize> = grid.iter().copied().filter(|&k| ok(k)).collect();
    let (&first, &last) = (hits.first()?, hits.last()?);
    // Refine the lower end: ok(first), and below the previous grid point not.
    let below = grid
        .iter()
        .copied()
        .filter(|&k| k < first)
        .max()
        .unwrap_or(lo);
    let low = if ok(below) {
        below
    } else {
        bisect(below, first, |k| !ok(k)).1
    };
    // Refine the upper end the same way, up to the next grid point.
    let above = grid
        .iter()
        .copied()
        .filter(|&k| k > last)
        .min()
        .unwrap_or(hi);
    let high = if ok(above) {
        above
    } else {
        bisect(last, above, &mut ok).0
    };
    Some((low, high))
}

/// Where `before` stops holding between `a` (it holds) and `b > a` (it
/// does not): the last k with `before(k)` and the first k without.
fn bisect(mut a: usize, mut b: usize, mut before: impl FnMut(usize) -> bool) -> (usize, usize) {
    while b - a > 1 {
        let m = a + (b - a) / 2;
        if before(m) { a = m } else { b = m }
    }
    (a, b)
}

#[cfg(test)]
mod tests {
    #![allow(clippy::unwrap_used)]
    use super::*;
    use crate::test_figures::figs;
    use approx::abs_diff_eq;

    #[test]
    fn integer_range_finds_a_run() {
        assert_eq!(
            integer_range(2, 100, |k| (30..=40).contains(&k)),
            Some((30, 40))
        );
        assert_eq!(
            integer_range(2, 1_000_000, |k| (5000..=5200).contains(&k)),
            Some((5000, 5200))
        );
        assert_eq!(integer_range(2, 100, |_| false), None);
    }

    /// The issue's example: with n = 64 the plain z from R = 0.71 is
    /// −4.44; z = −4.9 needs sqrt(n) = 4.9/(0.29·1.91306), so n ≈ 74–82
    /// over the rounding ranges (hand computation from Clark & Evans 1954).
    /// Donnelly's correction and a guard zone both shrink |z| for the same
    /// R, so neither explains a larger |z|.
    #[test]
    fn issue_example_points_at_n() {
        let f = figs(
            64,
            &[
                (Quantity::Ratio, "0.71"),
                (Quantity::Z, "-4.9"),
                (Quantity::P, "<0.001"),
            ],
        );
        let e = explain(&f);
        let by = |name: &str| e.iter().find(|x| x.name == name).unwrap();
        assert!(!by("donnelly").fits);
        assert!(!by("guard-zone").fits);
        let n = by("other-n");
        assert!(n.fits);
        let r = n.range.unwrap();
        assert!(
            abs_diff_eq!(r.low, 74.0, epsilon = 1.0) && abs_diff_eq!(r.high, 82.0, epsilon = 1.0),
            "{r}"
        );
        let r_out = by("without-R").range.unwrap();
        // R = 1 + z/15.3045 over z in [−4.95, −4.85].
        assert!(
            abs_diff_eq!(r_out.low, 0.6766, epsilon = 1e-3)
                && abs_diff_eq!(r_out.high, 0.6831, epsilon = 1e-3),
            "{r_out}"
        );
    }

    /// Donnelly (1978) by hand for a square (shape 4), n = 100, R = 0.90:
    /// E/sqrt(A) = 0.05 + 0.0555·0.04 = 0.05222, SE/sqrt(A) =
    /// sqrt(0.0703e-4 + 0.148e-5) = 0.0029172, z = −0.1·17.90 = −1.790.
    /// The plain z for R = 0.90 is −1.913, so z = −1.79 is plain-inconsistent
    /// and Donnelly-consistent with a shape near 4.
    #[test]
    fn donnelly_explains_a_smaller_z() {
        let f = figs(100, &[(Quantity::Ratio, "0.900"), (Quantity::Z, "-1.79")]);
        let e = explain(&f);
        let d = e.iter().find(|x| x.name == "donnelly").unwrap();
        assert!(d.fits, "{}", d.detail);
        assert!(d.range.unwrap().contains(4.0), "{:?}", d.range);
        let g = e.iter().find(|x| x.name == "guard-zone").unwrap();
        // Guard zone: sqrt(m) = 1.79/(0.1·1.91306) → m ≈ 87–88.
        assert!(g.fits && g.range.unwrap().contains(88.0), "{:?}", g.range);
    }
}
