//! The five kernels, each normalised to integrate to 1 over the plane.
//!
//! With bandwidth `h` and distance `r` from the event:
//!
//! | kernel | `h` is | density |
//! |---|---|---|
//! | gaussian | standard deviation of each coordinate | `exp(−r²/2h²) / (2πh²)` |
//! | quartic (biweight) | support radius | `3/(πh²) · (1 − r²/h²)²` for `r < h` |
//! | epanechnikov | support radius | `2/(πh²) · (1 − r²/h²)` |
//! | triangular (cone) | support radius | `3/(πh²) · (1 − r/h)` |
//! | uniform (disc) | support radius | `1/(πh²)` |
//!
//! Bandwidths of different kernels do not mean the same smoothing. The
//! canonical bandwidth of Marron & Nolan (1988), `δ = (R(K)/μ₂(K)²)^(1/(d+4))`
//! with `R(K) = ∫K²`, `μ₂(K) = ∫x₁²K` and `d = 2`, puts kernels on one scale:
//! bandwidths `h_A/δ_A = h_B/δ_B` give the same asymptotic balance of bias
//! and variance. [`Kernel::gaussian_equivalent`] converts a bandwidth to the
//! Gaussian standard deviation with the same smoothing in that sense.

use serde::Serialize;
use std::f64::consts::PI;

/// A kernel shape.
#[derive(Debug, Clone, Copy, PartialEq, Eq, PartialOrd, Ord, Serialize)]
#[serde(rename_all = "lowercase")]
pub enum Kernel {
    /// Bivariate normal with independent coordinates.
    Gaussian,
    /// Quartic, also called biweight.
    Quartic,
    /// Epanechnikov.
    Epanechnikov,
    /// Triangular, also called the cone kernel.
    Triangular,
    /// Uniform disc.
    Uniform,
}

/// Every kernel, in the order of the default list.
pub const ALL: [Kernel; 5] = [
    Kernel::Gaussian,
    Kernel::Quartic,
    Kernel::Epanechnikov,
    Kernel::Triangular,
    Kernel::Uniform,
];

impl Kernel {
    /// Parse a name as given on the command line.
    pub fn parse(s: &str) -> Option<Kernel> {
        match s.trim().to_ascii_lowercase().as_str() {
            "gaussian" | "normal" => Some(Kernel::Gaussian),
            "quartic" | "biweight" => Some(Kernel::Quartic),
            "epanechnikov" => Some(Kernel::Epanechnikov),
            "triangular" | "cone" => Some(Kernel::Triangular),
            "uniform" | "disc" | "disk" => Some(Kernel::Uniform),
            _ => None,
        }
    }

