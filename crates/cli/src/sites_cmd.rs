//! `patternproof sites`: one locked protocol over many sites.

use crate::args::{CoordArgs, OutArgs, count};
use crate::audit_cmd::input_summary;
use crate::budget;
use crate::fail::Failure;
use crate::progress::Progress;
use crate::protocol_cmd::read_verified;
use clap::Args;
use patternproof_audit::simulation;
use patternproof_audit::window::NamedShape;
use patternproof_io::boundary::read_named_boundaries;
use patternproof_io::geopackage::{self, is_geopackage};
use patternproof_io::{CoordChoice, CoordSystem, Dataset, LoadOptions};
use patternproof_protocol::Protocol;
use patternproof_report::document::{FileDigest, ReportProvenance};
use patternproof_report::sites::SiteInputs;
use patternproof_report::{AuditReport, OutputFolder, Plane, RenderChoices, RunContext};
use patternproof_sites::document::document;
use patternproof_sites::{RunOptions, SiteInput, SiteRun};
use sha2::Digest;
use std::path::{Path, PathBuf};

/// `patternproof sites`.
#[derive(Debug, Args)]
pub struct SitesArgs {
    /// The protocol file (from `patternproof protocol new`); a changed one is refused.
    #[arg(long, value_name = "FILE")]
    pub protocol: PathBuf,
    /// Point files, one per site (the file stem is the site name), or one file with --site-field.
    #[arg(value_name = "INPUT", required = true)]
    pub inputs: Vec<PathBuf>,
    /// Column (CSV, GeoPackage) or property (GeoJSON) naming each point's site, for one file holding all sites.
    #[arg(long, value_name = "NAME")]
    pub site_field: Option<String>,
    /// GeoPackage point layer to read from each input (needed when a file holds more than one feature layer).
    #[arg(long, value_name = "NAME")]
    pub layer: Option<String>,
    /// Keep only the points whose column (CSV, GeoPackage) or property (GeoJSON) FIELD equals
    /// VALUE as text (e.g. `--where year=2024`).
    #[arg(long = "where", value_name = "FIELD=VALUE")]
    pub filter: Option<String>,
    /// One boundary per site, matched by name: a GeoJSON FeatureCollection or a
    /// GeoPackage polygon layer.
    #[arg(long, value_name = "FILE")]
    pub boundaries: Option<PathBuf>,
    /// GeoPackage polygon layer of `--boundaries` (needed when the file holds more than one
    /// feature layer).
    #[arg(long, value_name = "NAME")]
    pub boundary_layer: Option<String>,
    /// Property (GeoJSON) or column (GeoPackage) of the boundary features that holds the site
    /// name.
    #[arg(long, default_value = "name", value_name = "NAME")]
    pub boundary_field: String,
    #[command(flatten)]
    pub coords: CoordArgs,
    /// Remove points that repeat an earlier point of the same site exactly.
    #[arg(long)]
    pub drop_duplicates: bool,
    /// Simulations per window in each site's window-sensitivity sweep (the
    /// protocol window always gets the protocol's number).
    #[arg(long, default_value_t = 99, value_parser = count::<usize>, allow_negative_numbers = true)]
    pub sweep_sims: usize,
    /// Leave the point maps out of the per-site reports.
    #[arg(long)]
    pub no_map: bool,
    /// No progress bar and no forecast of the run's time.
    #[arg(long, short)]
    pub quiet: bool,
    #[command(flatten)]
    pub output: OutArgs,
}

/// A site with what its report needs besides the sweep.
struct Loaded {
    input: SiteInput,
    /// Index of the data set the site came from (shared with --site-field).
    data: usize,
    /// What its report says about the input.
    summary: patternproof_report::InputSummary,
    files: Vec<PathBuf>,
}

