//! The end-to-end tests of the `patternproof` binary, compiled into one
//! test binary: one module per area, sharing the helpers of `util`.

#![allow(clippy::unwrap_used, missing_docs)]

mod util;

mod audit;
mod bad_inputs;
mod density;
mod figures;
mod flags;
mod glance;
mod gpkg;
mod output_folder;
mod pictures;
mod recheck;
mod reference;
mod report;
mod scales;
mod sites;
mod terminal;
