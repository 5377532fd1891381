//! The audit: one data set, every defensible study area × every edge
//! handling, side by side.
//!
//! | module | job |
//! |---|---|
//! | [`window`] | the study-area variants, built by `patternproof_window` (re-exported) |
//! | [`document`] | the `report.json` document: the sweep with its input, settings and checksums |
//! | [`edge`] | the edge-handling choices as one enum |
//! | [`error`] | why the sweep cannot start, with the number involved |
//! | [`streams`] | per-simulation random streams derived from one seed |
//! | [`simulation`] | CSR patterns in a window and the statistics taken on each |
//! | [`sweep`] | the loop over windows × edges that yields the verdict table |
//! | [`flip`] | where the call changes: area and buffer thresholds per edge handling |
//! | [`curves`] | R and z over the family of scaled hulls, for the sensitivity picture |
//! | [`robustness`] | counts, unanimity, what flips the call, the plain-language verdict |
//!
//! A new edge correction is one more [`edge::Edge`] variant, one arm in
//! [`sweep`], and its tests; a new window kind is one more
//! [`window::WindowKind`] and a builder in `patternproof_window::build`.

pub mod curves;
pub mod document;
pub mod edge;
pub mod error;
pub mod flip;
pub mod robustness;
pub mod simulation;
pub mod streams;
pub mod sweep;
#[cfg(test)]
mod test_shapes;
/// Window building and geometry live in `patternproof_window`; these
/// paths stay for callers of the audit.
pub use patternproof_window::{build as window, sampling};

pub use edge::Edge;
pub use error::AuditError;
pub use sweep::{Audit, AuditOptions, ResultRow, run_audit};
pub use window::{BufferRule, Window, WindowKind};
