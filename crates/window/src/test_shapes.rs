//! Axis-aligned test windows and a seeded generator shared by the unit
//! tests of this crate.

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

/// xorshift64*: a tiny self-contained generator for test data only.
pub struct Gen(pub u64);

impl Gen {
    /// Uniform in [0, 1), 53 bits.
    pub fn unit(&mut self) -> f64 {
        self.0 ^= self.0 >> 12;
        self.0 ^= self.0 << 25;
        self.0 ^= self.0 >> 27;
        (self.0.wrapping_mul(0x2545_F491_4F6C_DD1D) >> 11) as f64 / (1u64 << 53) as f64
    }
}
