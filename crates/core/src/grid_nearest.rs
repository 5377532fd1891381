//! Exact nearest-neighbour distances from a uniform grid of buckets, in the
//! plane and on a torus.
//!
//! Why a second engine next to the R*-tree of [`crate::nearest`]: every
//! simulated pattern of the audit is small (about a hundred points) and is
//! searched once, so building and walking a tree costs far more than the
//! answer is worth. A grid of square-ish cells, about `POINTS_PER_CELL`
//! points each, is built with one counting sort and answers a query by
//! scanning the cells in rings around the query's cell, nearest ring first.
//!
//! Exactness. The search stops only when no unsearched point can be
//! closer than the best one found: after the box of rings 0..=k every
//! unsearched point lies beyond one of the box's sides, so its distance is
//! at least the distance from the query to that side (sides beyond which
//! no cell exists do not count). That bound is shrunk by a margin that
//! covers every rounding error of the bucketing and of the side positions
//! (a few ulps of the largest coordinate; see [`BucketGrid::guard`]), and the
//! squared bound is shrunk by a few ulps more, so a rounding error can only
//! make the search look one ring further, never stop early. The distance
//! itself is the square root of `dx·dx + dy·dy`, the same expression
//! `rstar` evaluates, so both engines return the same bits.
//!
//! On a torus (opposite sides of a rectangle identified) the rings wrap
//! around, and each candidate's squared distance is the smallest over the
//! nine shifted copies `p + (sx, sy)`, `sx ∈ {−w, 0, w}`, `sy ∈ {−h, 0, h}`,
//! evaluated exactly as [`crate::toroidal`] always has.
//!
//! Heavily clustered data would put many points in a few cells and make
//! the scan quadratic. [`BucketGrid::rebuild`] estimates the scan's work from the
//! cell counts; past `WORK_PER_POINT` candidate checks per point on average
//! it tries cells 4 and then 16 times smaller (for large patterns a sample
//! guesses the fineness first), and beyond that refuses (returns `false`).
//! The callers then use the Z-order tree of [`crate::curve_tree`], so there
//! is no pathological slowdown.
//!
//! Large patterns (from `PARALLEL_FROM` points) are queried cell by cell
//! in the sorted order, rows in parallel, so that consecutive queries read
//! neighbouring memory; each distance depends only on its point, so the
//! order changes no bit. From `PARALLEL_BUILD_FROM` points the grid is
//! also built in parallel, in two passes (into rows, then into the cells
//! of each row), which gives the serial build's order exactly.

use crate::Rectangle;
use crate::Xy;
use rayon::prelude::*;

/// Target number of points per cell. About one keeps the 3 × 3 block that
/// settles most queries small without many empty cells to visit (counted
/// in instructions on 143 uniform points: 0.7–1 did best of 0.5 to 4; see
/// docs/performance.md).
const POINTS_PER_CELL: f64 = 1.0;

/// Finest grid tried when the cells overfill: this many cells per point
/// at most (clusters then get cells of their own size, up to a point).
const MAX_CELLS_PER_POINT: f64 = 16.0;

/// Average number of candidate checks per point (estimated from the cell
/// counts over each cell's 3 × 3 block) above which the grid hands over to
/// the R*-tree. CSR data at one point per cell needs about 10.
const WORK_PER_POINT: usize = 96;

/// Point count from which queries are spread over threads (same rule as
/// [`crate::nearest::PARALLEL_FROM`]: small patterns stay on one thread).
const PARALLEL_FROM: usize = crate::nearest::PARALLEL_FROM;

/// Point count from which the grid is built in parallel, in two passes
/// (rows, then cells within each row); smaller patterns, every simulated
/// one among them, take the one-pass serial build.
const PARALLEL_BUILD_FROM: usize = 1 << 16;

/// Input points per task in the parallel build's first pass. The result
/// does not depend on it.
const BUILD_CHUNK: usize = 1 << 14;

/// A uniform bucket grid over a set of points, reusable across patterns
/// (its buffers keep their capacity between [`BucketGrid::rebuild`] calls, so a
/// simulation loop allocates nothing per pattern once warmed up).
#[derive(Debug, Clone, Default)]
pub struct BucketGrid {
    /// Lower-left corner of cell (0, 0).
    origin: Xy,
    /// Cell width and height.
    cell: [f64; 2],
    /// Columns and rows.
    nx: usize,
    ny: usize,
    /// Rounding margin subtracted from every distance bound.
    guard: f64,
    /// `Some([w, h])` when the grid covers a rectangle exactly and every
    /// point lies in it, so torus queries are allowed.
    period: Option<[f64; 2]>,
    /// Cell of each input point: column, row, row-major index.
    cell_of: Vec<[usize; 3]>,
    /// Positions of the cell walls: `origin + k·cell`, k = 0..=nx (ny).
    walls_x: Vec<f64>,
    walls_y: Vec<f64>,
    /// `nx` and `ny` as floats, for bucketing.
    limits: [f64; 2],
    /// Start of each cell's run in `sorted` (`nx·ny + 1` entries; 32
    /// bits, so a finer grid for clustered data stays affordable).
    start: Vec<u32>,
    /// The points sorted by cell.
    sorted: Vec<Xy>,
    /// Position of each input point in the sorted order, so a query skips
    /// itself by position instead of testing every candidate's index.
    slot: Vec<u32>,
    /// Number of points indexed.
    n: usize,
}

impl BucketGrid {
    /// An empty grid; call [`BucketGrid::rebuild`] before querying.
    pub fn new() -> Self {
        Self::default()
    }

    /// Bucket `points`. The grid spans `frame` when given (the torus
    /// rectangle; enables [`BucketGrid::torus_distances_into`] provided every
    /// point lies in it) and the points' bounding box otherwise.
    ///
    /// Returns `false`, leaving the grid unusable, when the grid would not
    /// pay: fewer than two points, a non-finite coordinate or frame, or
    /// cells so full that the R*-tree is the better tool.
    pub fn rebuild(&mut self, points: &[Xy], frame: Option<Rectangle>) -> bool {
        let build = if points.len() >= PARALLEL_BUILD_FROM {
            Build::Rows { chunk: BUILD_CHUNK }
        } else {
            Build::Serial
        };
        self.rebuild_as(points, frame, build)
    }

