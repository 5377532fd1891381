//! `patternproof audit`: load, sweep, write the report folder, print.

use crate::args::{AuditArgs, InputArgs};
use crate::budget;
use crate::fail::Failure;
use crate::progress::Progress;
use crate::scales_cmd;
use patternproof_audit::simulation;
use patternproof_audit::window::WindowOptions;
use patternproof_audit::{AuditOptions, BufferRule, Edge};
use patternproof_io::magnitude::{MAX_AREA, MIN_AREA};
use patternproof_io::{Dataset, LoadOptions};
use patternproof_report::html::{self, Picture, Provenance, Section};
use patternproof_report::{
    AuditReport, OutputFolder, markdown, outlines, sensitivity_plot, simulation_plot, table,
    window_map,
};
use patternproof_scales::{ScalesOptions, ScalesRun};

/// Run the command.
pub fn run(a: &AuditArgs) -> Result<(), Failure> {
    let (buffers, concavity) = a.window.checked()?;
    let edges = parse_edges(&a.edges)?;
    check_alpha(a.alpha)?;
    if let Some(area) = a.area
        && !(area > 0.0 && area.is_finite())
    {
        return Err(Failure::Input(format!(
            "--area {area}: the area must be a positive number (in the unit squared)\n  what to do: give the study area the analysis used, e.g. --area 12500"
        )));
    }
    if let Some(area) = a.area
        && !(MIN_AREA..=MAX_AREA).contains(&area)
    {
        return Err(Failure::Input(format!(
            "--area {area:e}: the area must lie between {MIN_AREA:e} and {MAX_AREA:e} (in the unit squared); beyond that no map in any unit reaches (the Earth's surface is 5.1·10¹⁴ m²), and floating point cannot measure the intensities\n  what to do: check the number and its unit, and give the study area the analysis used, e.g. --area 12500"
        )));
    }
    if let Some(g) = a.guard
        && !(g >= 0.0 && g.is_finite())
    {
        return Err(Failure::Input(format!(
            "--guard {g}: the guard width must be a non-negative distance\n  what to do: give a width in the data's unit, or leave it out for the default"
        )));
    }
    if let Some(r) = a.scales_rmax
        && !(r > 0.0 && r.is_finite())
    {
        return Err(Failure::Input(format!(
            "--scales-rmax {r}: the largest distance must be a positive number in the data's unit\n  what to do: give e.g. --scales-rmax 40, or leave it out for a quarter of the window's shorter side"
        )));
    }
    let data = load(&a.input)?;
    print_reading(&data);
    let input = patternproof::Input::from_dataset(&data)?;
    let windows = patternproof::outlined_windows(buffers.len(), input.boundaries.len());
    let scales_options = a.scales.then(|| ScalesOptions {
        rmax: a.scales_rmax,
        sims: a.scales_sims,
        seed: a.seed,
        alpha: a.alpha,
        ..ScalesOptions::default()
    });
    check_budget(a, &data, windows, scales_options.as_ref())?;
    let options = AuditOptions {
        windows: WindowOptions {
            buffers: buffers.clone(),
            area: a.area,
            concavity,
        },
        alpha: a.alpha,
        edges,
        guard: a.guard,
        sims: a.sims,
        seed: a.seed,
    };
    let report = patternproof::audit(&input, &options, &Progress::new(a.quiet))?;
    let scales = match &scales_options {
        Some(scales_options) => Some(scales_cmd::compute(
            &input,
            &options.windows,
            scales_options,
            a.quiet,
            "--scales-sims",
        )?),
        None => None,
    };
    let choices = RenderChoices {
        picture_window: a.picture_window.clone(),
        no_map: a.no_map,
        stamp: a.stamp,
        protocol: None,
        scales: scales.as_ref().map(|k| k.run.clone()),
    };
    let mut folder = render(&report, &data.points, data.projection.as_ref(), &choices)?;
    folder.add("windows.gpkg", windows_gpkg(&report, &data, a.stamp)?);
    a.output.write(&folder)?;

    print_summary(&report, &a.output.out, &folder);
    if let Some(k) = &scales {
        println!("\nRipley's K across the same windows (--scales):");
        scales_cmd::print_lines(&k.run, &k.notes);
    }
    Ok(())
}

