//! The window-shaping options that `audit` and `scales` share, defined
//! once so that both commands offer the same flags with the same defaults,
//! help and checks.

use crate::fail::Failure;
use clap::Args;
use patternproof::options::BufferRule;

/// `--buffers` and `--concavity`.
#[derive(Debug, Clone, Args)]
pub struct WindowArgs {
    /// Buffer distances for the buffered-hull windows: plain numbers are distances in the
    /// unit, a trailing `x` means a multiple of the observed mean nearest-neighbour distance.
    #[arg(
        long,
        value_delimiter = ',',
        default_value = "0.5x,1x,2x",
        value_name = "D,…",
        allow_hyphen_values = true
    )]
    pub buffers: Vec<String>,
    /// Concavity of the concave hull (smaller cuts deeper into the gaps between points).
    #[arg(long, default_value_t = 2.0, allow_negative_numbers = true)]
    pub concavity: f64,
}

impl WindowArgs {
    /// The buffer rules and the concavity, checked: exit 2 with the flag
    /// named and what to do, before any file is read.
    pub fn checked(&self) -> Result<(Vec<BufferRule>, f64), Failure> {
        let buffers = patternproof::words::buffers(&self.buffers)?;
        let concavity = patternproof::words::concavity(self.concavity)?;
        Ok((buffers, concavity))
    }
}
