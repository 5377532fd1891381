//! A window as the K estimators use it: its prepared geometry
//! ([`PreparedWindow`]: edges near a circle, point-in-window, distance to
//! the outline — exact for a buffered hull, as the audit's guard zone
//! measures it) and, for long runs, the translation overlap table.

use crate::translation::OverlapTable;
use geo::MultiPolygon;
use patternproof_core::Rectangle;
use patternproof_window::{PreparedWindow, Window};

/// One window, prepared for the estimators.
#[derive(Debug, Clone)]
pub struct KWindow {
    /// The outline, prepared for geometric queries.
    pub geometry: PreparedWindow,
    /// Bounding rectangle.
    pub bounds: Rectangle,
    /// Tabulated overlaps |W ∩ (W + v)| for the translation weight, set by
    /// a run with many pairs ([`crate::translation::worth_a_table`]).
    pub overlap_table: Option<OverlapTable>,
}

impl KWindow {
    /// Wrap a prepared window; `None` when it has no positive finite area.
    pub fn prepared(geometry: PreparedWindow) -> Option<Self> {
        let bounds = geometry.bounds()?;
        let area = geometry.area();
        (area > 0.0 && area.is_finite()).then_some(Self {
            geometry,
            bounds,
            overlap_table: None,
        })
    }

    /// Prepare `shape`; `rectangle` is the window's own note that it is an
    /// axis-aligned rectangle ([`Window::rectangle`]), or `None`. `None`
    /// when it has no area.
    pub fn new(shape: &MultiPolygon<f64>, rectangle: Option<Rectangle>) -> Option<Self> {
        Self::prepared(PreparedWindow::new(shape.clone(), rectangle))
    }

    /// Prepare a window of the sweep ([`PreparedWindow::of`]: a buffered
    /// hull measures outline distances from the exact buffer). `None` for
    /// a bare area or an outline without area.
    pub fn of(window: &Window) -> Option<Self> {
        Self::prepared(PreparedWindow::of(window)?)
    }

    /// The shorter side of the bounding rectangle (for the default r_max).
    pub fn shorter_side(&self) -> f64 {
        self.bounds.width().min(self.bounds.height())
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::border::{counted_ends, counted_up_to, outline_distances};
    use crate::distance_grid;
    use geo::{Distance, Euclidean, Intersects, Point};
    use patternproof_core::Xy;
    use patternproof_window::{BufferRule, WindowKind, WindowOptions, build_windows};

    /// The K function's `border` correction and the audit's `border` row
    /// count the same centres in a buffered hull: b_i ≥ w exactly when the
    /// guard zone (the audit's `PreparedWindow::guard_zone`) finds x_i
    /// clear of w. Both measure to the exact buffer, checked against the
    /// parallel body of a convex set (D + t inside the hull, D − t outside,
    /// t from geo's `Euclidean` distance to the hull, the side from geo's
    /// `Intersects`; Steiner's formula rests on the same fact, METHODS.md).
    /// The hull's corners are data points at exactly D from the buffer.
    #[test]
    fn k_border_and_nn_border_measure_the_same_distance_in_a_buffered_hull() {
        let mut state = 0x9E37_79B9_7F4A_7C15u64;
        let mut unit = || {
            state ^= state >> 12;
            state ^= state << 25;
            state ^= state >> 27;
            (state.wrapping_mul(0x2545_F491_4F6C_DD1D) >> 11) as f64 / (1u64 << 53) as f64
        };
        let points: Vec<Xy> = (0..300).map(|_| [unit() * 80.0, unit() * 50.0]).collect();
        let options = WindowOptions {
            buffers: vec![BufferRule::Distance(3.0), BufferRule::Distance(7.5)],
            ..WindowOptions::default()
        };
        let (windows, _) = build_windows(&points, 2.0, &[], &options);
        let mut checked = 0;
        for w in windows
            .iter()
            .filter(|w| w.kind == WindowKind::BufferedHull)
        {
            let d = w.buffer.expect("a buffered hull has its buffer");
            let hull = w.hull.as_ref().expect("a buffered hull keeps its hull");
            let k = KWindow::of(w).expect("the window has area");
            let b = outline_distances(&k, &points, false);
            for (p, &bi) in points.iter().zip(&b) {
                let q = Point::new(p[0], p[1]);
                let t = Euclidean.distance(&q, hull.exterior());
                let exact = if hull.intersects(&q) { d + t } else { d - t };
                assert!((bi - exact).abs() <= 1e-9 * exact, "{p:?}: {bi} vs {exact}");
            }
            // What the K sums count: each centre up to the grid distances
            // its b_i reaches.
            let grid = distance_grid(15.0, 300);
            let ends: Vec<u32> = b
                .iter()
                .map(|&bi| counted_up_to(&grid, bi) as u32)
                .collect();
            assert_eq!(counted_ends(&k, &grid, &points, true), ends);
            let prepared = PreparedWindow::of(w).expect("outline");
            for guard in [1.0, d, 0.5 * (d + 9.0), 9.0, 12.0] {
                let zone = prepared.guard_zone(guard);
                for (p, &bi) in points.iter().zip(&b) {
                    assert_eq!(zone.clear_of(*p, guard), bi >= guard, "{p:?} guard {guard}");
                }
            }
            checked += 1;
        }
        assert_eq!(checked, 2);
    }
}
