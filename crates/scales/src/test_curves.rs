//! The hand-worked curves shared by the unit tests of the two global
//! tests ([`crate::envelope`] and [`crate::rank_envelope`]), so both are
//! checked by hand on the same example.

/// The height of the k-th flat simulated curve: ±0.1·k, odd k below zero.
pub fn height(k: u32) -> f64 {
    let step = if k.is_multiple_of(2) { 0.1 } else { -0.1 };
    step * f64::from(k)
}

/// An observed curve at 0 with a bump of 5 at distance 1, and 19 flat
/// simulated curves at [`height`] k = 1…19, on four distances.
pub fn bump_and_flat_curves() -> (Vec<Option<f64>>, Vec<Vec<Option<f64>>>) {
    let obs = vec![Some(0.0), Some(5.0), Some(0.0), Some(0.0)];
    let sims = (1..=19).map(|k| vec![Some(height(k)); 4]).collect();
    (obs, sims)
}
