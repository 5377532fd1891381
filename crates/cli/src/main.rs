//! The `patternproof` binary: parses the command line, runs one command,
//! prints one clear message on failure.
//!
//! Exit codes: 0 done; 2 bad input or usage (the message names the file,
//! where, what is wrong and what to do); 1 an internal failure (a bug:
//! please report it); 128 + the signal number (130, 143) when stopped by
//! a signal, which leaves no half-written folder (see [`interrupt`]).

mod args;
mod audit_cmd;
mod budget;
mod common;
mod density_cmd;
mod fail;
mod figures;
mod interrupt;
mod progress;
mod protocol_cmd;
mod recheck_cmd;
mod scales_cmd;
mod sites_cmd;
mod terminal;
mod window_args;

use clap::Parser;
use std::process::ExitCode;

fn main() -> ExitCode {
    interrupt::install();
    let cli = args::Cli::parse();
    let result = match cli.command {
        args::Command::Audit(a) => audit_cmd::run(&a),
        args::Command::Recheck(a) => recheck_cmd::run(&a),
        args::Command::Protocol(a) => protocol_cmd::run(&a),
        args::Command::Sites(a) => sites_cmd::run(&a),
        args::Command::Scales(a) => scales_cmd::run(&a),
        args::Command::Density(a) => density_cmd::run(&a),
    };
    match result {
        Ok(()) => ExitCode::SUCCESS,
        Err(e) => {
            eprintln!("patternproof: error: {e}");
            if let fail::Failure::Interrupted { signal, .. } = e {
                interrupt::end_by(signal);
            }
            ExitCode::from(e.exit_code())
        }
    }
}
