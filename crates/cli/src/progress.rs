//! A progress bar for simulations that run longer than a second.
//!
//! Hidden at first; shown on stderr once a second has passed, and never
//! when stderr is not a terminal or `--quiet` is given, so logs and pipes
//! stay clean.

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
    /// A bar for `total` steps.
    pub fn new(total: u64, quiet: bool, what: &str) -> Self {
        let bar = ProgressBar::with_draw_target(Some(total), ProgressDrawTarget::hidden());
        if let Ok(style) = ProgressStyle::with_template("{msg} {wide_bar} {pos}/{len} ({eta} left)")
        {
            bar.set_style(style);
        }
        bar.set_message(what.to_string());
        Self {
            bar,
            allowed: !quiet && std::io::stderr().is_terminal(),
            shown: AtomicBool::new(false),
        }
    }

    /// One step done.
    pub fn tick(&self) {
        self.bar.inc(1);
        if self.allowed
            && !self.shown.load(Ordering::Relaxed)
            && self.bar.elapsed().as_secs_f64() > 1.0
            && !self.shown.swap(true, Ordering::Relaxed)
        {
            self.bar.set_draw_target(ProgressDrawTarget::stderr());
        }
    }

    /// Remove the bar.
    pub fn finish(&self) {
        self.bar.finish_and_clear();
    }
}
