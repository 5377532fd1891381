//! `sites`: one locked protocol over many sites.
//!
//! [`load_sites`] reads the point files (one per site, or one file split
//! by a site column) and matches each site to its boundary; [`sites`]
//! runs them all and adjusts the p-values across sites; [`site_result`]
//! runs one site alone, for a worker of a distributed run (the
//! adjustment across sites then happens where the results meet, with
//! [`adjust`]).

use crate::document::{AuditReport, BoundarySource, InputSummary};
use crate::error::{Error, Refusal};
use crate::input::{digests, input_summary};
use crate::progress::{Progress, stoppable, ticker};
use patternproof_audit::window::NamedShape;
use patternproof_io::boundary::read_named_boundaries;
use patternproof_io::geopackage::{self, is_geopackage};
use patternproof_io::{CoordSystem, Dataset, LoadOptions};
use patternproof_protocol::{Protocol, WindowRule};
use patternproof_sites::{RunOptions, SiteInput, SiteRun};
use std::path::PathBuf;

pub use patternproof_sites::adjust;

/// Where the sites come from.
#[derive(Debug, Clone)]
pub struct SitesSource {
    /// Point files, one per site (the file stem names the site), or one
    /// file with [`SitesSource::site_field`].
    pub inputs: Vec<PathBuf>,
    /// The column or property naming each point's site, when one file
    /// holds every site.
    pub site_field: Option<String>,
    /// One boundary per site, matched by name.
    pub boundaries: Option<PathBuf>,
    /// The GeoPackage layer of the boundaries.
    pub boundary_layer: Option<String>,
    /// The property or column of the boundaries that names the site.
    pub boundary_field: String,
    /// How to read the point files (`field` is set from `site_field`).
    pub load: LoadOptions,
}

/// One site, ready to run.
#[derive(Debug, Clone)]
pub struct Site {
    /// Name, points and boundary.
    pub input: SiteInput,
    /// Index of the data set in [`LoadedSites::datasets`] it came from
    /// (shared by every site of a `site_field` file).
    pub data: usize,
    /// What the site's report says about its input.
    pub summary: InputSummary,
    /// The files it was read from.
    pub files: Vec<PathBuf>,
}

/// Every site and the data sets they were read from.
#[derive(Debug)]
pub struct LoadedSites {
    /// The sites, in the order of the files (or by name for `site_field`).
    pub sites: Vec<Site>,
    /// The data sets as read.
    pub datasets: Vec<Dataset>,
    /// Warnings of the matching, such as a boundary no site uses.
    pub warnings: Vec<String>,
}

/// Read every site of `source` and match the boundaries; refuse what
/// `protocol` cannot run (its window is the site's own boundary and no
/// boundary matches).
pub fn load_sites(
    source: &SitesSource,
    protocol: &Protocol,
    protocol_file: &str,
) -> Result<LoadedSites, Error> {
    if protocol.window == WindowRule::Boundary && source.boundaries.is_none() {
        return Err(Error::refused(
            Refusal::Sites,
            protocol_file,
            "the protocol's window is each site's own boundary, and no --boundaries file was given, so no site could be tested",
            "pass --boundaries FILE (one polygon per site, named in --boundary-field), or use a protocol with another window rule",
        ));
    }
    let loaded = read_sites(source)?;
    if protocol.window == WindowRule::Boundary
        && let Some(bfile) = &source.boundaries
        && loaded.sites.iter().all(|s| s.input.boundary.is_none())
    {
        let names: Vec<&str> = loaded
            .sites
            .iter()
            .map(|s| s.input.name.as_str())
            .take(5)
            .collect();
        return Err(Error::refused(
            Refusal::Sites,
            bfile.display().to_string(),
            format!(
                "no boundary's `{}` matches a site name ({}{}), and the protocol's window is each site's own boundary, so no site could be tested",
                source.boundary_field,
                names.join(", "),
                if loaded.sites.len() > 5 { ", …" } else { "" }
            ),
            "name the property or column that holds the site names with --boundary-field",
        ));
    }
    Ok(loaded)
}

