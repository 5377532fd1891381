//! Isopleths: the smallest region holding a given share of the surface's
//! mass inside the window (the highest-density region; Worton 1989 for home
//! ranges). Cells are ranked by value (ties by index, so the result does not
//! depend on sort stability), mass accumulated from the top until the share
//! is reached; the region is every window cell at or above that cell's
//! value. Its area is the cell count times the cell area.
//!
//! The share is of the mass the surface holds inside the window (with edge
//! handling `none` this is less than 1: see `mass_outside`).

/// One level's region.
#[derive(Debug, Clone)]
pub struct Region {
    /// Share of the mass, in (0, 1).
    pub level: f64,
    /// Density value bounding the region.
    pub threshold: f64,
    /// Cells in the region.
    pub cells: Vec<bool>,
    /// Area (unit²).
    pub area: f64,
}

/// The window's cells from the densest down (ties by index, so the order
/// is total and the result does not depend on the sort), with the mass
/// they hold. Sorting is the costly step, so one order serves every level
/// of a surface and its mass ranks.
pub struct MassOrder {
    /// (value, cell index), densest first.
    cells: Vec<(f64, usize)>,
    /// Sum of the values, accumulated in that order.
    total: f64,
}

impl MassOrder {
    /// Rank the cells of `values` inside `mask`.
    pub fn new(values: &[f64], mask: &[bool]) -> Self {
        let mut cells: Vec<(f64, usize)> = values
            .iter()
            .zip(mask)
            .enumerate()
            .filter(|(_, (_, m))| **m)
            .map(|(k, (v, _))| (*v, k))
            .collect();
        cells.sort_unstable_by(|a, b| b.0.total_cmp(&a.0).then(a.1.cmp(&b.1)));
        let total = cells.iter().map(|c| c.0).sum();
        Self { cells, total }
    }

    /// The `level` isopleth: every window cell at or above the value of
    /// the cell where the accumulated mass reaches the share.
    pub fn region(&self, values: &[f64], mask: &[bool], cell_area: f64, level: f64) -> Region {
        let target = level * self.total;
        let mut acc = 0.0;
        let mut threshold = 0.0;
        for &(v, _) in &self.cells {
            acc += v;
            threshold = v;
            if acc >= target {
                break;
            }
        }
        let cells: Vec<bool> = values
            .iter()
            .zip(mask)
            .map(|(v, m)| *m && *v >= threshold && *v > 0.0)
            .collect();
        let count = cells.iter().filter(|c| **c).count();
        Region {
            level,
            threshold,
            area: count as f64 * cell_area,
            cells,
        }
    }

    /// For each of `len` cells, the share of the mass held by window cells
    /// of higher or equal density (0 at the peak, 1 at the lowest cell); 1
    /// outside the window.
    pub fn ranks(&self, len: usize) -> Vec<f64> {
        let mut out = vec![1.0; len];
        let mut acc = 0.0;
        for &(v, k) in &self.cells {
            acc += v;
            out[k] = if self.total > 0.0 {
                acc / self.total
            } else {
                1.0
            };
        }
        out
    }
}

/// The `level` isopleth of `values` restricted to `mask`.
pub fn region(values: &[f64], mask: &[bool], cell_area: f64, level: f64) -> Region {
    MassOrder::new(values, mask).region(values, mask, cell_area, level)
}

/// For each window cell, the share of the mass held by cells of higher or
/// equal density (0 at the peak, 1 at the lowest cell); 1 outside the window.
/// A cell belongs to the `p` isopleth region exactly when its rank is ≤ `p`
/// (up to ties), so colouring by rank makes surfaces of different
/// peakedness comparable.
pub fn mass_rank(values: &[f64], mask: &[bool]) -> Vec<f64> {
    MassOrder::new(values, mask).ranks(values.len())
}

/// Outline of the region `{value ≥ threshold}` traced by marching squares
/// (the `contour` crate), in the raster's coordinates: the value of cell
/// `(i, j)` is placed at its centre.
pub fn outline(grid: &crate::grid::Grid, values: &[f64], threshold: f64) -> geo::MultiPolygon<f64> {
    // The contour crate puts value k of a row at x = k (+ origin); shift by
    // half a cell so that values sit at cell centres.
    let builder = contour::ContourBuilder::new(grid.nx, grid.ny, true)
        .x_origin(grid.x0 + 0.5 * grid.cell)
        .y_origin(grid.y0 + 0.5 * grid.cell)
        .x_step(grid.cell)
        .y_step(grid.cell);
    match builder.contours(values, &[threshold]) {
        Ok(mut c) if !c.is_empty() => c.swap_remove(0).into_inner().0,
        _ => geo::MultiPolygon(vec![]),
    }
}

#[cfg(test)]
#[allow(clippy::unwrap_used)]
mod tests {
    use super::*;
    use crate::grid::Grid;
    use geo::Area;

    /// Source: closed form of the bivariate normal (the mass within radius r
    /// is 1 − exp(−r²/2σ²)), so the p-region of a single point's Gaussian is a
    /// disc of area −2πσ²·ln(1 − p). 95 % checked to 1 %, 50 % to 2 %.
    #[test]
    fn single_point_gaussian_isopleth_is_the_closed_form_disc() {
        let sigma = 10.0;
        let g = Grid {
            x0: -100.0,
            y0: -100.0,
            cell: 1.0,
            nx: 200,
            ny: 200,
        };
        let mask = vec![true; g.len()];
        let e = crate::edge::estimate(
            &[[0.3, -0.2]],
            &g,
            &mask,
            crate::kernels::Kernel::Gaussian,
            sigma,
            crate::edge::DensityEdge::None,
        );
        for (p, tol) in [(0.95, 0.01), (0.5, 0.02)] {
            let r = region(&e.values, &mask, g.cell_area(), p);
            let want = -2.0 * std::f64::consts::PI * sigma * sigma * (1.0f64 - p).ln();
            assert!(
                (r.area - want).abs() / want < tol,
                "{p}: {} vs {want}",
                r.area
            );
            let poly = outline(&g, &e.values, r.threshold);
            let traced = poly.unsigned_area();
            assert!(
                (traced - want).abs() / want < 0.02,
                "traced {p}: {traced} vs {want}"
            );
        }
    }
}
