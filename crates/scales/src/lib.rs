//! Multi-scale audit: Ripley's K function and its square-root transform
//! L(r) = sqrt(K(r)/π) in every study-area window of the audit sweep and
//! under several edge corrections, with a global envelope test.
//!
//! A claim such as "clustered at distances up to 200 m" rests on K or L,
//! and K̂(r) = A/(n(n−1))·Σ_{i≠j} w_ij·1(d_ij ≤ r) carries the study area A
//! and an edge-correction weight w_ij. This crate makes both visible.
//!
//! | module | job |
//! |---|---|
//! | [`k_window`] | a window as the estimators use it: its `patternproof_window::PreparedWindow` and the translation overlap table |
//! | [`isotropic`] | Ripley's (1977) isotropic weight from the exact arc length of a circle inside the window |
//! | [`translation`] | the Ohser–Stoyan translation weight from an exact polygon intersection area |
//! | [`border`] | the reduced-sample (border) estimator |
//! | [`k_function`] | K̂, L̂ and L̂ − r on a distance grid for any correction, summed per distance bin |
//! | [`memory`] | what a run holds in memory, estimated before it starts |
//! | [`envelope`] | CSR simulations, the maximum absolute deviation test and its global band |
//! | [`rank_envelope`] | the global rank envelope test with extreme-rank-length ordering (ERL), its p-value and band |
//! | [`verdict`] | distance bands of clustering / regularity and the sentence across windows |
//! | [`scales`] | the whole run over windows × corrections, planned before it runs |
//!
//! `patternproof-report` renders a run (tables, pictures, the page).

pub mod border;
pub mod envelope;
pub mod isotropic;
pub mod k_function;
pub mod k_window;
pub mod memory;
pub mod rank_envelope;
pub mod scales;
#[cfg(test)]
mod test_curves;
pub mod translation;
pub mod verdict;

pub use k_function::{Correction, KCurve, distance_grid};
pub use k_window::KWindow;
pub use scales::{Plan, ScalesOptions, ScalesRun, WindowScales, plan, run_scales};
