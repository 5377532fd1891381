//! Exact nearest-neighbour distances for large or clustered patterns: the
//! points sorted along a Z-order curve, cut into leaves of [`LEAF`]
//! consecutive points, with a complete binary tree of bounding boxes over
//! the leaves.
//!
//! Why a third engine next to the bucket grid and the R*-tree of
//! [`crate::nearest`]: the grid is the fastest tool for patterns that fill
//! their bounding box, but tight clusters overfill its cells, and the
//! R*-tree it then hands over to is no faster than a general-purpose k-d
//! tree. This tree adapts to any density, because its leaves hold a fixed
//! number of points wherever they lie, and it is built in O(n log n) with
//! one sort of 64-bit keys (parallel), with no per-node allocation.
//!
//! Method.
//! 1. Each point is quantised to 31 bits per axis over the bounding box and
//!    given its Morton key (the bits of x and y interleaved); points are
//!    sorted by (key, input index), a total order, so the layout is the
//!    same on every run and every thread count. Consecutive points along
//!    the curve are close in the plane.
//! 2. Leaf j holds sorted points `j·LEAF .. (j+1)·LEAF`. Node boxes are
//!    stored heap-fashion (node v has children 2v and 2v + 1, leaves from
//!    `first_leaf` on), each the bounding box of the actual coordinates
//!    below it.
//! 3. A query starts in its own leaf (its nearest other point there), then
//!    climbs to the root; at each level it searches the sibling subtree,
//!    nearer child first, whenever the sibling's box is closer than the best
//!    distance so far. Queries run leaf by leaf, so neighbouring queries
//!    touch the same memory.
//!
//! Exactness. A box is pruned only when its squared distance to the query,
//! computed in floating point, is at least the best squared distance. Box
//! corners are coordinates of actual points, and subtraction, squaring and
//! addition are all monotone under rounding, so every point in the box has
//! a computed `dx·dx + dy·dy` at least the box's computed value: pruning
//! never drops a strictly closer point, with no rounding margin at all.
//! The distances are the square root of the same `dx·dx + dy·dy` that the
//! grid, the R*-tree and a brute-force scan evaluate, so all engines return
//! the same bits. The torus version measures candidates against the nine
//! shifted copies of the query exactly as [`crate::toroidal`] does, and
//! bounds a box by the smallest per-axis distance over the three shifts,
//! which is monotone in the same way.
//!
//! Complexity: O(n log n) to sort, O(n) for the boxes, about O(log n) per
//! query. Memory: about 50 bytes per point while building (keys, sorted
//! points, order, boxes), 30 after.

use crate::Rectangle;
use crate::Xy;
use crate::grid_nearest::finite_bounds;
use rayon::prelude::*;

/// Points per leaf. Sixteen keeps the leaf scan short while the tree stays
/// shallow; 8, 16, 32 and 64 were tried on 1 M uniform and clustered
/// points (see docs/performance.md).
pub const LEAF: usize = 16;

/// Point count from which the tree is built and queried on several threads.
const PARALLEL_FROM: usize = crate::nearest::PARALLEL_FROM;

/// Queries per parallel task (whole leaves).
const CHUNK: usize = 512 * LEAF;

/// An empty box: every distance to it is infinite.
const EMPTY: [f64; 4] = [
    f64::INFINITY,
    f64::INFINITY,
    f64::NEG_INFINITY,
    f64::NEG_INFINITY,
];

/// A Z-order tree over one pattern, reusable across patterns (buffers keep
/// their capacity between [`CurveTree::rebuild`] calls).
#[derive(Debug, Clone, Default)]
pub struct CurveTree {
    /// The points in curve order.
    sorted: Vec<Xy>,
    /// Input index of each sorted point.
    order: Vec<u32>,
    /// Node boxes `[min_x, min_y, max_x, max_y]`, heap layout; index 0 unused.
    boxes: Vec<[f64; 4]>,
    /// Index of the first leaf node (a power of two).
    first_leaf: usize,
    /// Sort keys, kept to reuse the buffer.
    keys: Vec<(u64, u32)>,
    /// Distances in curve order, kept to reuse the buffer.
    scratch: Vec<f64>,
}