/// Run the command.
pub fn run(a: &SitesArgs) -> Result<(), Failure> {
    let protocol = read_verified(&a.protocol)?;
    if protocol.window == patternproof_protocol::WindowRule::Boundary && a.boundaries.is_none() {
        return Err(Failure::Input(format!(
            "{}: the protocol's window is each site's own boundary, and no --boundaries file was given, so no site could be tested\n  what to do: pass --boundaries FILE (one polygon per site, named in --boundary-field), or use a protocol with another window rule",
            a.protocol.display()
        )));
    }
    let (sites, datasets) = load_sites(a)?;
    if protocol.window == patternproof_protocol::WindowRule::Boundary
        && let Some(bfile) = &a.boundaries
        && sites.iter().all(|s| s.input.boundary.is_none())
    {
        let names: Vec<&str> = sites
            .iter()
            .map(|s| s.input.name.as_str())
            .take(5)
            .collect();
        return Err(Failure::Input(format!(
            "{}: no boundary's `{}` matches a site name ({}{}), and the protocol's window is each site's own boundary, so no site could be tested\n  what to do: name the property or column that holds the site names with --boundary-field",
            bfile.display(),
            a.boundary_field,
            names.join(", "),
            if sites.len() > 5 { ", …" } else { "" }
        )));
    }
    print_readings(&datasets);
    let inputs: Vec<SiteInput> = sites.iter().map(|s| s.input.clone()).collect();
    let opts = RunOptions {
        sweep_sims: a.sweep_sims,
    };
    check_budget(&inputs, &protocol, opts, a.quiet)?;
    let progress = Progress::new(
        patternproof_sites::simulated_patterns(&inputs, &protocol, opts),
        a.quiet,
        "simulating CSR at every site",
    );
    let runs = patternproof_sites::run_sites_with(&inputs, &protocol, opts, &|| progress.tick());
    progress.finish();
    let folder = outputs(a, &protocol, &sites, &datasets, &runs)?;
    a.output.write(&folder)?;

    let doc = document(&runs, &protocol, a.sweep_sims);
    println!(
        "protocol {} (SHA-256 {})",
        a.protocol.display(),
        doc.protocol_sha256
    );
    for r in &doc.sites {
        let what = match (&r.reason, r.ratio) {
            (Some(why), _) => format!("not tested: {why}"),
            (None, Some(ratio)) => format!(
                "R = {ratio:.3}, adjusted p = {}, {}{}",
                r.p_adjusted
                    .map_or("—".into(), patternproof_report::numbers::p_value),
                patternproof_report::table::call_word(r.call),
                if r.window_sensitive == Some(true) {
                    "; WINDOW-SENSITIVE"
                } else {
                    ""
                }
            ),
            _ => String::new(),
        };
        println!("  {}: {what}", r.site);
    }
    println!(
        "\n{}.",
        patternproof_report::sites::files::summary_line(&doc)
    );
    for n in &doc.notes {
        println!("  caution: {n}");
    }
    println!(
        "wrote sites.csv, sites.md, sites.json, sites.svg, index.html and site/*/ to {}",
        a.output.out.display()
    );
    Ok(())
}

/// One reading line per distinct reading, naming its first file and how
/// many more were read the same way, so two hundred sites read alike take
/// one line and a file read differently stands out.
fn print_readings(datasets: &[Dataset]) {
    let mut groups: Vec<(&Dataset, usize)> = Vec::new();
    for d in datasets {
        match groups
            .iter_mut()
            .find(|(first, _)| first.reading == d.reading)
        {
            Some(g) => g.1 += 1,
            None => groups.push((d, 0)),
        }
    }
    for (first, others) in groups {
        eprintln!(
            "{}",
            crate::audit_cmd::reading_line(&first.points_file, &first.reading, others)
        );
    }
    for line in warning_lines(datasets) {
        eprintln!("{line}");
    }
}

/// Every input's warnings (duplicates, decimal commas, distortion of the
/// lon/lat plane…), as `audit` prints them, each naming its file: before,
/// `sites` put them only into each site's `verdict.md`, and the terminal
/// said nothing about how a file was read beyond its reading line.
fn warning_lines(datasets: &[Dataset]) -> Vec<String> {
    let mut lines = Vec::new();
    for d in datasets {
        let file = d.points_file.display().to_string();
        for w in &d.warnings {
            let line = if w.starts_with(&file) {
                format!("patternproof: warning: {w}")
            } else {
                format!("patternproof: warning: {file}: {w}")
            };
            if !lines.contains(&line) {
                lines.push(line);
            }
        }
    }
    lines
}

