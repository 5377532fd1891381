//! Command-line definitions (clap derive). Every flag is declared once
//! here; help text, defaults and validation come from this table.

use crate::fail::Failure;
use crate::interrupt;
use crate::window_args::WindowArgs;
use clap::{Args, Parser, Subcommand, ValueEnum};
use patternproof::options::{CoordChoice, SCREEN_SIMS, TEST_SIMS};
use patternproof::words::{self, PictureFormat};
use patternproof_report::{FolderError, OutputFolder, WriteOptions, write_folder};
use std::path::PathBuf;

/// Does a claim about a point pattern survive every defensible study area
/// and edge handling?
#[derive(Debug, Parser)]
#[command(name = "patternproof", version, about, long_about = None, propagate_version = true)]
pub struct Cli {
    /// What to do.
    #[command(subcommand)]
    pub command: Command,
}

/// The commands.
#[derive(Debug, Subcommand)]
pub enum Command {
    /// Sweep study areas × edge handling for one data set: verdict table,
    /// flip thresholds and a report folder.
    Audit(AuditArgs),
    /// Recheck published figures (R, z, p, n, distances, area): do they agree,
    /// what study area do they imply, and which window reproduces them.
    Recheck(crate::recheck_cmd::RecheckArgs),
    /// Write a study protocol (window rule, edge handling, α, simulations,
    /// seed, adjustment) once, with a hash; or show and verify one.
    Protocol(crate::protocol_cmd::ProtocolArgs),
    /// Apply one protocol to many sites: per-site rows, adjusted p-values,
    /// window-sensitivity flags and a report folder per site.
    Sites(crate::sites_cmd::SitesArgs),
    /// Kernel density audit: how much the surface, its isopleth areas and its
    /// main hotspot depend on kernel, bandwidth and edge handling.
    Density(crate::density_cmd::DensityArgs),
    /// Ripley's K and L(r) − r in every study-area window under border,
    /// isotropic and translation edge correction, with a global envelope test.
    Scales(crate::scales_cmd::ScalesArgs),
}

/// How coordinates are to be read.
#[derive(Debug, Clone, Copy, PartialEq, Eq, ValueEnum)]
pub enum CoordsArg {
    /// Decide from the file (CSV column names, GeoJSON `crs` member, GeoPackage system); stop
    /// when unclear, also when x,y-named columns hold only numbers within the lon/lat ranges.
    Auto,
    /// Planar coordinates in `--unit`.
    Projected,
    /// Longitude/latitude in degrees (WGS84); projected to equal-area before any measurement.
    Lonlat,
}

impl From<CoordsArg> for CoordChoice {
    fn from(c: CoordsArg) -> Self {
        match c {
            CoordsArg::Auto => Self::Auto,
            CoordsArg::Projected => Self::Projected,
            CoordsArg::Lonlat => Self::LonLat,
        }
    }
}

/// Inputs shared by the commands that read one data set.
#[derive(Debug, Args)]
pub struct InputArgs {
    /// Point file: CSV (columns x,y / easting,northing / lon,lat / longitude,latitude), GeoJSON or GeoPackage (.gpkg).
    #[arg(value_name = "POINTS")]
    pub points: PathBuf,
    /// A study-area boundary (GeoJSON Polygon/MultiPolygon, WKT or GeoPackage); repeat for several.
    #[arg(long = "boundary", value_name = "FILE")]
    pub boundaries: Vec<PathBuf>,
    /// GeoPackage point layer to read (needed when the file holds more than one feature layer).
    #[arg(long, value_name = "NAME")]
    pub layer: Option<String>,
    /// GeoPackage polygon layer of the `--boundary` GeoPackage files.
    #[arg(long, value_name = "NAME")]
    pub boundary_layer: Option<String>,
    /// Keep only the points whose column (CSV, GeoPackage) or property (GeoJSON) FIELD equals
    /// VALUE as text (e.g. `--where year=2024`).
    #[arg(long = "where", value_name = "FIELD=VALUE")]
    pub filter: Option<String>,
    #[command(flatten)]
    pub coords: CoordArgs,
    /// Remove points that repeat an earlier point exactly (default: keep, count and warn).
    #[arg(long)]
    pub drop_duplicates: bool,
}