impl CurveTree {
    /// An empty tree; call [`CurveTree::rebuild`] before querying.
    pub fn new() -> Self {
        Self::default()
    }

    /// Sort `points` along the curve and box them. Returns `false`, leaving
    /// the tree empty, for fewer than two points, a non-finite coordinate,
    /// or more than `u32::MAX` points.
    pub fn rebuild(&mut self, points: &[Xy]) -> bool {
        self.sorted.clear();
        self.order.clear();
        self.boxes.clear();
        let n = points.len();
        if n < 2 || n > u32::MAX as usize {
            return false;
        }
        let Some((lo, hi)) = finite_bounds(points) else {
            return false;
        };
        // Quantisation only orders the points; exactness never depends on
        // it, so any rounding here is harmless.
        let top = (1u64 << 31) as f64;
        let scale = |a: usize| {
            let e = hi[a] - lo[a];
            if e > 0.0 && e.is_finite() {
                (top - 1.0) / e
            } else {
                0.0
            }
        };
        let (sx, sy) = (scale(0), scale(1));
        let key = |(i, p): (usize, &Xy)| {
            let qx = ((p[0] - lo[0]) * sx) as u32;
            let qy = ((p[1] - lo[1]) * sy) as u32;
            (spread(qx) | (spread(qy) << 1), i as u32)
        };
        self.keys.clear();
        if n < PARALLEL_FROM {
            self.keys.extend(points.iter().enumerate().map(key));
            self.keys.sort_unstable();
        } else {
            self.keys.par_extend(points.par_iter().enumerate().map(key));
            self.keys.par_sort_unstable();
        }
        self.order.extend(self.keys.iter().map(|&(_, i)| i));
        self.sorted
            .extend(self.order.iter().map(|&i| points[i as usize]));

        let leaves = n.div_ceil(LEAF);
        let first = leaves.next_power_of_two();
        self.first_leaf = first;
        self.boxes.resize(2 * first, EMPTY);
        for (j, chunk) in self.sorted.chunks(LEAF).enumerate() {
            let mut b = EMPTY;
            for p in chunk {
                b = [
                    b[0].min(p[0]),
                    b[1].min(p[1]),
                    b[2].max(p[0]),
                    b[3].max(p[1]),
                ];
            }
            self.boxes[first + j] = b;
        }
        for v in (1..first).rev() {
            let (l, r) = (self.boxes[2 * v], self.boxes[2 * v + 1]);
            self.boxes[v] = [
                l[0].min(r[0]),
                l[1].min(r[1]),
                l[2].max(r[2]),
                l[3].max(r[3]),
            ];
        }
        true
    }

    /// Plane nearest-neighbour distance of every point (the same `points`
    /// passed to [`CurveTree::rebuild`], in input order) into `out`.
    /// Returns `false`, with `out` empty, when the tree is not built for
    /// that many points.
    pub fn plane_distances_into(&mut self, n: usize, out: &mut Vec<f64>) -> bool {
        self.distances_into(n, out, None)
    }

    /// Torus nearest-neighbour distance of every point into `out`, input
    /// order: each candidate measured against the nine copies of the query
    /// shifted by (−w, 0, w) × (−h, 0, h), `rect` of positive width and
    /// height. Returns `false`, with `out` empty, when the tree is not
    /// built for that many points or the rectangle is empty.
    pub fn torus_distances_into(&mut self, n: usize, rect: Rectangle, out: &mut Vec<f64>) -> bool {
        let period = [rect.max[0] - rect.min[0], rect.max[1] - rect.min[1]];
        if !(period[0] > 0.0 && period[1] > 0.0 && period[0].is_finite() && period[1].is_finite()) {
            out.clear();
            return false;
        }
        self.distances_into(n, out, Some(period))
    }

