//! Ctrl-C and `kill` while a report folder is being written.
//!
//! Before and after the write phase nothing of the run is on disk, so
//! SIGINT, SIGTERM, SIGHUP and SIGQUIT end the program at once, as usual.
//! While [`hold`] runs the writer they only raise a flag; the writer asks
//! for it between files, removes what it made and leaves the earlier
//! report in place (or, once its renames have begun, finishes them). The
//! caller then reports the signal and [`end_by`] ends the program with it,
//! so a shell sees the usual status (130 for SIGINT, 143 for SIGTERM).

#[cfg(unix)]
mod imp {
    use signal_hook::consts::{SIGHUP, SIGINT, SIGQUIT, SIGTERM};
    use std::sync::atomic::{AtomicBool, AtomicUsize, Ordering};
    use std::sync::{Arc, OnceLock};

    const SIGNALS: [i32; 4] = [SIGINT, SIGTERM, SIGHUP, SIGQUIT];

    struct Handlers {
        /// The last signal received (0: none).
        received: Arc<AtomicUsize>,
        /// True outside the write phase: a signal ends the program.
        end_at_once: Arc<AtomicBool>,
    }

    static HANDLERS: OnceLock<Handlers> = OnceLock::new();

    pub fn install() {
        let received = Arc::new(AtomicUsize::new(0));
        let end_at_once = Arc::new(AtomicBool::new(true));
        for sig in SIGNALS {
            // Record first, then end the program if not writing; a signal
            // that cannot be handled keeps its default action.
            let recorded = usize::try_from(sig).is_ok_and(|value| {
                signal_hook::flag::register_usize(sig, Arc::clone(&received), value).is_ok()
            });
            if recorded {
                let _ =
                    signal_hook::flag::register_conditional_default(sig, Arc::clone(&end_at_once));
            }
        }
        let _ = HANDLERS.set(Handlers {
            received,
            end_at_once,
        });
    }

    pub fn hold<T>(work: impl FnOnce(&dyn Fn() -> bool) -> T) -> (T, Option<i32>) {
        let Some(h) = HANDLERS.get() else {
            return (work(&|| false), None);
        };
        h.end_at_once.store(false, Ordering::SeqCst);
        let stop = || h.received.load(Ordering::SeqCst) != 0;
        let out = work(&stop);
        // Re-armed before looking, so no signal falls between the two: one
        // that came during `work` is reported, a later one ends at once.
        h.end_at_once.store(true, Ordering::SeqCst);
        let got = h.received.load(Ordering::SeqCst);
        (out, i32::try_from(got).ok().filter(|&s| s != 0))
    }

    pub fn end_by(signal: i32) -> ! {
        let _ = signal_hook::low_level::emulate_default_handler(signal);
        std::process::exit(128 + signal)
    }

    pub fn name(signal: i32) -> String {
        signal_hook::low_level::signal_name(signal)
            .map_or_else(|| format!("signal {signal}"), str::to_string)
    }
}

#[cfg(not(unix))]
mod imp {
    pub fn install() {}
    pub fn hold<T>(work: impl FnOnce(&dyn Fn() -> bool) -> T) -> (T, Option<i32>) {
        (work(&|| false), None)
    }
    pub fn end_by(signal: i32) -> ! {
        std::process::exit(128 + signal)
    }
    pub fn name(signal: i32) -> String {
        format!("signal {signal}")
    }
}

/// Install the handlers (once, at start).
pub fn install() {
    imp::install()
}

/// Run the write phase: signals only raise a flag, which `work` reads
/// through the test it is given. Returns `work`'s answer and the signal
/// received meanwhile, if any (the caller must then call [`end_by`]).
pub fn hold<T>(work: impl FnOnce(&dyn Fn() -> bool) -> T) -> (T, Option<i32>) {
    imp::hold(work)
}

/// End the program as the signal would have.
pub fn end_by(signal: i32) -> ! {
    imp::end_by(signal)
}

/// `SIGINT`, `SIGTERM`…
pub fn name(signal: i32) -> String {
    imp::name(signal)
}
