//! Pair search up to r_max with an R*-tree.
//!
//! Only pairs closer than r_max ever matter to K̂ on [0, r_max], so the
//! points go into an `rstar` tree and each centre asks for the points
//! within r_max: the cost grows with the number of close pairs, not with
//! n². The search runs in parallel over centres; the answer is collected
//! in centre order and each centre's neighbours are sorted by index, so it
//! is the same for any number of threads.

use patternproof_core::Xy;
use rayon::prelude::*;
use rstar::RTree;
use rstar::primitives::GeomWithData;

/// The neighbours of one centre: index and distance.
pub type Neighbours = Vec<(usize, f64)>;

/// For every centre i, the points j > i with |x_i − x_j| ≤ `rmax`
/// (each unordered pair once), sorted by j. `parallel` spreads the centres
/// over rayon's threads.
pub fn close_pairs(points: &[Xy], rmax: f64, parallel: bool) -> Vec<Neighbours> {
    let tree: RTree<GeomWithData<Xy, usize>> = RTree::bulk_load(
        points
            .iter()
            .enumerate()
            .map(|(i, &p)| GeomWithData::new(p, i))
            .collect(),
    );
    let r2 = rmax * rmax;
    let one = |i: usize| -> Neighbours {
        let p = points[i];
        let mut v: Neighbours = tree
            .locate_within_distance(p, r2)
            .filter(|g| g.data > i)
            .map(|g| {
                let q = g.geom();
                (g.data, (p[0] - q[0]).hypot(p[1] - q[1]))
            })
            .filter(|&(_, d)| d <= rmax)
            .collect();
        v.sort_by_key(|&(j, _)| j);
        v
    };
    if parallel {
        (0..points.len()).into_par_iter().map(one).collect()
    } else {
        (0..points.len()).map(one).collect()
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Against the O(n²) loop over all pairs (brute force) on a small,
    /// irregular pattern.
    #[test]
    fn matches_brute_force() {
        let pts: Vec<Xy> = (0..80)
            .map(|k| {
                let t = k as f64;
                [(t * 7.31).sin() * 10.0 + 10.0, (t * 3.17).cos() * 6.0 + 6.0]
            })
            .collect();
        let found = close_pairs(&pts, 2.5, true);
        for i in 0..pts.len() {
            let want: Vec<(usize, f64)> = (i + 1..pts.len())
                .map(|j| (j, (pts[i][0] - pts[j][0]).hypot(pts[i][1] - pts[j][1])))
                .filter(|&(_, d)| d <= 2.5)
                .collect();
            assert_eq!(found[i], want, "centre {i}");
        }
        assert_eq!(found, close_pairs(&pts, 2.5, false));
    }
}
