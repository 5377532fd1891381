//! `patternproof._native`: the library facade's jobs for Python.
//!
//! Each function takes the command's options as plain values, checks
//! them with the command line's words, releases the GIL for the
//! computation, and returns the documented JSON document (the bytes the
//! command line writes) with the warnings the command line would print.
//! The Python package (`patternproof/__init__.py`) turns these into typed
//! result objects; nothing here computes a statistic of its own.

mod arrow;
mod errors;
mod inputs;
mod interrupt;

use errors::{setting, to_py};
use inputs::{Boundary, Points, Reading};
use interrupt::{StopFlag, interruptible};
use patternproof::words as options;
use patternproof::{
    AuditOptions, Error, Figures, Input, LoadedSites, Protocol, ScalesOptions, SiteRun,
    SitesOptions, SitesSource, WindowOptions,
};
use pyo3::prelude::*;
use pyo3::types::PyBytes;
use std::path::PathBuf;

/// What a job returns to Python: its JSON document and the warnings the
/// command line prints on stderr.
type Document = (String, Vec<String>);

fn points_arg(points: &Bound<'_, PyAny>) -> PyResult<Points> {
    if let Ok(bytes) = points.cast::<PyBytes>() {
        return inputs::pairs(bytes.as_bytes())
            .map(Points::Memory)
            .map_err(to_py);
    }
    Ok(Points::File(points.extract::<PathBuf>()?))
}

fn boundary_args(
    boundaries: Vec<(String, String, Option<String>)>,
) -> Result<Vec<Boundary>, Error> {
    boundaries
        .into_iter()
        .enumerate()
        .map(|(i, (kind, payload, name))| match kind.as_str() {
            "file" => Ok(Boundary::File(PathBuf::from(payload))),
            "wkb" => {
                let bytes = hex(&payload)
                    .ok_or_else(|| Error::Internal("the WKB was not handed over as hex".into()))?;
                inputs::boundary_wkb(&bytes, name, i)
            }
            _ => inputs::boundary_text(&payload, name, i),
        })
        .collect()
}

/// Bytes from the hex text Python's `bytes.hex()` writes.
fn hex(text: &str) -> Option<Vec<u8>> {
    if !text.len().is_multiple_of(2) {
        return None;
    }
    (0..text.len())
        .step_by(2)
        .map(|i| u8::from_str_radix(text.get(i..i + 2)?, 16).ok())
        .collect()
}

/// `layer=`, `boundary_layer=` and `where=` as handed over.
type Gpkg = (Option<String>, Option<String>, Option<String>);

fn reading(
    coords: &str,
    unit: &str,
    drop_duplicates: bool,
    (layer, boundary_layer, filter): Gpkg,
) -> Result<Reading, Error> {
    Ok(Reading {
        coords: inputs::coord_choice(coords)?,
        unit: unit.to_string(),
        drop_duplicates,
        gpkg: inputs::gpkg_choice(layer, boundary_layer, filter.as_deref())?,
    })
}

fn json<T: serde::Serialize>(value: &T) -> Result<String, Error> {
    serde_json::to_string_pretty(value)
        .map_err(|e| Error::Internal(format!("could not write the JSON: {e}")))
}

/// What an audit's report folder needs besides its document: the points
/// in the plane they were measured in, and that plane.
#[pyclass(module = "patternproof._native", frozen)]
pub struct AuditFolder {
    report: patternproof::AuditReport,
    points: Vec<[f64; 2]>,
    /// The centre of the equal-area plane of lon/lat input.
    projection: Option<(f64, f64)>,
    srs: patternproof::SpatialRef,
}

#[pymethods]
impl AuditFolder {
    /// The verdict at a glance (matrix, sentence, counts) as the report's
    /// page opens, with its styles: what a notebook shows.
    fn glance_html(&self) -> String {
        patternproof_report::matrix::glance_html(&self.report)
    }

    /// Write the report folder the command line writes for the same run
    /// into `dir`, all or nothing; `command_line` is what its page shows
    /// as the command. Returns the names of the files written.
    #[pyo3(signature = (dir, force, no_map, picture_window, command_line))]
    fn write(
        &self,
        py: Python<'_>,
        dir: PathBuf,
        force: bool,
        no_map: bool,
        picture_window: Option<String>,
        command_line: String,
    ) -> PyResult<Vec<String>> {
        py.detach(|| self.write_folder(&dir, force, no_map, picture_window, command_line))
            .map_err(to_py)
    }
}

