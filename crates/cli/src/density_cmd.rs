//! `patternproof density`: how much a kernel density surface, its isopleth
//! areas and its main hotspot depend on the kernel, the bandwidth and the
//! edge handling.

use crate::fail::Failure;
use clap::Args;
use patternproof::options::{
    ALL_KERNELS, BandwidthSpec, DensityConfig as Config, DensityEdge, FIXED_RANGE, Kernel,
    MULTIPLE_RANGE,
};
use patternproof_report::RunContext;
use patternproof_report::density::RunInfo;
use patternproof_report::html::shell_quote;

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
    /// Edge handlings: none, uniform (divide by the kernel mass inside the window
    /// at each cell), diggle (weight each point by it).
    #[arg(
        long,
        value_delimiter = ',',
        default_value = "none,uniform",
        value_name = "LIST"
    )]
    pub edge: Vec<String>,
    /// Reference surface, `KERNEL:BANDWIDTH[:EDGE]` (default edge: the first of --edge).
    #[arg(long, default_value = "gaussian:scott", value_name = "K:B")]
    pub reference: String,
    /// Print nothing but errors.
    #[arg(long, short)]
    pub quiet: bool,
    #[command(flatten)]
    pub output: crate::args::OutArgs,
}

fn bad(option: &str, what: String, todo: &str) -> Failure {
    Failure::Input(format!("{option}: {what}\n  what to do: {todo}"))
}

fn parse_config(a: &DensityArgs, unit: &str) -> Result<Config, Failure> {
    let mut ks = Vec::new();
    for k in &a.kernels {
        let kernel = Kernel::parse(k).ok_or_else(|| {
            bad(
                "--kernels",
                format!("unknown kernel {k:?}"),
                "use gaussian, quartic, epanechnikov, triangular or uniform",
            )
        })?;
        if !ks.contains(&kernel) {
            ks.push(kernel);
        }
    }
    if ks.is_empty() {
        ks = ALL_KERNELS.to_vec();
    }
    let mut bs = Vec::new();
    for b in &a.bandwidths {
        let spec = BandwidthSpec::parse(b).ok_or_else(|| {
            bad(
                "--bandwidths",
                format!("{b:?} is not a bandwidth"),
                &format!(
                    "use scott, lcv, a multiple of Scott's value such as 0.5x (from {:e}x to {:e}x), or a number in the unit (from {:e} to {:e})",
                    MULTIPLE_RANGE.0, MULTIPLE_RANGE.1, FIXED_RANGE.0, FIXED_RANGE.1
                ),
            )
        })?;
        if !bs.contains(&spec) {
            bs.push(spec);
        }
    }
    let mut edges = Vec::new();
    for e in &a.edge {
        let edge = DensityEdge::parse(e).ok_or_else(|| {
            bad(
                "--edge",
                format!("unknown edge handling {e:?}"),
                "use none, uniform or diggle",
            )
        })?;
        if !edges.contains(&edge) {
            edges.push(edge);
        }
    }
    let mut levels = Vec::new();
    for l in &a.levels {
        let v: f64 = l.trim().trim_end_matches('%').parse().map_err(|_| {
            bad(
                "--levels",
                format!("{l:?} is not a number"),
                "give percentages between 0 and 100, e.g. --levels 50,95",
            )
        })?;
        if !(v > 0.0 && v < 100.0) {
            return Err(bad(
                "--levels",
                format!("{v} is outside (0, 100)"),
                "give percentages strictly between 0 and 100",
            ));
        }
        levels.push(v / 100.0);
    }
    levels.sort_by(f64::total_cmp);
    levels.dedup();
    if let Some(c) = a.cell
        && !(c.is_finite() && c > 0.0)
    {
        return Err(bad(
            "--cell",
            format!("{c} is not a positive cell size"),
            "give the cell side in the unit of the coordinates",
        ));
    }
    let parts: Vec<&str> = a.reference.split(':').collect();
    let reference = match parts.as_slice() {
        [k, b] | [k, b, _] => {
            let k = Kernel::parse(k);
            let b = BandwidthSpec::parse(b);
            let e = match parts.get(2) {
                Some(e) => DensityEdge::parse(e),
                None => Some(edges.first().copied().unwrap_or(DensityEdge::None)),
            };
            match (k, b, e) {
                (Some(k), Some(b), Some(e)) => (k, b, e),
                _ => {
                    return Err(bad(
                        "--reference",
                        format!("{:?} is not KERNEL:BANDWIDTH[:EDGE]", a.reference),
                        "e.g. --reference gaussian:scott or quartic:lcv:uniform",
                    ));
                }
            }
        }
        _ => {
            return Err(bad(
                "--reference",
                format!("{:?} is not KERNEL:BANDWIDTH[:EDGE]", a.reference),
                "e.g. --reference gaussian:scott or quartic:lcv:uniform",
            ));
        }
    };
    Ok(Config {
        kernels: ks,
        bandwidths: bs,
        edges,
        levels,
        cell: a.cell,
        reference,
        unit: unit.to_string(),
    })
}

/// Run the command.
pub fn run(a: &DensityArgs) -> Result<(), Failure> {
    if a.input.boundaries.len() > 1 {
        return Err(bad(
            "--boundary",
            format!(
                "{} boundaries given; density uses one window",
                a.input.boundaries.len()
            ),
            "pass one --boundary (or none for the convex hull of the points)",
        ));
    }
    let data = crate::common::load(&a.input)?;
    if !a.quiet {
        crate::common::print_reading(&data);
    }
    let config = parse_config(a, &data.unit)?;
    let points_name = a.input.points.display().to_string();
    let input = patternproof::Input::from_dataset(&data)?;
    let patternproof::DensityResult {
        analysis,
        window_source: source,
        window_area: area,
    } = patternproof::density(&input, &config)?;
    let mut command = vec!["patternproof".to_string()];
    command.extend(
        std::env::args_os()
            .skip(1)
            .map(|s| shell_quote(&s.to_string_lossy())),
    );
    let info = RunInfo {
        points_file: points_name.clone(),
        n_read: data.n_read,
        coords: data.system.as_str().to_string(),
        projection: data.projection.as_ref().map(|p| p.describe()),
        unit: data.unit.clone(),
        window_source: source,
        window_area: area,
        warnings: data.warnings.clone(),
    };
    let context = RunContext {
        command_line: command.join(" "),
        ..RunContext::default()
    };
    let folder = patternproof_report::density::folder(&analysis, &info, &context)?;
    a.output.write(&folder)?;
    if !a.quiet {
        for w in info.warnings.iter().chain(&analysis.warnings) {
            eprintln!("patternproof: warning: {w}");
        }
        println!("{}", analysis.verdict.sentence);
        println!("report: {}", a.output.out.display());
    }
    Ok(())
}