    /// [`BucketGrid::rebuild`] with the build chosen by the caller (tests run
    /// both builds on the same small patterns).
    fn rebuild_as(&mut self, points: &[Xy], frame: Option<Rectangle>, build: Build) -> bool {
        self.n = 0;
        self.cell_of.clear();
        self.period = None;
        let n = points.len();
        if n < 2 || n > u32::MAX as usize {
            return false;
        }
        let Some((lo, hi)) = finite_bounds(points) else {
            return false;
        };
        let (origin, extent) = match frame {
            Some(r) => {
                let extent = [r.max[0] - r.min[0], r.max[1] - r.min[1]];
                if !(r.min[0].is_finite()
                    && r.min[1].is_finite()
                    && extent[0].is_finite()
                    && extent[1].is_finite()
                    && extent[0] > 0.0
                    && extent[1] > 0.0)
                {
                    return false;
                }
                (r.min, extent)
            }
            None => (lo, [hi[0] - lo[0], hi[1] - lo[1]]),
        };
        // Largest magnitude any computed position can have; all rounding
        // errors below are a few ulps of it.
        let magnitude = [lo[0], hi[0], lo[1], hi[1], origin[0], origin[1]]
            .iter()
            .fold(0.0f64, |m, v| m.max(v.abs()))
            + extent[0]
            + extent[1];
        // 64 ulps: the bucketing, the side positions and the shifted torus
        // copies each err by at most 2–3 ulps of `magnitude`.
        self.guard = 64.0 * f64::EPSILON * magnitude;
        if let Some(r) = frame {
            let tol = self.guard;
            let inside = lo[0] >= r.min[0] - tol
                && lo[1] >= r.min[1] - tol
                && hi[0] <= r.max[0] + tol
                && hi[1] <= r.max[1] + tol;
            if inside {
                self.period = Some(extent);
                // A point up to `tol` outside its clamped cell adds `tol`
                // to the bucketing error.
                self.guard += 2.0 * tol;
            }
        }

        // About one point per cell; when clusters overfill the cells, a
        // grid 4 and then 16 times finer, and the tree beyond that.
        let mut per_cell = if n >= SAMPLE_FROM {
            sampled_density(points, origin, extent)
        } else {
            POINTS_PER_CELL
        };
        let mut rows = Rows::default();
        let cells = loop {
            let (nx, ny) = grid_shape(n, extent, per_cell);
            self.origin = origin;
            self.nx = nx;
            self.ny = ny;
            self.limits = [nx as f64, ny as f64];
            self.cell = [extent[0] / self.limits[0], extent[1] / self.limits[1]];
            let cells = nx * ny;
            self.start.clear();
            self.start.resize(cells + 1, 0);
            let fullest = match build {
                Build::Rows { chunk } => self.count_by_rows(points, chunk, &mut rows),
                Build::Serial => self.count_in_order(points),
            };
            // Each point checks at most 9 · fullest candidates in its 3 × 3
            // block, so the full estimate is needed only past that.
            if !(9 * fullest > WORK_PER_POINT && self.too_full(n)) {
                break cells;
            }
            per_cell /= 4.0;
            if per_cell < 1.0 / MAX_CELLS_PER_POINT || cells >= n.saturating_mul(8) {
                self.start.clear();
                self.cell_of.clear();
                return false;
            }
        };
        let (nx, ny) = (self.nx, self.ny);
        self.walls_x.clear();
        self.walls_x
            .extend((0..=nx).map(|k| origin[0] + k as f64 * self.cell[0]));
        self.walls_y.clear();
        self.walls_y
            .extend((0..=ny).map(|k| origin[1] + k as f64 * self.cell[1]));
        self.sorted.clear();
        self.sorted.resize(n, [0.0, 0.0]);
        self.slot.clear();
        self.slot.resize(n, 0);
        if let Build::Rows { .. } = build {
            self.sort_by_rows(&mut rows);
        } else {
            for c in 0..cells {
                self.start[c + 1] += self.start[c];
            }
            // Counting sort, points of a cell in input order: `start[c]`
            // serves as the cell's fill cursor, then everything moves back
            // one place.
            for (i, (p, &[_, _, c])) in points.iter().zip(&self.cell_of).enumerate() {
                let at = self.start[c] as usize;
                self.sorted[at] = *p;
                self.slot[i] = at as u32;
                self.start[c] += 1;
            }
            self.start.copy_within(0..cells, 1);
            self.start[0] = 0;
        }
        self.n = n;
        true
    }

    /// Serial bucketing for small patterns: the cell of each point into
    /// `cell_of` and the count of cell `c` into `start[c + 1]`. Returns the
    /// fullest cell's count.
    fn count_in_order(&mut self, points: &[Xy]) -> usize {
        let axes = self.axes();
        let nx = self.nx;
        self.cell_of.clear();
        let mut fullest = 0;
        for p in points {
            let (col, row) = (axes.column_of(p[0]), axes.row_of(p[1]));
            let c = row * nx + col;
            self.cell_of.push([col, row, c]);
            self.start[c + 1] += 1;
            fullest = fullest.max(self.start[c + 1] as usize);
        }
        fullest
    }

