//! Axis-aligned test windows shared by the unit tests of this crate.

use geo::{LineString, MultiPolygon, Polygon};

/// The ring of the rectangle [x0, x1] × [y0, y1], counter-clockwise.
pub fn rect_ring(x0: f64, y0: f64, x1: f64, y1: f64) -> LineString<f64> {
    LineString::from(vec![(x0, y0), (x1, y0), (x1, y1), (x0, y1), (x0, y0)])
}

/// The rectangle [0, w] × [0, h].
pub fn rectangle(w: f64, h: f64) -> MultiPolygon<f64> {
    MultiPolygon::new(vec![Polygon::new(rect_ring(0.0, 0.0, w, h), vec![])])
}

/// The rectangle [0, w] × [0, h] with the rectangular hole `[x0, y0, x1, y1]`.
pub fn rectangle_with_hole(w: f64, h: f64, hole: [f64; 4]) -> MultiPolygon<f64> {
    MultiPolygon::new(vec![Polygon::new(
        rect_ring(0.0, 0.0, w, h),
        vec![rect_ring(hole[0], hole[1], hole[2], hole[3])],
    )])
}
