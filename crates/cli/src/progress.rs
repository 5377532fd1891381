//! A progress bar for simulations that run longer than a second.
//!
//! Hidden at first; shown on stderr once a second has passed, and never
//! when stderr is not a terminal or `--quiet` is given, so logs and pipes
//! stay clean. It is the command line's [`patternproof::Progress`].

use indicatif::{ProgressBar, ProgressDrawTarget, ProgressStyle};
use std::io::IsTerminal;
use std::sync::atomic::{AtomicBool, Ordering};

/// A bar that appears only when the work is slow.
pub struct Progress {
    bar: ProgressBar,
    allowed: bool,
    shown: AtomicBool,
}

impl Progress {
    /// A bar, hidden until a stage starts and a second has passed.
    pub fn new(quiet: bool) -> Self {
        let bar = ProgressBar::with_draw_target(None, ProgressDrawTarget::hidden());
        if let Ok(style) = ProgressStyle::with_template("{msg} {wide_bar} {pos}/{len} ({eta} left)")
        {
            bar.set_style(style);
        }
        Self {
            bar,
            allowed: !quiet && std::io::stderr().is_terminal(),
            shown: AtomicBool::new(false),
        }
    }
}

impl patternproof::Progress for Progress {
    fn start(&self, total: u64, what: &str) {
        self.bar.set_length(total);
        self.bar.set_position(0);
        self.bar.set_message(what.to_string());
        self.bar.reset_elapsed();
        self.bar.reset_eta();
    }

    fn step(&self) {
        self.bar.inc(1);
        if self.allowed
            && !self.shown.load(Ordering::Relaxed)
            && self.bar.elapsed().as_secs_f64() > 1.0
            && !self.shown.swap(true, Ordering::Relaxed)
        {
            self.bar.set_draw_target(ProgressDrawTarget::stderr());
        }
    }

    fn finish(&self) {
        self.bar.finish_and_clear();
    }
}
