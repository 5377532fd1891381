//! Exact uniform sampling in a polygon with holes.
//!
//! The window is cut into triangles (ear clipping, `geo`'s earcut, which
//! honours holes); a triangle is picked with probability proportional to
//! its area and a point is drawn uniformly inside it by folding the unit
//! square onto the triangle. No rejection from the bounding box, so a thin
//! or holed window costs the same as a square.

use geo::{Area, MultiPolygon, TriangulateEarcut};
use patternproof_core::Xy;
use rand::{Rng, RngExt};

/// A window prepared for sampling.
#[derive(Debug, Clone)]
pub struct Sampler {
    triangles: Vec<[Xy; 3]>,
    cumulative: Vec<f64>,
}

impl Sampler {
    /// Triangulate `shape`; `None` when it has no area.
    pub fn new(shape: &MultiPolygon<f64>) -> Option<Self> {
        let mut triangles = Vec::new();
        let mut cumulative = Vec::new();
        let mut total = 0.0;
        for polygon in shape {
            for t in polygon.earcut_triangles() {
                let a = t.unsigned_area();
                if a > 0.0 {
                    total += a;
                    triangles.push([
                        t.v1().x_y().into(),
                        t.v2().x_y().into(),
                        t.v3().x_y().into(),
                    ]);
                    cumulative.push(total);
                }
            }
        }
        (total > 0.0).then_some(Self {
            triangles,
            cumulative,
        })
    }

    /// Total triangulated area (equals the window's area up to rounding).
    pub fn area(&self) -> f64 {
        self.cumulative.last().copied().unwrap_or(0.0)
    }

    /// `n` independent uniform points.
    pub fn sample<R: Rng>(&self, n: usize, rng: &mut R) -> Vec<Xy> {
        let mut out = Vec::with_capacity(n);
        self.sample_into(n, rng, &mut out);
        out
    }

    /// `n` independent uniform points into `out` (cleared first), so a
    /// simulation loop can reuse one buffer. Draws exactly the same numbers
    /// in the same order as [`Sampler::sample`].
    pub fn sample_into<R: Rng>(&self, n: usize, rng: &mut R, out: &mut Vec<Xy>) {
        out.clear();
        let total = self.area();
        let last = self.triangles.len().saturating_sub(1);
        out.extend((0..n).map(|_| {
            let pick: f64 = rng.random::<f64>() * total;
            let k = self.cumulative.partition_point(|&c| c <= pick).min(last);
            let [a, b, c] = self.triangles[k];
            let (mut u, mut v): (f64, f64) = (rng.random(), rng.random());
            if u + v > 1.0 {
                u = 1.0 - u;
                v = 1.0 - v;
            }
            [
                a[0] + u * (b[0] - a[0]) + v * (c[0] - a[0]),
                a[1] + u * (b[1] - a[1]) + v * (c[1] - a[1]),
            ]
        }));
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use geo::{Contains, Point};
    use rand::SeedableRng;
    use rand_chacha::ChaCha8Rng;

    fn square_with_hole() -> MultiPolygon<f64> {
        // 10 × 10 square with a 4 × 4 hole: area 84.
        crate::test_shapes::rectangle_with_hole(10.0, 10.0, [2.0, 2.0, 6.0, 6.0])
    }

    #[test]
    fn triangulation_keeps_the_area_and_never_lands_in_the_hole() {
        let shape = square_with_hole();
        let s = Sampler::new(&shape).expect("shape has area");
        assert!((s.area() - 84.0).abs() < 1e-9);
        let pts = s.sample(5_000, &mut ChaCha8Rng::seed_from_u64(1));
        for p in &pts {
            assert!(
                !(p[0] > 2.0 && p[0] < 6.0 && p[1] > 2.0 && p[1] < 6.0),
                "{p:?} in hole"
            );
            assert!(shape.contains(&Point::new(p[0], p[1])) || p[0] == 0.0 || p[1] == 0.0);
        }
    }

    /// Pearson's chi-square goodness of fit (common practice): counts in
    /// four regions of the holed square against their area shares. The 99.9 %
    /// point of chi-square with 3 degrees of freedom is 16.266 (standard
    /// table value, recalled from memory; scipy.stats.chi2.ppf(0.999, 3)).
    #[test]
    fn area_shares_pass_chi_square() {
        let s = Sampler::new(&square_with_hole()).expect("shape has area");
        let n = 20_000;
        let pts = s.sample(n, &mut ChaCha8Rng::seed_from_u64(99));
        // Regions: x < 2 (area 20), x > 6 (40), 2 ≤ x ≤ 6 and y < 2 (8), y > 6 (16).
        let mut counts = [0.0f64; 4];
        for p in &pts {
            let k = if p[0] < 2.0 {
                0
            } else if p[0] > 6.0 {
                1
            } else if p[1] < 2.0 {
                2
            } else {
                3
            };
            counts[k] += 1.0;
        }
        let shares = [20.0 / 84.0, 40.0 / 84.0, 8.0 / 84.0, 16.0 / 84.0];
        let chi2: f64 = counts
            .iter()
            .zip(shares)
            .map(|(o, s)| {
                let e = s * n as f64;
                (o - e).powi(2) / e
            })
            .sum();
        assert!(chi2 < 16.266, "chi-square {chi2}");
    }
}
