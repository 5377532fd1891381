//! # patternproof
//!
//! Does a claim about a spatial point pattern ("the burrows are
//! clustered") survive every defensible study area and edge handling?
//! This crate is the library behind the `patternproof` command line, and
//! the one a Rust program, the Python package or a distributed worker
//! depends on. It has one entry per job; each takes typed inputs and
//! options with documented defaults, returns a typed result that
//! serialises to the documented JSON schema, and never prints. Long runs
//! report through a [`Progress`] the caller supplies.
//!
//! | entry | job |
//! |---|---|
//! | [`audit()`] | the nearest-neighbour sweep over windows × edge handlings, with flip thresholds and sensitivity curves |
//! | [`scales()`] / [`ScalesJob`] | Ripley's K and the L function in the same windows, with a global envelope test |
//! | [`density()`] | kernel density surfaces across kernels, bandwidths and edge handlings |
//! | [`recheck()`] | are reported figures consistent, and which window reproduces them |
//! | [`read_verified`] | a protocol file, refused when changed after it was written |
//! | [`load_sites`], [`sites()`], [`site_result`], [`site_report`] | one protocol over many sites, or one site at a time |
//!
//! Inputs are read with [`load`] (CSV, GeoJSON, WKT, GeoPackage; lon/lat
//! projected to a plane) and wrapped in an [`Input`]; points already in
//! memory become one with [`Input::from_points`]. Errors are an [`Error`]
//! whose [`Error::kind`] says what went wrong.
//!
//! The crates underneath, each with one job: `patternproof-core`
//! (statistics on points: nearest neighbours, the Clark–Evans ratio, edge
//! corrections, Monte Carlo ranks), `patternproof-io` (readers),
//! `patternproof-gpkg` (GeoPackage), `patternproof-audit` (windows and the
//! sweep), `patternproof-scales` (K and L), `patternproof-density` (kernel
//! density), `patternproof-recheck`, `patternproof-protocol`,
//! `patternproof-sites`. Rendering (tables, Markdown, SVG, HTML, GeoJSON,
//! GeoPackage and GeoTIFF files) lives in `patternproof-report`, which
//! renders the results of this crate.
//!
//! ## Example
//!
//! A regular grid of 100 points in a 100 × 100 square is dispersed in
//! its own surveyed outline, under every edge handling:
//!
//! ```
//! use geo::{MultiPolygon, Rect, coord};
//! use patternproof::{AuditOptions, Input, Silent, audit};
//!
//! let points: Vec<[f64; 2]> = (0..100)
//!     .map(|i| [5.0 + 10.0 * (i % 10) as f64, 5.0 + 10.0 * (i / 10) as f64])
//!     .collect();
//! let square = Rect::new(coord! { x: 0.0, y: 0.0 }, coord! { x: 100.0, y: 100.0 });
//! let input = Input::from_points(points, "m")
//!     .with_boundary("plot", MultiPolygon(vec![square.to_polygon()]));
//! let options = AuditOptions { sims: 99, ..AuditOptions::default() };
//!
//! let report = audit(&input, &options, &Silent)?;
//!
//! // Mean nearest-neighbour distance 10; expected under CSR in the
//! // 10 000 m² outline 0.5·sqrt(10 000 / 100) = 5, so R = 2 with no edge
//! // correction.
//! let row = report
//!     .results
//!     .iter()
//!     .find(|r| r.window.starts_with("boundary") && r.edge == patternproof::Edge::None)
//!     .expect("the outline's row");
//! assert!((row.ratio.expect("a ratio") - 2.0).abs() < 1e-12);
//! assert!(report.results.iter().all(|r| r.ratio.is_none_or(|ratio| ratio > 1.0)));
//! # Ok::<(), patternproof::Error>(())
//! ```

mod audit;
pub mod cost;
mod density;
mod error;
mod input;
pub mod memory;
pub mod options;
mod progress;
mod protocol;
mod recheck;
mod scales;
mod sites;
pub mod words;

pub use audit::{audit, audit_in, frame, outlined_windows};
pub use density::{DensityResult, density};
pub use document::{AuditReport, FileDigest, InputSummary, ReportProvenance};
pub use error::{Error, ErrorKind, Refusal};
pub use input::{Input, digests, input_summary, load, named_shapes};
pub use patternproof_audit::document;
pub use patternproof_audit::sweep::Frame;
pub use progress::{Progress, Silent};
pub use protocol::{changed, read_protocol, read_verified};
pub use recheck::recheck;
pub use scales::{ScalesJob, ScalesResult, scales};
pub use sites::{
    LoadedSites, Site, SitesSource, adjust, load_sites, site_report, site_result, sites,
};

pub use patternproof_audit::window::WindowOptions;
pub use patternproof_audit::{AuditOptions, BufferRule, Edge};
pub use patternproof_density::Analysis as DensityAnalysis;
pub use patternproof_density::Config as DensityConfig;
pub use patternproof_density::bandwidth::BandwidthSpec;
pub use patternproof_density::edge::DensityEdge;
pub use patternproof_density::kernels::Kernel;
pub use patternproof_io::{CoordChoice, Dataset, InputError, LoadOptions, Projection, SpatialRef};
pub use patternproof_protocol::Protocol;
pub use patternproof_recheck::{Figures, Recheck};
pub use patternproof_scales::{Correction, ScalesOptions, ScalesRun};
pub use patternproof_sites::document::{SitesDocument, document as sites_document};
pub use patternproof_sites::{RunOptions as SitesOptions, SiteInput, SiteRun};