impl AuditFolder {
    fn write_folder(
        &self,
        dir: &std::path::Path,
        force: bool,
        no_map: bool,
        picture_window: Option<String>,
        command_line: String,
    ) -> Result<Vec<String>, Error> {
        use patternproof_report::{Plane, RenderChoices, RenderError, RunContext, audit_folder};
        let projection = match self.projection {
            Some((lon0, lat0)) => Some(
                patternproof::Projection::centred_at(lon0, lat0).ok_or_else(|| {
                    Error::Internal(format!("no projection centred at {lon0}, {lat0}"))
                })?,
            ),
            None => None,
        };
        let unproject = projection
            .as_ref()
            .map(|p| move |x: f64, y: f64| p.inverse(x, y));
        let plane = Plane {
            points: &self.points,
            unproject: unproject
                .as_ref()
                .map(|f| f as &(dyn Fn(f64, f64) -> _ + Sync)),
            srs: &self.srs,
        };
        let choices = RenderChoices {
            picture_window,
            no_map,
            scales: None,
        };
        let run = RunContext {
            command_line,
            stamp: None,
            protocol: None,
        };
        // The command line's words for the same refusals.
        let folder = audit_folder(&self.report, plane, &choices, &run).map_err(|e| match e {
            RenderError::UnknownWindow { id, known } => setting(
                format!("picture_window={id:?}"),
                "no window has this id",
                format!("choose one of {}", known.join(", ")),
            ),
            RenderError::NoSimulations { id } => setting(
                format!("picture_window={id:?}"),
                "this window has no simulations (simulations need an outline and sims above 0)",
                "choose a window with an outline, or leave the option out",
            ),
            e => Error::Internal(e.to_string()),
        })?;
        write_out(dir, &folder, force)
    }
}

/// Write `folder` into `dir` all or nothing, as the command line does
/// (`force` replaces only a folder this tool wrote). Returns the names.
fn write_out(
    dir: &std::path::Path,
    folder: &patternproof_report::OutputFolder,
    force: bool,
) -> Result<Vec<String>, Error> {
    use patternproof_report::{FolderError, WriteOptions, write_folder};
    let options = if force {
        WriteOptions::FORCE
    } else {
        WriteOptions::KEEP
    };
    match write_folder(dir, folder, options) {
        Ok(_) => Ok(folder.names().map(str::to_string).collect()),
        Err(FolderError::BadName(n)) => Err(Error::Internal(format!(
            "the report has a file named `{n}`, which is not a plain relative path"
        ))),
        Err(e) => {
            let text = e.to_string();
            let (what, hint) = text
                .split_once("\n  what to do: ")
                .unwrap_or((text.as_str(), "choose another folder, or pass force=True"));
            Err(setting("", what, hint))
        }
    }
}

/// What the folder of `scales` needs besides `scales.json`.
#[pyclass(module = "patternproof._native", frozen)]
pub struct ScalesFolder {
    run: patternproof::ScalesRun,
    summary: patternproof::InputSummary,
    digests: Vec<patternproof::FileDigest>,
    notes: Vec<String>,
}

#[pymethods]
impl ScalesFolder {
    /// Write the folder `patternproof scales --out DIR` writes, all or
    /// nothing; returns the names of the files written.
    #[pyo3(signature = (dir, force, command_line))]
    fn write(
        &self,
        py: Python<'_>,
        dir: PathBuf,
        force: bool,
        command_line: String,
    ) -> PyResult<Vec<String>> {
        py.detach(|| {
            let source = patternproof_report::scales::Source {
                input: &self.summary,
                digests: &self.digests,
                notes: &self.notes,
            };
            let run = patternproof_report::RunContext {
                command_line,
                ..patternproof_report::RunContext::default()
            };
            let folder = patternproof_report::scales::folder(&self.run, source, &run)
                .map_err(|e| Error::Internal(e.to_string()))?;
            write_out(&dir, &folder, force)
        })
        .map_err(to_py)
    }
}

/// What the folder of `density` needs besides `density.json`.
#[pyclass(module = "patternproof._native", frozen)]
pub struct DensityFolder {
    analysis: patternproof::DensityAnalysis,
    info: patternproof_report::density::RunInfo,
}

