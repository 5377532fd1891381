//! `patternproof scales`: Ripley's K and the L function in every window of
//! the audit sweep, under each edge correction, with a global envelope
//! test per window; writes a report folder and prints the verdict.
//!
//! The flags and the run function live here together; the estimators and
//! the test are in the `patternproof-scales` crate.

use crate::args::{InputArgs, OutArgs, Quiet, count};
use crate::budget;
use crate::common::load;
use crate::fail::Failure;
use crate::progress::Progress;
use crate::window_args::WindowArgs;
use clap::Args;
use patternproof::cost::scales as memory;
use patternproof::options::{SCREEN_SIMS, ScalesOptions};
use patternproof::words;
use patternproof::{ScalesJob, ScalesResult, WindowOptions};
use patternproof_report::RunContext;

/// `patternproof scales`.
///
/// K̂(r) = A/(n(n−1))·Σ w_ij·1(d_ij ≤ r) and L(r) − r = sqrt(K̂/π) − r on a
/// grid of distances up to `--rmax`, for every study-area window and edge
/// correction, with a simulation envelope test (maximum absolute deviation,
/// Diggle 2003) in each window.
#[derive(Debug, Args)]
pub struct ScalesArgs {
    #[command(flatten)]
    pub input: InputArgs,
    #[command(flatten)]
    pub window: WindowArgs,
    /// Edge corrections whose curves are estimated: border, isotropic, translation.
    #[arg(
        long,
        value_delimiter = ',',
        default_value = "border,isotropic,translation",
        value_name = "LIST"
    )]
    pub edges: Vec<String>,
    /// Corrections that get the simulation envelope test (each costs `--sims` estimates per window).
    #[arg(
        long,
        value_delimiter = ',',
        default_value = "isotropic",
        value_name = "LIST"
    )]
    pub test_edges: Vec<String>,
    /// Largest distance (default: a quarter of the shorter side of the
    /// bounding rectangle of the window where that side is smallest).
    #[arg(long, value_name = "R", allow_hyphen_values = true)]
    pub rmax: Option<f64>,
    /// Number of distances on the grid r_max·k/steps, k = 1..steps.
    #[arg(long, default_value_t = 50, value_parser = count::<usize>, allow_negative_numbers = true)]
    pub steps: usize,
    /// CSR simulations per window for the envelope test; 0: no test (default by the one rule
    /// of every command: 999 where the p-value is the result, 99 where simulations screen
    /// windows or distances at α).
    #[arg(long, default_value_t = SCREEN_SIMS, value_parser = count::<usize>, allow_negative_numbers = true)]
    pub sims: usize,
    /// Seed of every random stream (printed in the report).
    #[arg(long, default_value_t = 1, value_parser = count::<u64>, allow_negative_numbers = true)]
    pub seed: u64,
    /// Significance level of the global test.
    #[arg(long, default_value_t = 0.05, allow_hyphen_values = true)]
    pub alpha: f64,
    #[command(flatten)]
    pub quiet: Quiet,
    #[command(flatten)]
    pub output: OutArgs,
}

/// Run the command.
pub fn run(a: &ScalesArgs) -> Result<(), Failure> {
    let (buffers, concavity) = a.window.checked()?;
    let mut corrections = words::corrections("--edges", &a.edges)?;
    let tested = words::corrections("--test-edges", &a.test_edges)?;
    for &t in &tested {
        if !corrections.contains(&t) {
            corrections.push(t);
        }
    }
    words::alpha(a.alpha)?;
    words::rmax(a.rmax)?;
    words::steps(a.steps)?;
    let data = load(&a.input)?;
    crate::common::print_reading(&data);
    let options = ScalesOptions {
        corrections,
        tested,
        rmax: a.rmax,
        steps: a.steps,
        sims: a.sims,
        seed: a.seed,
        alpha: a.alpha,
    };
    let windows = budget::outlined_windows(buffers.len(), data.boundaries.len());
    check_memory("--sims", &options, data.points.len(), windows, 0)?;
    let input = patternproof::Input::checksummed(&data)?;
    let windows = WindowOptions {
        buffers,
        area: None,
        concavity,
    };
    let job = ScalesJob::prepare(&input, &windows)?;
    let ScalesResult { run, notes } = compute(&job, &options, a.quiet.quiet, "--sims")?;
    let source = patternproof_report::scales::Source {
        input: &input.summary,
        digests: &input.digests,
        notes: &notes,
    };
    let context = RunContext {
        command_line: crate::common::command_line(),
        ..RunContext::default()
    };
    let mut folder = patternproof_report::scales::folder(&run, source, &context)?;
    a.output.write(&mut folder)?;

    for w in &data.warnings {
        eprintln!("patternproof: warning: {w}");
    }
    let width = crate::terminal::stdout_width();
    print!(
        "{}",
        patternproof_report::scales::terminal_text(&run, &notes, width)
    );
    println!();
    // One line, never wrapped: the folder's path is copied from it.
    println!("{}", crate::common::wrote_line(&folder, &a.output.out));
    Ok(())
}

/// Stop before anything runs when the K audit with `options` needs more
/// memory than the machine has free ([`budget`]); `flag` is the option
/// that sets `options.sims` and `held` what the caller keeps meanwhile.
pub fn check_memory(
    flag: &str,
    options: &ScalesOptions,
    n: usize,
    windows: usize,
    held: u64,
) -> Result<(), Failure> {
    let threads = rayon::current_num_threads();
    let (steps, tested) = (options.steps, options.tested.len());
    let need = |sims: usize| {
        held.saturating_add(memory::run_bytes(n, windows, threads, sims, steps, tested))
    };
    let basis = format!(
        "{} bytes per simulation for the L(r) − r curves both global tests need ({steps} distances × {tested} tested correction(s), one window at a time), {} bytes per point",
        memory::bytes_per_simulation(steps, tested),
        memory::bytes_per_point(windows, threads)
    );
    budget::check_memory(flag, options.sims, need, &basis, budget::available_memory())
}

/// The K audit in the windows of `job`, with a forecast
/// of its time and a progress bar unless `quiet`; `flag` is the option
/// that set `options.sims`. Shared by `scales` and `audit --scales`.
pub fn compute(
    job: &ScalesJob,
    options: &ScalesOptions,
    quiet: bool,
    flag: &str,
) -> Result<ScalesResult, Failure> {
    let check = |plan: &memory::Plan, options: &ScalesOptions| {
        if plan.simulated_patterns(options) > 0 {
            // One trial pattern per window, on one thread; the simulations
            // share the threads.
            let trial = plan.trial_seconds(options);
            let threads = rayon::current_num_threads();
            let seconds = |sims: usize| trial * sims as f64 / threads as f64;
            budget::check_time(flag, options.sims, seconds, threads, quiet)?;
        }
        Ok::<(), Failure>(())
    };
    job.run(options, check, &Progress::new(quiet))
}
