//! The `report.json` document: schema `patternproof.audit/3`.
//!
//! Version 3 (this one) adds the sensitivity curves and the input digests
//! to version 2's per-edge `flip` entries and simulation fields; see
//! `docs/report-schema.md`. No clock
//! time is stored, so the same inputs and seed give the same bytes.

use crate::Audit;
use crate::curves::Sensitivity;
use crate::flip::FlipEntry;
use crate::robustness::Summary;
use crate::sweep::{ResultRow, Skipped};
use crate::window::Window;
use serde::Serialize;
use std::io;

/// Schema identifier written into every report.
pub const SCHEMA: &str = "patternproof.audit/3";

/// What was read.
#[derive(Debug, Clone, Serialize)]
pub struct InputSummary {
    /// The point file as given.
    pub points_file: String,
    /// Points analysed (after `--drop-duplicates`).
    pub n: usize,
    /// Points read.
    pub n_read: usize,
    /// Points repeating an earlier point exactly.
    pub duplicates: usize,
    /// Whether those were removed.
    pub duplicates_dropped: bool,
    /// `projected` or `lonlat`.
    pub coords: String,
    /// The projection applied to lon/lat input, else `null`.
    pub projection: Option<String>,
    /// Unit of every distance (areas in its square).
    pub unit: String,
    /// Boundary files, in order.
    pub boundaries: Vec<BoundarySource>,
    /// Warnings raised while reading.
    pub warnings: Vec<String>,
}

/// One boundary file.
#[derive(Debug, Clone, Serialize)]
pub struct BoundarySource {
    /// Its name (window id suffix).
    pub name: String,
    /// The file.
    pub file: String,
}

/// A file's digest, so a reader can tell whether they hold the same data.
#[derive(Debug, Clone, Serialize)]
pub struct FileDigest {
    /// The file as given.
    pub file: String,
    /// SHA-256 of its bytes, lower-case hex.
    pub sha256: String,
}

/// Where the report's inputs came from.
#[derive(Debug, Clone, Default, Serialize)]
pub struct ReportProvenance {
    /// Every input file (points, then boundaries) with its digest.
    pub inputs: Vec<FileDigest>,
}

/// The settings that shaped the sweep.
#[derive(Debug, Clone, Serialize)]
pub struct Settings {
    /// Two-sided critical value.
    pub z_crit: f64,
    /// Edge handlings swept.
    pub edges: Vec<String>,
    /// Guard width for `border`.
    pub guard: f64,
    /// Whether it is the default (the observed mean nearest-neighbour distance).
    pub guard_is_default: bool,
    /// Simulations per window.
    pub sims: usize,
    /// Seed of every random stream.
    pub seed: u64,
    /// How the `hull+D` buffers were chosen.
    pub buffers: String,
    /// Concavity of the concave hull.
    pub concavity: f64,
}

/// The whole report.
#[derive(Debug, Clone, Serialize)]
pub struct AuditReport {
    /// Schema identifier.
    pub schema: &'static str,
    /// patternproof version.
    pub tool_version: &'static str,
    /// What was read.
    pub input: InputSummary,
    /// Significance level.
    pub alpha: f64,
    /// The observed mean nearest-neighbour distance over all points.
    pub mean_nn: f64,
    /// Settings.
    pub settings: Settings,
    /// Windows.
    pub windows: Vec<Window>,
    /// The verdict table.
    pub results: Vec<ResultRow>,
    /// Pairs with no row, and why.
    pub skipped: Vec<Skipped>,
    /// Notes on windows that could not be built.
    pub window_notes: Vec<String>,
    /// Flip thresholds per analytic edge handling.
    pub flip: Vec<FlipEntry>,
    /// Robustness summary.
    pub summary: Summary,
    /// What the tests do and do not show, and data-protection reminders.
    pub cautions: Vec<String>,
    /// Input digests.
    pub provenance: ReportProvenance,
    /// SHA-256 of the protocol the run followed (multi-site runs only).
    #[serde(skip_serializing_if = "Option::is_none")]
    pub protocol_sha256: Option<String>,
    /// R and z over the scaled-hull family (the sensitivity picture's lines);
    /// `null` without a hull.
    pub sensitivity: Option<Sensitivity>,
    /// Simulated means per window id, for pictures (not serialised).
    #[serde(skip)]
    pub simulated_means: Vec<(String, Vec<f64>)>,
}

/// Standing cautions printed in every report.
pub fn standing_cautions() -> Vec<String> {
    vec![
        "The nearest-neighbour test compares one summary (the mean distance to the closest other point) with complete spatial randomness in the chosen window. A significant result rules out CSR in that window at that α; it does not identify a process, and a non-significant one does not prove randomness. Clustering at one scale can hide dispersion at another: only the closest neighbour is looked at here (Ripley's K or the L function looks across distances).".into(),
        "Choose the window and the edge handling before looking at the results, and report every window looked at: this table is the record of that.".into(),
        "Point locations of people (cases, patients, victims, residents, addresses) are personal data: keep input files and outputs such as windows.geojson under the same protection as the data, leave the map out with --no-map, do not publish raw point maps, and follow the data-protection rules and ethics approvals that apply.".into(),
    ]
}

impl AuditReport {
    /// Assemble the report from the audit and the input summary.
    pub fn new(
        audit: Audit,
        sensitivity: Option<Sensitivity>,
        input: InputSummary,
        buffers: String,
        concavity: f64,
    ) -> Self {
        let mut cautions = audit.summary.cautions.clone();
        cautions.extend(standing_cautions());
        let simulated_means = audit
            .windows
            .iter()
            .map(|w| w.id.clone())
            .zip(audit.simulated_means.iter().cloned())
            .collect();
        Self {
            schema: SCHEMA,
            tool_version: env!("CARGO_PKG_VERSION"),
            input,
            alpha: audit.alpha,
            mean_nn: audit.mean_nn,
            settings: Settings {
                z_crit: audit.z_crit,
                edges: audit.edges.iter().map(|e| e.as_str().to_string()).collect(),
                guard: audit.guard,
                guard_is_default: audit.guard_is_default,
                sims: audit.sims,
                seed: audit.seed,
                buffers,
                concavity,
            },
            windows: audit.windows,
            results: audit.results,
            skipped: audit.skipped,
            window_notes: audit.notes,
            flip: audit.flip,
            summary: audit.summary,
            cautions,
            provenance: ReportProvenance::default(),
            protocol_sha256: None,
            sensitivity,
            simulated_means,
        }
    }

    /// Write the JSON document (pretty, full precision, trailing newline).
    pub fn write_json<W: io::Write>(&self, mut out: W) -> io::Result<()> {
        serde_json::to_writer_pretty(&mut out, self)?;
        out.write_all(b"\n")
    }
}