#[pymethods]
impl DensityFolder {
    /// Write the folder `patternproof density --out DIR` writes, all or
    /// nothing; returns the names of the files written.
    #[pyo3(signature = (dir, force, command_line))]
    fn write(
        &self,
        py: Python<'_>,
        dir: PathBuf,
        force: bool,
        command_line: String,
    ) -> PyResult<Vec<String>> {
        py.detach(|| {
            let run = patternproof_report::RunContext {
                command_line,
                ..patternproof_report::RunContext::default()
            };
            let folder = patternproof_report::density::folder(&self.analysis, &self.info, &run)
                .map_err(|e| Error::Internal(e.to_string()))?;
            write_out(&dir, &folder, force)
        })
        .map_err(to_py)
    }
}

/// The nearest-neighbour audit: `report.json`, the loading warnings and
/// what its report folder needs.
#[pyfunction]
#[pyo3(signature = (points, boundaries, coords, unit, drop_duplicates, gpkg, buffers, concavity, edges, sims, seed, alpha, guard, area))]
#[allow(clippy::too_many_arguments)]
fn audit(
    py: Python<'_>,
    points: &Bound<'_, PyAny>,
    boundaries: Vec<(String, String, Option<String>)>,
    coords: String,
    unit: String,
    drop_duplicates: bool,
    gpkg: Gpkg,
    buffers: Vec<String>,
    concavity: f64,
    edges: Vec<String>,
    sims: usize,
    seed: u64,
    alpha: f64,
    guard: Option<f64>,
    area: Option<f64>,
) -> PyResult<(String, Vec<String>, AuditFolder)> {
    let points = points_arg(points)?;
    let run = move |stop: &StopFlag| -> Result<(String, Vec<String>, AuditFolder), Error> {
        // The command line's order: options first, then the files.
        let buffers = options::buffers(&buffers)?;
        let concavity = options::concavity(concavity)?;
        let edges = options::edges(&edges)?;
        let alpha = options::alpha(alpha)?;
        let area = options::area(area)?;
        let guard = options::guard(guard)?;
        let reading = reading(&coords, &unit, drop_duplicates, gpkg)?;
        let (input, data) = inputs::input(points, boundary_args(boundaries)?, &reading)?;
        let options = AuditOptions {
            windows: WindowOptions {
                buffers,
                area,
                concavity,
            },
            alpha,
            edges,
            guard,
            sims,
            seed,
        };
        let report = patternproof::audit(&input, &options, stop)?;
        let mut buf = Vec::new();
        report
            .write_json(&mut buf)
            .map_err(|e| Error::Internal(format!("could not write report.json: {e}")))?;
        let text = String::from_utf8(buf)
            .map_err(|e| Error::Internal(format!("report.json is not UTF-8: {e}")))?;
        let folder = AuditFolder {
            points: data.points.clone(),
            projection: data.projection.as_ref().map(|p| (p.lon0, p.lat0)),
            srs: data.plane_srs(),
            report,
        };
        Ok((text, data.warnings, folder))
    };
    interruptible(py, run)
}

fn figures(n: &str, given: &[(String, String)], one_sided: bool) -> Result<Figures, Error> {
    use patternproof::options::{Problem, Quantity, parse_count, parse_figure as parse};
    let refuse = |flag: &str, text: &str, p: Problem| {
        setting(format!("{flag} {}", text.trim()), p.what, p.advice)
    };
    let count = parse_count(n).map_err(|p| refuse("--n", n, p))?;
    let mut f = Figures::new(count, one_sided);
    for (name, text) in given {
        let q = match name.as_str() {
            "ratio" => Quantity::Ratio,
            "z" => Quantity::Z,
            "p" => Quantity::P,
            "mean_nn" => Quantity::MeanNn,
            "expected_nn" => Quantity::ExpectedNn,
            "area" => Quantity::Area,
            other => return Err(Error::Internal(format!("no figure called {other}"))),
        };
        let r = parse(text, q).map_err(|p| refuse(q.flag(), text, p))?;
        f = f.with(r);
    }
    if f.figures.is_empty() {
        return Err(setting(
            "",
            "nothing to recheck: only n was given",
            "add the figures as printed, e.g. --ratio 0.71 --z -4.9 --p \"<0.001\"",
        ));
    }
    Ok(f)
}