    /// Parallel bucketing for large patterns, first pass: the points (and
    /// their input indices) grouped by row, input order within a row, into
    /// `rows`; then, row by row in parallel, the count of cell `c` into
    /// `start[c + 1]`. Returns the fullest cell's count.
    ///
    /// Why two passes: one pass scatters every point to a random one of
    /// about n cells and stalls on cache misses; grouping by row first
    /// scatters to about √n rows (few enough write cursors to stay in
    /// cache), and each row's own pass then reads and writes one small
    /// block of memory. Each chunk sorts its own points by row and the rows
    /// are gathered chunk by chunk, so the grouping is the stable one
    /// whatever the chunks or threads.
    fn count_by_rows(&mut self, points: &[Xy], chunk: usize, rows: &mut Rows) -> usize {
        let axes = self.axes();
        let (nx, ny) = (self.nx, self.ny);
        // Per chunk: its points and indices sorted by row, and where each
        // row starts.
        let pieces: Vec<(Vec<Xy>, Vec<u32>, Vec<u32>)> = points
            .par_chunks(chunk)
            .enumerate()
            .map(|(k, part)| {
                let base = k * chunk;
                let row: Vec<u32> = part.iter().map(|p| axes.row_of(p[1]) as u32).collect();
                let mut starts = vec![0u32; ny + 1];
                for &r in &row {
                    starts[r as usize + 1] += 1;
                }
                for r in 0..ny {
                    starts[r + 1] += starts[r];
                }
                let mut cursor = starts.clone();
                let mut grouped = vec![[0.0, 0.0]; part.len()];
                let mut index = vec![0u32; part.len()];
                for (j, (&r, p)) in row.iter().zip(part).enumerate() {
                    let at = &mut cursor[r as usize];
                    grouped[*at as usize] = *p;
                    index[*at as usize] = (base + j) as u32;
                    *at += 1;
                }
                (grouped, index, starts)
            })
            .collect();
        rows.lengths.clear();
        rows.lengths.extend((0..ny).map(|r| {
            pieces
                .iter()
                .map(|(_, _, s)| (s[r + 1] - s[r]) as usize)
                .sum::<usize>()
        }));
        rows.points.clear();
        rows.points.resize(points.len(), [0.0, 0.0]);
        rows.index.clear();
        rows.index.resize(points.len(), 0);
        let lengths = rows.lengths.iter().copied();
        let grouped = split_runs(&mut rows.points, lengths.clone());
        let indices = split_runs(&mut rows.index, lengths);
        grouped
            .into_par_iter()
            .zip(indices)
            .zip(self.start[1..].par_chunks_mut(nx))
            .enumerate()
            .map(|(r, ((grouped, indices), counts))| {
                let mut at = 0;
                for (points, index, starts) in &pieces {
                    let run = starts[r] as usize..starts[r + 1] as usize;
                    let len = run.len();
                    grouped[at..at + len].copy_from_slice(&points[run.clone()]);
                    indices[at..at + len].copy_from_slice(&index[run]);
                    at += len;
                }
                let mut fullest = 0;
                for p in grouped.iter() {
                    let count = &mut counts[axes.column_of(p[0])];
                    *count += 1;
                    fullest = fullest.max(*count);
                }
                fullest as usize
            })
            .max()
            .unwrap_or(0)
    }

    /// Parallel bucketing, second pass (after [`BucketGrid::count_by_rows`]):
    /// cell counts into cell starts, then each row's points into its cells,
    /// rows in parallel. The result is the same stable counting sort the
    /// serial build makes, bit for bit.
    fn sort_by_rows(&mut self, rows: &mut Rows) {
        let axes = self.axes();
        let (nx, ny) = (self.nx, self.ny);
        // Points before each row, then the running count within each row.
        let mut before = Vec::with_capacity(ny);
        let mut total = 0u32;
        for &len in &rows.lengths {
            before.push(total);
            total += len as u32;
        }
        self.start[1..]
            .par_chunks_mut(nx)
            .zip(&before)
            .for_each(|(counts, &first)| {
                let mut running = first;
                for c in counts {
                    running += *c;
                    *c = running;
                }
            });
        self.start[0] = 0;
        let start = &self.start;
        let lengths = rows.lengths.iter().copied();
        let mut order = vec![0u32; rows.index.len()];
        let sorted = split_runs(&mut self.sorted, lengths.clone());
        let ranked = split_runs(&mut order, lengths.clone());
        let grouped = split_runs(&mut rows.points, lengths.clone());
        let indices = split_runs(&mut rows.index, lengths);
        sorted
            .into_par_iter()
            .zip(ranked)
            .zip(grouped)
            .zip(indices)
            .enumerate()
            .for_each(|(r, (((sorted, ranked), grouped), indices))| {
                let first = start[r * nx];
                let mut cursor: Vec<u32> = start[r * nx..(r + 1) * nx]
                    .iter()
                    .map(|s| s - first)
                    .collect();
                for (p, &i) in grouped.iter().zip(indices.iter()) {
                    let at = &mut cursor[axes.column_of(p[0])];
                    sorted[*at as usize] = *p;
                    ranked[*at as usize] = i;
                    *at += 1;
                }
            });
        // Input position → sorted position. A scatter, serial: each write
        // is to a different place, which rayon cannot see.
        for (s, &i) in order.iter().enumerate() {
            self.slot[i as usize] = s as u32;
        }
    }

    /// The bucketing parameters alone, copied so that the parallel passes
    /// can read them while the grid's buffers are borrowed mutably.
    fn axes(&self) -> Axes {
        Axes {
            origin: self.origin,
            cell: self.cell,
            count: [self.nx, self.ny],
            limits: self.limits,
        }
    }

    /// Rounding margin subtracted from every distance bound: 64 ulps of
    /// the largest coordinate plus the extents, more than the few ulps the
    /// bucketing, the cell sides and the torus shifts can each be off by.
    pub fn guard(&self) -> f64 {
        self.guard
    }

    /// True when torus queries are allowed (a frame was given and holds
    /// every point).
    pub fn wraps(&self) -> bool {
        self.n > 0 && self.period.is_some()
    }

    /// Plane nearest-neighbour distance of every point (the same `points`
    /// passed to [`BucketGrid::rebuild`]) into `out`, in input order. Returns
    /// `false` (and leaves `out` empty) when the grid was not built for
    /// these points.
    pub fn plane_distances_into(&self, points: &[Xy], out: &mut Vec<f64>) -> bool {
        out.clear();
        if self.n == 0 || points.len() != self.n {
            return false;
        }
        if self.by_point() {
            out.extend(
                points
                    .iter()
                    .enumerate()
                    .map(|(i, p)| self.plane_nearest(i, *p).sqrt()),
            );
        } else {
            let d = self.in_cell_order(|s, p, ci, cj| self.plane_nearest_at(s, p, ci, cj));
            out.par_extend(self.slot.par_iter().map(|&s| d[s as usize]));
        }
        true
    }

    /// Torus nearest-neighbour distance of every point into `out`, input
    /// order. Returns `false` (and leaves `out` empty) unless the grid was
    /// built for these points with a frame that holds them all.
    pub fn torus_distances_into(&self, points: &[Xy], out: &mut Vec<f64>) -> bool {
        out.clear();
        let Some(period) = self.period else {
            return false;
        };
        if self.n == 0 || points.len() != self.n {
            return false;
        }
        if self.by_point() {
            out.extend(
                points
                    .iter()
                    .enumerate()
                    .map(|(i, p)| self.torus_nearest(i, *p, period).sqrt()),
            );
        } else {
            let d = self.in_cell_order(|s, p, ci, cj| self.torus_nearest_at(s, p, ci, cj, period));
            out.par_extend(self.slot.par_iter().map(|&s| d[s as usize]));
        }
        true
    }

