//! `patternproof sites`: one locked protocol over many sites.

use crate::args::{CoordArgs, OutArgs, Quiet, count};
use crate::budget;
use crate::fail::Failure;
use crate::progress::Progress;
use clap::Args;
use patternproof::Dataset;
use patternproof::cost::audit as simulation;
use patternproof::options::SitesOptions as RunOptions;
use patternproof::options::{LoadOptions, Protocol, SCREEN_SIMS};
use patternproof::{Site, SitesSource};
use patternproof::{SiteInput, SiteRun, sites_document as document};
use patternproof_report::sites::StudySite;
use patternproof_report::{OutputFolder, RenderChoices, RunContext};
use std::path::PathBuf;

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
    /// Simulations per window in each site's window-sensitivity sweep; the protocol window
    /// always gets the protocol's number (default by the one rule of every command: 999 where
    /// the p-value is the result, 99 where simulations screen windows or distances at α).
    #[arg(long, default_value_t = SCREEN_SIMS, value_parser = count::<usize>, allow_negative_numbers = true)]
    pub sweep_sims: usize,
    /// Leave the point maps out of the per-site reports.
    #[arg(long)]
    pub no_map: bool,
    #[command(flatten)]
    pub quiet: Quiet,
    #[command(flatten)]
    pub output: OutArgs,
}

/// Run the command.
pub fn run(a: &SitesArgs) -> Result<(), Failure> {
    let protocol = patternproof::read_verified(&a.protocol)?;
    let source = SitesSource {
        inputs: a.inputs.clone(),
        site_field: a.site_field.clone(),
        boundaries: a.boundaries.clone(),
        boundary_layer: a.boundary_layer.clone(),
        boundary_field: a.boundary_field.clone(),
        load: LoadOptions {
            coords: a.coords.choice(),
            unit: a.coords.unit.clone(),
            drop_duplicates: a.drop_duplicates,
            field: None,
            gpkg: crate::common::gpkg_choice(a.layer.clone(), None, a.filter.as_deref())?,
        },
    };
    let loaded = patternproof::load_sites(&source, &protocol, &a.protocol.display().to_string())?;
    for w in &loaded.warnings {
        eprintln!("patternproof: warning: {w}");
    }
    let (sites, datasets) = (&loaded.sites, &loaded.datasets);
    print_readings(datasets);
    let inputs: Vec<SiteInput> = sites.iter().map(|s| s.input.clone()).collect();
    let opts = RunOptions {
        sweep_sims: a.sweep_sims,
    };
    check_budget(&inputs, &protocol, opts, a.quiet.quiet)?;
    let runs = patternproof::sites(&loaded, &protocol, opts, &Progress::new(a.quiet.quiet))?;
    let mut folder = outputs(a, &protocol, sites, datasets, &runs)?;
    a.output.write(&mut folder)?;

    let doc = document(&runs, &protocol, a.sweep_sims);
    let width = crate::terminal::stdout_width();
    crate::terminal::say(
        &format!(
            "protocol {} (SHA-256 {})",
            a.protocol.display(),
            doc.protocol_sha256
        ),
        width,
        "",
        "  ",
    );
    print!(
        "{}",
        patternproof_report::sites::terminal::terminal_text(&doc, width)
    );
    for n in &doc.notes {
        crate::terminal::say(&format!("caution: {n}"), width, "  ", "    ");
    }
    // One line, never wrapped: the folder's path is copied from it.
    println!("{}", crate::common::wrote_line(&folder, &a.output.out));
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
            crate::common::reading_line(&first.points_file, &first.reading, others)
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
        patternproof::cost::sites::run_bytes(inputs, protocol, RunOptions { sweep_sims }, threads)
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
    if patternproof::cost::sites::simulated_patterns(inputs, protocol, opts) == 0 {
        return Ok(());
    }
    let Some(trial) = simulation::trial_seconds(&largest.points, 0.2, 64) else {
        return Ok(());
    };
    let seconds = |sweep_sims: usize| {
        patternproof::cost::sites::forecast_seconds(
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

/// Every file of the run: each tested site's report is made by the
/// facade and rendered by the presentation crate.
fn outputs(
    a: &SitesArgs,
    protocol: &Protocol,
    sites: &[Site],
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
        command_line: crate::common::command_line(),
        stamp: None,
        protocol: Some(format!("{} (SHA-256 {hash})", a.protocol.display())),
    };
    let study: Vec<StudySite<'_>> = sites
        .iter()
        .map(|s| StudySite {
            input: &s.input,
            files: &s.files,
            data: s.data,
        })
        .collect();
    let report_of = |i: usize| -> Result<patternproof::AuditReport, Failure> {
        patternproof::site_report(&sites[i], &runs[i], protocol)?
            .ok_or_else(|| Failure::Internal("a site without a sweep has no report".into()))
    };
    patternproof_report::sites::study_folder(
        runs,
        protocol,
        a.sweep_sims,
        &study,
        datasets,
        report_of,
        &choices,
        &context,
    )
}
