//! The outputs of `patternproof sites`: `sites.json`, `sites.csv`,
//! `sites.md`, the forest picture, the run's `index.html`, the protocol
//! and one audit folder per tested site.
//!
//! | module | writes |
//! |---|---|
//! | [`files`] | `sites.json`, `sites.csv`, `sites.md` and the summary line |
//! | [`forest`] | `sites.svg`, the site-by-site picture of R and its interval |
//! | [`page`] | `index.html` of the run |
//! | [`terminal`] | the table, summary and cautions printed on the terminal |

pub mod files;
pub mod forest;
pub mod page;
pub mod terminal;

use crate::OutputFolder;
use crate::audit_folder::{Plane, RenderChoices, audit_folder};
use crate::document::AuditReport;
use crate::run::{RenderError, RunContext, bytes};
use patternproof_io::Dataset;
use patternproof_protocol::Protocol;
use patternproof_sites::folder_name::site_folders;
use patternproof_sites::{SiteInput, SiteRun};
use rayon::prelude::*;
use std::path::PathBuf;

/// What a site's own folder needs besides its audit report.
#[derive(Clone)]
pub struct SiteInputs<'a> {
    /// The site's name.
    pub name: &'a str,
    /// The files it was read from, as the user named them.
    pub files: Vec<String>,
    /// Its points and plane.
    pub plane: Plane<'a>,
}

/// One site of a study as it was loaded: its input, the files it was
/// read from, and the index of the data set it came from.
#[derive(Clone, Copy)]
pub struct StudySite<'a> {
    /// Name, points and boundary.
    pub input: &'a SiteInput,
    /// The files, as the user named them.
    pub files: &'a [PathBuf],
    /// Index into the data sets.
    pub data: usize,
}

/// Every file of a `sites` run from the sites as loaded and the data sets
/// they came from (each site's plane, and the way back to lon/lat, is its
/// data set's): what the command line and the Python package write.
/// `report_of(i)` makes the audit report of tested site `i`.
#[allow(clippy::too_many_arguments)]
pub fn study_folder<E>(
    runs: &[SiteRun],
    protocol: &Protocol,
    sweep_sims: usize,
    sites: &[StudySite<'_>],
    datasets: &[Dataset],
    report_of: impl Fn(usize) -> Result<AuditReport, E> + Sync,
    choices: &RenderChoices,
    run: &RunContext,
) -> Result<OutputFolder, E>
where
    E: From<RenderError> + Send,
{
    let unprojects: Vec<_> = datasets
        .iter()
        .map(|d| {
            d.projection
                .as_ref()
                .map(|p| move |x: f64, y: f64| p.inverse(x, y))
        })
        .collect();
    let planes: Vec<_> = datasets.iter().map(|d| d.plane_srs()).collect();
    let inputs: Vec<SiteInputs<'_>> = sites
        .iter()
        .map(|s| SiteInputs {
            name: &s.input.name,
            files: s.files.iter().map(|f| f.display().to_string()).collect(),
            plane: Plane {
                points: &s.input.points,
                unproject: unprojects[s.data]
                    .as_ref()
                    .map(|f| f as &(dyn Fn(f64, f64) -> _ + Sync)),
                srs: &planes[s.data],
            },
        })
        .collect();
    sites_folder(runs, protocol, sweep_sims, &inputs, report_of, choices, run)
}

/// One site's report folder, before it joins the run's folder.
struct SiteFolder {
    /// `site/FOLDER`.
    dir: String,
    /// Which site and input, for error messages.
    what: String,
    folder: OutputFolder,
}

/// Every file of a `sites` run. `sites[i]` goes with `runs[i]`;
/// `report_of(i)` makes the audit report of a tested site `i` (only
/// called for sites with a sweep, in parallel, so that each report lives
/// only while its folder renders).
pub fn sites_folder<E>(
    runs: &[SiteRun],
    protocol: &Protocol,
    sweep_sims: usize,
    sites: &[SiteInputs<'_>],
    report_of: impl Fn(usize) -> Result<AuditReport, E> + Sync,
    choices: &RenderChoices,
    run: &RunContext,
) -> Result<OutputFolder, E>
where
    E: From<RenderError> + Send,
{
    let names: Vec<&str> = sites
        .iter()
        .zip(runs)
        .filter(|(_, r)| r.audit.is_some())
        .map(|(s, _)| s.name)
        .collect();
    let folders: Vec<(String, String)> = names
        .iter()
        .zip(site_folders(&names))
        .map(|(name, folder)| (name.to_string(), format!("site/{folder}")))
        .collect();
    let per_site: Vec<Result<Option<SiteFolder>, E>> = sites
        .par_iter()
        .zip(runs.par_iter())
        .enumerate()
        .map(|(i, (s, r))| {
            if r.audit.is_none() {
                return Ok(None);
            }
            let report = report_of(i)?;
            let folder = audit_folder(&report, s.plane, choices, run)?;
            let dir = folders
                .iter()
                .find(|f| f.0 == s.name)
                .map(|f| f.1.clone())
                .unwrap_or_default();
            let what = format!(
                "the report of site `{}`, read from {}",
                s.name,
                s.files.join(" and ")
            );
            Ok(Some(SiteFolder { dir, what, folder }))
        })
        .collect();
    let mut out = OutputFolder::default();
    let doc = patternproof_sites::document::document(runs, protocol, sweep_sims);
    out.add(
        "sites.json",
        bytes("sites.json", |b| files::write_json(&doc, b))?,
    );
    out.add(
        "sites.csv",
        bytes("sites.csv", |b| files::write_csv(&doc, b))?,
    );
    out.add(
        "sites.md",
        bytes("sites.md", |b| files::write_markdown(&doc, b))?,
    );
    let svg = forest::forest_svg(runs);
    if let Some(svg) = &svg {
        out.add("sites.svg", svg.clone().into_bytes());
    }
    out.add(
        "index.html",
        page::index_html(&doc, svg.as_deref(), &folders).into_bytes(),
    );
    out.add("protocol.json", protocol.to_file_text().into_bytes());
    for r in per_site {
        if let Some(site) = r? {
            out.nest(&site.dir, site.folder);
            out.describe(&site.dir, &site.what);
        }
    }
    Ok(out)
}
