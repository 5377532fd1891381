//! Every pair of points closer than a distance: the range search behind
//! the K function.
//!
//! Why a bucket grid and not a tree: the K function asks the same question
//! (all points within r_max) of every point, for the observed pattern and
//! for every simulated one, so the index is built once per pattern and
//! queried n times with one radius. Points sorted by cell in row-major
//! order put every row of a query's square in one contiguous run, so a
//! query reads a handful of runs and no tree nodes. Cells are a quarter of
//! r_max across (or the mean spacing, when that is larger), so the scanned
//! rectangle is at most (2.25·r_max)², about 1.6 times the circle.
//!
//! Exactness: a point within `r` of `p` differs from it by at most `r` on
//! each axis, and the bucketing is monotone, so it lies in a cell between
//! the cells of `p − r − g` and `p + r + g`, where the margin `g` (64 ulps
//! of the largest magnitude) covers the rounding of those sums. A scanned
//! point is kept when `hypot(dx, dy) ≤ r`, the distance the K function
//! then uses, so the answer is the brute-force one, bit for bit.

use crate::Xy;
use crate::grid_nearest::{bucket, finite_bounds};
use rayon::prelude::*;

/// The neighbours of one centre: index and distance.
pub type Neighbours = Vec<(usize, f64)>;

/// For every centre i, the points j > i with `hypot(x_i − x_j) ≤ rmax`
/// (each unordered pair once), sorted by j. `parallel` spreads the centres
/// over rayon's threads; the answer is the same for any thread count.
///
/// This holds every pair at once (16 bytes each); callers that only sum
/// over the pairs should ask [`PairSearch`] centre by centre instead.
pub fn close_pairs(points: &[Xy], rmax: f64, parallel: bool) -> Vec<Neighbours> {
    let search = PairSearch::new(points, rmax);
    let one = |i: usize| {
        let mut near = Vec::new();
        search.neighbours_into(i, &mut near);
        near
    };
    if parallel {
        (0..points.len()).into_par_iter().map(one).collect()
    } else {
        (0..points.len()).map(one).collect()
    }
}

/// The range search of one pattern, built once and asked centre by centre.
///
/// Why not hand out every pair: 1 M points with a few hundred neighbours
/// each are hundreds of millions of pairs, gigabytes as a list, while a
/// caller that sums over them needs only the pairs of the centres it is
/// working on. The index itself holds the points once, sorted by cell
/// (about 32 bytes a point), so its memory grows with n, not with the
/// number of pairs.
pub struct PairSearch<'a> {
    points: &'a [Xy],
    rmax: f64,
    /// `None` for the inputs the grid does not take (then the definition
    /// answers, pair by pair).
    cells: Option<Cells>,
}

impl<'a> PairSearch<'a> {
    /// Index `points` for neighbours within `rmax`.
    pub fn new(points: &'a [Xy], rmax: f64) -> Self {
        Self {
            points,
            rmax,
            cells: Cells::new(points, rmax),
        }
    }

    /// The points j > i within r_max of point i, sorted by j, into `out`
    /// (cleared first, so one buffer serves every centre).
    pub fn neighbours_into(&self, i: usize, out: &mut Neighbours) {
        out.clear();
        match &self.cells {
            Some(cells) => cells.neighbours_into(self.points, i, self.rmax, out),
            None => brute_force_into(self.points, i, self.rmax, out),
        }
    }
}

/// The definition for one centre, pair by pair: for inputs the grid does
/// not take (a non-finite coordinate or radius, or fewer than two points).
fn brute_force_into(points: &[Xy], i: usize, rmax: f64, out: &mut Neighbours) {
    let p = points[i];
    out.extend(
        (i + 1..points.len())
            .map(|j| (j, distance(p, points[j])))
            .filter(|&(_, d)| d <= rmax),
    );
}

/// The definition for every centre (the tests' oracle).
#[cfg(test)]
fn brute_force(points: &[Xy], rmax: f64) -> Vec<Neighbours> {
    (0..points.len())
        .map(|i| {
            let mut near = Vec::new();
            brute_force_into(points, i, rmax, &mut near);
            near
        })
        .collect()
}