/// `--coords` and `--unit`, for the commands whose points are always read.
#[derive(Debug, Args)]
pub struct CoordArgs {
    /// How to read coordinates.
    #[arg(long, value_enum, default_value_t = CoordsArg::Auto)]
    pub coords: CoordsArg,
    /// Name of the unit of projected coordinates (shown with every distance and area); a unit
    /// other than the default also says that x,y numbers are planar.
    #[arg(long, default_value = "m")]
    pub unit: String,
}

impl CoordArgs {
    /// `--coords` as the readers want it.
    pub fn choice(&self) -> CoordChoice {
        self.coords.into()
    }
}

/// `--force` and `--out`, shared by the commands that write a report folder.
#[derive(Debug, Args)]
pub struct OutArgs {
    /// Replace an earlier report in `--out` (only a folder holding nothing
    /// but the files patternproof listed in it is ever replaced).
    #[arg(long)]
    pub force: bool,
    /// Report folder (written whole or not at all).
    #[arg(long, value_name = "DIR")]
    pub out: PathBuf,
    /// Picture formats: svg (always written), png, pdf; `--figures
    /// svg,png,pdf` adds NAME.png (at --dpi) and NAME.pdf (fonts
    /// embedded) beside each NAME.svg.
    #[arg(long, value_delimiter = ',', default_value = "svg", value_name = "LIST", value_parser = picture_format)]
    pub figures: Vec<PictureFormat>,
    /// Resolution of the PNG pictures of `--figures`, in dots per inch (72 to 600).
    #[arg(long, default_value_t = 300, value_name = "N", value_parser = dpi)]
    pub dpi: u32,
}

/// A word of `--figures`, checked by the facade's `words` (as the Python
/// package checks it); clap adds the flag and the value to the message.
fn picture_format(text: &str) -> Result<PictureFormat, String> {
    words::picture_format(text).map_err(|e| refusal_text(&e))
}

/// `--dpi`: a whole number within the facade's `words::DPI_RANGE`.
fn dpi(text: &str) -> Result<u32, String> {
    let (low, high) = words::DPI_RANGE;
    let n = text.trim().parse::<u32>().map_err(|_| {
        format!(
            "not a whole number of dots per inch\n  what to do: give a resolution from {low} to {high}, e.g. --dpi 300"
        )
    })?;
    words::dpi(n).map_err(|e| refusal_text(&e))
}

/// What is wrong and what to do, without the subject clap names itself.
fn refusal_text(e: &patternproof::Error) -> String {
    match e {
        patternproof::Error::Refused { what, hint, .. } => {
            format!("{what}\n  what to do: {hint}")
        }
        e => e.to_string(),
    }
}

impl OutArgs {
    /// Write the report folder; a refusal (an earlier report without
    /// `--force`, a folder that is not a report) is bad input. A signal
    /// during the write leaves the old report or the new one, whole, and
    /// ends the program after saying which.
    ///
    /// The print copies of `--figures` are added to `folder` first, so it
    /// lists every file written.
    pub fn write(&self, folder: &mut OutputFolder) -> Result<(), Failure> {
        crate::figures::add_copies(folder, &self.figures, self.dpi)?;
        let (result, signal) = interrupt::hold(|stop| {
            write_folder(
                &self.out,
                folder,
                WriteOptions {
                    force: self.force,
                    stop,
                },
            )
        });
        if let Ok(written) = &result {
            for note in &written.repaired {
                eprintln!("patternproof: note: {note}");
            }
        }
        let out = self.out.display();
        match (result, signal) {
            (Err(FolderError::BadName(n)), _) => Err(Failure::Internal(format!(
                "the report has a file named `{n}`, which is not a plain relative path"
            ))),
            (Ok(_), Some(signal)) => Err(Failure::Interrupted {
                signal,
                message: format!(
                    "stopped by {}; the new report in {out} was already complete and is kept",
                    interrupt::name(signal)
                ),
            }),
            (Err(e), Some(signal)) => Err(Failure::Interrupted {
                signal,
                message: format!(
                    "stopped by {} while writing {out}; {}",
                    interrupt::name(signal),
                    match e {
                        FolderError::Interrupted => "nothing was changed there".to_string(),
                        e => e.to_string(),
                    }
                ),
            }),
            (Err(e), None) => Err(Failure::Input(e.to_string())),
            (Ok(_), None) => Ok(()),
        }
    }
}