/// Stop before the sweep when its simulations (and those of `--scales`)
/// need more memory than is free, or would take absurdly long; say how
/// long a long run will take ([`budget`]).
fn check_budget(
    a: &AuditArgs,
    data: &Dataset,
    windows: usize,
    scales: Option<&ScalesOptions>,
) -> Result<(), Failure> {
    let n = data.points.len();
    let threads = rayon::current_num_threads();
    let need = |sims: usize| simulation::run_bytes(n, windows, threads, sims);
    let basis = format!(
        "{} bytes per simulation while a window is simulated and {} per simulation and window kept for the report, {} bytes per point",
        simulation::BYTES_WHILE_SIMULATING,
        simulation::BYTES_KEPT,
        simulation::bytes_per_point(windows, threads)
    );
    budget::check_memory("--sims", a.sims, need, &basis, budget::available_memory())?;
    if let Some(options) = scales {
        // The sweep's kept means stay in memory while K runs.
        let held = (a.sims as u64).saturating_mul(simulation::BYTES_KEPT * windows as u64);
        scales_cmd::check_memory("--scales-sims", options, n, windows, held)?;
    }
    if a.sims > 0
        && let Some(trial) = simulation::trial_seconds(&data.points, 0.2, 64)
    {
        let seconds = |sims: usize| trial * sims as f64 * windows as f64 / threads as f64;
        budget::check_time("--sims", a.sims, seconds, threads, a.quiet)?;
    }
    Ok(())
}

/// The rendering switches shared by `audit` and the per-site folders of
/// `sites`.
#[derive(Debug, Clone, Default)]
pub struct RenderChoices {
    /// `--picture-window`.
    pub picture_window: Option<String>,
    /// `--no-map`.
    pub no_map: bool,
    /// `--stamp`.
    pub stamp: bool,
    /// The protocol followed, in words (id and hash), if any.
    pub protocol: Option<String>,
    /// The K audit of the same windows (`audit --scales`): its files join
    /// the folder and its section the page.
    pub scales: Option<ScalesRun>,
}