/// The distance the K function uses.
fn distance(p: Xy, q: Xy) -> f64 {
    (p[0] - q[0]).hypot(p[1] - q[1])
}

/// Points sorted by cell, row-major, with their input indices.
struct Cells {
    origin: Xy,
    size: [f64; 2],
    count: [usize; 2],
    limits: [f64; 2],
    /// Start of each cell's run in `sorted` (`nx·ny + 1` entries).
    start: Vec<usize>,
    sorted: Vec<Xy>,
    index: Vec<usize>,
    /// Rounding margin added to the query square.
    guard: f64,
}

impl Cells {
    /// `None` for fewer than two points, a non-finite coordinate, or a
    /// radius that is negative or not finite.
    fn new(points: &[Xy], rmax: f64) -> Option<Self> {
        let n = points.len();
        if n < 2 || !(rmax >= 0.0 && rmax.is_finite()) {
            return None;
        }
        let (lo, hi) = finite_bounds(points)?;
        let extent = [hi[0] - lo[0], hi[1] - lo[1]];
        let magnitude = lo.iter().chain(&hi).fold(0.0f64, |m, v| m.max(v.abs())) + rmax;
        let guard = 64.0 * f64::EPSILON * magnitude;
        // A quarter of r_max, but no finer than the mean spacing (about
        // one point per cell) so that small radii do not make empty cells.
        let spacing = match (extent[0] > 0.0, extent[1] > 0.0) {
            (true, true) => (extent[0] * extent[1] / n as f64).sqrt(),
            (true, false) => extent[0] / n as f64,
            (false, true) => extent[1] / n as f64,
            (false, false) => 0.0,
        };
        let side = (rmax / 4.0).max(spacing);
        let along = |e: f64| -> usize {
            if e > 0.0 && side > 0.0 {
                ((e / side).floor() as usize).clamp(1, n)
            } else {
                1
            }
        };
        let count = [along(extent[0]), along(extent[1])];
        let limits = [count[0] as f64, count[1] as f64];
        let size = [extent[0] / limits[0], extent[1] / limits[1]];
        let mut cells = Cells {
            origin: lo,
            size,
            count,
            limits,
            start: vec![0; count[0] * count[1] + 1],
            sorted: vec![[0.0, 0.0]; n],
            index: vec![0; n],
            guard,
        };
        // Counting sort by cell, input order within a cell.
        let of: Vec<usize> = points.iter().map(|&p| cells.cell_of(p)).collect();
        for &c in &of {
            cells.start[c + 1] += 1;
        }
        for c in 0..count[0] * count[1] {
            cells.start[c + 1] += cells.start[c];
        }
        let mut cursor = cells.start.clone();
        for (i, (&c, &p)) in of.iter().zip(points).enumerate() {
            let at = &mut cursor[c];
            cells.sorted[*at] = p;
            cells.index[*at] = i;
            *at += 1;
        }
        Some(cells)
    }

    fn column(&self, x: f64) -> usize {
        bucket(
            x,
            self.origin[0],
            self.size[0],
            self.count[0],
            self.limits[0],
        )
    }

    fn row(&self, y: f64) -> usize {
        bucket(
            y,
            self.origin[1],
            self.size[1],
            self.count[1],
            self.limits[1],
        )
    }

    fn cell_of(&self, p: Xy) -> usize {
        self.row(p[1]) * self.count[0] + self.column(p[0])
    }

