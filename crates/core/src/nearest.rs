//! Exact nearest-neighbour distances.
//!
//! Each point's distance to its closest *other* point. No approximation.
//! Three engines give the same bits: a uniform bucket grid
//! ([`crate::grid_nearest`]), used whenever the points are spread well
//! enough for it to pay; a Z-order tree of bounding boxes
//! ([`crate::curve_tree`]), which takes over for clusters too tight for
//! the grid; and an R*-tree (`rstar`), which returns neighbours in exact
//! order of distance and is the last resort (non-finite coordinates). All
//! take the square root of the same `dx·dx + dy·dy`. Duplicate points are each other's nearest neighbour at
//! distance 0, which is what the Clark–Evans statistic expects of them
//! (they are counted and reported by the caller).
//!
//! Complexity: O(n) to bucket and about O(1) per query on the grid;
//! O(n log n) to build and about O(log n) per query on the tree. Large
//! patterns are queried in parallel with `rayon`; each result lands at its
//! own index, so the output does not depend on the thread count.

use crate::Rectangle;
use crate::Xy;
use crate::curve_tree::CurveTree;
use crate::grid_nearest::BucketGrid;
use crate::toroidal::torus_tree_distances;
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
    let mut d = Distances::new();
    d.measure(points, None)
        .then(|| std::mem::take(&mut d.plane))
}