    /// True when queries go point by point in input order: small patterns
    /// from the serial build, which records each point's cell.
    fn by_point(&self) -> bool {
        self.n < PARALLEL_FROM && self.cell_of.len() == self.n
    }

    /// `query` (a squared distance) for every point, square-rooted, in
    /// sorted order: cell by cell, rows in parallel, so that consecutive
    /// queries read neighbouring memory. Each value depends only on its
    /// point, so the order changes no bit of the result.
    fn in_cell_order(&self, query: impl Fn(usize, Xy, usize, usize) -> f64 + Sync) -> Vec<f64> {
        let nx = self.nx;
        let mut d = vec![0.0; self.n];
        let row_len = |j: usize| (self.start[(j + 1) * nx] - self.start[j * nx]) as usize;
        let rows = split_runs(&mut d, (0..self.ny).map(row_len));
        rows.into_par_iter().enumerate().for_each(|(j, out)| {
            let first = self.start[j * nx] as usize;
            for i in 0..nx {
                let (from, to) = self.span(j, i, i);
                for s in from..to {
                    out[s - first] = query(s, self.sorted[s], i, j).sqrt();
                }
            }
        });
        d
    }

    /// Estimated candidate checks of a full scan: each point looks at the
    /// 3 × 3 block of cells around its own. `start[c + 1]` holds the
    /// count of cell `c` when this is called.
    fn too_full(&self, n: usize) -> bool {
        let (nx, ny) = (self.nx, self.ny);
        let count = |i: usize, j: usize| self.start[j * nx + i + 1] as usize;
        // Saturating sums of non-negative terms, so the order of the
        // parallel reduction changes nothing.
        let row_work = |j: usize| {
            let mut work = 0usize;
            for i in 0..nx {
                let own = count(i, j);
                if own == 0 {
                    continue;
                }
                let mut block = 0;
                for jj in j.saturating_sub(1)..=(j + 1).min(ny - 1) {
                    for ii in i.saturating_sub(1)..=(i + 1).min(nx - 1) {
                        block += count(ii, jj);
                    }
                }
                work = work.saturating_add(own.saturating_mul(block));
            }
            work
        };
        let work = if n >= PARALLEL_BUILD_FROM {
            (0..ny)
                .into_par_iter()
                .map(row_work)
                .reduce(|| 0, usize::saturating_add)
        } else {
            (0..ny).map(row_work).fold(0, usize::saturating_add)
        };
        work > WORK_PER_POINT.saturating_mul(n)
    }

    /// Squared distance from point `i` at `p` to its nearest other point.
    fn plane_nearest(&self, i: usize, p: Xy) -> f64 {
        let [ci, cj, _] = self.cell_of[i];
        self.plane_nearest_at(self.slot[i] as usize, p, ci, cj)
    }

    /// Squared distance from the point at sorted position `own` (at `p`,
    /// in cell (ci, cj)) to its nearest other point.
    fn plane_nearest_at(&self, own: usize, p: Xy, ci: usize, cj: usize) -> f64 {
        let mut best = f64::INFINITY;
        let scan = |run: (usize, usize), best: f64| {
            self.others(run, own, best, |points, best| closest_in(points, p, best))
        };
        // Rings 0 and 1 together, row by row: the 3 × 3 block settles
        // nearly every query, and checking its centre alone first rarely
        // pays.
        let mut b = self.plane_box(ci, cj, 1);
        for row in b[2]..=b[3] {
            best = scan(self.span(row, b[0], b[1]), best);
        }
        let mut k = 1;
        while !self.plane_settled(best, p, b) {
            // Only the cells of the next ring are new.
            k += 1;
            let prev = b;
            b = self.plane_box(ci, cj, k);
            for row in b[2]..=b[3] {
                if row < prev[2] || row > prev[3] {
                    best = scan(self.span(row, b[0], b[1]), best);
                } else {
                    if b[0] < prev[0] {
                        best = scan(self.span(row, b[0], prev[0] - 1), best);
                    }
                    if prev[1] < b[1] {
                        best = scan(self.span(row, prev[1] + 1, b[1]), best);
                    }
                }
            }
        }
        best
    }

    /// Box of rings 0..=k around cell (ci, cj), clipped to the grid:
    /// columns b[0]..=b[1], rows b[2]..=b[3].
    fn plane_box(&self, ci: usize, cj: usize, k: usize) -> [usize; 4] {
        [
            ci.saturating_sub(k),
            (ci + k).min(self.nx - 1),
            cj.saturating_sub(k),
            (cj + k).min(self.ny - 1),
        ]
    }

    /// True when, with box `b` searched, no unsearched point can beat
    /// `best`: the distance from `p` to each side of the box that has cells
    /// beyond it bounds every unsearched point (no such side: all searched).
    fn plane_settled(&self, best: f64, p: Xy, b: [usize; 4]) -> bool {
        let mut bound = f64::INFINITY;
        if b[0] > 0 {
            bound = bound.min(p[0] - self.walls_x[b[0]]);
        }
        if b[1] + 1 < self.nx {
            bound = bound.min(self.walls_x[b[1] + 1] - p[0]);
        }
        if b[2] > 0 {
            bound = bound.min(p[1] - self.walls_y[b[2]]);
        }
        if b[3] + 1 < self.ny {
            bound = bound.min(self.walls_y[b[3] + 1] - p[1]);
        }
        bound == f64::INFINITY || self.settled(best, bound)
    }

    /// Squared torus distance from point `i` at `p` to its nearest other
    /// point, `period` = [w, h].
    fn torus_nearest(&self, i: usize, p: Xy, period: [f64; 2]) -> f64 {
        let [ci, cj, _] = self.cell_of[i];
        self.torus_nearest_at(self.slot[i] as usize, p, ci, cj, period)
    }

