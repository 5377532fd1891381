//! How a long run tells its caller that work is moving.
//!
//! The library never draws anything: the command line shows a bar, a
//! notebook may show a widget, a distributed worker may say nothing. Each
//! implements [`Progress`]; [`Silent`] is the one that ignores it all.

use crate::error::{Error, Refusal};

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
    /// Asked after every step: `true` stops the run, which then returns
    /// [`Refusal::Stopped`] (a notebook's Ctrl-C, a cancelled task).
    fn cancelled(&self) -> bool {
        false
    }
}

/// What carries a stop out of the engines' parallel loops, which have no
/// early exit: an unwinding payload of this type, raised with
/// `resume_unwind` (so no panic message is printed) and caught by
/// [`stoppable`] alone. The engines hold no state that outlives the run.
struct Stop;

/// The per-pattern callback of an engine: a step, then a stop if asked.
pub(crate) fn ticker(progress: &dyn Progress) -> impl Fn() + Sync + '_ {
    move || {
        if progress.cancelled() {
            std::panic::resume_unwind(Box::new(Stop));
        }
        progress.step();
    }
}

/// Run `job`, turning a stop raised by [`ticker`] into
/// [`Refusal::Stopped`]; any other panic goes on unwinding.
pub(crate) fn stoppable<T>(subject: &str, job: impl FnOnce() -> T) -> Result<T, Error> {
    match std::panic::catch_unwind(std::panic::AssertUnwindSafe(job)) {
        Ok(v) => Ok(v),
        Err(payload) if payload.is::<Stop>() => Err(Error::refused(
            Refusal::Stopped,
            subject,
            "the run was stopped before it finished",
            "run it again to get a result",
        )),
        Err(payload) => std::panic::resume_unwind(payload),
    }
}

/// Progress that goes nowhere.
#[derive(Debug, Clone, Copy, Default)]
pub struct Silent;

impl Progress for Silent {}
