//! Edge handling: what to do about kernel mass that falls outside the window.
//!
//! - `none`: the plain estimate `f̂(x) = Σᵢ K_h(x − xᵢ)/n`; part of its unit
//!   mass lies outside the window and is reported (`mass_outside`).
//! - `uniform`: divide at each cell by `e(x) = ∫_W K_h(x − y) dy`, the kernel
//!   mass inside the window around that cell (the cell-wise correction
//!   described by Diggle 1985 and named "uniform" by Jones 1993). `e` is itself
//!   a convolution, of the window mask with the kernel. The corrected surface
//!   holds about, not exactly, unit mass inside the window; its mass is reported.
//! - `diggle`: weight each point by `1/e(xᵢ)` instead (the per-point form, Jones
//!   1993 after Diggle 1985); the surface then holds exactly unit mass inside
//!   the window (up to round-off).
//!
//! Cells outside the window are set to 0 in every surface.

use crate::convolve::convolve;
use crate::grid::Grid;
use crate::kernels::Kernel;
use patternproof_core::Xy;
use serde::Serialize;

/// An edge handling.
#[derive(Debug, Clone, Copy, PartialEq, Eq, PartialOrd, Ord, Serialize)]
#[serde(rename_all = "lowercase")]
pub enum DensityEdge {
    /// No correction.
    None,
    /// Divide by the kernel mass inside the window at each cell.
    Uniform,
    /// Weight each point by the inverse of its kernel mass inside the window.
    Diggle,
}

impl DensityEdge {
    /// Parse a name.
    pub fn parse(s: &str) -> Option<DensityEdge> {
        match s.trim().to_ascii_lowercase().as_str() {
            "none" => Some(DensityEdge::None),
            "uniform" => Some(DensityEdge::Uniform),
            "diggle" => Some(DensityEdge::Diggle),
            _ => None,
        }
    }

    /// The name used in outputs.
    pub fn name(self) -> &'static str {
        match self {
            DensityEdge::None => "none",
            DensityEdge::Uniform => "uniform",
            DensityEdge::Diggle => "diggle",
        }
    }
}

/// A density raster and its mass accounting.
#[derive(Debug, Clone)]
pub struct Estimate {
    /// Density per unit area at each cell centre (0 outside the window).
    pub values: Vec<f64>,
    /// Integral of the surface over the window (cell sum × cell area).
    pub mass_inside: f64,
    /// With `none`: the share of the estimate's unit mass outside the
    /// window (`1 − mass_inside`). `None` for the corrected surfaces, which
    /// are defined inside the window only.
    pub mass_outside: Option<f64>,
}

/// Estimate the density of `points` (all inside the window) on `grid`.
pub fn estimate(
    points: &[Xy],
    grid: &Grid,
    mask: &[bool],
    kernel: Kernel,
    h: f64,
    edge: DensityEdge,
) -> Estimate {
    let n = points.len().max(1) as f64;
    let a = grid.cell_area();
    let inside_mass = |v: &[f64]| -> f64 {
        v.iter()
            .zip(mask)
            .filter(|(_, m)| **m)
            .map(|(x, _)| *x)
            .sum::<f64>()
            * a
    };
    let kernel_mass_inside = || {
        let m: Vec<f64> = mask.iter().map(|m| if *m { 1.0 } else { 0.0 }).collect();
        // `convolve` sums weights × density: times the cell area it is the mass.
        let mut e = convolve(&m, grid.nx, grid.ny, grid.cell, kernel, h);
        for v in &mut e {
            *v *= a;
        }
        e
    };
    let mut values = match edge {
        DensityEdge::None => {
            let mut bins = grid.bin(points, None);
            for b in &mut bins {
                *b /= n;
            }
            convolve(&bins, grid.nx, grid.ny, grid.cell, kernel, h)
        }
        DensityEdge::Uniform => {
            let e = kernel_mass_inside();
            let mut bins = grid.bin(points, None);
            for b in &mut bins {
                *b /= n;
            }
            let mut f = convolve(&bins, grid.nx, grid.ny, grid.cell, kernel, h);
            for (v, ek) in f.iter_mut().zip(&e) {
                *v = if *ek > 1e-12 { *v / ek } else { 0.0 };
            }
            f
        }
        DensityEdge::Diggle => {
            let e = kernel_mass_inside();
            let w: Vec<f64> = points
                .iter()
                .map(|p| {
                    let ei = grid.interpolate(&e, *p);
                    if ei > 1e-12 { 1.0 / (ei * n) } else { 0.0 }
                })
                .collect();
            let bins = grid.bin(points, Some(&w));
            convolve(&bins, grid.nx, grid.ny, grid.cell, kernel, h)
        }
    };
    for (v, m) in values.iter_mut().zip(mask) {
        if !*m {
            *v = 0.0;
        }
    }
    let mass_inside = inside_mass(&values);
    Estimate {
        mass_outside: (edge == DensityEdge::None).then_some((1.0 - mass_inside).max(0.0)),
        values,
        mass_inside,
    }
}
