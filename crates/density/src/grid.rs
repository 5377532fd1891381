//! The raster: square cells over the window's bounding box (one spare cell
//! on each side), the window mask, and the linear binning of points.
//!
//! Cell `(i, j)` has its centre at `(x0 + (i + ½)·cell, y0 + (j + ½)·cell)`;
//! row `j = 0` is the southern edge; values are stored row by row,
//! index `j·nx + i`.

use patternproof_core::Xy;
use patternproof_window::PreparedWindow;
use serde::Serialize;

/// A raster geometry.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct Grid {
    /// West edge of the raster.
    pub x0: f64,
    /// South edge of the raster.
    pub y0: f64,
    /// Side of a (square) cell, in the unit.
    pub cell: f64,
    /// Columns.
    pub nx: usize,
    /// Rows.
    pub ny: usize,
}

/// Cells on the long side of the window when `--cell` is not given.
pub const DEFAULT_LONG_SIDE_CELLS: f64 = 250.0;

/// Largest raster accepted (cells).
pub const MAX_CELLS: usize = 16_000_000;

impl Grid {
    /// The raster over `window` with cells of side `cell` (default: the
    /// long side of the bounding box over [`DEFAULT_LONG_SIDE_CELLS`]).
    pub fn over(window: &PreparedWindow, cell: Option<f64>) -> Option<Grid> {
        let r = window.bounds()?;
        let (w, h) = (r.width(), r.height());
        let cell = cell.unwrap_or(w.max(h) / DEFAULT_LONG_SIDE_CELLS);
        if !(cell.is_finite() && cell > 0.0) {
            return None;
        }
        let nx = (w / cell).ceil().max(1.0) as usize + 2;
        let ny = (h / cell).ceil().max(1.0) as usize + 2;
        // Centre the raster on the box.
        let x0 = r.min[0] - ((nx as f64) * cell - w) / 2.0;
        let y0 = r.min[1] - ((ny as f64) * cell - h) / 2.0;
        Some(Grid {
            x0,
            y0,
            cell,
            nx,
            ny,
        })
    }

    /// Number of cells.
    pub fn len(&self) -> usize {
        self.nx * self.ny
    }

    /// Whether the raster has no cells.
    pub fn is_empty(&self) -> bool {
        self.len() == 0
    }

    /// Area of one cell.
    pub fn cell_area(&self) -> f64 {
        self.cell * self.cell
    }

    /// Centre of cell `(i, j)`.
    pub fn centre(&self, i: usize, j: usize) -> Xy {
        [
            self.x0 + (i as f64 + 0.5) * self.cell,
            self.y0 + (j as f64 + 0.5) * self.cell,
        ]
    }

    /// Which cells have their centre inside the window
    /// ([`PreparedWindow::lattice_inside`]: the even–odd rule along the
    /// rows of centres, so holes and several parts are handled).
    pub fn mask(&self, window: &PreparedWindow) -> Vec<bool> {
        window.lattice_inside([self.x0, self.y0], self.cell, self.nx, self.ny)
    }

    /// Bilinear weights of a location over the four surrounding cell
    /// centres: `(index, weight)`; `None` outside the raster's inner part.
    pub fn bilinear(&self, p: Xy) -> Option<[(usize, f64); 4]> {
        let u = (p[0] - self.x0) / self.cell - 0.5;
        let v = (p[1] - self.y0) / self.cell - 0.5;
        if !(u.is_finite() && v.is_finite()) || u < 0.0 || v < 0.0 {
            return None;
        }
        let (i, j) = (u.floor() as usize, v.floor() as usize);
        if i + 1 >= self.nx || j + 1 >= self.ny {
            return None;
        }
        let (fx, fy) = (u - i as f64, v - j as f64);
        let k = j * self.nx + i;
        Some([
            (k, (1.0 - fx) * (1.0 - fy)),
            (k + 1, fx * (1.0 - fy)),
            (k + self.nx, (1.0 - fx) * fy),
            (k + self.nx + 1, fx * fy),
        ])
    }

    /// Linear binning (Wand 1994): each point's weight is shared among the
    /// four nearest cell centres, so a smooth kernel's convolution with the
    /// bins is accurate to second order. Returns the binned weights (they
    /// sum to the weights of the points that fall inside the raster).
    pub fn bin(&self, points: &[Xy], weights: Option<&[f64]>) -> Vec<f64> {
        let mut out = vec![0.0; self.len()];
        for (k, p) in points.iter().enumerate() {
            let w = weights.map_or(1.0, |w| w[k]);
            if let Some(b) = self.bilinear(*p) {
                for (idx, f) in b {
                    out[idx] += w * f;
                }
            }
        }
        out
    }

    /// Bilinear interpolation of `values` at `p` (0 outside).
    pub fn interpolate(&self, values: &[f64], p: Xy) -> f64 {
        self.bilinear(p)
            .map_or(0.0, |b| b.iter().map(|(k, f)| values[*k] * f).sum())
    }
}

#[cfg(test)]
#[allow(clippy::unwrap_used)]
mod tests {
    use super::*;
    use approx::assert_abs_diff_eq;
    use geo::{MultiPolygon, polygon};

    #[test]
    fn mask_of_a_square_with_a_hole() {
        let w = MultiPolygon(vec![polygon![
            exterior: [(x: 0.0, y: 0.0), (x: 10.0, y: 0.0), (x: 10.0, y: 10.0), (x: 0.0, y: 10.0)],
            interiors: [[(x: 4.0, y: 4.0), (x: 6.0, y: 4.0), (x: 6.0, y: 6.0), (x: 4.0, y: 6.0)]],
        ]]);
        let w = PreparedWindow::new(w, None);
        let g = Grid::over(&w, Some(1.0)).unwrap();
        assert_eq!((g.nx, g.ny), (12, 12));
        let inside = g.mask(&w).iter().filter(|m| **m).count();
        assert_eq!(inside, 100 - 4);
        let b = g.bin(&[[3.3, 7.9]], None);
        assert_abs_diff_eq!(b.iter().sum::<f64>(), 1.0, epsilon = 1e-12);
    }
}
