//! Binned kernel estimation by FFT convolution: the binned weights are
//! convolved with the kernel sampled at cell-centre offsets, zero-padded so
//! that nothing wraps round into the raster (linear, not circular,
//! convolution). Cost `O(N log N)` in the padded raster's size, whatever
//! the number of points.
//!
//! The sampled kernel is rescaled so that its values times the cell area
//! sum to 1 (for bandwidths wider than 1 500 cells the Riemann sum is
//! already exact to many digits and is used as is), so binning and
//! sampling never create or lose mass.

use crate::kernels::Kernel;
use rustfft::FftPlanner;
use rustfft::num_complex::Complex;

/// The smallest `2^a·3^b·5^c` at least `n` (fast FFT lengths).
pub fn good_size(n: usize) -> usize {
    let mut m = n.max(1);
    loop {
        let mut k = m;
        for p in [2, 3, 5] {
            while k.is_multiple_of(p) {
                k /= p;
            }
        }
        if k == 1 {
            return m;
        }
        m += 1;
    }
}

/// Kernel reach in whole cells.
pub fn reach_cells(kernel: Kernel, h: f64, cell: f64) -> usize {
    (kernel.reach(h) / cell).ceil().max(0.0) as usize
}

/// Sum over the sampled kernel (times the cell area) over its full reach.
fn sampled_mass(kernel: Kernel, h: f64, cell: f64, r: usize) -> f64 {
    if r > 1500 {
        return 1.0;
    }
    let r = r as i64;
    let mut s = 0.0;
    for dy in -r..=r {
        for dx in -r..=r {
            let d2 = ((dx * dx + dy * dy) as f64) * cell * cell;
            s += kernel.value(d2, h);
        }
    }
    s * cell * cell
}

/// The kernel's value at cell offset 0 after the rescaling (used by the
/// leave-one-out approximation).
pub fn centre_value(kernel: Kernel, h: f64, cell: f64) -> f64 {
    let r = reach_cells(kernel, h, cell);
    kernel.value(0.0, h) / sampled_mass(kernel, h, cell, r)
}

fn fft2(
    data: &mut [Complex<f64>],
    lx: usize,
    ly: usize,
    inverse: bool,
    planner: &mut FftPlanner<f64>,
) {
    let (fx, fy) = if inverse {
        (planner.plan_fft_inverse(lx), planner.plan_fft_inverse(ly))
    } else {
        (planner.plan_fft_forward(lx), planner.plan_fft_forward(ly))
    };
    fx.process(data);
    let mut t = vec![Complex::new(0.0, 0.0); lx * ly];
    for y in 0..ly {
        for x in 0..lx {
            t[x * ly + y] = data[y * lx + x];
        }
    }
    fy.process(&mut t);
    for x in 0..lx {
        for y in 0..ly {
            data[y * lx + x] = t[x * ly + y];
        }
    }
}

/// Convolve `values` (an `nx × ny` raster, row by row) with `kernel` of
/// bandwidth `h` sampled on cells of side `cell`. The result is a density
/// per unit area when `values` are weights that sum to 1.
pub fn convolve(
    values: &[f64],
    nx: usize,
    ny: usize,
    cell: f64,
    kernel: Kernel,
    h: f64,
) -> Vec<f64> {
    let r = reach_cells(kernel, h, cell);
    let norm = sampled_mass(kernel, h, cell, r);
    // Offsets beyond the raster's size never join two cells of it.
    let rx = r.min(nx.saturating_sub(1));
    let ry = r.min(ny.saturating_sub(1));
    let lx = good_size(nx + rx);
    let ly = good_size(ny + ry);
    let zero = Complex::new(0.0, 0.0);
    let mut a = vec![zero; lx * ly];
    for j in 0..ny {
        for i in 0..nx {
            a[j * lx + i] = Complex::new(values[j * nx + i], 0.0);
        }
    }
    let mut k = vec![zero; lx * ly];
    let c2 = cell * cell;
    for dy in -(ry as i64)..=(ry as i64) {
        for dx in -(rx as i64)..=(rx as i64) {
            let v = kernel.value(((dx * dx + dy * dy) as f64) * c2, h) / norm;
            if v != 0.0 {
                let x = dx.rem_euclid(lx as i64) as usize;
                let y = dy.rem_euclid(ly as i64) as usize;
                k[y * lx + x] = Complex::new(v, 0.0);
            }
        }
    }
    let mut planner = FftPlanner::new();
    fft2(&mut a, lx, ly, false, &mut planner);
    fft2(&mut k, lx, ly, false, &mut planner);
    for (p, q) in a.iter_mut().zip(&k) {
        *p *= *q;
    }
    fft2(&mut a, lx, ly, true, &mut planner);
    let scale = 1.0 / (lx * ly) as f64;
    let mut out = vec![0.0; nx * ny];
    for j in 0..ny {
        for i in 0..nx {
            // Round-off can leave tiny negatives where the true value is 0.
            out[j * nx + i] = (a[j * lx + i].re * scale).max(0.0);
        }
    }
    out
}

#[cfg(test)]
#[allow(clippy::unwrap_used)]
mod tests {
    use super::*;
    use approx::abs_diff_eq;

    /// Source: definition of discrete convolution; FFT result checked
    /// against the direct double sum.
    #[test]
    fn fft_matches_direct_convolution() {
        let (nx, ny) = (13, 9);
        let mut v = vec![0.0; nx * ny];
        v[2 * nx + 3] = 0.5;
        v[7 * nx + 11] = 0.3;
        v[4 * nx] = 0.2;
        let (cell, h) = (1.0, 1.6);
        for kernel in crate::kernels::ALL {
            let got = convolve(&v, nx, ny, cell, kernel, h);
            let r = reach_cells(kernel, h, cell) as i64;
            let norm = sampled_mass(kernel, h, cell, r as usize);
            for j in 0..ny as i64 {
                for i in 0..nx as i64 {
                    let mut s = 0.0;
                    for jj in 0..ny as i64 {
                        for ii in 0..nx as i64 {
                            let (dx, dy) = (i - ii, j - jj);
                            if dx.abs() <= r && dy.abs() <= r {
                                s += v[(jj as usize) * nx + ii as usize]
                                    * kernel.value((dx * dx + dy * dy) as f64, h)
                                    / norm;
                            }
                        }
                    }
                    let g = got[(j as usize) * nx + i as usize];
                    assert!(
                        abs_diff_eq!(g, s, epsilon = 1e-12),
                        "{} at {i},{j}: {g} vs {s}",
                        kernel.name()
                    );
                }
            }
        }
        assert_eq!(good_size(97), 100);
    }
}