/// Stop before any site runs when the sweeps' simulations need more
/// memory than is free, or would take absurdly long; say how long a long
/// run will take ([`budget`]). The time comes from a trial on the largest
/// site.
fn check_budget(
    inputs: &[SiteInput],
    protocol: &Protocol,
    opts: RunOptions,
    quiet: bool,
) -> Result<(), Failure> {
    let threads = rayon::current_num_threads();
    let need = |sweep_sims: usize| {
        patternproof_sites::run_bytes(inputs, protocol, RunOptions { sweep_sims }, threads)
    };
    let basis = format!(
        "the simulated means of every site's sweep are kept until the folders are written: 8 bytes per simulation and window, for {} site(s)",
        inputs.len()
    );
    budget::check_memory(
        "--sweep-sims",
        opts.sweep_sims,
        need,
        &basis,
        budget::available_memory(),
    )?;
    let Some(largest) = inputs.iter().max_by_key(|s| s.points.len()) else {
        return Ok(());
    };
    if patternproof_sites::simulated_patterns(inputs, protocol, opts) == 0 {
        return Ok(());
    }
    let Some(trial) = simulation::trial_seconds(&largest.points, 0.2, 64) else {
        return Ok(());
    };
    let seconds = |sweep_sims: usize| {
        patternproof_sites::forecast_seconds(
            inputs,
            protocol,
            RunOptions { sweep_sims },
            trial,
            largest.points.len(),
            threads,
        )
    };
    budget::check_time("--sweep-sims", opts.sweep_sims, seconds, threads, quiet)
}