/// Recheck reported figures (and, with points, find the windows that
/// reproduce them): the JSON of `patternproof recheck --json`.
#[pyfunction]
#[pyo3(signature = (n, given, one_sided, points, boundaries, coords, unit, drop_duplicates))]
#[allow(clippy::too_many_arguments)]
fn recheck(
    py: Python<'_>,
    n: String,
    given: Vec<(String, String)>,
    one_sided: bool,
    points: Option<&Bound<'_, PyAny>>,
    boundaries: Vec<(String, String, Option<String>)>,
    coords: String,
    unit: String,
    drop_duplicates: bool,
) -> PyResult<Document> {
    let points = points.map(points_arg).transpose()?;
    let run = move || -> Result<Document, Error> {
        let f = figures(&n, &given, one_sided)?;
        let (input, warnings): (Option<Input>, Vec<String>) = match points {
            Some(points) => {
                let reading = reading(&coords, &unit, drop_duplicates, (None, None, None))?;
                let (input, data) = inputs::input(points, boundary_args(boundaries)?, &reading)?;
                (Some(input), data.warnings)
            }
            None => (None, Vec::new()),
        };
        let result = patternproof::recheck(&f, input.as_ref())?;
        let mut text = json(&result)?;
        text.push('\n');
        Ok((text, warnings))
    };
    py.detach(run).map_err(to_py)
}

/// Ripley's K across the windows: `scales.json`, the notes on windows
/// left out, and the loading warnings.
#[pyfunction]
#[pyo3(signature = (points, boundaries, coords, unit, drop_duplicates, gpkg, buffers, concavity, edges, test_edges, rmax, steps, sims, seed, alpha))]
#[allow(clippy::too_many_arguments)]
fn scales(
    py: Python<'_>,
    points: &Bound<'_, PyAny>,
    boundaries: Vec<(String, String, Option<String>)>,
    coords: String,
    unit: String,
    drop_duplicates: bool,
    gpkg: Gpkg,
    buffers: Vec<String>,
    concavity: f64,
    edges: Vec<String>,
    test_edges: Vec<String>,
    rmax: Option<f64>,
    steps: usize,
    sims: usize,
    seed: u64,
    alpha: f64,
) -> PyResult<(String, Vec<String>, Vec<String>, ScalesFolder)> {
    let points = points_arg(points)?;
    let run =
        move |stop: &StopFlag| -> Result<(String, Vec<String>, Vec<String>, ScalesFolder), Error> {
            let buffers = options::buffers(&buffers)?;
            let concavity = options::concavity(concavity)?;
            let mut corrections = options::corrections("--edges", &edges)?;
            let tested = options::corrections("--test-edges", &test_edges)?;
            for &t in &tested {
                if !corrections.contains(&t) {
                    corrections.push(t);
                }
            }
            let alpha = options::alpha(alpha)?;
            let rmax = options::rmax(rmax)?;
            let steps = options::steps(steps)?;
            let reading = reading(&coords, &unit, drop_duplicates, gpkg)?;
            let (input, data) = inputs::input(points, boundary_args(boundaries)?, &reading)?;
            let options = ScalesOptions {
                corrections,
                tested,
                rmax,
                steps,
                sims,
                seed,
                alpha,
            };
            let windows = WindowOptions {
                buffers,
                area: None,
                concavity,
            };
            let result = patternproof::scales(&input, &windows, &options, stop)?;
            let text = json(&result.run)?;
            let folder = ScalesFolder {
                run: result.run,
                summary: input.summary,
                digests: input.digests,
                notes: result.notes.clone(),
            };
            Ok((text, result.notes, data.warnings, folder))
        };
    interruptible(py, run)
}