fn read_sites(source: &SitesSource) -> Result<LoadedSites, Error> {
    let options = |field: Option<String>| LoadOptions {
        field,
        ..source.load.clone()
    };
    let mut sites: Vec<Site> = Vec::new();
    let mut datasets: Vec<Dataset> = Vec::new();
    let mut warnings = Vec::new();
    if let Some(field) = &source.site_field {
        if source.inputs.len() != 1 {
            return Err(Error::refused(
                Refusal::Sites,
                format!("--site-field {field}"),
                format!(
                    "give exactly one point file holding every site ({} given)",
                    source.inputs.len()
                ),
                "drop --site-field to use one file per site, or merge the files",
            ));
        }
        let file = &source.inputs[0];
        let all = Dataset::load(file, &[], &options(Some(field.clone())))?;
        let values = all
            .field_values
            .clone()
            .ok_or_else(|| Error::Internal("the site field was requested but not read".into()))?;
        let mut names: Vec<String> = values.clone();
        names.sort();
        names.dedup();
        for name in names {
            let idx: Vec<usize> = (0..values.len()).filter(|&i| values[i] == name).collect();
            let points: Vec<_> = idx.iter().map(|&i| all.points[i]).collect();
            let mut summary = input_summary(&all);
            summary.points_file = format!("{} (site {name})", summary.points_file);
            summary.n = points.len();
            summary.n_read = points.len();
            summary.duplicates = 0;
            sites.push(Site {
                input: SiteInput {
                    name: name.clone(),
                    points,
                    boundary: None,
                },
                data: 0,
                summary,
                files: vec![file.clone()],
            });
        }
        datasets.push(all);
    } else {
        for file in &source.inputs {
            let name = patternproof_io::points::one_line(
                file.file_stem().and_then(|s| s.to_str()).unwrap_or("site"),
            );
            if sites.iter().any(|s| s.input.name == name) {
                return Err(Error::refused(
                    Refusal::Sites,
                    file.display().to_string(),
                    format!("a second file for site `{name}` (site names are file stems)"),
                    "rename one of the files so every site has its own name",
                ));
            }
            let data = Dataset::load(file, &[], &options(None))?;
            sites.push(Site {
                input: SiteInput {
                    name,
                    points: data.points.clone(),
                    boundary: None,
                },
                data: datasets.len(),
                summary: input_summary(&data),
                files: vec![file.clone()],
            });
            datasets.push(data);
        }
    }
    if source.boundary_layer.is_some() && !source.boundaries.as_deref().is_some_and(is_geopackage) {
        return Err(Error::refused(
            Refusal::Setting,
            "",
            "--boundary-layer was given but --boundaries is not a GeoPackage",
            "give --boundaries FILE.gpkg --boundary-layer NAME, or leave --boundary-layer out",
        ));
    }
    if let Some(bfile) = &source.boundaries {
        let coords = source.load.coords;
        let mut layer_srs = None;
        let raws = if is_geopackage(bfile) {
            let (raws, layer, srs) = geopackage::read_named_boundaries(
                bfile,
                source.boundary_layer.as_deref(),
                &source.boundary_field,
                coords,
            )?;
            layer_srs = srs.map(|s| (layer, s));
            raws
        } else {
            read_named_boundaries(bfile, &source.boundary_field)?
        };
        for raw in &raws {
            if !sites.iter().any(|s| s.input.name == raw.name) {
                warnings.push(format!(
                    "{}: boundary `{}` matches no site",
                    bfile.display(),
                    raw.name
                ));
            }
        }
        for s in &mut sites {
            if let Some(raw) = raws.iter().find(|r| r.name == s.input.name) {
                let data = &datasets[s.data];
                // Projected layers must share the points' system: nothing
                // here reprojects between two projected systems.
                if let (
                    Some((layer, b)),
                    Some(p),
                    CoordSystem::Projected,
                    patternproof_io::CoordChoice::Auto,
                ) = (&layer_srs, &data.srs, data.system, coords)
                    && !geopackage::same_system(p, b)
                {
                    return Err(Error::refused(
                        Refusal::Sites,
                        bfile.display().to_string(),
                        format!(
                            "layer `{layer}` is in {} but the points of site `{}` are in {}",
                            b.label(),
                            s.input.name,
                            p.label()
                        ),
                        "reproject the boundaries to the points' coordinate system in a GIS and export them again",
                    ));
                }
                let b = datasets[s.data].planar(bfile, raw.clone(), coords)?;
                s.input.boundary = Some(NamedShape {
                    name: b.name.clone(),
                    source: bfile.display().to_string(),
                    shape: b.shape.clone(),
                });
                s.summary.boundaries = vec![BoundarySource {
                    name: b.name.clone(),
                    file: bfile.display().to_string(),
                }];
                s.files.push(bfile.clone());
            }
        }
    }
    for s in &mut sites {
        s.summary.warnings = datasets[s.data].warnings.clone();
    }
    Ok(LoadedSites {
        sites,
        datasets,
        warnings,
    })
}

