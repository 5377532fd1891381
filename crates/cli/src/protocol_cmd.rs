//! `patternproof protocol new|show`: write a study protocol down once and
//! check it later.

use crate::args::count;
use crate::fail::Failure;
use clap::{Args, Subcommand};
use patternproof::options::{Check, TEST_SIMS};
use std::path::{Path, PathBuf};

/// `patternproof protocol`.
#[derive(Debug, Args)]
pub struct ProtocolArgs {
    /// What to do with a protocol.
    #[command(subcommand)]
    pub action: ProtocolAction,
}

/// The protocol actions.
#[derive(Debug, Subcommand)]
pub enum ProtocolAction {
    /// Write a new protocol file (refuses to overwrite one).
    New(NewArgs),
    /// Print a protocol in words and verify its hash.
    Show(ShowArgs),
}

/// `patternproof protocol new`.
#[derive(Debug, Args)]
pub struct NewArgs {
    /// Window rule: hull, hull+D (a distance), hull+kNN (e.g. hull+1nn: k × each site's
    /// mean nearest-neighbour distance), bbox, boundary (each site's own), concave.
    #[arg(long, default_value = "hull+1nn", value_name = "RULE")]
    pub window: String,
    /// Edge handling whose row is each site's result: none, donnelly, border, toroidal, simulation.
    #[arg(long, default_value = "simulation", value_name = "E")]
    pub edge: String,
    /// Two-sided significance level.
    #[arg(long, default_value_t = 0.05, allow_negative_numbers = true)]
    pub alpha: f64,
    /// CSR simulations per site (default by the one rule of every command: 999 where the
    /// p-value is the result, 99 where simulations screen windows or distances at α).
    #[arg(long, default_value_t = TEST_SIMS, value_parser = count::<usize>, allow_negative_numbers = true)]
    pub sims: usize,
    /// Seed; each site's streams derive from it and the site's name.
    #[arg(long, default_value_t = 1, value_parser = count::<u64>, allow_negative_numbers = true)]
    pub seed: u64,
    /// Multiple-testing adjustment across sites: holm, bh or none.
    #[arg(long, default_value = "holm")]
    pub adjust: String,
    /// Sites with fewer points are listed, not tested.
    #[arg(long, default_value_t = 10, value_parser = count::<usize>, allow_negative_numbers = true)]
    pub min_n: usize,
    /// Guard width for `border` (default: each site's mean nearest-neighbour distance).
    #[arg(long, value_name = "W", allow_negative_numbers = true)]
    pub guard: Option<f64>,
    /// Concavity of the concave hull (smaller cuts deeper into the gaps between points).
    #[arg(long, default_value_t = 2.0, allow_negative_numbers = true)]
    pub concavity: f64,
    /// Free text: who fixed the protocol, when, why.
    #[arg(long, value_name = "TEXT")]
    pub note: Option<String>,
    /// The protocol file to write.
    #[arg(long, value_name = "FILE")]
    pub out: PathBuf,
}

/// `patternproof protocol show`.
#[derive(Debug, Args)]
pub struct ShowArgs {
    /// The protocol file.
    #[arg(value_name = "FILE")]
    pub file: PathBuf,
}

/// Run the command.
pub fn run(a: &ProtocolArgs) -> Result<(), Failure> {
    match &a.action {
        ProtocolAction::New(n) => new(n),
        ProtocolAction::Show(s) => show(s),
    }
}

fn new(a: &NewArgs) -> Result<(), Failure> {
    let protocol = patternproof::words::protocol(&patternproof::words::ProtocolWords {
        window: &a.window,
        edge: &a.edge,
        alpha: a.alpha,
        sims: a.sims,
        seed: a.seed,
        adjust: &a.adjust,
        min_n: a.min_n,
        guard: a.guard,
        concavity: a.concavity,
        note: a.note.as_deref(),
    })?;
    if a.out.exists() {
        return Err(Failure::Input(format!(
            "{}: the file exists; a protocol is not overwritten\n  what to do: choose a new --out name (keep the old protocol as the record of what was fixed)",
            a.out.display()
        )));
    }
    write_new(&a.out, &protocol.to_file_text())?;
    println!("wrote {} (SHA-256 {})", a.out.display(), protocol.sha256());
    for l in protocol.describe() {
        println!("  {l}");
    }
    Ok(())
}

/// Write a file that must not exist yet, all or nothing.
fn write_new(path: &Path, text: &str) -> Result<(), Failure> {
    let dir = match path.parent() {
        Some(p) if !p.as_os_str().is_empty() => p.to_path_buf(),
        _ => PathBuf::from("."),
    };
    let io_err = |e: std::io::Error| {
        Failure::Input(format!(
            "{}: {e}\n  what to do: check that the folder exists and is writable",
            path.display()
        ))
    };
    // A signal while the temporary file exists waits until it is renamed
    // or removed, so no temporary file is left beside the protocol.
    let (written, signal) = crate::interrupt::hold(|_| {
        let mut tmp = tempfile::NamedTempFile::new_in(&dir).map_err(io_err)?;
        std::io::Write::write_all(&mut tmp, text.as_bytes()).map_err(io_err)?;
        tmp.persist_noclobber(path).map_err(|e| io_err(e.error))?;
        Ok(())
    });
    match signal {
        Some(signal) => Err(Failure::Interrupted {
            signal,
            message: format!(
                "stopped by {}; {}",
                crate::interrupt::name(signal),
                if written.is_ok() {
                    format!("{} was already complete and is kept", path.display())
                } else {
                    "no protocol file was written".to_string()
                }
            ),
        }),
        None => written,
    }
}

fn show(a: &ShowArgs) -> Result<(), Failure> {
    let (protocol, check) = patternproof::read_protocol(&a.file)?;
    println!("protocol {} ({})", a.file.display(), protocol.schema);
    for l in protocol.describe() {
        println!("  {l}");
    }
    match check {
        Check::Intact => {
            println!(
                "SHA-256 {}: intact (the choices match the recorded hash)",
                protocol.sha256()
            );
            Ok(())
        }
        Check::Changed { stored, actual } => {
            Err(patternproof::changed(&a.file, &stored, &actual).into())
        }
    }
}
