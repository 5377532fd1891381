//! Nearest-neighbour distances on a torus.
//!
//! Opposite sides of a rectangular window are identified, so a point near
//! the left edge may find its neighbour just across the right edge: every
//! point then "sees" a full neighbourhood and the edge bias of the plain
//! statistic disappears (Diggle 2003, ch. 2). Only meaningful for
//! rectangles; the audit offers it for `bbox` and rectangular boundaries.
//!
//! Method: the bucket grid of [`crate::grid_nearest`] laid over the
//! rectangle, its rings wrapping around; each candidate is measured
//! against the query's nine shifted copies (±width, ±height). Where the
//! grid does not pay (heavily clustered data) or a point lies outside the
//! rectangle, one R*-tree of the points is queried at the point's own
//! place and at the eight shifted copies, skipping itself, and the
//! shortest of the nine answers is the torus distance. Both give the same
//! bits.

use crate::nearest::Distances;
use crate::{Rectangle, Xy};
use rayon::prelude::*;
use rstar::RTree;
use rstar::primitives::GeomWithData;

/// Torus nearest-neighbour distance of every point in `rect`, input order.
/// `None` for fewer than two points or an empty rectangle.
///
/// ```
/// use patternproof_core::Rectangle;
/// use patternproof_core::toroidal::torus_nearest_distances;
/// let r = Rectangle { min: [0.0, 0.0], max: [10.0, 10.0] };
/// // 0.5 and 9.5 are 1 apart across the wrap, 9 apart in the plane.
/// let d = torus_nearest_distances(&[[0.5, 5.0], [9.5, 5.0]], r).unwrap();
/// assert!((d[0] - 1.0).abs() < 1e-12 && (d[1] - 1.0).abs() < 1e-12);
/// ```
pub fn torus_nearest_distances(points: &[Xy], rect: Rectangle) -> Option<Vec<f64>> {
    let (w, h) = (rect.max[0] - rect.min[0], rect.max[1] - rect.min[1]);
    if points.len() < 2 || !(w > 0.0 && h > 0.0) {
        return None;
    }
    let mut d = Distances::new();
    d.measure(points, Some(rect));
    Some(d.torus)
}

/// The R*-tree engine alone: same answers as [`torus_nearest_distances`],
/// kept public as the fallback and for comparing the two engines. `None`
/// for fewer than two points or an empty rectangle.
pub fn torus_tree_distances(points: &[Xy], rect: Rectangle) -> Option<Vec<f64>> {
    let (w, h) = (rect.max[0] - rect.min[0], rect.max[1] - rect.min[1]);
    if points.len() < 2 || !(w > 0.0 && h > 0.0) {
        return None;
    }
    let tree: RTree<GeomWithData<Xy, usize>> = RTree::bulk_load(
        points
            .iter()
            .enumerate()
            .map(|(i, p)| GeomWithData::new(*p, i))
            .collect(),
    );
    Some(
        points
            .par_iter()
            .enumerate()
            .map(|(i, p)| {
                let mut best = f64::INFINITY;
                for dx in [-w, 0.0, w] {
                    for dy in [-h, 0.0, h] {
                        let q = [p[0] + dx, p[1] + dy];
                        let found = tree
                            .nearest_neighbor_iter_with_distance_2(&q)
                            .find(|(item, _)| item.data != i);
                        if let Some((_, d2)) = found {
                            best = best.min(d2);
                        }
                    }
                }
                best.sqrt()
            })
            .collect(),
    )
}

#[cfg(test)]
mod tests {
    use super::*;
    use approx::abs_diff_eq;

    /// A point outside the rectangle (which the grid cannot wrap) sends
    /// the whole pattern to the R*-tree: same answer as the tree alone,
    /// and by hand on the 10 × 10 torus: (9, 1) is 2 from (11, 1) in the
    /// plane and √8 from (1, 9) across both wraps; (1, 9) shifted by
    /// (10, −10) is (11, −1), 2 from (11, 1).
    #[test]
    fn a_point_outside_falls_back_to_the_tree() {
        let r = Rectangle {
            min: [0.0, 0.0],
            max: [10.0, 10.0],
        };
        let pts = [[9.0, 1.0], [11.0, 1.0], [1.0, 9.0]];
        let d = torus_nearest_distances(&pts, r).expect("three points");
        assert_eq!(d, torus_tree_distances(&pts, r).expect("three points"));
        assert_eq!(d, vec![2.0, 2.0, 2.0]);
    }

    /// Brute force over all pairs with the wrapped coordinate difference
    /// min(|dx|, w − |dx|) (definition of the flat torus; common practice).
    #[test]
    fn agrees_with_brute_force() {
        let rect = Rectangle {
            min: [2.0, -1.0],
            max: [12.0, 5.0],
        };
        // A fixed, irregular set built from a small linear congruential rule.
        let mut s: u64 = 12345;
        let mut pts = Vec::new();
        for _ in 0..200 {
            s = s
                .wrapping_mul(6364136223846793005)
                .wrapping_add(1442695040888963407);
            let u = (s >> 11) as f64 / (1u64 << 53) as f64;
            s = s
                .wrapping_mul(6364136223846793005)
                .wrapping_add(1442695040888963407);
            let v = (s >> 11) as f64 / (1u64 << 53) as f64;
            pts.push([2.0 + 10.0 * u, -1.0 + 6.0 * v]);
        }
        let fast = torus_nearest_distances(&pts, rect).expect("at least two points");
        for (i, p) in pts.iter().enumerate() {
            let mut best = f64::INFINITY;
            for (j, q) in pts.iter().enumerate() {
                if i == j {
                    continue;
                }
                let dx = (p[0] - q[0]).abs();
                let dy = (p[1] - q[1]).abs();
                let dx = dx.min(10.0 - dx);
                let dy = dy.min(6.0 - dy);
                best = best.min((dx * dx + dy * dy).sqrt());
            }
            assert!(
                abs_diff_eq!(fast[i], best, epsilon = 1e-12),
                "point {i}: {} vs {best}",
                fast[i]
            );
        }
    }
}
