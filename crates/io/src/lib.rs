//! Everything that touches the user's files: reading points and
//! boundaries, deciding whether coordinates are projected or lon/lat, and
//! projecting lon/lat to an equal-area plane before any distance is taken.
//!
//! | module | job |
//! |---|---|
//! | [`error`] | one error type with a kind, naming the file, the place, what is wrong and what to do |
//! | [`points`] | CSV and GeoJSON point readers |
//! | [`boundary`] | GeoJSON and WKT polygon readers, with validity checks |
//! | [`validity`] | geo's polygon validity rules, with the pairwise searches pruned so that dense outlines check fast |
//! | [`coords`] | the projected / lon-lat decision, why it was made, and the Lambert azimuthal equal-area projection centred on the points' mean direction |
//! | [`json_keys`] | finds a key repeated in one JSON object, which readers would resolve silently |
//! | [`geopackage`] | GeoPackage point and polygon layers, their coordinate system, `--where` |
//! | [`magnitude`] | refuses coordinates too large, or spread too little, for floating point to measure |
//! | [`dataset`] | loads points and boundaries together into one planar data set |
//!
//! Nothing here guesses silently: an ambiguous coordinate system stops with
//! a message asking for `--coords`.

pub mod boundary;
pub mod coords;
pub mod dataset;
pub mod error;
pub mod geopackage;
pub mod json_keys;
pub mod magnitude;
pub mod points;
#[cfg(test)]
mod test_files;
pub mod validity;

pub use coords::{CoordChoice, CoordSystem, Projection};
pub use dataset::{Boundary, Dataset, LoadOptions};
pub use error::{InputError, InputErrorKind};
pub use geopackage::GpkgChoice;
pub use patternproof_gpkg::{Filter, SpatialRef};