/// Every file of the report folder, rendered in memory first so that
/// nothing is written unless everything rendered.
pub fn render(
    report: &AuditReport,
    points: &[patternproof_core::Xy],
    projection: Option<&patternproof_io::Projection>,
    a: &RenderChoices,
) -> Result<OutputFolder, Failure> {
    let mut folder = OutputFolder::default();
    let mut buf = Vec::new();
    report.write_json(&mut buf).map_err(internal)?;
    folder.add("report.json", buf);
    let mut buf = Vec::new();
    table::write_csv(report, &mut buf).map_err(internal)?;
    folder.add("verdict.csv", buf);
    let mut buf = Vec::new();
    markdown::write_markdown(report, &mut buf).map_err(internal)?;
    folder.add("verdict.md", buf);
    let mut buf = Vec::new();
    let unproject = projection.map(|p| move |x: f64, y: f64| p.inverse(x, y));
    let unproject_ref: Option<&dyn Fn(f64, f64) -> Option<[f64; 2]>> = unproject
        .as_ref()
        .map(|f| f as &dyn Fn(f64, f64) -> Option<[f64; 2]>);
    outlines::write_outlines(report, unproject_ref, &mut buf).map_err(internal)?;
    folder.add("windows.geojson", buf);

    let mut pictures = Vec::new();
    if let Some(svg) = sensitivity_plot::sensitivity_svg(report) {
        pictures.push(Picture {
            title: "How R and z change with the study area".into(),
            caption: "Does the call survive every defensible window, and where does it flip? Lines: each analytic edge handling over windows of the hull's shape scaled up and down; markers: the verdict-table rows at the named windows; bars: the 95 % range of R under CSR in each exact window; solid verticals: the flip thresholds.".into(),
            svg: svg.clone(),
        });
        folder.add("sensitivity.svg", svg.into_bytes());
    }
    let sim_window = match &a.picture_window {
        Some(id) => {
            if !report.windows.iter().any(|w| &w.id == id) {
                return Err(Failure::Input(format!(
                    "--picture-window {id}: no window has this id\n  what to do: choose one of {}",
                    report
                        .windows
                        .iter()
                        .map(|w| w.id.as_str())
                        .collect::<Vec<_>>()
                        .join(", ")
                )));
            }
            Some(id.as_str())
        }
        None => simulation_plot::default_window(report),
    };
    if let Some(svg) = sim_window.and_then(|id| simulation_plot::simulation_svg(report, id)) {
        pictures.push(Picture {
            title: format!("The simulation test in `{}`", sim_window.unwrap_or_default()),
            caption: "Where does the observed mean nearest-neighbour distance fall among patterns of complete spatial randomness in this exact window? The rank p-value counts the simulated patterns at least as far out.".into(),
            svg: svg.clone(),
        });
        folder.add("simulation.svg", svg.into_bytes());
    } else if let Some(id) = &a.picture_window {
        return Err(Failure::Input(format!(
            "--picture-window {id}: this window has no simulations (simulations need an outline and --sims above 0)\n  what to do: choose a window with an outline, or leave the option out"
        )));
    }
    if !a.no_map
        && let Some(svg) = window_map::window_map_svg(report, points)
    {
        pictures.push(Picture {
            title: "The windows".into(),
            caption: "Which study areas were compared? Every window outline over the points, labelled by id, with a scale bar.".into(),
            svg: svg.clone(),
        });
        folder.add("windows.svg", svg.into_bytes());
    }
    let run = Provenance {
        command_line: std::env::args_os()
            .map(|s| html::shell_quote(&s.to_string_lossy()))
            .collect::<Vec<_>>()
            .join(" "),
        protocol: a.protocol.clone(),
        stamp: a
            .stamp
            .then(|| humantime::format_rfc3339_seconds(std::time::SystemTime::now()).to_string()),
    };
    let mut sections = Vec::new();
    if let Some(k) = &a.scales {
        scales_cmd::add_files(&mut folder, k)?;
        let svg = patternproof_scales::plot::scales_svg(k);
        sections.push(Section {
            id: "scales".into(),
            title: "Ripley's K and L across the same windows".into(),
            html: patternproof_scales::summary::html_section(k, svg.as_deref()),
        });
    }
    folder.add(
        "index.html",
        html::index_html(report, &pictures, &sections, &run).into_bytes(),
    );
    Ok(folder)
}

fn internal(e: std::io::Error) -> Failure {
    Failure::Internal(format!("could not render the report in memory: {e}"))
}

/// Load points and boundaries with the shared input flags.
pub fn load(input: &InputArgs) -> Result<Dataset, Failure> {
    Ok(patternproof::load(
        &input.points,
        &input.boundaries,
        &LoadOptions {
            coords: input.coords.choice(),
            unit: input.coords.unit.clone(),
            drop_duplicates: input.drop_duplicates,
            field: None,
            gpkg: gpkg_choice(
                input.layer.clone(),
                input.boundary_layer.clone(),
                input.filter.as_deref(),
            )?,
        },
    )?)
}

/// Say how the points were read, first thing: which coordinate system and
/// why (column names, a format's default, the file's own declaration or
/// `--coords`). On stderr, beside the warnings, so that a table or JSON on
/// stdout stays clean; a misreading is never silent.
pub fn print_reading(data: &Dataset) {
    eprintln!("{}", reading_line(&data.points_file, &data.reading, 0));
}

/// The reading line of one file, or of `others` more read the same way.
pub fn reading_line(file: &std::path::Path, reading: &str, others: usize) -> String {
    let more = match others {
        0 => String::new(),
        1 => " and 1 more file".to_string(),
        n => format!(" and {n} more files"),
    };
    format!(
        "patternproof: reading {}{more} as {reading}",
        file.display()
    )
}