fn load_sites(a: &SitesArgs) -> Result<(Vec<Loaded>, Vec<Dataset>), Failure> {
    let gpkg = crate::audit_cmd::gpkg_choice(a.layer.clone(), None, a.filter.as_deref())?;
    let options = |field: Option<String>| LoadOptions {
        coords: a.coords.choice(),
        unit: a.coords.unit.clone(),
        drop_duplicates: a.drop_duplicates,
        field,
        gpkg: gpkg.clone(),
    };
    let mut sites: Vec<Loaded> = Vec::new();
    let mut datasets: Vec<Dataset> = Vec::new();
    if let Some(field) = &a.site_field {
        if a.inputs.len() != 1 {
            return Err(Failure::Input(format!(
                "--site-field {field}: give exactly one point file holding every site ({} given)\n  what to do: drop --site-field to use one file per site, or merge the files",
                a.inputs.len()
            )));
        }
        let file = &a.inputs[0];
        let all = Dataset::load(file, &[], &options(Some(field.clone())))?;
        let values = all
            .field_values
            .clone()
            .ok_or_else(|| Failure::Internal("the site field was requested but not read".into()))?;
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
            sites.push(Loaded {
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
        for file in &a.inputs {
            let name = patternproof_io::points::one_line(
                file.file_stem().and_then(|s| s.to_str()).unwrap_or("site"),
            );
            if sites.iter().any(|s| s.input.name == name) {
                return Err(Failure::Input(format!(
                    "{}: a second file for site `{name}` (site names are file stems)\n  what to do: rename one of the files so every site has its own name",
                    file.display()
                )));
            }
            let data = Dataset::load(file, &[], &options(None))?;
            sites.push(Loaded {
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
    if a.boundary_layer.is_some() && !a.boundaries.as_deref().is_some_and(is_geopackage) {
        return Err(Failure::Input(
            "--boundary-layer was given but --boundaries is not a GeoPackage\n  what to do: give --boundaries FILE.gpkg --boundary-layer NAME, or leave --boundary-layer out".into(),
        ));
    }
    if let Some(bfile) = &a.boundaries {
        let mut layer_srs = None;
        let raws = if is_geopackage(bfile) {
            let (raws, layer, srs) = geopackage::read_named_boundaries(
                bfile,
                a.boundary_layer.as_deref(),
                &a.boundary_field,
                a.coords.choice(),
            )?;
            layer_srs = srs.map(|s| (layer, s));
            raws
        } else {
            read_named_boundaries(bfile, &a.boundary_field)?
        };
        for raw in &raws {
            if !sites.iter().any(|s| s.input.name == raw.name) {
                eprintln!(
                    "patternproof: warning: {}: boundary `{}` matches no site",
                    bfile.display(),
                    raw.name
                );
            }
        }
        for s in &mut sites {
            if let Some(raw) = raws.iter().find(|r| r.name == s.input.name) {
                let data = &datasets[s.data];
                // Projected layers must share the points' system: nothing
                // here reprojects between two projected systems.
                if let (Some((layer, b)), Some(p), CoordSystem::Projected, CoordChoice::Auto) =
                    (&layer_srs, &data.srs, data.system, a.coords.choice())
                    && !geopackage::same_system(p, b)
                {
                    return Err(Failure::Input(format!(
                        "{}: layer `{layer}` is in {} but the points of site `{}` are in {}\n  what to do: reproject the boundaries to the points' coordinate system in a GIS and export them again",
                        bfile.display(),
                        b.label(),
                        s.input.name,
                        p.label()
                    )));
                }
                let b = datasets[s.data].planar(bfile, raw.clone(), a.coords.choice())?;
                s.input.boundary = Some(NamedShape {
                    name: b.name.clone(),
                    source: bfile.display().to_string(),
                    shape: b.shape.clone(),
                });
                s.summary.boundaries = vec![patternproof_report::document::BoundarySource {
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
    Ok((sites, datasets))
}

fn digest(path: &Path) -> Result<FileDigest, Failure> {
    let bytes = std::fs::read(path).map_err(|e| {
        Failure::Input(format!(
            "{}: could not be read again for its checksum: {e}\n  what to do: keep the input files in place while the run lasts",
            path.display()
        ))
    })?;
    Ok(FileDigest {
        file: path.display().to_string(),
        sha256: sha2::Sha256::digest(&bytes)
            .iter()
            .map(|b| format!("{b:02x}"))
            .collect(),
    })
}

/// Every file of the run: each tested site's report is made here (its
/// input summary and checksums) and rendered by the presentation crate.
fn outputs(
    a: &SitesArgs,
    protocol: &Protocol,
    sites: &[Loaded],
    datasets: &[Dataset],
    runs: &[SiteRun],
) -> Result<OutputFolder, Failure> {
    let hash = protocol.sha256();
    let choices = RenderChoices {
        picture_window: None,
        no_map: a.no_map,
        scales: None,
    };
    let context = RunContext {
        command_line: crate::audit_cmd::command_line(),
        stamp: None,
        protocol: Some(format!("{} (SHA-256 {hash})", a.protocol.display())),
    };
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
    let report_of = |i: usize| -> Result<AuditReport, Failure> {
        let (s, run) = (&sites[i], &runs[i]);
        let audit = run
            .audit
            .as_ref()
            .ok_or_else(|| Failure::Internal("a site without a sweep has no report".into()))?;
        let sensitivity = patternproof_audit::curves::sensitivity(&s.input.points, audit);
        let mut report = AuditReport::new(
            audit.clone(),
            sensitivity,
            s.summary.clone(),
            "0.5x,1x,2x (+ the protocol's buffer)".into(),
            protocol.concavity,
        );
        report.provenance = ReportProvenance {
            inputs: s
                .files
                .iter()
                .map(|f| digest(f))
                .collect::<Result<_, _>>()?,
        };
        report.protocol_sha256 = Some(hash.clone());
        Ok(report)
    };
    patternproof_report::sites::sites_folder(
        runs,
        protocol,
        a.sweep_sims,
        &inputs,
        report_of,
        &choices,
        &context,
    )
}