/// The R*-tree engine alone: same answers as [`nearest_distances`], kept
/// public as the fallback and so that tests and benchmarks can compare the
/// two engines. `None` for fewer than two points.
pub fn tree_nearest_distances(points: &[Xy]) -> Option<Vec<f64>> {
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

/// The Z-order tree engine alone ([`crate::curve_tree`]): same answers as
/// [`nearest_distances`], public so that tests and benchmarks can compare
/// the engines. `None` for fewer than two points or a non-finite
/// coordinate.
pub fn curve_tree_distances(points: &[Xy]) -> Option<Vec<f64>> {
    let mut tree = CurveTree::new();
    let mut out = Vec::new();
    (tree.rebuild(points) && tree.plane_distances_into(points.len(), &mut out)).then_some(out)
}

/// Nearest-neighbour distance of each focal point, neighbours taken from all
/// points. Used by the guard-zone (border) method, where only points far
/// enough from the boundary are focal but any point may be their neighbour.
pub fn nearest_distances_of(points: &[Xy], focal: &[usize]) -> Option<Vec<f64>> {
    let all = nearest_distances(points)?;
    focal.iter().map(|&i| all.get(i).copied()).collect()
}

/// Plane (and optionally torus) nearest-neighbour distances of one pattern
/// after another, with the buffers kept between patterns: a simulation
/// loop that measures thousands of small patterns then allocates nothing
/// per pattern, and the plane and torus searches share one grid.
#[derive(Debug, Clone, Default)]
pub struct Distances {
    grid: BucketGrid,
    tree: CurveTree,
    /// Plane distances of the last pattern measured, input order.
    pub plane: Vec<f64>,
    /// Torus distances of the last pattern, input order; empty when no
    /// usable rectangle was given.
    pub torus: Vec<f64>,
}

impl Distances {
    /// Empty buffers.
    pub fn new() -> Self {
        Self::default()
    }

    /// Measure `points`: plane distances into `plane`, and with `torus` =
    /// Some(rectangle) of positive width and height, torus distances into
    /// `torus` (otherwise `torus` is left empty). Returns `false`, with both
    /// empty, for fewer than two points. Same values as
    /// [`nearest_distances`] and [`crate::toroidal::torus_nearest_distances`].
    pub fn measure(&mut self, points: &[Xy], torus: Option<Rectangle>) -> bool {
        self.plane.clear();
        self.torus.clear();
        if points.len() < 2 {
            return false;
        }
        let torus = torus.filter(|r| r.max[0] - r.min[0] > 0.0 && r.max[1] - r.min[1] > 0.0);
        let n = points.len();
        let on_grid = self.grid.rebuild(points, torus);
        let mut on_tree = None;
        let mut tree = |t: &mut CurveTree| *on_tree.get_or_insert_with(|| t.rebuild(points));
        // Grid first, then the Z-order tree, then the R*-tree.
        let plane_done = (on_grid && self.grid.plane_distances_into(points, &mut self.plane))
            || (tree(&mut self.tree) && self.tree.plane_distances_into(n, &mut self.plane));
        if !plane_done {
            self.plane = tree_nearest_distances(points).unwrap_or_default();
        }
        if let Some(r) = torus
            && !((on_grid && self.grid.torus_distances_into(points, &mut self.torus))
                || (tree(&mut self.tree) && self.tree.torus_distances_into(n, r, &mut self.torus)))
        {
            self.torus = torus_tree_distances(points, r).unwrap_or_default();
        }
        true
    }
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
    tree.nearest_neighbor_iter_with_distance_2(&p)
        .find(|(g, _)| g.data != i)
        .map(|(_, d2)| d2.sqrt())
        .unwrap_or(f64::INFINITY)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::oracles::{Gen, brute_plane, brute_torus};
    use approx::assert_abs_diff_eq;

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
        let fast = nearest_distances(&pts).expect("500 points");
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

    /// One random pattern of a random kind: uniform, clustered (spread from
    /// 1e-7 to 1 of the extent), every point duplicated, collinear at a
    /// random angle, an integer lattice with ties, or far from the origin.
    fn random_pattern(g: &mut Gen, max_n: usize) -> Vec<Xy> {
        let n = 2 + g.below(max_n - 1);
        let scale = [1e-6, 1.0, 250.0, 1e5][g.below(4)];
        match g.below(6) {
            0 => (0..n)
                .map(|_| [g.unit() * scale, g.unit() * scale * 0.4])
                .collect(),
            1 => {
                let spread = scale * 10f64.powf(-7.0 * g.unit());
                let parents: Vec<Xy> = (0..1 + g.below(8))
                    .map(|_| [g.unit() * scale, g.unit() * scale])
                    .collect();
                (0..n)
                    .map(|k| {
                        let c = parents[k % parents.len()];
                        [c[0] + spread * g.unit(), c[1] + spread * g.unit()]
                    })
                    .collect()
            }
            2 => {
                let half: Vec<Xy> = (0..n.div_ceil(2))
                    .map(|_| [g.unit() * scale, g.unit() * scale])
                    .collect();
                half.iter().chain(half.iter()).copied().collect()
            }
            3 => {
                let (c, s) = [(1.0, 0.0), (0.0, 1.0), (0.6, 0.8), (0.999, 1e-9)][g.below(4)];
                (0..n)
                    .map(|_| {
                        let t = g.unit() * scale;
                        [c * t - 3.0, s * t + 2.0]
                    })
                    .collect()
            }
            4 => {
                let k = 1 + g.below(20);
                (0..n).map(|i| [(i % k) as f64, (i / k) as f64]).collect()
            }
            _ => (0..n)
                .map(|_| [6.1e6 + g.unit() * scale, -4.5e5 + g.unit() * scale])
                .collect(),
        }
    }

    /// Property test over 400 seeded random patterns (2–300 points) of every awkward kind:
    /// the grid-backed [`nearest_distances`], the R*-tree alone and the
    /// brute-force scan agree bit for bit, and the grid is actually used
    /// for most of them (so the comparison is not only tree against tree).
    #[test]
    fn grid_tree_and_brute_force_agree_bit_for_bit() {
        let mut g = Gen(0xD1B5_4A32_D192_ED03);
        let mut on_grid = 0;
        for case in 0..400 {
            let pts = random_pattern(&mut g, 300);
            let want = brute_plane(&pts);
            assert_eq!(
                nearest_distances(&pts).expect("at least two points"),
                want,
                "case {case}"
            );
            assert_eq!(
                tree_nearest_distances(&pts).expect("at least two points"),
                want,
                "case {case}"
            );
            assert_eq!(
                curve_tree_distances(&pts).expect("at least two points"),
                want,
                "case {case} (Z-order tree)"
            );
            if BucketGrid::new().rebuild(&pts, None) {
                on_grid += 1;
            }
        }
        assert!(on_grid > 300, "grid used for {on_grid} of 400");
    }

    /// The same property on a torus (200 patterns of 2–150 points): grid with wrap-around, R*-tree with
    /// nine shifted queries, and the brute-force scan of every pair against
    /// the nine shifted copies (the definition of the flat torus distance).
    #[test]
    fn torus_grid_tree_and_brute_force_agree_bit_for_bit() {
        let mut g = Gen(0x8CB9_2BA7_2F3D_8DD7);
        let mut wrapped = 0;
        for case in 0..200 {
            let raw = random_pattern(&mut g, 150);
            // The rectangle: the points' bounding box, sometimes enlarged.
            let mut lo = [f64::INFINITY; 2];
            let mut hi = [f64::NEG_INFINITY; 2];
            for p in &raw {
                for a in 0..2 {
                    lo[a] = lo[a].min(p[a]);
                    hi[a] = hi[a].max(p[a]);
                }
            }
            let grow = if g.unit() < 0.5 { 0.0 } else { g.unit() };
            let r = Rectangle {
                min: [lo[0] - grow, lo[1] - grow],
                max: [hi[0] + grow, hi[1] + grow],
            };
            let (w, h) = (r.max[0] - r.min[0], r.max[1] - r.min[1]);
            if !(w > 0.0 && h > 0.0) {
                assert!(crate::toroidal::torus_nearest_distances(&raw, r).is_none());
                continue;
            }
            // Brute force: every other point against the nine shifted copies.
            let want = brute_torus(&raw, r);
            let grid =
                crate::toroidal::torus_nearest_distances(&raw, r).expect("at least two points");
            assert_eq!(grid, want, "case {case}");
            assert_eq!(
                torus_tree_distances(&raw, r).expect("at least two points"),
                want,
                "case {case}"
            );
            let mut curve = CurveTree::new();
            let mut d = Vec::new();
            assert!(curve.rebuild(&raw));
            assert!(curve.torus_distances_into(raw.len(), r, &mut d));
            assert_eq!(d, want, "case {case} (Z-order tree)");
            // Plane and torus from one shared workspace.
            let mut ws = Distances::new();
            assert!(ws.measure(&raw, Some(r)));
            assert_eq!(ws.torus, want, "case {case}");
            assert_eq!(ws.plane, brute_plane(&raw), "case {case}");
            let mut grid = BucketGrid::new();
            if grid.rebuild(&raw, Some(r)) && grid.wraps() {
                wrapped += 1;
            }
        }
        assert!(wrapped > 120, "torus grid used for {wrapped} of 200");
    }

    /// Patterns above `PARALLEL_FROM`, where the grid queries cell by cell
    /// on several threads, densifies its cells for clusters, or hands over
    /// to the Z-order tree: every engine against the O(n²) scan, bit for
    /// bit, on uniform, Thomas-like clustered, duplicate-heavy, collinear,
    /// far-offset and ultra-tight clustered patterns of 4 200 points, with
    /// the path each one takes checked too.
    #[test]
    fn large_patterns_match_brute_force_on_every_engine_path() {
        let mut g = Gen(0x5DEE_CE66_D1CE_4E5B);
        let n = 4_200;
        let uniform: Vec<Xy> = (0..n)
            .map(|_| [g.unit() * 300.0, g.unit() * 200.0])
            .collect();
        // 60 parents, offspring within ±3 of them: clusters overfill cells
        // of the mean spacing, so the grid goes 4 or 16 times finer.
        let parents: Vec<Xy> = (0..60)
            .map(|_| [g.unit() * 300.0, g.unit() * 200.0])
            .collect();
        let clustered: Vec<Xy> = (0..n)
            .map(|k| {
                let c = parents[k % 60];
                [c[0] + 6.0 * (g.unit() - 0.5), c[1] + 6.0 * (g.unit() - 0.5)]
            })
            .collect();
        // Every point three times.
        let base: Vec<Xy> = (0..n / 3)
            .map(|_| [g.unit() * 50.0, g.unit() * 50.0])
            .collect();
        let mut tripled: Vec<Xy> = base.iter().chain(&base).chain(&base).copied().collect();
        tripled.push([25.0, 25.0]);
        let line: Vec<Xy> = (0..n)
            .map(|_| {
                let t = g.unit() * 1000.0;
                [0.6 * t + 3.0, 0.8 * t - 1.0]
            })
            .collect();
        let far: Vec<Xy> = (0..n)
            .map(|_| [6.1e6 + g.unit() * 800.0, -4.5e5 + g.unit() * 600.0])
            .collect();
        // 12 clusters 1e-9 wide in a 1e6 square: no grid fits, the tree does.
        let tight_parents: Vec<Xy> = (0..12).map(|_| [g.unit() * 1e6, g.unit() * 1e6]).collect();
        let tight: Vec<Xy> = (0..n)
            .map(|k| {
                let c = tight_parents[k % 12];
                [c[0] + 1e-9 * g.unit(), c[1] + 1e-9 * g.unit()]
            })
            .collect();
        let mut grid = BucketGrid::new();
        for (name, pts, on_grid) in [
            ("uniform", &uniform, true),
            ("clustered", &clustered, true),
            ("tripled", &tripled, true),
            ("collinear", &line, true),
            ("far", &far, true),
            ("tight", &tight, false),
        ] {
            assert!(pts.len() >= PARALLEL_FROM, "{name}");
            let want = brute_plane(pts);
            assert_eq!(grid.rebuild(pts, None), on_grid, "{name}: grid used");
            assert_eq!(nearest_distances(pts).expect("points"), want, "{name}");
            assert_eq!(
                curve_tree_distances(pts).expect("points"),
                want,
                "{name} (tree)"
            );
        }
        // Torus distances of the uniform pattern in its 300 × 200 frame, on
        // the grid and on the Z-order tree.
        let r = Rectangle {
            min: [0.0, 0.0],
            max: [300.0, 200.0],
        };
        let want: Vec<f64> = uniform
            .iter()
            .enumerate()
            .map(|(i, p)| {
                let mut best = f64::INFINITY;
                for (j, q) in uniform.iter().enumerate() {
                    if i != j {
                        // Nearest of the three copies on each axis, exactly
                        // as the nine-copy definition evaluates it.
                        let sx = [p[0] + -300.0, p[0] + 0.0, p[0] + 300.0]
                            .map(|s| (q[0] - s) * (q[0] - s));
                        let sy = [p[1] + -200.0, p[1] + 0.0, p[1] + 200.0]
                            .map(|s| (q[1] - s) * (q[1] - s));
                        let m = |a: [f64; 3]| a[0].min(a[1]).min(a[2]);
                        best = best.min(m(sx) + m(sy));
                    }
                }
                best.sqrt()
            })
            .collect();
        let mut ws = Distances::new();
        assert!(ws.measure(&uniform, Some(r)));
        assert_eq!(ws.torus, want, "uniform torus (grid)");
        let mut curve = CurveTree::new();
        let mut d = Vec::new();
        assert!(curve.rebuild(&uniform));
        assert!(curve.torus_distances_into(uniform.len(), r, &mut d));
        assert_eq!(d, want, "uniform torus (tree)");
        // The tight clusters' torus distances come from the tree as well.
        let rt = Rectangle {
            min: [-1.0, -1.0],
            max: [1e6 + 1.0, 1e6 + 1.0],
        };
        assert!(ws.measure(&tight, Some(rt)));
        assert_eq!(ws.plane, brute_plane(&tight));
        assert_eq!(ws.torus.len(), tight.len());
    }

    #[test]
    fn duplicates_are_at_distance_zero() {
        let d = nearest_distances(&[[1.0, 1.0], [1.0, 1.0], [9.0, 9.0]]).expect("three points");
        assert_eq!(d[0], 0.0);
        assert_eq!(d[1], 0.0);
        assert_abs_diff_eq!(d[2], (128.0f64).sqrt(), epsilon = 1e-12);
    }

    #[test]
    fn fewer_than_two_points_has_no_neighbour() {
        assert!(nearest_distances(&[[0.0, 0.0]]).is_none());
        assert!(nearest_distances(&[]).is_none());
    }

    #[test]
    fn focal_subset_uses_all_points_as_neighbours() {
        let pts = [[0.0, 0.0], [1.0, 0.0], [10.0, 0.0]];
        let d = nearest_distances_of(&pts, &[2]).expect("three points");
        assert_eq!(d, vec![9.0]);
    }
}