    fn distances_into(&mut self, n: usize, out: &mut Vec<f64>, period: Option<[f64; 2]>) -> bool {
        out.clear();
        if self.sorted.is_empty() || self.sorted.len() != n {
            return false;
        }
        let mut scratch = std::mem::take(&mut self.scratch);
        scratch.clear();
        scratch.resize(n, 0.0);
        let this = &*self;
        let run = |(c, chunk): (usize, &mut [f64])| {
            let from = c * CHUNK;
            for (k, d) in chunk.iter_mut().enumerate() {
                *d = match period {
                    None => this.plane_nearest(from + k),
                    Some(p) => this.torus_nearest(from + k, p),
                }
                .sqrt();
            }
        };
        if n < PARALLEL_FROM {
            scratch.chunks_mut(CHUNK).enumerate().for_each(run);
        } else {
            scratch.par_chunks_mut(CHUNK).enumerate().for_each(run);
        }
        out.resize(n, 0.0);
        for (&i, &d) in self.order.iter().zip(&scratch) {
            out[i as usize] = d;
        }
        self.scratch = scratch;
        true
    }

    /// Squared distance from sorted point `s` to its nearest other point.
    fn plane_nearest(&self, s: usize) -> f64 {
        let q = self.sorted[s];
        let near = |b: &[f64; 4]| box_distance2(q, b);
        let scan = |from: usize, to: usize, best: f64| closest(&self.sorted[from..to], q, best);
        self.nearest(s, near, scan)
    }

    /// Squared torus distance from sorted point `s` to its nearest other
    /// point, `period` = [w, h].
    fn torus_nearest(&self, s: usize, period: [f64; 2]) -> f64 {
        let q = self.sorted[s];
        let [w, h] = period;
        // The shifted copies, as `toroidal` has always written them.
        let xs = [q[0] + -w, q[0] + 0.0, q[0] + w];
        let ys = [q[1] + -h, q[1] + 0.0, q[1] + h];
        let near = |b: &[f64; 4]| {
            let ax = xs.map(|x| axis_gap2(x, b[0], b[2]));
            let ay = ys.map(|y| axis_gap2(y, b[1], b[3]));
            min3(ax) + min3(ay)
        };
        let scan = |from: usize, to: usize, mut best: f64| {
            for &[x, y] in &self.sorted[from..to] {
                let d2 = min_square(x, xs) + min_square(y, ys);
                if d2 < best {
                    best = d2;
                }
            }
            best
        };
        self.nearest(s, near, scan)
    }

    /// The search shared by plane and torus: own leaf without `s`, then
    /// every sibling on the way to the root whose box bound beats the best.
    #[inline]
    fn nearest(
        &self,
        s: usize,
        near: impl Fn(&[f64; 4]) -> f64,
        scan: impl Fn(usize, usize, f64) -> f64,
    ) -> f64 {
        let n = self.sorted.len();
        let leaf = s / LEAF;
        let (from, to) = (leaf * LEAF, ((leaf + 1) * LEAF).min(n));
        let mut best = scan(from, s, f64::INFINITY);
        best = scan(s + 1, to, best);
        let mut stack = [0usize; 64];
        let mut v = self.first_leaf + leaf;
        while v > 1 {
            let sib = v ^ 1;
            if near(&self.boxes[sib]) < best {
                // Depth-first below the sibling, nearer child first.
                let mut top = 0;
                stack[0] = sib;
                top += 1;
                while top > 0 {
                    top -= 1;
                    let u = stack[top];
                    if u >= self.first_leaf {
                        let j = u - self.first_leaf;
                        best = scan(j * LEAF, ((j + 1) * LEAF).min(n), best);
                        continue;
                    }
                    let (a, b) = (2 * u, 2 * u + 1);
                    let (da, db) = (near(&self.boxes[a]), near(&self.boxes[b]));
                    let (first, df, second, ds) = if da <= db {
                        (a, da, b, db)
                    } else {
                        (b, db, a, da)
                    };
                    // Pushed farther first, so the nearer is searched first;
                    // each is checked again against the best when popped
                    // through its children or leaf scan bound below.
                    if ds < best {
                        stack[top] = second;
                        top += 1;
                    }
                    if df < best {
                        stack[top] = first;
                        top += 1;
                    }
                }
            }
            v >>= 1;
        }
        best
    }
}