    /// [`BucketGrid::torus_nearest`] for the point at sorted position `own`, in
    /// cell (ci, cj).
    fn torus_nearest_at(&self, own: usize, p: Xy, ci: usize, cj: usize, period: [f64; 2]) -> f64 {
        let [w, h] = period;
        // The three shifted copies per axis, as `p[a] + s` for s in
        // [−w, 0, w]: the expressions `toroidal` has always used.
        let xs = [p[0] + -w, p[0] + 0.0, p[0] + w];
        let ys = [p[1] + -h, p[1] + 0.0, p[1] + h];
        let (nx, ny) = (self.nx, self.ny);
        let closest = |points: &[Xy], best: f64| closest_in_torus(points, xs, ys, best);
        // Columns at offsets lo..=hi (stored shifted by nx, so unsigned) of
        // grid row `row`. A span covers at most nx columns, so it wraps at
        // most once.
        let scan = |row: usize, lo: usize, hi: usize, best: f64| {
            let (first, last) = (wrap(ci + lo, nx), wrap(ci + hi, nx));
            if first <= last {
                self.others(self.span(row, first, last), own, best, closest)
            } else {
                let best = self.others(self.span(row, first, nx - 1), own, best, closest);
                self.others(self.span(row, 0, last), own, best, closest)
            }
        };
        let mut best = f64::INFINITY;
        // As in the plane, rings 0 and 1 are searched together.
        let mut k = 1;
        let mut b = self.torus_box(k);
        for r in b[2]..=b[3] {
            best = scan(wrap(cj + r, ny), b[0], b[1], best);
        }
        while !self.torus_settled(best, p, ci, cj, b) {
            k += 1;
            let prev = b;
            b = self.torus_box(k);
            for r in b[2]..=b[3] {
                let row = wrap(cj + r, ny);
                if r < prev[2] || r > prev[3] {
                    best = scan(row, b[0], b[1], best);
                } else {
                    if b[0] < prev[0] {
                        best = scan(row, b[0], prev[0] - 1, best);
                    }
                    if prev[1] < b[1] {
                        best = scan(row, prev[1] + 1, b[1], best);
                    }
                }
            }
        }
        best
    }

    /// Offsets of the box of rings 0..=k on the torus, shifted by nx (ny)
    /// so they stay unsigned: columns b[0]..=b[1], rows b[2]..=b[3].
    fn torus_box(&self, k: usize) -> [usize; 4] {
        let (ax, bx) = wrapped_span(k, self.nx);
        let (ay, by) = wrapped_span(k, self.ny);
        [self.nx - ax, self.nx + bx, self.ny - ay, self.ny + by]
    }

    /// True when, with torus box `b` around cell (ci, cj) searched, no
    /// unsearched point can beat `best`. An axis whose span wraps all the
    /// way round bounds nothing; otherwise every image of an unsearched
    /// point lies beyond one of the box's walls on that axis.
    fn torus_settled(&self, best: f64, p: Xy, ci: usize, cj: usize, b: [usize; 4]) -> bool {
        let mut bound = f64::INFINITY;
        if b[1] - b[0] + 1 < self.nx {
            let (ax, bx) = ((self.nx - b[0]) as f64, (b[1] - self.nx) as f64);
            let left = self.walls_x[ci] - self.cell[0] * ax;
            let right = self.walls_x[ci + 1] + self.cell[0] * bx;
            bound = bound.min(p[0] - left).min(right - p[0]);
        }
        if b[3] - b[2] + 1 < self.ny {
            let (ay, by) = ((self.ny - b[2]) as f64, (b[3] - self.ny) as f64);
            let low = self.walls_y[cj] - self.cell[1] * ay;
            let high = self.walls_y[cj + 1] + self.cell[1] * by;
            bound = bound.min(p[1] - low).min(high - p[1]);
        }
        bound == f64::INFINITY || self.settled(best, bound)
    }

    /// True when a squared distance `best` cannot be beaten by a point at
    /// least `bound` away, after the rounding margin.
    fn settled(&self, best: f64, bound: f64) -> bool {
        let b = bound - self.guard;
        // (1 − 8ε) absorbs the rounding of the squares and their sum.
        b > 0.0 && best <= b * b * (1.0 - 8.0 * f64::EPSILON)
    }

    /// The sorted positions `(from, to)` of the points in cells `lo..=hi`
    /// of `row`: one run, since points are sorted by cell in row-major
    /// order.
    fn span(&self, row: usize, lo: usize, hi: usize) -> (usize, usize) {
        let base = row * self.nx;
        (
            self.start[base + lo] as usize,
            self.start[base + hi + 1] as usize,
        )
    }

    /// Fold `closest` over the sorted points of run `(from, to)` without
    /// position `own` (the query itself): as one slice, or as the two
    /// slices either side of it.
    #[inline]
    fn others(
        &self,
        (from, to): (usize, usize),
        own: usize,
        best: f64,
        closest: impl Fn(&[Xy], f64) -> f64,
    ) -> f64 {
        if from <= own && own < to {
            let best = closest(&self.sorted[from..own], best);
            closest(&self.sorted[own + 1..to], best)
        } else {
            closest(&self.sorted[from..to], best)
        }
    }
}

/// The smaller of `best` and the squared distance from `p` to each of
/// `points`, as `dx·dx + dy·dy` (the expression `rstar` evaluates).
#[inline]
fn closest_in(points: &[Xy], p: Xy, mut best: f64) -> f64 {
    for &[x, y] in points {
        let (dx, dy) = (x - p[0], y - p[1]);
        let d2 = dx * dx + dy * dy;
        if d2 < best {
            best = d2;
        }
    }
    best
}

/// The smaller of `best` and the squared torus distance to each of
/// `points` from the query whose shifted copies are `xs` and `ys`.
/// Rounding is monotone, so the smallest of the nine sums is the sum of
/// the two smallest squares.
#[inline]
fn closest_in_torus(points: &[Xy], xs: [f64; 3], ys: [f64; 3], mut best: f64) -> f64 {
    for &[x, y] in points {
        let d2 = min_square(x, xs) + min_square(y, ys);
        if d2 < best {
            best = d2;
        }
    }
    best
}

/// `v` mod `count` for `v < 3·count` (offsets are stored shifted by one
/// period and never exceed it), without a division.
fn wrap(mut v: usize, count: usize) -> usize {
    if v >= count {
        v -= count;
    }
    if v >= count {
        v -= count;
    }
    v
}