/// Kernel density across kernels, bandwidths and edge handlings:
/// `density.json` and the warnings.
#[pyfunction]
#[pyo3(signature = (points, boundaries, coords, unit, drop_duplicates, gpkg, kernels, bandwidths, cell, levels, edges, reference))]
#[allow(clippy::too_many_arguments)]
fn density(
    py: Python<'_>,
    points: &Bound<'_, PyAny>,
    boundaries: Vec<(String, String, Option<String>)>,
    coords: String,
    unit: String,
    drop_duplicates: bool,
    gpkg: Gpkg,
    kernels: Vec<String>,
    bandwidths: Vec<String>,
    cell: Option<f64>,
    levels: Vec<String>,
    edges: Vec<String>,
    reference: String,
) -> PyResult<(String, Vec<String>, DensityFolder)> {
    let points = points_arg(points)?;
    let run = move || -> Result<(String, Vec<String>, DensityFolder), Error> {
        if boundaries.len() > 1 {
            return Err(setting(
                "--boundary",
                format!(
                    "{} boundaries given; density uses one window",
                    boundaries.len()
                ),
                "pass one --boundary (or none for the convex hull of the points)",
            ));
        }
        let reading = reading(&coords, &unit, drop_duplicates, gpkg)?;
        let (input, data) = inputs::input(points, boundary_args(boundaries)?, &reading)?;
        let words = options::DensityWords {
            kernels: &kernels,
            bandwidths: &bandwidths,
            cell,
            levels: &levels,
            edges: &edges,
            reference: &reference,
        };
        let config = options::density(&words, &data.unit)?;
        let result = patternproof::density(&input, &config)?;
        let info = patternproof_report::density::RunInfo {
            points_file: data.points_file.display().to_string(),
            n_read: data.n_read,
            coords: data.system.as_str().to_string(),
            projection: data.projection.as_ref().map(|p| p.describe()),
            unit: data.unit.clone(),
            window_source: result.window_source.clone(),
            window_area: result.window_area,
            warnings: data.warnings.clone(),
            inputs: input.digests.clone(),
        };
        let mut text = json(&patternproof_report::density::document(
            &result.analysis,
            &info,
        ))?;
        text.push('\n');
        let mut warnings = data.warnings;
        warnings.extend(result.analysis.warnings.iter().cloned());
        let folder = DensityFolder {
            analysis: result.analysis,
            info,
        };
        Ok((text, warnings, folder))
    };
    py.detach(run).map_err(to_py)
}

/// The sites of a multi-site study under one locked protocol, loaded and
/// matched to their boundaries, ready to run whole or one at a time.
#[pyclass(module = "patternproof._native")]
struct SitePlan {
    loaded: LoadedSites,
    protocol: Protocol,
    /// The protocol file, as the run's pages name it.
    protocol_file: PathBuf,
    sweep_sims: usize,
}

/// An error while a folder is rendered: the facade's, or the renderer's
/// (which only a bug can cause) as an internal one.
struct Rendering(Error);

impl From<patternproof_report::RenderError> for Rendering {
    fn from(e: patternproof_report::RenderError) -> Self {
        Rendering(Error::Internal(e.to_string()))
    }
}

/// A finished `sites` run, ready to write the folder the command line
/// writes: the plan it came from and every site's run.
#[pyclass(module = "patternproof._native", frozen)]
pub struct SitesFolder {
    plan: Py<SitePlan>,
    runs: Vec<SiteRun>,
}

#[pymethods]
impl SitesFolder {
    /// Write the folder `patternproof sites --out DIR` writes, all or
    /// nothing; returns the names of the files written.
    #[pyo3(signature = (dir, force, command_line))]
    fn write(
        &self,
        py: Python<'_>,
        dir: PathBuf,
        force: bool,
        command_line: String,
    ) -> PyResult<Vec<String>> {
        let plan = self.plan.borrow(py);
        let plan: &SitePlan = &plan;
        let runs = &self.runs;
        py.detach(|| {
            use patternproof_report::sites::StudySite;
            use patternproof_report::{RenderChoices, RunContext};
            let sites = &plan.loaded.sites;
            let study: Vec<StudySite<'_>> = sites
                .iter()
                .map(|s| StudySite {
                    input: &s.input,
                    files: &s.files,
                    data: s.data,
                })
                .collect();
            let choices = RenderChoices {
                picture_window: None,
                no_map: false,
                scales: None,
            };
            let context = RunContext {
                command_line,
                stamp: None,
                protocol: Some(format!(
                    "{} (SHA-256 {})",
                    plan.protocol_file.display(),
                    plan.protocol.sha256()
                )),
            };
            let report_of = |i: usize| -> Result<patternproof::AuditReport, Rendering> {
                patternproof::site_report(&sites[i], &runs[i], &plan.protocol)
                    .map_err(Rendering)?
                    .ok_or_else(|| {
                        Rendering(Error::Internal(
                            "a site without a sweep has no report".into(),
                        ))
                    })
            };
            let folder = patternproof_report::sites::study_folder(
                runs,
                &plan.protocol,
                plan.sweep_sims,
                &study,
                &plan.loaded.datasets,
                report_of,
                &choices,
                &context,
            )
            .map_err(|Rendering(e)| e)?;
            write_out(&dir, &folder, force)
        })
        .map_err(to_py)
    }
}

