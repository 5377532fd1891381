//! GeoPackage for patternproof: reading point and polygon layers, and
//! writing the study-area windows as one polygon layer.
//!
//! A GeoPackage (OGC 12-128, version 1.3) is an SQLite database with a few
//! catalogue tables: `gpkg_contents` lists the layers, `gpkg_geometry_columns`
//! names each layer's geometry column and coordinate system, and
//! `gpkg_spatial_ref_sys` defines the systems. Each geometry is a blob: a
//! short GeoPackage header, then ordinary WKB.
//!
//! | module | job |
//! |---|---|
//! | [`blob`] | the geometry blob: header (magic, version, flags, srs_id, envelope) and the WKB after it |
//! | [`crs`] | what a WKT definition says: geographic or projected, and the linear unit |
//! | [`read`] | layers, spatial reference rows, columns and features, with parameterised queries only |
//! | [`write`](mod@write) | one polygon layer in a fresh GeoPackage, built in memory and returned as bytes |
//!
//! This crate knows the format and nothing of the analysis: `patternproof-io`
//! turns its layers into points and boundaries (and decides what the
//! coordinate system means for them), and `patternproof-report` uses the
//! writer for `windows.gpkg`.
//!
//! SQLite itself is the `rusqlite` crate with its bundled SQLite, so nothing
//! has to be installed; WKB is the georust `wkb` crate. Only the eight-byte
//! blob header is decoded by hand, because no maintained crate offers it
//! apart from a whole GeoPackage stack.
//!
//! ```
//! use patternproof_gpkg::blob;
//! use geo::{LineString, MultiPolygon, Polygon};
//! let square = Polygon::new(LineString::from(vec![(0.0, 0.0), (2.0, 0.0), (2.0, 2.0), (0.0, 2.0)]), vec![]);
//! let bytes = blob::encode_multi_polygon(&MultiPolygon(vec![square.clone()]), 4326);
//! let back = blob::decode(&bytes).unwrap();
//! assert_eq!(back.header.srs_id, 4326);
//! assert_eq!(back.shape, Some(blob::Shape::Polygons(MultiPolygon(vec![square]))));
//! ```

pub mod blob;
pub mod crs;
pub mod read;
pub mod write;

pub use read::{Feature, Filter, GeoPackage, GpkgError, Layer, SpatialRef};