/// Smallest of `(v − s)²` over the three shifted copies `s`.
fn min_square(v: f64, shifted: [f64; 3]) -> f64 {
    let [a, b, c] = shifted.map(|s| {
        let d = v - s;
        d * d
    });
    // Plain comparisons (the squares are never NaN: coordinates are
    // checked finite), cheaper than `f64::min`'s NaN handling.
    let ab = if b < a { b } else { a };
    if c < ab { c } else { ab }
}

/// How [`BucketGrid::rebuild`] sorts the points into cells.
#[derive(Debug, Clone, Copy)]
enum Build {
    /// One pass in input order, each point's cell recorded.
    Serial,
    /// In parallel, first into rows (`chunk` input points per task), then
    /// into cells row by row; the same order as `Serial`.
    Rows { chunk: usize },
}

/// The parallel build's points grouped by row: the points, their input
/// indices, and the length of each row's run. Dropped after the build.
#[derive(Debug, Default)]
struct Rows {
    points: Vec<Xy>,
    index: Vec<u32>,
    lengths: Vec<usize>,
}

/// Where the cells of a grid lie: what bucketing a coordinate needs.
#[derive(Debug, Clone, Copy)]
struct Axes {
    /// Lower-left corner of cell (0, 0).
    origin: Xy,
    /// Cell width and height.
    cell: [f64; 2],
    /// Columns and rows.
    count: [usize; 2],
    /// `count` as floats.
    limits: [f64; 2],
}

impl Axes {
    fn column_of(&self, x: f64) -> usize {
        bucket(
            x,
            self.origin[0],
            self.cell[0],
            self.count[0],
            self.limits[0],
        )
    }

    fn row_of(&self, y: f64) -> usize {
        bucket(
            y,
            self.origin[1],
            self.cell[1],
            self.count[1],
            self.limits[1],
        )
    }
}

/// `buffer` cut into consecutive runs of the given lengths (which sum to
/// at most its length), so that each run can go to a task of its own.
fn split_runs<T>(buffer: &mut [T], lengths: impl Iterator<Item = usize>) -> Vec<&mut [T]> {
    let mut rest = buffer;
    lengths
        .map(|len| {
            let (run, tail) = std::mem::take(&mut rest).split_at_mut(len);
            rest = tail;
            run
        })
        .collect()
}

/// Point count from which [`sampled_density`] picks the grid's fineness
/// before the full build.
const SAMPLE_FROM: usize = 1 << 16;

/// Points per cell for a large pattern, guessed from every k-th point
/// (about 4 096 of them): the coarsest of 1, 1/4 and 1/16 at which the
/// sample's estimated scan work, scaled up to all points, stays within
/// `WORK_PER_POINT` a point. Only a guess to skip builds that would be
/// refused; the full build still checks its own cells and goes finer if
/// the guess was low.
fn sampled_density(points: &[Xy], origin: Xy, extent: [f64; 2]) -> f64 {
    let n = points.len();
    let step = (n / 4096).max(1);
    let sample: Vec<Xy> = points.iter().step_by(step).copied().collect();
    let f = sample.len() as f64 / n as f64;
    let mut per_cell = POINTS_PER_CELL;
    while per_cell > 1.0 / MAX_CELLS_PER_POINT {
        let (nx, ny) = grid_shape(n, extent, per_cell);
        let limits = [nx as f64, ny as f64];
        let size = [extent[0] / limits[0], extent[1] / limits[1]];
        let mut cells: Vec<(usize, usize)> = sample
            .iter()
            .map(|p| {
                (
                    bucket(p[1], origin[1], size[1], ny, limits[1]),
                    bucket(p[0], origin[0], size[0], nx, limits[0]),
                )
            })
            .collect();
        cells.sort_unstable();
        let count = |c: (usize, usize)| {
            cells.partition_point(|&x| x <= c) - cells.partition_point(|&x| x < c)
        };
        let mut pairs = 0.0;
        let mut k = 0;
        while k < cells.len() {
            let c = cells[k];
            let own = count(c);
            let mut block = 0;
            for r in c.0.saturating_sub(1)..=(c.0 + 1).min(ny - 1) {
                for q in c.1.saturating_sub(1)..=(c.1 + 1).min(nx - 1) {
                    block += count((r, q));
                }
            }
            // Pairs other than a point with itself, scaled from the sample.
            pairs += (own * block - own) as f64;
            k += own;
        }
        let work = pairs / (f * f) + n as f64;
        if work <= (WORK_PER_POINT * n) as f64 {
            break;
        }
        per_cell /= 4.0;
    }
    per_cell.max(1.0 / MAX_CELLS_PER_POINT)
}

/// Columns and rows for `n` points over `extent`: cells of about
/// `per_cell` points, at least one and at most `n` along each axis (so
/// never more than about `n / per_cell` cells, even for a line of points).
fn grid_shape(n: usize, extent: [f64; 2], per_cell: f64) -> (usize, usize) {
    let target = (n as f64 / per_cell).max(1.0);
    let along = |e: f64, side: f64| -> usize {
        if e > 0.0 && side > 0.0 {
            ((e / side).floor() as usize).clamp(1, n)
        } else {
            1
        }
    };
    let (ex, ey) = (extent[0], extent[1]);
    if ex > 0.0 && ey > 0.0 {
        let side = (ex * ey / target).sqrt();
        let nx = along(ex, side);
        let ny = along(ey, side);
        // A long thin frame: one axis clamped, give the other all cells.
        if nx == 1 {
            return (1, along(ey, ey / target));
        }
        if ny == 1 {
            return (along(ex, ex / target), 1);
        }
        (nx, ny)
    } else if ex > 0.0 {
        (along(ex, ex / target), 1)
    } else if ey > 0.0 {
        (1, along(ey, ey / target))
    } else {
        (1, 1)
    }
}

/// Cell index of coordinate `v` along an axis starting at `origin` with
/// `count` cells of `size` (`limit` = count as f64), clamped into
/// 0..count. Clamping keeps each point on the correct side of every cell
/// wall, which is all the search bounds need.
pub(crate) fn bucket(v: f64, origin: f64, size: f64, count: usize, limit: f64) -> usize {
    // Zero on a flat axis (one cell); never NaN, as coordinates are finite.
    if size <= 0.0 {
        return 0;
    }
    let t = (v - origin) / size;
    // For 0 < t < count truncation is the floor; going through i64 is
    // cheaper than a direct f64 → usize conversion and exact here.
    if t > 0.0 && t < limit {
        (t as i64 as usize).min(count - 1)
    } else if t > 0.0 {
        count - 1
    } else {
        0
    }
}

