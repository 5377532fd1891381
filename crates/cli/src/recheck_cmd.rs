//! `patternproof recheck`: are published figures consistent, what study
//! area do they imply, and (given the points) which window reproduces them.
//!
//! The flags and the run function live here together; the checks are in
//! the `patternproof-recheck` crate.

use crate::args::CoordArgs;
use crate::fail::Failure;
use clap::Args;
use patternproof::options::{
    Figures, LoadOptions, Problem, Quantity, parse_count, parse_figure as parse,
};
use std::path::PathBuf;

/// `patternproof recheck`.
///
/// Give the figures exactly as printed: the number of decimals sets the
/// rounding range each figure is allowed (R = 0.71 means 0.705 to 0.715).
/// Bounds such as "<0.001" are accepted for any figure.
#[derive(Debug, Args)]
pub struct RecheckArgs {
    /// Number of points the analysis used.
    #[arg(long, value_name = "N", allow_hyphen_values = true)]
    pub n: String,
    /// The ratio R (mean nearest-neighbour distance over its CSR expectation), as printed.
    #[arg(long, value_name = "R", allow_hyphen_values = true)]
    pub ratio: Option<String>,
    /// The standardised difference z, as printed (e.g. -4.9).
    #[arg(long, value_name = "Z", allow_hyphen_values = true)]
    pub z: Option<String>,
    /// The p-value, as printed (e.g. 0.013 or "<0.001").
    #[arg(long, value_name = "P", allow_hyphen_values = true)]
    pub p: Option<String>,
    /// The mean nearest-neighbour distance D, as printed (in the data's unit).
    #[arg(long, value_name = "D", allow_hyphen_values = true)]
    pub mean_nn: Option<String>,
    /// The expected distance under CSR, E, as printed.
    #[arg(long, value_name = "E", allow_hyphen_values = true)]
    pub expected_nn: Option<String>,
    /// The study area A, as printed (unit squared).
    #[arg(long, value_name = "A", allow_hyphen_values = true)]
    pub area: Option<String>,
    /// The reported p is one-sided (the tail in the direction of the departure).
    #[arg(long)]
    pub one_sided: bool,
    /// The points, to find which window and edge handling reproduce the figures: CSV, GeoJSON
    /// or GeoPackage (.gpkg), as the other commands read them.
    #[arg(long, value_name = "FILE")]
    pub points: Option<PathBuf>,
    /// A study-area boundary (GeoJSON Polygon/MultiPolygon, WKT or GeoPackage); repeat for several.
    #[arg(long = "boundary", value_name = "FILE", requires = "points")]
    pub boundaries: Vec<PathBuf>,
    /// GeoPackage point layer to read (needed when the file holds more than one feature layer).
    #[arg(long, value_name = "NAME", requires = "points")]
    pub layer: Option<String>,
    /// GeoPackage polygon layer of the `--boundary` GeoPackage files.
    #[arg(long, value_name = "NAME", requires = "points")]
    pub boundary_layer: Option<String>,
    /// Keep only the points whose column (CSV, GeoPackage) or property (GeoJSON) FIELD equals
    /// VALUE as text (e.g. `--where year=2024`).
    #[arg(long = "where", value_name = "FIELD=VALUE", requires = "points")]
    pub filter: Option<String>,
    #[command(flatten)]
    pub coords: CoordArgs,
    /// Remove points that repeat an earlier point exactly before matching n.
    #[arg(long, requires = "points")]
    pub drop_duplicates: bool,
    /// Print the result as JSON (schema `patternproof.recheck/2`, docs/recheck-schema.md).
    #[arg(long)]
    pub json: bool,
}

fn refuse(flag: &str, text: &str, p: Problem) -> Failure {
    Failure::Input(format!(
        "{flag} {}: {}\n  what to do: {}",
        text.trim(),
        p.what,
        p.advice
    ))
}

fn figures(a: &RecheckArgs) -> Result<Figures, Failure> {
    let n = parse_count(&a.n).map_err(|p| refuse("--n", &a.n, p))?;
    let mut f = Figures::new(n, a.one_sided);
    let given = [
        (Quantity::Ratio, &a.ratio),
        (Quantity::Z, &a.z),
        (Quantity::P, &a.p),
        (Quantity::MeanNn, &a.mean_nn),
        (Quantity::ExpectedNn, &a.expected_nn),
        (Quantity::Area, &a.area),
    ];
    for (q, text) in given {
        if let Some(t) = text {
            let r = parse(t, q).map_err(|p| refuse(q.flag(), t, p))?;
            f = f.with(r);
        }
    }
    if f.figures.is_empty() {
        return Err(Failure::Input(
            "nothing to recheck: only n was given\n  what to do: add the figures as printed, e.g. --ratio 0.71 --z -4.9 --p \"<0.001\"".into(),
        ));
    }
    Ok(f)
}

/// Run the command.
pub fn run(a: &RecheckArgs) -> Result<(), Failure> {
    let f = figures(a)?;
    let data = match &a.points {
        Some(path) => {
            let options = LoadOptions {
                coords: a.coords.choice(),
                unit: a.coords.unit.clone(),
                drop_duplicates: a.drop_duplicates,
                field: None,
                gpkg: crate::common::gpkg_choice(
                    a.layer.clone(),
                    a.boundary_layer.clone(),
                    a.filter.as_deref(),
                )?,
            };
            let data = patternproof::load(path, &a.boundaries, &options)?;
            crate::common::print_reading(&data);
            Some(data)
        }
        None => None,
    };
    let input = data.as_ref().map(patternproof::Input::from_dataset);
    let result = patternproof::recheck(&f, input.as_ref())?;
    if let Some(d) = &data {
        for w in &d.warnings {
            eprintln!("patternproof: warning: {w}");
        }
    }
    if a.json {
        let text = serde_json::to_string_pretty(&result)
            .map_err(|e| Failure::Internal(format!("could not write the JSON: {e}")))?;
        println!("{text}");
    } else {
        print!(
            "{}",
            patternproof_report::recheck::text(&result, crate::terminal::stdout_width())
        );
    }
    Ok(())
}
