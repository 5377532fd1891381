//! Rounding for people: the one formatter, kept in `patternproof-core`
//! (where the analyses' own sentences reach it) and re-exported here for
//! every renderer.

pub use patternproof_core::numbers::*;