/// `patternproof audit`.
#[derive(Debug, Args)]
pub struct AuditArgs {
    #[command(flatten)]
    pub input: InputArgs,
    #[command(flatten)]
    pub window: WindowArgs,
    /// A bare study-area value (unit²), to reproduce an analysis whose outline is unknown.
    #[arg(long, value_name = "A", allow_negative_numbers = true)]
    pub area: Option<f64>,
    /// Two-sided significance level.
    #[arg(long, default_value_t = 0.05, allow_negative_numbers = true)]
    pub alpha: f64,
    /// Edge handlings to sweep: none, donnelly, border, toroidal, simulation.
    #[arg(
        long,
        value_delimiter = ',',
        default_value = "none,donnelly,border,toroidal,simulation",
        value_name = "LIST"
    )]
    pub edges: Vec<String>,
    /// Guard width for `border` (default: the observed mean nearest-neighbour distance).
    #[arg(long, value_name = "W", allow_negative_numbers = true)]
    pub guard: Option<f64>,
    /// CSR simulations per window for the Monte Carlo test and the false-alarm rates
    /// (default by the one rule of every command: 999 where the p-value is the result, 99
    /// where simulations screen windows or distances at α).
    #[arg(long, default_value_t = TEST_SIMS, value_parser = count::<usize>, allow_negative_numbers = true)]
    pub sims: usize,
    /// Seed of every random stream (printed in the report).
    #[arg(long, default_value_t = 1, value_parser = count::<u64>, allow_negative_numbers = true)]
    pub seed: u64,
    /// Window whose simulated means `simulation.svg` shows (default: the
    /// first boundary, else the hull).
    #[arg(long, value_name = "ID")]
    pub picture_window: Option<String>,
    /// Leave the point map out of the report (`windows.svg` and the map in
    /// `index.html`), e.g. when the points are locations of people.
    #[arg(long)]
    pub no_map: bool,
    /// Write the time of the run into `index.html` (off by default, so
    /// reruns give the same bytes).
    #[arg(long)]
    pub stamp: bool,
    /// Also audit Ripley's K and the L function in every window (as
    /// `patternproof scales` with its defaults, so the same sims, seed, rmax and
    /// steps give the same bands), adding its files and a section to `index.html`.
    #[arg(long)]
    pub scales: bool,
    /// CSR simulations per window for the K envelope test of `--scales`, as `scales --sims`
    /// (default by the one rule of every command: 999 where the p-value is the result, 99
    /// where simulations screen windows or distances at α).
    #[arg(long, default_value_t = SCREEN_SIMS, value_name = "N", value_parser = count::<usize>, allow_negative_numbers = true)]
    pub scales_sims: usize,
    /// Largest distance of `--scales` (default: a quarter of the shorter
    /// side of the bounding rectangle of the window where that side is smallest).
    #[arg(long, value_name = "R", allow_hyphen_values = true)]
    pub scales_rmax: Option<f64>,
    #[command(flatten)]
    pub quiet: Quiet,
    #[command(flatten)]
    pub output: OutArgs,
}

/// `-q`/`--quiet`, one meaning in every command that has it (`audit`,
/// `scales`, `density`, `sites`): only the running commentary goes.
#[derive(Debug, Clone, Copy, Args)]
pub struct Quiet {
    /// No progress bar and no forecast of the run's time; the reading line, warnings, results
    /// and the closing `wrote … to DIR` line still print, and errors always do.
    #[arg(long, short)]
    pub quiet: bool,
}

/// The value parser of every count and seed option: a whole number of 0
/// or more. A negative or fractional value gets this message rather than
/// the parser's "invalid digit", and `allow_negative_numbers` on the option
/// lets `-1` reach it at all (otherwise it reads as an unknown flag).
pub fn count<T: std::str::FromStr>(text: &str) -> Result<T, String> {
    text.trim().parse::<T>().map_err(|_| {
        format!(
            "not a whole number of 0 or more that fits in {} bits\n  what to do: give a count (or seed) without a sign or decimals, e.g. 999",
            8 * std::mem::size_of::<T>()
        )
    })
}
