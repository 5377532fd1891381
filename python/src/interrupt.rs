//! Ctrl-C in a notebook stops a long run: the job runs on its own thread
//! without the GIL, while the calling thread waits in short slices and,
//! between them, lets Python look at its signals. On KeyboardInterrupt the
//! job is asked to stop (through the facade's `Progress`), is waited for
//! (the engines stop after the pattern each thread is on), and the
//! interrupt is raised: no thread is left running.

use crate::errors::to_py;
use patternproof::{Error, Progress};
use pyo3::prelude::*;
use std::sync::atomic::{AtomicBool, Ordering};
use std::time::Duration;

/// How often the waiting thread looks at Python's signals.
const SLICE: Duration = Duration::from_millis(50);

/// A progress that only carries the stop request.
#[derive(Default)]
pub struct StopFlag(AtomicBool);

impl Progress for StopFlag {
    fn cancelled(&self) -> bool {
        self.0.load(Ordering::Relaxed)
    }
}

/// Run `job` so that Ctrl-C (or any signal handler that raises) stops it.
/// `job` gets the progress to hand to the facade.
pub fn interruptible<T: Send>(
    py: Python<'_>,
    job: impl FnOnce(&StopFlag) -> Result<T, Error> + Send,
) -> PyResult<T> {
    let flag = StopFlag::default();
    std::thread::scope(|scope| {
        let handle = scope.spawn(|| job(&flag));
        let mut raised = None;
        while !handle.is_finished() {
            py.detach(|| {
                // Woken early by nothing: a short sleep is all it is.
                std::thread::park_timeout(SLICE);
            });
            if raised.is_none()
                && let Err(e) = py.check_signals()
            {
                flag.0.store(true, Ordering::Relaxed);
                raised = Some(e);
            }
        }
        let outcome = py.detach(|| handle.join());
        match (outcome, raised) {
            (_, Some(interrupt)) => Err(interrupt),
            (Ok(result), None) => result.map_err(to_py),
            (Err(panic), None) => std::panic::resume_unwind(panic),
        }
    })
}
