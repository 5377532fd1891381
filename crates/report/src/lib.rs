//! The presentation crate: every output of every analysis is rendered
//! here, from the analyses' result data, so the JSON, the tables, the
//! pictures and the pages never disagree and the analyses never draw.
//!
//! The audit: one result struct ([`document::AuditReport`]) and several
//! renderings of it.
//!
//! | module | writes |
//! |---|---|
//! | [`audit_folder`](mod@audit_folder) | the whole folder of one audit, in memory |
//! | [`run`] | the run's context (command line, stamp, protocol) and why rendering failed |
//! | [`document`] | the versioned `report.json` document (schema in `docs/report-schema.md`) |
//! | [`numbers`] | rounding for human readers (JSON keeps full precision) |
//! | [`table`] | `verdict.csv` and the terminal table |
//! | [`terminal_layout`] | how every command's terminal tables and sentences fit the terminal (or 100 columns when piped) without splitting a number |
//! | [`markdown`] | `verdict.md` |
//! | [`markdown_escape`] | escaping of user strings in every Markdown file |
//! | [`methods`] | the methods paragraph for a manuscript |
//! | [`outlines`] | `windows.geojson` |
//! | [`windows_gpkg`] | `windows.gpkg`, the outlines as a GeoPackage layer in the measured plane |
//! | [`window_map`] | `windows.svg`, the map of points and window outlines |
//! | [`sensitivity_plot`] | `sensitivity.svg`, R and z against the study area |
//! | [`simulation_plot`] | `simulation.svg`, the simulated means of one window |
//! | [`palette`] | the one colour-and-dash palette of every picture |
//! | [`canvas`] | the white SVG frame, the inked line and the legend box the pictures share |
//! | [`html`] | `index.html`, the one self-contained file to attach |
//! | [`page`] | the one layout and stylesheet of every `index.html` (maud) |
//! | [`folder`] | the output folder, written aside and renamed into place, with the list of its files |
//!
//! The other analyses, one module each:
//!
//! | module | writes |
//! |---|---|
//! | [`scales`] | the K audit: `scales.json`, `.csv`, `.md`, its pictures, page section and terminal lines |
//! | [`density`] | the density audit: `density.json`, `isopleths.geojson`, the pictures, `reference.tif`, `index.html` |
//! | [`sites`] | a multi-site run: `sites.json`, `.csv`, `.md`, `sites.svg`, `index.html`, and each site's audit folder |
//! | [`recheck`] | the recheck's terminal table |
//!
//! Every writer takes any `io::Write`, so tests render into a `Vec<u8>`.

pub mod audit_folder;
pub mod canvas;
pub mod density;
/// The report document is the audit's data; it is rendered here.
pub use patternproof_audit::document;
pub mod folder;
pub mod html;
pub mod markdown;
pub mod markdown_escape;
pub mod matrix;
pub mod methods;
pub mod numbers;
pub mod outlines;
pub mod page;
pub mod palette;
pub mod recheck;
pub mod run;
pub mod scales;
pub mod sensitivity_plot;
pub mod simulation_plot;
pub mod sites;
pub mod table;
pub mod terminal_layout;
pub mod window_map;
pub mod windows_gpkg;

pub use audit_folder::{Plane, RenderChoices, audit_folder};
pub use document::{AuditReport, InputSummary, SCHEMA};
pub use folder::{FolderError, OutputFolder, WriteOptions, Written, write_folder};
pub use run::{RenderError, RunContext};