    /// The points j > i within `rmax` of point i, sorted by j, appended
    /// to `out`.
    fn neighbours_into(&self, points: &[Xy], i: usize, rmax: f64, out: &mut Neighbours) {
        let p = points[i];
        let reach = rmax + self.guard;
        let (c0, c1) = (self.column(p[0] - reach), self.column(p[0] + reach));
        let (r0, r1) = (self.row(p[1] - reach), self.row(p[1] + reach));
        for row in r0..=r1 {
            let base = row * self.count[0];
            let run = self.start[base + c0]..self.start[base + c1 + 1];
            for (&q, &j) in self.sorted[run.clone()].iter().zip(&self.index[run]) {
                if j > i {
                    let d = distance(p, q);
                    if d <= rmax {
                        out.push((j, d));
                    }
                }
            }
        }
        out.sort_unstable_by_key(|&(j, _)| j);
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Small deterministic generator (splitmix64) for test patterns.
    struct Gen(u64);

    impl Gen {
        fn unit(&mut self) -> f64 {
            self.0 = self.0.wrapping_add(0x9E37_79B9_7F4A_7C15);
            let mut z = self.0;
            z = (z ^ (z >> 30)).wrapping_mul(0xBF58_476D_1CE4_E5B9);
            z = (z ^ (z >> 27)).wrapping_mul(0x94D0_49BB_1331_11EB);
            ((z ^ (z >> 31)) >> 11) as f64 / (1u64 << 53) as f64
        }
    }

    fn patterns() -> Vec<Vec<Xy>> {
        let mut g = Gen(11);
        let mut out: Vec<Vec<Xy>> = vec![vec![], vec![[1.0, 1.0]], vec![[0.0, 0.0], [3.0, 4.0]]];
        out.push(
            (0..400)
                .map(|_| [g.unit() * 100.0, g.unit() * 40.0])
                .collect(),
        );
        // Tight clusters, duplicates, a line, a far offset.
        let parents: Vec<Xy> = (0..5).map(|_| [g.unit() * 50.0, g.unit() * 50.0]).collect();
        out.push(
            (0..300)
                .map(|k| {
                    let c = parents[k % 5];
                    [c[0] + 0.3 * g.unit(), c[1] + 0.3 * g.unit()]
                })
                .collect(),
        );
        let base: Vec<Xy> = (0..80)
            .map(|_| [g.unit() * 10.0, g.unit() * 10.0])
            .collect();
        out.push(base.iter().chain(&base).copied().collect());
        out.push((0..150).map(|_| [g.unit() * 30.0, 7.0]).collect());
        out.push(
            (0..200)
                .map(|_| [5.3e6 + g.unit() * 250.0, 4.1e5 + g.unit() * 90.0])
                .collect(),
        );
        // An integer lattice: many pairs exactly at the radius.
        out.push(
            (0..12)
                .flat_map(|i| (0..9).map(move |j| [i as f64, j as f64]))
                .collect(),
        );
        out
    }

    /// Against the O(n²) loop over all pairs (the definition) on uniform,
    /// clustered, duplicated, collinear, far-offset and lattice patterns,
    /// for radii from zero to beyond the pattern, exactly.
    #[test]
    fn matches_brute_force() {
        for (k, pts) in patterns().iter().enumerate() {
            for rmax in [0.0, 1.0, 2.5, 7.0, 33.0, 1e4] {
                let want = brute_force(pts, rmax);
                assert_eq!(close_pairs(pts, rmax, false), want, "pattern {k} r {rmax}");
                assert_eq!(close_pairs(pts, rmax, true), want, "pattern {k} r {rmax}");
                // Centre by centre through one reused buffer, in a
                // scrambled order: the same lists.
                let search = PairSearch::new(pts, rmax);
                let mut near = vec![(usize::MAX, f64::NAN)];
                for i in (0..pts.len()).rev() {
                    search.neighbours_into(i, &mut near);
                    assert_eq!(near, want[i], "pattern {k} r {rmax} centre {i}");
                }
            }
        }
        // The lattice at radius 1 has its 12·8 + 11·9 unit pairs.
        let lattice = patterns().pop().expect("lattice");
        let pairs: usize = close_pairs(&lattice, 1.0, false).iter().map(Vec::len).sum();
        assert_eq!(pairs, 12 * 8 + 11 * 9);
    }

    /// Inputs the grid does not take fall back to the definition.
    #[test]
    fn odd_inputs_fall_back_to_the_definition() {
        let pts = [[0.0, 0.0], [1.0, 0.0], [f64::NAN, 2.0]];
        assert_eq!(
            close_pairs(&pts, 1.5, false),
            vec![vec![(1, 1.0)], vec![], vec![]]
        );
        let pts = [[0.0, 0.0], [1.0, 0.0]];
        assert_eq!(
            close_pairs(&pts, f64::INFINITY, true),
            vec![vec![(1, 1.0)], vec![]]
        );
        assert_eq!(close_pairs(&pts, -1.0, true), vec![vec![], vec![]]);
    }
}
