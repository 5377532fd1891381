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
    /// Concavity of the concave hull (geo's parameter; smaller cuts deeper).
    #[arg(long, default_value_t = 2.0, allow_negative_numbers = true)]
    pub concavity: f64,
}

impl WindowArgs {
    /// The buffer rules and the concavity, checked: exit 2 with the flag
    /// named and what to do, before any file is read.
    pub fn checked(&self) -> Result<(Vec<BufferRule>, f64), Failure> {
        let buffers = parse_buffers(&self.buffers)?;
        if !(self.concavity > 0.0 && self.concavity.is_finite()) {
            return Err(Failure::Input(format!(
                "--concavity {}: must be a positive number\n  what to do: leave it out for geo's default 2.0",
                self.concavity
            )));
        }
        Ok((buffers, self.concavity))
    }
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
