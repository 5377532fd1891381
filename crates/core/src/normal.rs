//! Standard normal tail probabilities and critical values, from `statrs`.
//!
//! Kept in one place so every command uses the same tail convention.

use statrs::distribution::{ContinuousCDF, Normal};

fn standard() -> Normal {
    // Mean 0, sd 1 are valid parameters; this cannot fail.
    Normal::standard()
}

/// Two-sided p-value: P(|Z| ≥ |z|).
pub fn two_sided_p(z: f64) -> f64 {
    (2.0 * standard().sf(z.abs())).min(1.0)
}

/// Lower-tail p-value: P(Z ≤ z) (the one-sided test for clustering).
pub fn lower_p(z: f64) -> f64 {
    standard().cdf(z)
}

/// Upper-tail p-value: P(Z ≥ z) (the one-sided test for dispersion).
pub fn upper_p(z: f64) -> f64 {
    standard().sf(z)
}

/// Two-sided critical value z_c with P(|Z| ≥ z_c) = α.
///
/// Returns `None` unless 0 < α < 1.
pub fn two_sided_critical(alpha: f64) -> Option<f64> {
    if alpha > 0.0 && alpha < 1.0 {
        Some(standard().inverse_cdf(1.0 - alpha / 2.0))
    } else {
        None
    }
}

#[cfg(test)]
#[allow(clippy::unwrap_used)] // a failed unwrap is a failed test
mod tests {
    use super::*;
    use approx::assert_abs_diff_eq;

    /// Printed normal tables (e.g. Abramowitz & Stegun 1964, table 26.1):
    /// z_0.975 = 1.959964, two-sided p at z = 1.96 is 0.0499958, at 2.576 is 0.00999.
    #[test]
    fn matches_printed_normal_table_values() {
        assert_abs_diff_eq!(two_sided_critical(0.05).unwrap(), 1.959_964, epsilon = 1e-6);
        assert_abs_diff_eq!(two_sided_critical(0.01).unwrap(), 2.575_829, epsilon = 1e-6);
        assert_abs_diff_eq!(two_sided_p(1.96), 0.049_995_8, epsilon = 1e-6);
        assert_abs_diff_eq!(two_sided_p(-1.96), 0.049_995_8, epsilon = 1e-6);
        assert_abs_diff_eq!(lower_p(-1.644_854), 0.05, epsilon = 1e-6);
        assert_abs_diff_eq!(upper_p(1.644_854), 0.05, epsilon = 1e-6);
        assert!(two_sided_critical(0.0).is_none());
        assert!(two_sided_critical(1.0).is_none());
    }
}