/// `--layer`, `--boundary-layer` and `--where` as the reader wants them.
pub fn gpkg_choice(
    layer: Option<String>,
    boundary_layer: Option<String>,
    filter: Option<&str>,
) -> Result<patternproof_io::GpkgChoice, Failure> {
    Ok(patternproof_io::GpkgChoice {
        layer,
        boundary_layer,
        filter: filter
            .map(patternproof_io::geopackage::parse_filter)
            .transpose()?,
    })
}

/// `windows.gpkg`: the outlines in the plane the report measured them in.
/// `last_change` is fixed unless `--stamp` asks for the time of the run.
pub fn windows_gpkg(report: &AuditReport, data: &Dataset, stamp: bool) -> Result<Vec<u8>, Failure> {
    let last_change = if stamp {
        humantime::format_rfc3339_millis(std::time::SystemTime::now()).to_string()
    } else {
        patternproof_gpkg::write::FIXED_LAST_CHANGE.to_string()
    };
    patternproof_report::windows_gpkg::windows_gpkg(report, &data.plane_srs(), &last_change)
        .map_err(|e| Failure::Internal(format!("could not write windows.gpkg in memory: {e}")))
}

/// `--buffers 0.5x,1x,2x` or `--buffers 5,10`.
pub fn parse_buffers(words: &[String]) -> Result<Vec<BufferRule>, Failure> {
    words
        .iter()
        .map(|w| {
            let w = w.trim();
            let (num, multiple) = match w.strip_suffix('x') {
                Some(n) => (n, true),
                None => (w, false),
            };
            let rule = num.parse::<f64>().ok().map(|v| {
                if multiple {
                    BufferRule::MeanNnMultiple(v)
                } else {
                    BufferRule::Distance(v)
                }
            });
            match rule.map(|r| (r, r.problem())) {
                Some((r, None)) => Ok(r),
                Some((_, Some(problem))) => Err(Failure::Input(format!(
                    "--buffers: `{w}` is {problem}\n  what to do: give distances in the unit (e.g. 5,10) or multiples of the mean nearest-neighbour distance (e.g. 0.5x,1x)"
                ))),
                None => Err(Failure::Input(format!(
                    "--buffers: `{w}` is not a positive distance\n  what to do: give distances in the unit (e.g. 5,10) or multiples of the mean nearest-neighbour distance (e.g. 0.5x,1x)"
                ))),
            }
        })
        .collect()
}

/// `--edges none,donnelly,…`.
pub fn parse_edges(words: &[String]) -> Result<Vec<Edge>, Failure> {
    let mut out = Vec::new();
    for w in words {
        let e = Edge::parse(w).ok_or_else(|| {
            Failure::Input(format!(
                "--edges: `{w}` is not an edge handling\n  what to do: choose from none, donnelly, border, toroidal, simulation"
            ))
        })?;
        if !out.contains(&e) {
            out.push(e);
        }
    }
    Ok(out)
}

/// α strictly between 0 and 1.
pub fn check_alpha(alpha: f64) -> Result<(), Failure> {
    if alpha > 0.0 && alpha < 1.0 {
        Ok(())
    } else {
        Err(Failure::Input(format!(
            "--alpha {alpha}: the significance level must lie strictly between 0 and 1\n  what to do: use e.g. --alpha 0.05"
        )))
    }
}

fn print_summary(report: &AuditReport, out: &std::path::Path, folder: &OutputFolder) {
    for w in &report.input.warnings {
        eprintln!("patternproof: warning: {w}");
    }
    println!("{}", table::terminal_table(report, None));
    for n in &report.window_notes {
        println!("note: {n}");
    }
    println!("\nWhere the call flips:");
    for line in table::flip_lines(report) {
        println!("  {line}");
    }
    println!("\nVerdict: {}.", report.summary.verdict);
    for c in &report.summary.cautions {
        println!("  caution: {c}");
    }
    println!(
        "\nwrote {} to {}",
        folder.names().collect::<Vec<_>>().join(", "),
        out.display()
    );
}
