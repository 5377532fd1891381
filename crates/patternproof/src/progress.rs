//! How a long run tells its caller that work is moving.
//!
//! The library never draws anything: the command line shows a bar, a
//! notebook may show a widget, a distributed worker may say nothing. Each
//! implements [`Progress`]; [`Silent`] is the one that ignores it all.

/// Receives the steps of a run (one step is one simulated pattern).
///
/// Steps arrive from several threads at once, so implementations must be
/// `Sync` and cheap.
pub trait Progress: Sync {
    /// A stage of `total` steps begins; `what` says what is simulated.
    fn start(&self, _total: u64, _what: &str) {}
    /// One step is done.
    fn step(&self) {}
    /// The stage is over.
    fn finish(&self) {}
}

/// Progress that goes nowhere.
#[derive(Debug, Clone, Copy, Default)]
pub struct Silent;

impl Progress for Silent {}
