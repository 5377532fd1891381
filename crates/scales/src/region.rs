//! A window prepared for the geometric questions the estimators ask many
//! times: which ring edges come near a circle, is a point inside, how far
//! is a point from the outline.
//!
//! Every ring edge (exteriors and holes alike) sits in an R*-tree, so each
//! question touches only the edges near the point or circle. Inside-ness is
//! the even–odd crossing rule over all rings, which is exact for polygons
//! with holes and for several disjoint polygons.

use geo::{Area, BoundingRect, MultiPolygon};
use patternproof_core::Xy;
use patternproof_core::toroidal::Rect;
use rstar::primitives::Line;
use rstar::{AABB, PointDistance, RTree};

/// One window, indexed.
#[derive(Debug, Clone)]
pub struct Region {
    /// The outline.
    pub shape: MultiPolygon<f64>,
    /// Area |W|.
    pub area: f64,
    /// Bounding rectangle `[min, max]`.
    pub bounds: [Xy; 2],
    /// Set when the window is one axis-aligned rectangle without holes, so
    /// that the closed-form translation weight applies.
    pub rectangle: Option<Rect>,
    /// Tabulated overlaps |W ∩ (W + v)| for the translation weight, set by
    /// a run with many pairs ([`crate::translation::worth_a_table`]).
    pub overlap_table: Option<crate::translation::OverlapTable>,
    edges: RTree<Line<Xy>>,
}

impl Region {
    /// Index `shape`. `None` when it has no area. `rectangle` is the
    /// window's own note that it is an axis-aligned rectangle (as
    /// `patternproof_audit::Window::rectangle`), or `None`.
    pub fn new(shape: &MultiPolygon<f64>, rectangle: Option<Rect>) -> Option<Self> {
        let area = shape.unsigned_area();
        let r = shape.bounding_rect()?;
        if !(area > 0.0 && area.is_finite()) {
            return None;
        }
        let mut lines = Vec::new();
        for poly in shape {
            for ring in std::iter::once(poly.exterior()).chain(poly.interiors()) {
                for seg in ring.lines() {
                    if seg.start != seg.end {
                        lines.push(Line::new(
                            [seg.start.x, seg.start.y],
                            [seg.end.x, seg.end.y],
                        ));
                    }
                }
            }
        }
        Some(Self {
            shape: shape.clone(),
            area,
            bounds: [[r.min().x, r.min().y], [r.max().x, r.max().y]],
            rectangle,
            overlap_table: None,
            edges: RTree::bulk_load(lines),
        })
    }

    /// The shorter side of the bounding rectangle (for the default r_max).
    pub fn shorter_side(&self) -> f64 {
        (self.bounds[1][0] - self.bounds[0][0]).min(self.bounds[1][1] - self.bounds[0][1])
    }

    /// Ring edges whose bounding box meets the square around `c` of
    /// half-width `r`: every edge a circle of radius `r` about `c` can cut.
    pub fn edges_near(&self, c: Xy, r: f64) -> impl Iterator<Item = &Line<Xy>> {
        let env = AABB::from_corners([c[0] - r, c[1] - r], [c[0] + r, c[1] + r]);
        self.edges.locate_in_envelope_intersecting(&env)
    }

    /// Even–odd rule: a horizontal ray from `p` to the right crosses the
    /// rings an odd number of times exactly when `p` is inside. Points on
    /// the outline may go either way (a set of zero area).
    pub fn contains(&self, p: Xy) -> bool {
        if p[0] > self.bounds[1][0] || p[0] < self.bounds[0][0] {
            return false;
        }
        let env = AABB::from_corners(p, [self.bounds[1][0] + 1.0, p[1]]);
        let mut inside = false;
        for l in self.edges.locate_in_envelope_intersecting(&env) {
            let (a, b) = (l.from, l.to);
            if (a[1] > p[1]) != (b[1] > p[1]) {
                let x = a[0] + (p[1] - a[1]) / (b[1] - a[1]) * (b[0] - a[0]);
                if x > p[0] {
                    inside = !inside;
                }
            }
        }
        inside
    }

    /// Distance from `p` to the nearest ring edge (holes included).
    pub fn distance_to_outline(&self, p: Xy) -> f64 {
        self.edges
            .nearest_neighbor(&p)
            .map_or(f64::INFINITY, |l| l.distance_2(&p).sqrt())
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use approx::assert_abs_diff_eq;
    use geo::{LineString, Polygon};

    fn holed() -> MultiPolygon<f64> {
        let ring = |v: Vec<(f64, f64)>| LineString::from(v);
        MultiPolygon::new(vec![Polygon::new(
            ring(vec![(0., 0.), (10., 0.), (10., 10.), (0., 10.), (0., 0.)]),
            vec![ring(vec![(4., 4.), (6., 4.), (6., 6.), (4., 6.), (4., 4.)])],
        )])
    }

    /// Inside-ness and outline distance against `geo` on a lattice
    /// (independent implementation: geo's `Contains` and `Distance`).
    #[test]
    fn contains_and_distance_agree_with_geo() {
        use geo::{Contains, Distance, Euclidean, Point};
        let shape = holed();
        let reg = Region::new(&shape, None).expect("area");
        assert_abs_diff_eq!(reg.area, 96.0, epsilon = 1e-12);
        for i in 0..=50 {
            for j in 0..=50 {
                let p = [-1.0 + i as f64 * 0.2417, -1.0 + j as f64 * 0.2391];
                let pt = Point::new(p[0], p[1]);
                assert_eq!(reg.contains(p), shape.contains(&pt), "{p:?}");
                let want = shape
                    .iter()
                    .flat_map(|poly| std::iter::once(poly.exterior()).chain(poly.interiors()))
                    .map(|r| Euclidean.distance(&pt, r))
                    .fold(f64::INFINITY, f64::min);
                assert_abs_diff_eq!(reg.distance_to_outline(p), want, epsilon = 1e-12);
            }
        }
    }
}
