//! Coordinates that floating point can measure.
//!
//! Every distance and area downstream is a difference, a square or a
//! cross product of coordinates in `f64`. Three kinds of input make those
//! silently wrong rather than failing: numbers so large that squares
//! overflow (a point-in-polygon test then says "outside" for every point),
//! a spread so small that areas underflow to zero, and a spread so narrow
//! beside the coordinates' size that only a few distinct values fit across
//! it (distances come out rounded to a coarse step). Such input is refused
//! with the numbers involved and what to do, for points and boundary
//! vertices alike.

use crate::error::{InputError, InputErrorKind};
use crate::points::Place;
use std::path::Path;

/// Largest accepted |coordinate| in the file's unit. No map position in
/// any unit comes near: the Earth's circumference is 4·10⁷ m, 4·10¹⁰ mm.
/// Below it, squares (10²⁶) and the cross products of area and
/// point-in-polygon tests stay far from overflow.
pub const MAX_COORDINATE: f64 = 1e13;

/// Smallest accepted spread (the larger of the x and y ranges) in the
/// file's unit. No pattern measured in a sensible unit spreads over less
/// (a picometre, in metres). Above it, areas (≥ 10⁻²⁴), intensities n/A
/// and the densities of the 32-bit GeoTIFF surface (≤ 3·10³⁸) stay well
/// inside floating point; a few orders of magnitude below, the densities
/// overflow and areas of thin windows underflow.
pub const MIN_SPREAD: f64 = 1e-12;

/// Fewest representable steps across the spread. Coordinates are rounded
/// to one step (an ulp at their magnitude); with a million steps a
/// distance is off by at most a few millionths of the spread, well under
/// the printed digits. Fewer means the coordinates carry a large common
/// offset that swallows their differences.
pub const MIN_STEPS: f64 = 1e6;

/// Largest accepted area (unit²) given as a number (`audit --area`): the
/// square of [`MAX_COORDINATE`]. The Earth's surface is 5.1·10¹⁴ m².
pub const MAX_AREA: f64 = MAX_COORDINATE * MAX_COORDINATE;

/// Smallest accepted area (unit²) given as a number: the square of
/// [`MIN_SPREAD`].
pub const MIN_AREA: f64 = MIN_SPREAD * MIN_SPREAD;

/// The spacing of `f64` values at `v`'s magnitude (one ulp).
fn ulp(v: f64) -> f64 {
    let a = v.abs();
    if !a.is_finite() {
        return f64::NAN;
    }
    f64::from_bits(a.to_bits() + 1) - a
}

/// Bounds of a set of coordinates: (min, max) per axis.
struct Bounds {
    lo: [f64; 2],
    hi: [f64; 2],
}

impl Bounds {
    fn of<'a>(coords: impl Iterator<Item = &'a [f64; 2]>) -> Option<Self> {
        let mut b = Bounds {
            lo: [f64::INFINITY; 2],
            hi: [f64::NEG_INFINITY; 2],
        };
        let mut any = false;
        for c in coords {
            any = true;
            for (k, v) in c.iter().enumerate() {
                b.lo[k] = b.lo[k].min(*v);
                b.hi[k] = b.hi[k].max(*v);
            }
        }
        any.then_some(b)
    }

    fn spread(&self) -> f64 {
        (self.hi[0] - self.lo[0]).max(self.hi[1] - self.lo[1])
    }

    fn largest(&self) -> f64 {
        self.lo
            .iter()
            .chain(&self.hi)
            .fold(0.0_f64, |m, v| m.max(v.abs()))
    }

    fn shown(&self) -> String {
        format!(
            "x {}..{}, y {}..{}",
            number(self.lo[0]),
            number(self.hi[0]),
            number(self.lo[1]),
            number(self.hi[1])
        )
    }
}

/// A coordinate as the user wrote it when it has a plain decimal form of
/// reasonable length, in scientific notation otherwise (`1e-308` rather
/// than three hundred zeros).
fn number(v: f64) -> String {
    if v == 0.0 || (1e-4..1e15).contains(&v.abs()) {
        format!("{v}")
    } else {
        format!("{v:e}")
    }
}

/// The first coordinate beyond [`MAX_COORDINATE`], as (index, axis).
fn first_too_large<'a>(coords: impl Iterator<Item = &'a [f64; 2]>) -> Option<(usize, usize)> {
    coords.enumerate().find_map(|(i, c)| {
        (0..2)
            .find(|&k| !(c[k].abs() <= MAX_COORDINATE))
            .map(|k| (i, k))
    })
}

