//! `patternproof audit`: load, sweep, write the report folder, print.

use crate::args::AuditArgs;
use crate::budget;
use crate::common::{command_line, load, print_reading};
use crate::fail::Failure;
use crate::progress::Progress;
use crate::scales_cmd;
use crate::terminal::{self, say};
use patternproof::Dataset;
use patternproof::ScalesJob;
use patternproof::cost::audit as simulation;
use patternproof::options::{AuditOptions, ScalesOptions, WindowOptions};
use patternproof::words;
use patternproof_report::matrix::{self, VerdictMatrix};
use patternproof_report::{AuditReport, Plane, RenderChoices, RunContext, audit_folder, table};

/// Run the command.
pub fn run(a: &AuditArgs) -> Result<(), Failure> {
    let (buffers, concavity) = a.window.checked()?;
    let edges = words::edges(&a.edges)?;
    words::alpha(a.alpha)?;
    words::area(a.area)?;
    words::guard(a.guard)?;
    if let Some(r) = a.scales_rmax
        && !(r > 0.0 && r.is_finite())
    {
        return Err(Failure::Input(format!(
            "--scales-rmax {r}: the largest distance must be a positive number in the data's unit\n  what to do: give e.g. --scales-rmax 40, or leave it out for a quarter of the window's shorter side"
        )));
    }
    let data = load(&a.input)?;
    print_reading(&data);
    let input = patternproof::Input::checksummed(&data)?;
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
    // One set of windows for the sweep and, with --scales, for K.
    let frame = patternproof::frame(&input, &options.windows)?;
    let report = patternproof::audit_in(&input, &frame, &options, &Progress::new(a.quiet.quiet))?;
    let scales = match &scales_options {
        Some(scales_options) => Some(scales_cmd::compute(
            &ScalesJob::from_frame(&input, &frame),
            scales_options,
            a.quiet.quiet,
            "--scales-sims",
        )?),
        None => None,
    };
    let choices = RenderChoices {
        picture_window: a.picture_window.clone(),
        no_map: a.no_map,
        scales: scales.as_ref().map(|k| k.run.clone()),
    };
    let context = RunContext {
        command_line: command_line(),
        stamp: a.stamp.then(std::time::SystemTime::now),
        protocol: None,
    };
    let unproject = data
        .projection
        .as_ref()
        .map(|p| move |x: f64, y: f64| p.inverse(x, y));
    let srs = data.plane_srs();
    let plane = Plane {
        points: &data.points,
        unproject: unproject
            .as_ref()
            .map(|f| f as &(dyn Fn(f64, f64) -> _ + Sync)),
        srs: &srs,
    };
    let mut folder = audit_folder(&report, plane, &choices, &context)?;
    a.output.write(&mut folder)?;

    print_summary(&report);
    if let Some(k) = &scales {
        println!("\nRipley's K across the same windows (--scales):");
        print!(
            "{}",
            patternproof_report::scales::terminal_text(&k.run, &k.notes, terminal::stdout_width())
        );
    }
    println!("\n{}", crate::common::wrote_line(&folder, &a.output.out));
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
        budget::check_time("--sims", a.sims, seconds, threads, a.quiet.quiet)?;
    }
    Ok(())
}

fn print_summary(report: &AuditReport) {
    for w in &report.input.warnings {
        eprintln!("patternproof: warning: {w}");
    }
    let width = terminal::stdout_width();
    print!(
        "{}",
        VerdictMatrix::new(report).terminal(terminal::layout_width(width), terminal::colour())
    );
    println!();
    say(
        &format!("Verdict: {}.", report.summary.verdict),
        width,
        "",
        "  ",
    );
    say(&matrix::counts_line(report), width, "  ", "  ");
    println!();
    print!("{}", table::terminal_table(report, width));
    for n in &report.window_notes {
        say(&format!("note: {n}"), width, "", "  ");
    }
    println!("\nWhere the call flips:");
    for line in table::flip_lines(report) {
        say(&line, width, "  ", "    ");
    }
    println!();
    for c in &report.summary.cautions {
        say(&format!("caution: {c}"), width, "", "  ");
    }
}