    /// The name used in every output.
    pub fn name(self) -> &'static str {
        match self {
            Kernel::Gaussian => "gaussian",
            Kernel::Quartic => "quartic",
            Kernel::Epanechnikov => "epanechnikov",
            Kernel::Triangular => "triangular",
            Kernel::Uniform => "uniform",
        }
    }

    /// What the bandwidth of this kernel is.
    pub fn bandwidth_meaning(self) -> &'static str {
        match self {
            Kernel::Gaussian => "standard deviation",
            _ => "support radius",
        }
    }

    /// Density at squared distance `r2` for bandwidth `h`.
    pub fn value(self, r2: f64, h: f64) -> f64 {
        let h2 = h * h;
        let u = r2 / h2;
        match self {
            Kernel::Gaussian => (-0.5 * u).exp() / (2.0 * PI * h2),
            _ if u >= 1.0 => 0.0,
            Kernel::Quartic => 3.0 / (PI * h2) * (1.0 - u) * (1.0 - u),
            Kernel::Epanechnikov => 2.0 / (PI * h2) * (1.0 - u),
            Kernel::Triangular => 3.0 / (PI * h2) * (1.0 - u.sqrt()),
            Kernel::Uniform => 1.0 / (PI * h2),
        }
    }

    /// Distance beyond which the kernel is zero (or, for the Gaussian,
    /// below `exp(−12.5)` of its peak: 5 standard deviations).
    pub fn reach(self, h: f64) -> f64 {
        match self {
            Kernel::Gaussian => 5.0 * h,
            _ => h,
        }
    }

    /// `R(K) = ∫K²` and `μ₂(K) = ∫x₁²K` for `h = 1` (closed forms).
    pub fn roughness_and_moment(self) -> (f64, f64) {
        match self {
            Kernel::Gaussian => (1.0 / (4.0 * PI), 1.0),
            Kernel::Quartic => (9.0 / (5.0 * PI), 1.0 / 8.0),
            Kernel::Epanechnikov => (4.0 / (3.0 * PI), 1.0 / 6.0),
            Kernel::Triangular => (3.0 / (2.0 * PI), 3.0 / 20.0),
            Kernel::Uniform => (1.0 / PI, 1.0 / 4.0),
        }
    }

    /// Marron & Nolan's canonical bandwidth `δ = (R/μ₂²)^(1/6)` in two dimensions.
    pub fn canonical(self) -> f64 {
        let (r, m) = self.roughness_and_moment();
        (r / (m * m)).powf(1.0 / 6.0)
    }

    /// The Gaussian standard deviation with the same canonical smoothing as
    /// bandwidth `h` of this kernel.
    pub fn gaussian_equivalent(self, h: f64) -> f64 {
        h * Kernel::Gaussian.canonical() / self.canonical()
    }

    /// The bandwidth of this kernel with the same canonical smoothing as
    /// the Gaussian standard deviation `sigma`.
    pub fn from_gaussian(self, sigma: f64) -> f64 {
        sigma * self.canonical() / Kernel::Gaussian.canonical()
    }
}

#[cfg(test)]
#[allow(clippy::unwrap_used)]
mod tests {
    use super::*;
    use approx::abs_diff_eq;

    /// Riemann sum of `f(x, y)` over a square grid of spacing `d` covering `[-l, l]²`.
    fn integrate(f: impl Fn(f64, f64) -> f64, l: f64, d: f64) -> f64 {
        let m = (2.0 * l / d).round() as i64;
        let mut s = 0.0;
        for i in 0..m {
            for j in 0..m {
                let x = -l + (i as f64 + 0.5) * d;
                let y = -l + (j as f64 + 0.5) * d;
                s += f(x, y);
            }
        }
        s * d * d
    }

    /// Source: definition of a density (each kernel must integrate to 1);
    /// checked numerically on a fine grid to 1e-3.
    #[test]
    fn each_kernel_integrates_to_one() {
        for k in ALL {
            let h = 1.7;
            let total = integrate(|x, y| k.value(x * x + y * y, h), 6.0 * h, h / 100.0);
            assert!(
                abs_diff_eq!(total, 1.0, epsilon = 1e-3),
                "{}: {total}",
                k.name()
            );
        }
    }

    /// Source: the closed forms of R(K) and μ₂(K) in `roughness_and_moment`
    /// (Marron & Nolan 1988 define δ from them); checked numerically.
    #[test]
    fn roughness_and_moment_match_numerical_integrals() {
        for k in ALL {
            let (r, m) = k.roughness_and_moment();
            let (l, d) = if k == Kernel::Gaussian {
                (6.0, 0.01)
            } else {
                (1.05, 0.002)
            };
            let rn = integrate(|x, y| k.value(x * x + y * y, 1.0).powi(2), l, d);
            let mn = integrate(|x, y| x * x * k.value(x * x + y * y, 1.0), l, d);
            assert!((rn - r).abs() / r < 2e-3, "{} R {rn} vs {r}", k.name());
            assert!((mn - m).abs() / m < 2e-3, "{} mu2 {mn} vs {m}", k.name());
        }
        // Common practice: the quartic radius equivalent to a Gaussian σ is
        // about 2.78σ.
        let q = Kernel::Quartic.from_gaussian(1.0);
        assert!(abs_diff_eq!(q, 2.78, epsilon = 0.01), "{q}");
    }
}
