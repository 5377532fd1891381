//! The border (reduced-sample) estimator.
//!
//! At distance r only centres at least r from the outline count, because
//! their whole disc of radius r lies in the window and every neighbour
//! within r was seen:
//!
//! K̂_b(r) = |W| / ((n − 1)·n_r) · Σ_{i: b_i ≥ r} #{j ≠ i: d_ij ≤ r},
//!
//! with b_i the distance from x_i to the outline (holes included; for a
//! buffered hull, to the exact buffer, as the audit's guard zone has it) and
//! n_r the number of such centres. Under CSR with n points fixed, each
//! counted centre has on average (n − 1)πr²/|W| neighbours within r, so
//! K̂_b(r) averages πr² (ratio-unbiased). It is undefined (`None`) when no
//! centre is r from the outline. It wastes the points near the edge, which
//! is why it is noisier than the weighted estimators at large r.

use crate::k_window::KWindow;
use patternproof_core::Xy;
use rayon::prelude::*;

/// b_i for every point, in point order: the distance to the window's
/// outline, for a buffered hull to the exact buffer (as the audit's guard
/// zone measures it).
pub fn outline_distances(region: &KWindow, points: &[Xy], parallel: bool) -> Vec<f64> {
    per_point(points, parallel, |p| region.geometry.distance_to_outline(p))
}

/// The distance of every point to the window polygon's own edges (the
/// isotropic weight's shortcut: a shorter circle lies wholly inside).
/// The same as [`outline_distances`] except in a buffered hull.
pub fn edge_distances(region: &KWindow, points: &[Xy], parallel: bool) -> Vec<f64> {
    per_point(points, parallel, |p| region.geometry.distance_to_edges(p))
}

/// For every point, how many grid distances its b_i reaches
/// ([`counted_up_to`]), without keeping b_i.
pub fn counted_ends(region: &KWindow, grid: &[f64], points: &[Xy], parallel: bool) -> Vec<u32> {
    // At most `grid.len()` (≤ the CLI's 10 000), so it fits a u32.
    per_point(points, parallel, |p| {
        counted_up_to(grid, region.geometry.distance_to_outline(p)) as u32
    })
}

fn per_point<T: Send>(points: &[Xy], parallel: bool, f: impl Fn(Xy) -> T + Sync) -> Vec<T> {
    if parallel {
        points.par_iter().map(|&p| f(p)).collect()
    } else {
        points.iter().map(|&p| f(p)).collect()
    }
}

/// How many grid distances are ≤ b (the grid indices at which a centre
/// with outline distance b counts): `grid[..k]`.
pub fn counted_up_to(grid: &[f64], b: f64) -> usize {
    grid.partition_point(|&r| r <= b)
}

/// The estimate on the grid from `counts[k]` (the neighbour counts of the
/// counted centres at `grid[k]`, summed) and `centres[k]` (n_r).
pub fn estimate(area: f64, n: usize, counts: &[f64], centres: &[usize]) -> Vec<Option<f64>> {
    counts
        .iter()
        .zip(centres)
        .map(|(&c, &m)| (m > 0 && n > 1).then(|| area * c / ((n - 1) as f64 * m as f64)))
        .collect()
}
