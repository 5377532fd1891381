//! `patternproof density`: how much a kernel density surface, its isopleth
//! areas and its main hotspot depend on the kernel, the bandwidth and the
//! edge handling.

use crate::fail::Failure;
use clap::Args;
use patternproof::options::DensityConfig as Config;
use patternproof_report::RunContext;
use patternproof_report::density::RunInfo;

/// `patternproof density`.
#[derive(Debug, Args)]
pub struct DensityArgs {
    #[command(flatten)]
    pub input: crate::args::InputArgs,
    /// Kernels: gaussian, quartic (biweight), epanechnikov, triangular (cone), uniform (disc).
    #[arg(
        long,
        value_delimiter = ',',
        default_value = "gaussian,quartic,epanechnikov,triangular,uniform",
        value_name = "LIST"
    )]
    pub kernels: Vec<String>,
    /// Bandwidths: `scott`, `lcv` (likelihood cross-validation), `Fx` (F × Scott's
    /// value) or a number in the unit (Gaussian: standard deviation; others: support radius).
    #[arg(
        long,
        value_delimiter = ',',
        default_value = "scott,lcv,0.5x,2x",
        value_name = "LIST",
        allow_hyphen_values = true
    )]
    pub bandwidths: Vec<String>,
    /// Cell side in the unit (default: about 250 cells on the window's long side).
    #[arg(long, value_name = "C", allow_negative_numbers = true)]
    pub cell: Option<f64>,
    /// Isopleth levels in percent of the mass.
    #[arg(
        long,
        value_delimiter = ',',
        default_value = "50,95",
        value_name = "P,…",
        allow_hyphen_values = true
    )]
    pub levels: Vec<String>,
    /// Edge handlings to sweep: none, uniform (divide by the kernel mass inside the window
    /// at each cell), diggle (weight each point by it).
    #[arg(
        long,
        value_delimiter = ',',
        default_value = "none,uniform",
        value_name = "LIST"
    )]
    pub edges: Vec<String>,
    /// Reference surface, `KERNEL:BANDWIDTH[:EDGE]` (default edge: the first of --edges).
    #[arg(long, default_value = "gaussian:scott", value_name = "K:B")]
    pub reference: String,
    // `-q`: density shows no progress bar and no forecast, so it changes
    // nothing here; taken so that every command accepts it with one meaning.
    #[command(flatten)]
    pub quiet: crate::args::Quiet,
    #[command(flatten)]
    pub output: crate::args::OutArgs,
}

/// The flags as the facade's words read them.
fn parse_config(a: &DensityArgs, unit: &str) -> Result<Config, Failure> {
    let words = patternproof::words::DensityWords {
        kernels: &a.kernels,
        bandwidths: &a.bandwidths,
        cell: a.cell,
        levels: &a.levels,
        edges: &a.edges,
        reference: &a.reference,
    };
    Ok(patternproof::words::density(&words, unit)?)
}

/// Run the command.
pub fn run(a: &DensityArgs) -> Result<(), Failure> {
    if a.input.boundaries.len() > 1 {
        return Err(Failure::Input(format!(
            "--boundary: {} boundaries given; density uses one window\n  what to do: pass one --boundary (or none for the convex hull of the points)",
            a.input.boundaries.len()
        )));
    }
    let data = crate::common::load(&a.input)?;
    crate::common::print_reading(&data);
    let config = parse_config(a, &data.unit)?;
    let points_name = a.input.points.display().to_string();
    let input = patternproof::Input::checksummed(&data)?;
    let patternproof::DensityResult {
        analysis,
        window_source: source,
        window_area: area,
    } = patternproof::density(&input, &config)?;
    let info = RunInfo {
        points_file: points_name.clone(),
        n_read: data.n_read,
        coords: data.system.as_str().to_string(),
        projection: data.projection.as_ref().map(|p| p.describe()),
        unit: data.unit.clone(),
        window_source: source,
        window_area: area,
        warnings: data.warnings.clone(),
        inputs: input.digests.clone(),
    };
    let context = RunContext {
        command_line: crate::common::command_line(),
        ..RunContext::default()
    };
    let mut folder = patternproof_report::density::folder(&analysis, &info, &context)?;
    a.output.write(&mut folder)?;
    for w in info.warnings.iter().chain(&analysis.warnings) {
        eprintln!("patternproof: warning: {w}");
    }
    let width = crate::terminal::stdout_width();
    print!(
        "{}",
        patternproof_report::density::terminal_text(&analysis, width)
    );
    // One line, never wrapped: the folder's path is copied from it.
    println!("{}", crate::common::wrote_line(&folder, &a.output.out));
    Ok(())
}