/// One site's run, before the adjustment across sites.
#[pyclass(module = "patternproof._native")]
struct SiteRunHandle {
    run: SiteRun,
}

#[pymethods]
impl SiteRunHandle {
    /// The site's row as JSON (`adjusted p` empty until combined).
    fn row_json(&self) -> PyResult<String> {
        json(&self.run.row).map_err(to_py)
    }
}

#[pymethods]
impl SitePlan {
    /// The site names, in run order.
    fn names(&self) -> Vec<String> {
        self.loaded
            .sites
            .iter()
            .map(|s| s.input.name.clone())
            .collect()
    }

    /// Warnings of the matching (a boundary no site uses).
    fn warnings(&self) -> Vec<String> {
        self.loaded.warnings.clone()
    }

    /// Run site `index` alone: what one worker of a distributed run does.
    fn run_site(&self, py: Python<'_>, index: usize) -> PyResult<SiteRunHandle> {
        let Some(site) = self.loaded.sites.get(index) else {
            return Err(to_py(setting(
                format!("site {index}"),
                format!("there are {} sites", self.loaded.sites.len()),
                "give an index from 0 to the number of sites less one",
            )));
        };
        let options = SitesOptions {
            sweep_sims: self.sweep_sims,
        };
        let run = py.detach(|| patternproof::site_result(site, &self.protocol, options));
        Ok(SiteRunHandle { run })
    }

    /// Adjust the p-values of runs (one per site, in run order) across
    /// sites and give `sites.json`.
    fn combine(
        slf: PyRef<'_, Self>,
        runs: Vec<PyRef<'_, SiteRunHandle>>,
    ) -> PyResult<(String, SitesFolder)> {
        let this: &SitePlan = &slf;
        if runs.len() != this.loaded.sites.len() {
            return Err(to_py(setting(
                "runs",
                format!(
                    "{} run(s) for {} sites",
                    runs.len(),
                    this.loaded.sites.len()
                ),
                "give one run per site, in the order of the plan's names",
            )));
        }
        let mut runs: Vec<SiteRun> = runs.iter().map(|r| r.run.clone()).collect();
        for (run, site) in runs.iter().zip(&this.loaded.sites) {
            if run.row.site != site.input.name {
                return Err(to_py(setting(
                    "runs",
                    format!(
                        "site `{}` where `{}` was expected",
                        run.row.site, site.input.name
                    ),
                    "give one run per site, in the order of the plan's names",
                )));
            }
        }
        patternproof::adjust(&mut runs, &this.protocol);
        let text = sites_json(&runs, &this.protocol, this.sweep_sims).map_err(to_py)?;
        Ok((
            text,
            SitesFolder {
                plan: slf.into(),
                runs,
            },
        ))
    }

    /// Run every site (in parallel) and give `sites.json`.
    fn run_all(slf: PyRef<'_, Self>, py: Python<'_>) -> PyResult<(String, SitesFolder)> {
        let this: &SitePlan = &slf;
        let options = SitesOptions {
            sweep_sims: this.sweep_sims,
        };
        let (text, runs) = interruptible(py, |stop| {
            let runs = patternproof::sites(&this.loaded, &this.protocol, options, stop)?;
            let text = sites_json(&runs, &this.protocol, this.sweep_sims)?;
            Ok((text, runs))
        })?;
        Ok((
            text,
            SitesFolder {
                plan: slf.into(),
                runs,
            },
        ))
    }
}

fn sites_json(runs: &[SiteRun], protocol: &Protocol, sweep_sims: usize) -> Result<String, Error> {
    let doc = patternproof::sites_document(runs, protocol, sweep_sims);
    let mut buf = Vec::new();
    patternproof_report::sites::files::write_json(&doc, &mut buf)
        .map_err(|e| Error::Internal(format!("could not write sites.json: {e}")))?;
    String::from_utf8(buf).map_err(|e| Error::Internal(format!("sites.json is not UTF-8: {e}")))
}