fn too_large(file: &Path, what: &str, axis: usize, value: f64) -> InputError {
    if !value.is_finite() {
        return InputError::new(
            InputErrorKind::BadCoordinate,
            file,
            format!(
                "{what} {} is {value}, not a finite number",
                ["x", "y"][axis]
            ),
            "fix or remove it: a missing or infinite coordinate cannot be placed",
        );
    }
    InputError::new(
        InputErrorKind::Magnitude,
        file,
        format!(
            "{what} {} = {value:e} lies beyond ±{MAX_COORDINATE:e}, farther out than any map position in any unit (the Earth's circumference is 4·10⁷ m, 4·10¹⁰ mm); distances and areas this large cannot be computed reliably",
            ["x", "y"][axis]
        ),
        "check the column and its unit: a number this large is an export or unit error; give planar coordinates of the study area in m, ft or mm",
    )
}

/// The spread checks shared by points and boundaries; `what` names them
/// in the message ("the points", "the boundary's vertices").
fn check_spread(file: &Path, what: &str, b: &Bounds) -> Result<(), InputError> {
    let spread = b.spread();
    if spread == 0.0 {
        // One place (or a line along an axis): the callers have their
        // own words for it.
        return Ok(());
    }
    if spread < MIN_SPREAD {
        return Err(InputError::new(
            InputErrorKind::Magnitude,
            file,
            format!(
                "{what} spread over only {spread:e} ({}): below {MIN_SPREAD:e}, areas and intensities leave the range floating point can hold",
                b.shown()
            ),
            "express the coordinates in a smaller unit (e.g. µm instead of m: multiply by 10⁶) and name it with --unit",
        ));
    }
    let steps = spread / ulp(b.largest());
    if steps < MIN_STEPS {
        return Err(InputError::new(
            InputErrorKind::Magnitude,
            file,
            format!(
                "{what} spread over only {spread:e} at coordinates as large as {:e} ({}): floating point holds just {:.0} distinct values across that spread, so every distance would be rounded to 1/{:.0} of it",
                b.largest(),
                b.shown(),
                steps.floor(),
                steps.floor()
            ),
            "subtract a local origin (e.g. the smallest x and y) from every coordinate, so that the numbers are about as large as the spread, and try again",
        ));
    }
    Ok(())
}

/// Refuse point coordinates that floating point cannot measure: beyond
/// [`MAX_COORDINATE`] (named with the point's place; skipped for lon/lat,
/// whose range check is stricter), or spread too little for their size.
pub(crate) fn check_points(
    file: &Path,
    coords: &[[f64; 2]],
    places: &[Place],
    planar: bool,
) -> Result<(), InputError> {
    if planar && let Some((i, k)) = first_too_large(coords.iter()) {
        let e = too_large(file, "the point's", k, coords[i][k]);
        return Err(match places.get(i) {
            Some(p) => e.at(p.to_string()),
            None => e,
        });
    }
    match Bounds::of(coords.iter()) {
        Some(b) => check_spread(file, "the points", &b),
        None => Ok(()),
    }
}

/// The same checks for a boundary's vertices, in the file's coordinates.
pub(crate) fn check_boundary(
    file: &Path,
    shape: &geo::MultiPolygon<f64>,
    planar: bool,
) -> Result<(), InputError> {
    let vertices: Vec<[f64; 2]> = shape
        .0
        .iter()
        .flat_map(|p| std::iter::once(p.exterior()).chain(p.interiors()))
        .flat_map(|ring| ring.0.iter().map(|c| [c.x, c.y]))
        .collect();
    if planar && let Some((i, k)) = first_too_large(vertices.iter()) {
        return Err(too_large(file, "a vertex's", k, vertices[i][k]));
    }
    match Bounds::of(vertices.iter()) {
        Some(b) => check_spread(file, "the boundary's vertices", &b),
        None => Ok(()),
    }
}

#[cfg(test)]
#[allow(clippy::unwrap_used)] // a failed unwrap is a failed test
mod tests {
    use super::*;

    fn places(n: usize) -> Vec<Place> {
        (0..n).map(|i| Place::Line(i as u64 + 2)).collect()
    }

    #[test]
    fn ulp_is_the_gap_to_the_next_double() {
        assert_eq!(ulp(1.0), f64::EPSILON);
        // 2^19 ≤ 1e6 < 2^20: the gap is 2^(19−52).
        assert_eq!(ulp(1e6), 2f64.powi(-33));
        assert_eq!(ulp(-1e6), 2f64.powi(-33));
    }