/// Run every site under `protocol` (sites in parallel) and adjust the
/// p-values across them. Refused only when `progress` asks the run to
/// stop ([`Refusal::Stopped`]).
pub fn sites(
    loaded: &LoadedSites,
    protocol: &Protocol,
    options: RunOptions,
    progress: &dyn Progress,
) -> Result<Vec<SiteRun>, Error> {
    let inputs: Vec<SiteInput> = loaded.sites.iter().map(|s| s.input.clone()).collect();
    progress.start(
        patternproof_sites::simulated_patterns(&inputs, protocol, options),
        "simulating CSR at every site",
    );
    let runs = stoppable("the sites", || {
        patternproof_sites::run_sites_with(&inputs, protocol, options, &ticker(progress))
    });
    progress.finish();
    runs
}

/// One site's run, without the adjustment across sites: what a worker of
/// a distributed run computes. The row's adjusted p-value is filled in by
/// [`adjust`] once every site's row is in.
///
/// ```
/// use patternproof::options::{Adjust, Edge, PROTOCOL_SCHEMA, Protocol, WindowRule};
/// use patternproof::{CoordChoice, LoadOptions, SitesOptions, SitesSource};
/// use patternproof::{adjust, load_sites, site_result};
///
/// let repo = std::path::Path::new(env!("CARGO_MANIFEST_DIR")).join("../..");
/// let protocol = Protocol {
///     schema: PROTOCOL_SCHEMA.into(),
///     window: WindowRule::Boundary,
///     edge: Edge::Simulation,
///     alpha: 0.05,
///     sims: 39,
///     seed: 7,
///     adjust: Adjust::Holm,
///     min_n: 10,
///     guard: None,
///     concavity: 0.3,
///     note: None,
/// };
/// let source = SitesSource {
///     inputs: vec![repo.join("demo-data/plots/plot-a.csv"), repo.join("demo-data/plots/plot-b.csv")],
///     site_field: None,
///     boundaries: Some(repo.join("demo-data/plots-boundaries.geojson")),
///     boundary_layer: None,
///     boundary_field: "name".into(),
///     load: LoadOptions { coords: CoordChoice::Projected, ..LoadOptions::default() },
/// };
/// let loaded = load_sites(&source, &protocol, "protocol.json")?;
/// // What each worker of a distributed run computes, one site each …
/// let mut runs: Vec<_> = loaded
///     .sites
///     .iter()
///     .map(|s| site_result(s, &protocol, SitesOptions { sweep_sims: 0 }))
///     .collect();
/// // … and where the rows meet, Holm's adjustment across the sites.
/// adjust(&mut runs, &protocol);
/// assert_eq!(runs.len(), 2);
/// for r in &runs {
///     let (p, adjusted) = (r.row.p.expect("tested"), r.row.p_adjusted.expect("adjusted"));
///     assert!(adjusted >= p && adjusted <= 1.0);
/// }
/// # Ok::<(), patternproof::Error>(())
/// ```
pub fn site_result(site: &Site, protocol: &Protocol, options: RunOptions) -> SiteRun {
    patternproof_sites::run_site(&site.input, protocol, options)
}

/// The report document of one site that was tested (its sweep, with the
/// protocol's hash and the checksums of its files); `None` for a site
/// that was not.
pub fn site_report(
    site: &Site,
    run: &SiteRun,
    protocol: &Protocol,
) -> Result<Option<AuditReport>, Error> {
    let Some(audit) = &run.audit else {
        return Ok(None);
    };
    let sensitivity = patternproof_audit::curves::sensitivity(&site.input.points, audit);
    let mut report = AuditReport::new(
        audit.clone(),
        sensitivity,
        site.summary.clone(),
        "0.5x,1x,2x (+ the protocol's buffer)".into(),
        protocol.concavity,
    );
    report.provenance.inputs = digests(&site.files, "while the run lasts")?;
    report.protocol_sha256 = Some(protocol.sha256());
    Ok(Some(report))
}