/// Read a protocol (refused when changed) and load its sites.
#[pyfunction]
#[pyo3(signature = (protocol_file, inputs, site_field, layer, filter, boundaries, boundary_layer, boundary_field, coords, unit, drop_duplicates, sweep_sims))]
#[allow(clippy::too_many_arguments)]
fn plan_sites(
    py: Python<'_>,
    protocol_file: PathBuf,
    inputs: Vec<PathBuf>,
    site_field: Option<String>,
    layer: Option<String>,
    filter: Option<String>,
    boundaries: Option<PathBuf>,
    boundary_layer: Option<String>,
    boundary_field: String,
    coords: String,
    unit: String,
    drop_duplicates: bool,
    sweep_sims: usize,
) -> PyResult<SitePlan> {
    let run = move || -> Result<SitePlan, Error> {
        let protocol = patternproof::read_verified(&protocol_file)?;
        // The boundary layer is the sites source's own, not the loader's.
        let reading = reading(&coords, &unit, drop_duplicates, (layer, None, filter))?;
        let source = SitesSource {
            inputs,
            site_field,
            boundaries,
            boundary_layer,
            boundary_field,
            load: patternproof::LoadOptions {
                coords: reading.coords,
                unit: reading.unit,
                drop_duplicates,
                field: None,
                gpkg: reading.gpkg,
            },
        };
        let loaded =
            patternproof::load_sites(&source, &protocol, &protocol_file.display().to_string())?;
        Ok(SitePlan {
            loaded,
            protocol,
            protocol_file,
            sweep_sims,
        })
    };
    py.detach(run).map_err(to_py)
}

/// What a protocol gives Python: the file text, its SHA-256 and the
/// choices in words.
type ProtocolParts = (String, String, Vec<String>);

fn protocol_parts(p: &Protocol) -> ProtocolParts {
    (p.to_file_text(), p.sha256(), p.describe())
}

/// A new study protocol, checked as `protocol new` checks it.
#[pyfunction]
#[pyo3(signature = (window, edge, alpha, sims, seed, adjust, min_n, guard, concavity, note))]
#[allow(clippy::too_many_arguments)]
fn protocol(
    window: String,
    edge: String,
    alpha: f64,
    sims: usize,
    seed: u64,
    adjust: String,
    min_n: usize,
    guard: Option<f64>,
    concavity: f64,
    note: Option<String>,
) -> PyResult<ProtocolParts> {
    let p = options::protocol(&options::ProtocolWords {
        window: &window,
        edge: &edge,
        alpha,
        sims,
        seed,
        adjust: &adjust,
        min_n,
        guard,
        concavity,
        note: note.as_deref(),
    })
    .map_err(to_py)?;
    Ok(protocol_parts(&p))
}

/// A protocol file, refused when its choices were changed after it was
/// written (`protocol show`).
#[pyfunction]
fn read_protocol(path: PathBuf) -> PyResult<ProtocolParts> {
    let p = patternproof::read_verified(&path).map_err(to_py)?;
    Ok(protocol_parts(&p))
}

/// The module.
#[pymodule]
fn _native(m: &Bound<'_, PyModule>) -> PyResult<()> {
    m.add_function(wrap_pyfunction!(audit, m)?)?;
    m.add_class::<AuditFolder>()?;
    m.add_function(wrap_pyfunction!(protocol, m)?)?;
    m.add_function(wrap_pyfunction!(read_protocol, m)?)?;
    m.add_class::<ScalesFolder>()?;
    m.add_class::<DensityFolder>()?;
    m.add_class::<SitesFolder>()?;
    m.add_function(wrap_pyfunction!(recheck, m)?)?;
    m.add_function(wrap_pyfunction!(scales, m)?)?;
    m.add_function(wrap_pyfunction!(density, m)?)?;
    m.add_function(wrap_pyfunction!(plan_sites, m)?)?;
    m.add_class::<SitePlan>()?;
    m.add_class::<SiteRunHandle>()?;
    m.add_function(wrap_pyfunction!(arrow::arrow_points, m)?)?;
    m.add_class::<arrow::ArrowTable>()?;
    Ok(())
}
