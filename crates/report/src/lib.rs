//! Writers: one result struct ([`document::AuditReport`]) and several
//! renderings of it, so the JSON, the tables and the map never disagree.
//!
//! | module | writes |
//! |---|---|
//! | [`document`] | the versioned `report.json` document (schema in `docs/report-schema.md`) |
//! | [`numbers`] | rounding for human readers (JSON keeps full precision) |
//! | [`table`] | `verdict.csv` and the terminal table |
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
//! | [`folder`] | the output folder, written aside and renamed into place, with the list of its files |
//!
//! Every writer takes any `io::Write`, so tests render into a `Vec<u8>`.

pub mod canvas;
pub mod document;
pub mod folder;
pub mod html;
pub mod markdown;
pub mod markdown_escape;
pub mod methods;
pub mod numbers;
pub mod outlines;
pub mod palette;
pub mod sensitivity_plot;
pub mod simulation_plot;
pub mod table;
pub mod window_map;
pub mod windows_gpkg;

pub use document::{AuditReport, InputSummary, SCHEMA};
pub use folder::{
    FolderError, OutputFolder, Written, write_folder, write_folder_interruptible, write_folder_with,
};