    /// Survey coordinates pass; 1.06·10³⁰³ and −2·10¹³ are refused with
    /// the line; lon/lat skips the magnitude test (its range is checked
    /// elsewhere).
    #[test]
    fn magnitudes_beyond_any_map_are_refused() {
        let file = Path::new("p.csv");
        let ok = [[512_000.5, 5_600_000.25], [512_010.0, 5_600_003.0]];
        assert!(check_points(file, &ok, &places(2), true).is_ok());
        let huge = [[1.0, 2.0], [1.06e303, 3.0], [4.0, 5.0]];
        let e = check_points(file, &huge, &places(3), true).unwrap_err();
        assert_eq!(e.kind, InputErrorKind::Magnitude, "{e}");
        assert_eq!(e.location.as_deref(), Some("line 3"));
        assert!(e.what.contains("x = 1.06e303"), "{}", e.what);
        let far = [[1.0, -2e13], [3.0, 4.0]];
        let e = check_points(file, &far, &places(2), true).unwrap_err();
        assert_eq!(e.kind, InputErrorKind::Magnitude, "{e}");
        assert!(e.what.contains("y = -2e13"), "{}", e.what);
        assert!(check_points(file, &[[1.0, 1e13], [3.0, 4.0]], &places(2), true).is_ok());
        let e = check_points(file, &[[1.0, 2.0], [f64::NAN, 4.0]], &places(2), true).unwrap_err();
        assert_eq!(e.kind, InputErrorKind::BadCoordinate, "{e}");
        assert!(
            e.what.contains("x is NaN, not a finite number"),
            "{}",
            e.what
        );
    }

    /// Spreads of 10⁻³⁰⁸ (subnormal) and 10⁻¹³ are refused, 10⁻¹¹ passes;
    /// one place (spread 0) is left to the callers.
    #[test]
    fn spreads_too_small_to_measure_are_refused() {
        let file = Path::new("p.csv");
        let sub = [[0.0, 0.0], [2e-308, 1e-308]];
        let e = check_points(file, &sub, &places(2), true).unwrap_err();
        assert_eq!(e.kind, InputErrorKind::Magnitude, "{e}");
        assert!(
            e.what
                .contains("spread over only 2e-308 (x 0..2e-308, y 0..1e-308)"),
            "{}",
            e.what
        );
        assert!(e.hint.contains("smaller unit"));
        let e = check_points(file, &[[0.0, 0.0], [1e-13, 0.0]], &places(2), true).unwrap_err();
        assert_eq!(e.kind, InputErrorKind::Magnitude, "{e}");
        assert!(e.what.contains("1e-13"), "{}", e.what);
        assert!(check_points(file, &[[0.0, 0.0], [1e-11, 0.0]], &places(2), true).is_ok());
        assert!(check_points(file, &[[5.0, 5.0], [5.0, 5.0]], &places(2), true).is_ok());
    }

    /// A spread of 10⁻⁷ at 10⁶ holds 10⁻⁷ / 2⁻³³ ≈ 859 steps: refused with
    /// that count; 10⁻³ at 10⁶ holds 8.6·10⁶ steps and passes.
    #[test]
    fn a_large_common_offset_that_swallows_the_spread_is_refused() {
        let file = Path::new("p.csv");
        let narrow = [[1e6, 1e6], [1e6 + 1e-7, 1e6 + 0.5e-7]];
        let e = check_points(file, &narrow, &places(2), true).unwrap_err();
        assert_eq!(e.kind, InputErrorKind::Magnitude, "{e}");
        assert!(e.what.contains("just 859 distinct values"), "{}", e.what);
        assert!(e.hint.contains("subtract a local origin"));
        let fine = [[1e6, 1e6], [1e6 + 1e-3, 1e6]];
        assert!(check_points(file, &fine, &places(2), true).is_ok());
    }

    #[test]
    fn boundary_vertices_get_the_same_checks() {
        let file = Path::new("b.wkt");
        let square = |lo: f64, hi: f64| {
            geo::MultiPolygon(vec![geo::Polygon::new(
                geo::LineString::from(vec![(lo, lo), (hi, lo), (hi, hi), (lo, hi), (lo, lo)]),
                vec![],
            )])
        };
        assert!(check_boundary(file, &square(0.0, 10.0), true).is_ok());
        let e = check_boundary(file, &square(-1e300, 1e300), true).unwrap_err();
        assert_eq!(e.kind, InputErrorKind::Magnitude, "{e}");
        assert!(e.what.contains("a vertex's x = -1e300"), "{}", e.what);
        let e = check_boundary(file, &square(0.0, 1e-309), true).unwrap_err();
        assert_eq!(e.kind, InputErrorKind::Magnitude, "{e}");
        assert!(e.what.contains("boundary's vertices spread"), "{}", e.what);
    }
}
