//! Moments of the guard-zone (border) nearest-neighbour test.
//!
//! Diggle (2003, *Statistical Analysis of Spatial Point Patterns*, 2nd ed.,
//! ch. 2): only the m points at least w from the boundary are focal; their
//! neighbours may be any point, so no focal distance is cut short by the
//! edge (as long as w is at least the focal point's nearest distance). The
//! intensity is still n/A over the whole window, so the m focal distances
//! have the CSR mean 0.5·sqrt(A/n) and the mean of m of them has standard
//! error 0.26136·sqrt(A/n)/sqrt(m).

use crate::clark_evans::{CE_MEAN_FACTOR, CE_SE_FACTOR, NnRatioTest};

/// The guard-zone test: `mean_focal` over `m` focal points, `n` points in a
/// window of `area`. `None` when m = 0, n < 2 or the area is degenerate.
///
/// ```
/// use patternproof_core::guard_zone;
/// // With every point focal (m = n) it is the plain Clark–Evans test.
/// let g = guard_zone::test(0.04, 100, 100, 1.0).unwrap();
/// let p = patternproof_core::NnRatioTest::uncorrected(0.04, 100, 1.0).unwrap();
/// assert!((g.z - p.z).abs() < 1e-12);
/// ```
pub fn test(mean_focal: f64, m: usize, n: usize, area: f64) -> Option<NnRatioTest> {
    if m == 0 || n < 2 || !(area > 0.0 && area.is_finite()) {
        return None;
    }
    let spacing = (area / n as f64).sqrt();
    NnRatioTest::from_moments(
        mean_focal,
        CE_MEAN_FACTOR * spacing,
        CE_SE_FACTOR * spacing / (m as f64).sqrt(),
    )
}