/// Squared distance from `q` to box `b`, as `dx·dx + dy·dy` with each gap
/// taken from the nearer side (0 inside).
#[inline]
fn box_distance2(q: Xy, b: &[f64; 4]) -> f64 {
    axis_gap2(q[0], b[0], b[2]) + axis_gap2(q[1], b[1], b[3])
}

/// Squared gap from `v` to the interval `[lo, hi]` (0 inside).
#[inline]
fn axis_gap2(v: f64, lo: f64, hi: f64) -> f64 {
    let g = if v < lo {
        lo - v
    } else if v > hi {
        v - hi
    } else {
        0.0
    };
    g * g
}

#[inline]
fn min3([a, b, c]: [f64; 3]) -> f64 {
    let ab = if b < a { b } else { a };
    if c < ab { c } else { ab }
}

/// Smallest of `(v − s)²` over the three shifted copies `s` (the same
/// expression as the grid's torus search).
#[inline]
fn min_square(v: f64, shifted: [f64; 3]) -> f64 {
    min3(shifted.map(|s| {
        let d = v - s;
        d * d
    }))
}

/// The smaller of `best` and the squared distance from `q` to each of
/// `points`, as `dx·dx + dy·dy`.
#[inline]
fn closest(points: &[Xy], q: Xy, mut best: f64) -> f64 {
    for &[x, y] in points {
        let (dx, dy) = (x - q[0], y - q[1]);
        let d2 = dx * dx + dy * dy;
        if d2 < best {
            best = d2;
        }
    }
    best
}

/// The 32 bits of `v` moved to the even bit positions of a u64.
fn spread(v: u32) -> u64 {
    let mut x = u64::from(v);
    x = (x | (x << 16)) & 0x0000_FFFF_0000_FFFF;
    x = (x | (x << 8)) & 0x00FF_00FF_00FF_00FF;
    x = (x | (x << 4)) & 0x0F0F_0F0F_0F0F_0F0F;
    x = (x | (x << 2)) & 0x3333_3333_3333_3333;
    x = (x | (x << 1)) & 0x5555_5555_5555_5555;
    x
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn spread_interleaves() {
        assert_eq!(spread(0), 0);
        assert_eq!(spread(1), 1);
        assert_eq!(spread(0b11), 0b101);
        assert_eq!(spread(u32::MAX), 0x5555_5555_5555_5555);
    }

    #[test]
    fn tiny_and_refused_inputs() {
        let mut t = CurveTree::new();
        assert!(!t.rebuild(&[[0.0, 0.0]]));
        assert!(!t.rebuild(&[[0.0, 0.0], [f64::NAN, 1.0]]));
        let mut d = Vec::new();
        assert!(!t.plane_distances_into(2, &mut d));
        assert!(t.rebuild(&[[0.0, 0.0], [3.0, 4.0]]));
        assert!(t.plane_distances_into(2, &mut d));
        assert_eq!(d, vec![5.0, 5.0]);
        assert!(t.rebuild(&[[0.0, 0.0], [3.0, 4.0], [3.0, 5.0]]));
        assert!(t.plane_distances_into(3, &mut d));
        assert_eq!(d, vec![5.0, 1.0, 1.0]);
        // On a 10 × 10 torus 0.5 and 9.5 are 1 apart.
        let r = Rectangle {
            min: [0.0, 0.0],
            max: [10.0, 10.0],
        };
        assert!(t.rebuild(&[[0.5, 5.0], [9.5, 5.0]]));
        assert!(t.torus_distances_into(2, r, &mut d));
        assert_eq!(d, vec![1.0, 1.0]);
    }
}
