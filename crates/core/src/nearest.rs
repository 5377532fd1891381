//! Exact nearest-neighbour distances.
//!
//! Each point's distance to its closest *other* point, found with an
//! R*-tree (`rstar`). No approximation: the tree returns neighbours in
//! exact order of distance. Duplicate points are each other's nearest
//! neighbour at distance 0, which is what the Clark–Evans statistic
//! expects of them (they are counted and reported by the caller).
//!
//! Complexity: O(n log n) to build, about O(log n) per query. Queries run
//! in parallel with `rayon`; each result lands at its own index, so the
//! output does not depend on the thread count.

use crate::Xy;
use rayon::prelude::*;
use rstar::RTree;
use rstar::primitives::GeomWithData;

type Indexed = GeomWithData<Xy, usize>;

/// Point count from which queries are spread over threads.
pub const PARALLEL_FROM: usize = 4096;

/// Distance from every point to its nearest other point, in input order.
///
/// Returns `None` when there are fewer than two points (no neighbour exists).
///
/// ```
/// let d = patternproof_core::nearest::nearest_distances(&[[0.0, 0.0], [3.0, 4.0], [3.0, 5.0]]).unwrap();
/// assert_eq!(d, vec![5.0, 1.0, 1.0]);
/// ```
pub fn nearest_distances(points: &[Xy]) -> Option<Vec<f64>> {
    if points.len() < 2 {
        return None;
    }
    let tree = build_tree(points);
    // Small patterns (every simulated one) stay on one thread: splitting
    // a few hundred queries costs more than it saves, and the caller
    // already runs simulations in parallel.
    let query = |(i, p): (usize, &Xy)| nearest_other(&tree, i, *p);
    Some(if points.len() < PARALLEL_FROM {
        points.iter().enumerate().map(query).collect()
    } else {
        points.par_iter().enumerate().map(query).collect()
    })
}

/// Nearest-neighbour distance of each focal point, neighbours taken from all
/// points. Used by the guard-zone (border) method, where only points far
/// enough from the boundary are focal but any point may be their neighbour.
pub fn nearest_distances_of(points: &[Xy], focal: &[usize]) -> Option<Vec<f64>> {
    if points.len() < 2 {
        return None;
    }
    let tree = build_tree(points);
    let query = |&i: &usize| nearest_other(&tree, i, points[i]);
    Some(if focal.len() < PARALLEL_FROM {
        focal.iter().map(query).collect()
    } else {
        focal.par_iter().map(query).collect()
    })
}

/// Arithmetic mean of a slice; `None` when it is empty.
pub fn mean(values: &[f64]) -> Option<f64> {
    if values.is_empty() {
        None
    } else {
        // Sequential sum in input order: the same bytes for any thread count.
        Some(values.iter().sum::<f64>() / values.len() as f64)
    }
}

fn build_tree(points: &[Xy]) -> RTree<Indexed> {
    RTree::bulk_load(
        points
            .iter()
            .enumerate()
            .map(|(i, p)| GeomWithData::new(*p, i))
            .collect(),
    )
}

fn nearest_other(tree: &RTree<Indexed>, i: usize, p: Xy) -> f64 {
    tree.nearest_neighbor_iter_with_distance_2(p)
        .find(|(g, _)| g.data != i)
        .map(|(_, d2)| d2.sqrt())
        .unwrap_or(f64::INFINITY)
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Brute-force oracle: the indexed search must agree exactly with the
    /// O(n²) scan (common practice for checking a spatial index).
    #[test]
    fn agrees_with_brute_force_on_seeded_points() {
        let mut state: u64 = 0x9E37_79B9_7F4A_7C15;
        let mut next = || {
            // xorshift64*: a tiny self-contained generator for test data only.
            state ^= state >> 12;
            state ^= state << 25;
            state ^= state >> 27;
            (state.wrapping_mul(0x2545_F491_4F6C_DD1D) >> 11) as f64 / (1u64 << 53) as f64
        };
        let pts: Vec<Xy> = (0..500).map(|_| [next() * 100.0, next() * 50.0]).collect();
        let fast = nearest_distances(&pts).unwrap();
        for (i, p) in pts.iter().enumerate() {
            let brute = pts
                .iter()
                .enumerate()
                .filter(|(j, _)| *j != i)
                .map(|(_, q)| ((p[0] - q[0]).powi(2) + (p[1] - q[1]).powi(2)).sqrt())
                .fold(f64::INFINITY, f64::min);
            assert_eq!(fast[i], brute, "point {i}");
        }
    }

    #[test]
    fn duplicates_are_at_distance_zero() {
        let d = nearest_distances(&[[1.0, 1.0], [1.0, 1.0], [9.0, 9.0]]).unwrap();
        assert_eq!(d[0], 0.0);
        assert_eq!(d[1], 0.0);
        assert!((d[2] - (128.0f64).sqrt()).abs() < 1e-12);
    }

    #[test]
    fn fewer_than_two_points_has_no_neighbour() {
        assert!(nearest_distances(&[[0.0, 0.0]]).is_none());
        assert!(nearest_distances(&[]).is_none());
    }

    #[test]
    fn focal_subset_uses_all_points_as_neighbours() {
        let pts = [[0.0, 0.0], [1.0, 0.0], [10.0, 0.0]];
        let d = nearest_distances_of(&pts, &[2]).unwrap();
        assert_eq!(d, vec![9.0]);
    }
}
