//! Test-only helpers shared by the nearest-neighbour engines' tests: a
//! seeded generator for test patterns and the brute-force oracles every
//! indexed search is checked against, bit for bit.

use crate::Rectangle;
use crate::Xy;

/// xorshift64*: a tiny self-contained generator for test data only.
pub(crate) struct Gen(pub(crate) u64);

impl Gen {
    /// Uniform in [0, 1), 53 bits.
    pub(crate) fn unit(&mut self) -> f64 {
        self.0 ^= self.0 >> 12;
        self.0 ^= self.0 << 25;
        self.0 ^= self.0 >> 27;
        (self.0.wrapping_mul(0x2545_F491_4F6C_DD1D) >> 11) as f64 / (1u64 << 53) as f64
    }

    /// Uniform in 0..k.
    pub(crate) fn below(&mut self, k: usize) -> usize {
        ((self.unit() * k as f64) as usize).min(k - 1)
    }
}

/// Brute-force oracle (the O(n²) scan of every pair, the definition of the
/// nearest-neighbour distance): squared differences summed as
/// dx·dx + dy·dy, then the square root, as the engines compute them.
pub(crate) fn brute_plane(points: &[Xy]) -> Vec<f64> {
    brute(points, &[0.0], &[0.0])
}

/// Brute-force torus oracle: every other point against the nine shifted
/// copies of the query (the definition of the flat torus distance).
pub(crate) fn brute_torus(points: &[Xy], r: Rectangle) -> Vec<f64> {
    let (w, h) = (r.max[0] - r.min[0], r.max[1] - r.min[1]);
    brute(points, &[-w, 0.0, w], &[-h, 0.0, h])
}

/// Every other point against the query shifted by each (sx, sy); a zero
/// shift leaves the query's coordinates exactly as they are.
fn brute(points: &[Xy], shifts_x: &[f64], shifts_y: &[f64]) -> Vec<f64> {
    points
        .iter()
        .enumerate()
        .map(|(i, p)| {
            let mut best = f64::INFINITY;
            for (j, q) in points.iter().enumerate() {
                if i == j {
                    continue;
                }
                for &sx in shifts_x {
                    for &sy in shifts_y {
                        let (dx, dy) = (q[0] - (p[0] + sx), q[1] - (p[1] + sy));
                        best = best.min(dx * dx + dy * dy);
                    }
                }
            }
            best.sqrt()
        })
        .collect()
}