/// Offsets `−a..=b` searched along a wrapping axis of `count` cells at ring
/// `k`: `−k..=k` until that would visit a column twice, then every column
/// once. Grows with `k` and never shrinks.
fn wrapped_span(k: usize, count: usize) -> (usize, usize) {
    let a = k.min((count - 1) / 2);
    let b = k.min(count - 1 - a);
    (a, b)
}

/// The bounding box `(lo, hi)` of `points`; `None` when a coordinate is
/// not finite (the engines then leave the pattern to the R*-tree).
pub(crate) fn finite_bounds(points: &[Xy]) -> Option<(Xy, Xy)> {
    let mut lo = [f64::INFINITY; 2];
    let mut hi = [f64::NEG_INFINITY; 2];
    for p in points {
        for a in 0..2 {
            if !p[a].is_finite() {
                return None;
            }
            lo[a] = lo[a].min(p[a]);
            hi[a] = hi[a].max(p[a]);
        }
    }
    Some((lo, hi))
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::oracles::{Gen, brute_plane, brute_torus};

    /// Many kinds of awkward input: uniform, tight clusters, duplicates,
    /// collinear (horizontal, vertical, diagonal), lattice ties, a far
    /// outlier, huge offsets from the origin, and tiny sizes.
    fn cases() -> Vec<Vec<Xy>> {
        let mut g = Gen(0x9E37_79B9_7F4A_7C15);
        let mut out = Vec::new();
        for n in [2, 3, 5, 17, 143, 400] {
            out.push(
                (0..n)
                    .map(|_| [g.unit() * 100.0, g.unit() * 40.0])
                    .collect(),
            );
        }
        // Clusters of various tightness around a few parents.
        for spread in [1e-6, 0.01, 0.5] {
            let parents: Vec<Xy> = (0..6).map(|_| [g.unit() * 50.0, g.unit() * 50.0]).collect();
            out.push(
                (0..300)
                    .map(|k| {
                        let c = parents[k % parents.len()];
                        [c[0] + spread * g.unit(), c[1] + spread * g.unit()]
                    })
                    .collect(),
            );
        }
        // Duplicates: every point twice, and all points identical.
        let base: Vec<Xy> = (0..60)
            .map(|_| [g.unit() * 10.0, g.unit() * 10.0])
            .collect();
        out.push(base.iter().chain(base.iter()).copied().collect());
        out.push(vec![[3.0, -2.0]; 50]);
        // Collinear.
        out.push((0..100).map(|_| [g.unit() * 30.0, 7.0]).collect());
        out.push((0..100).map(|_| [-1.0, g.unit() * 30.0]).collect());
        out.push(
            (0..100)
                .map(|_| {
                    let t = g.unit();
                    [t * 20.0, t * 5.0 + 1.0]
                })
                .collect(),
        );
        // Integer lattice: many exact ties.
        out.push(
            (0..15)
                .flat_map(|i| (0..9).map(move |j| [i as f64, j as f64]))
                .collect(),
        );
        // One cluster and one far outlier.
        let mut o: Vec<Xy> = (0..120).map(|_| [g.unit(), g.unit()]).collect();
        o.push([1e4, -3e3]);
        out.push(o);
        // Projected-looking coordinates far from the origin, and tiny ones.
        out.push(
            (0..200)
                .map(|_| [5.3e6 + g.unit() * 250.0, 4.1e5 + g.unit() * 90.0])
                .collect(),
        );
        out.push(
            (0..200)
                .map(|_| [1e-9 * g.unit(), 1e-9 * g.unit()])
                .collect(),
        );
        out
    }

    #[test]
    fn plane_distances_match_brute_force_bit_for_bit() {
        let mut grid = BucketGrid::new();
        let mut d = Vec::new();
        for (k, pts) in cases().iter().enumerate() {
            let want = brute_plane(pts);
            // With the bounding box as frame, and with a larger frame.
            if grid.rebuild(pts, None) {
                assert!(grid.plane_distances_into(pts, &mut d));
                assert_eq!(d, want, "case {k}");
            }
            let bigger = Rectangle {
                min: [-2e4, -2e4],
                max: [6e6, 6e6],
            };
            if grid.rebuild(pts, Some(bigger)) {
                assert!(grid.plane_distances_into(pts, &mut d));
                assert_eq!(d, want, "case {k}, big frame");
            }
        }
    }

    /// The serial build and the row-by-row build, with chunks far smaller
    /// than the patterns (so rows are gathered from many chunks), give the
    /// same cells, the same sorted order and the same positions, and the
    /// grid they give answers as the brute-force scan does.
    #[test]
    fn both_builds_sort_alike_and_answer_alike() {
        let mut serial = BucketGrid::new();
        let mut rows = BucketGrid::new();
        let mut d = Vec::new();
        let frame = Rectangle {
            min: [-2e4, -2e4],
            max: [6e6, 6e6],
        };
        let mut compared = 0;
        for (k, pts) in cases().iter().enumerate() {
            for frame in [None, Some(frame)] {
                for chunk in [1, 7, 64, 1 << 14] {
                    let built = serial.rebuild_as(pts, frame, Build::Serial);
                    assert_eq!(
                        rows.rebuild_as(pts, frame, Build::Rows { chunk }),
                        built,
                        "case {k}"
                    );
                    // Overfull patterns (a cluster beside a far outlier,
                    // or small ones in the big frame) are refused by both.
                    if !built {
                        continue;
                    }
                    assert_eq!((rows.nx, rows.ny), (serial.nx, serial.ny), "case {k}");
                    assert_eq!(rows.start, serial.start, "case {k} chunk {chunk}");
                    assert_eq!(rows.sorted, serial.sorted, "case {k} chunk {chunk}");
                    assert_eq!(rows.slot, serial.slot, "case {k} chunk {chunk}");
                    assert!(rows.cell_of.is_empty() && !rows.by_point());
                    assert!(rows.plane_distances_into(pts, &mut d));
                    assert_eq!(d, brute_plane(pts), "case {k} chunk {chunk}");
                    compared += 1;
                }
            }
        }
        assert!(compared > 4 * cases().len(), "{compared}");
    }

    /// Above `PARALLEL_BUILD_FROM` the row-by-row build is the default: on
    /// 70 000 tightly clustered points with duplicates it matches the
    /// serial build exactly, and its distances match the Z-order tree (an
    /// exact engine of a different design) bit for bit, plane and torus.
    #[test]
    fn large_patterns_take_the_row_build_and_stay_exact() {
        let mut g = Gen(7);
        let parents: Vec<Xy> = (0..700).map(|_| [g.unit() * 1e3, g.unit() * 1e3]).collect();
        let mut pts: Vec<Xy> = (0..70_000)
            .map(|k| {
                let c = parents[(k * 7919) % parents.len()];
                [c[0] + 2.0 * g.unit(), c[1] + 2.0 * g.unit()]
            })
            .collect();
        for k in 0..500 {
            pts[k + 1000] = pts[k];
        }
        assert!(pts.len() >= PARALLEL_BUILD_FROM);
        let mut grid = BucketGrid::new();
        let frame = Rectangle {
            min: [-5.0, -5.0],
            max: [1010.0, 1010.0],
        };
        assert!(grid.rebuild(&pts, Some(frame)));
        assert!(grid.cell_of.is_empty(), "the row build records no cells");
        let mut serial = BucketGrid::new();
        assert!(serial.rebuild_as(&pts, Some(frame), Build::Serial));
        assert_eq!((grid.nx, grid.ny), (serial.nx, serial.ny));
        assert!(grid.start == serial.start && grid.sorted == serial.sorted);
        assert_eq!(grid.slot, serial.slot);

        let mut d = Vec::new();
        assert!(grid.plane_distances_into(&pts, &mut d));
        let mut tree = crate::curve_tree::CurveTree::new();
        let mut want = Vec::new();
        assert!(tree.rebuild(&pts) && tree.plane_distances_into(pts.len(), &mut want));
        assert_eq!(d, want);
        assert!(d[1000..1500].iter().all(|&v| v == 0.0), "duplicates");
        assert!(grid.torus_distances_into(&pts, &mut d));
        assert!(tree.torus_distances_into(pts.len(), frame, &mut want));
        assert_eq!(d, want);
    }

    #[test]
    fn uniform_data_uses_the_grid_and_clustered_data_may_not() {
        let mut grid = BucketGrid::new();
        let c = cases();
        assert!(grid.rebuild(&c[4], None), "143 uniform points");
        // 500 identical points: 250 000 checks in one cell, so refused.
        let same = vec![[3.0, -2.0]; 500];
        assert!(!grid.rebuild(&same, None));
        assert!(!grid.plane_distances_into(&same, &mut Vec::new()));
        // 50 identical points are cheap enough (2 500 checks) to keep.
        assert!(grid.rebuild(&same[..50], None));
    }

    #[test]
    fn torus_distances_match_brute_force_bit_for_bit() {
        let mut g = Gen(42);
        let mut grid = BucketGrid::new();
        let mut d = Vec::new();
        let rects = [
            Rectangle {
                min: [0.0, 0.0],
                max: [10.0, 10.0],
            },
            Rectangle {
                min: [2.0, -1.0],
                max: [12.0, 5.0],
            },
            Rectangle {
                min: [5.3e6, 4.1e5],
                max: [5.3e6 + 250.0, 4.1e5 + 90.0],
            },
            // Very thin: one cell across.
            Rectangle {
                min: [0.0, 0.0],
                max: [100.0, 0.5],
            },
        ];
        let mut checked = 0;
        for r in rects {
            let (w, h) = (r.max[0] - r.min[0], r.max[1] - r.min[1]);
            for n in [2, 3, 8, 60, 143, 500] {
                let mut pts: Vec<Xy> = (0..n)
                    .map(|_| [r.min[0] + w * g.unit(), r.min[1] + h * g.unit()])
                    .collect();
                // Points on the rectangle's sides and corners.
                if n > 4 {
                    pts[0] = r.min;
                    pts[1] = r.max;
                    pts[2] = [r.min[0], r.max[1]];
                    pts[3] = [r.max[0], r.min[1] + 0.5 * h];
                }
                assert!(grid.rebuild(&pts, Some(r)), "{r:?} n {n}");
                assert!(grid.wraps());
                assert!(grid.torus_distances_into(&pts, &mut d));
                assert_eq!(d, brute_torus(&pts, r), "{r:?} n {n}");
                // The plane distances from the same grid.
                assert!(grid.plane_distances_into(&pts, &mut d));
                assert_eq!(d, brute_plane(&pts), "{r:?} n {n} plane");
                checked += 1;
            }
        }
        assert_eq!(checked, 24);
    }

    #[test]
    fn points_outside_the_frame_disable_the_torus_only() {
        let r = Rectangle {
            min: [0.0, 0.0],
            max: [10.0, 10.0],
        };
        let pts = [[1.0, 1.0], [2.0, 3.0], [11.0, 5.0]];
        let mut grid = BucketGrid::new();
        assert!(grid.rebuild(&pts, Some(r)));
        assert!(!grid.wraps());
        let mut d = Vec::new();
        assert!(!grid.torus_distances_into(&pts, &mut d));
        assert!(grid.plane_distances_into(&pts, &mut d));
        assert_eq!(d, brute_plane(&pts));
    }

    #[test]
    fn non_finite_or_tiny_inputs_are_refused() {
        let mut grid = BucketGrid::new();
        assert!(!grid.rebuild(&[[0.0, 0.0]], None));
        assert!(!grid.rebuild(&[[0.0, 0.0], [f64::NAN, 1.0]], None));
        assert!(!grid.rebuild(&[[0.0, 0.0], [f64::INFINITY, 1.0]], None));
    }

    #[test]
    fn wrapped_spans_cover_each_column_once() {
        for count in 1..8 {
            let mut last = (0, 0);
            for k in 0..10 {
                let (a, b) = wrapped_span(k, count);
                assert!(a + b < count, "count {count} k {k}");
                assert!(a >= last.0 && b >= last.1);
                last = (a, b);
            }
            assert_eq!(last.0 + last.1 + 1, count);
        }
    }
}
