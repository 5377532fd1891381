//! Memory, not time: what the K estimator and the envelope test hold.
//!
//! Peak resident memory is read from Linux's own counter (`VmHWM` in
//! `/proc/self/status`, reset by writing 5 to `/proc/self/clear_refs`), so
//! the checks measure bytes, never seconds. They share one test function
//! because the counter is per process and tests in one binary run at the
//! same time.

#![allow(clippy::unwrap_used, missing_docs)]
#![cfg(target_os = "linux")]

use geo::{LineString, MultiPolygon, Polygon};
use patternproof_audit::streams::stream;
use patternproof_core::Rectangle;
use patternproof_scales::k_function::{distance_grid, k_curves};
use patternproof_scales::{Correction, KWindow, ScalesOptions, memory, plan};
use patternproof_window::Sampler;
use patternproof_window::{WindowOptions, build_windows};

const MIB: u64 = 1 << 20;

/// A field of `/proc/self/status`, in bytes.
fn status(field: &str) -> u64 {
    let text = std::fs::read_to_string("/proc/self/status").unwrap();
    let line = text.lines().find(|l| l.starts_with(field)).unwrap();
    let kib: u64 = line.split_whitespace().nth(1).unwrap().parse().unwrap();
    kib * 1024
}

/// Peak resident memory above the resident memory at the start while `f`
/// runs, and what `f` returned.
fn peak_growth<T>(f: impl FnOnce() -> T) -> (u64, T) {
    std::fs::write("/proc/self/clear_refs", "5").unwrap();
    let start = status("VmRSS:");
    let out = f();
    (status("VmHWM:").saturating_sub(start), out)
}

#[test]
fn memory_grows_with_points_and_simulations_not_with_pairs() {
    // The rayon pool and the allocator's arenas exist before measuring.
    let square = MultiPolygon::new(vec![Polygon::new(
        LineString::from(vec![
            (0., 0.),
            (100., 0.),
            (100., 100.),
            (0., 100.),
            (0., 0.),
        ]),
        vec![],
    )]);
    // Closed-form weights (an axis-aligned rectangle), to keep the test
    // short in a debug build.
    let rect = Rectangle {
        min: [0.0, 0.0],
        max: [100.0, 100.0],
    };
    let region = KWindow::new(&square, Some(rect)).unwrap();
    let sampler = Sampler::new(&square).unwrap();
    let pts = sampler.sample(2_000, &mut stream(20, "memory", 0));
    let _ = k_curves(
        &pts,
        &region,
        &distance_grid(3.0, 50),
        &Correction::ALL,
        true,
    );

    // Issue 20: every one of the 2 M pairs lies within r_max = 150. A
    // list of them takes 16 bytes a pair (32 MB) and their weighed copies
    // 40 more (80 MB); summed per distance bin as they are found, the run
    // holds the points and about 8 MiB of weighed pairs at a time.
    let grid = distance_grid(150.0, 50);
    let (grew, (_, notes)) = peak_growth(|| k_curves(&pts, &region, &grid, &Correction::ALL, true));
    assert_eq!(notes.pairs, 2_000 * 1_999 / 2);
    println!("K̂ of 2 000 points, all 2 M pairs: peak grew {grew} bytes");
    assert!(grew < 24 * MIB, "peak grew {} MiB", grew / MIB);

    // The envelope test keeps every simulated curve of one window at a
    // time: 12 000 simulations of 50 distances, estimated at
    // `memory::bytes_per_simulation` each. The measurement lands within
    // the estimate plus 8 MiB for everything else, and above 60 % of it,
    // so the estimate neither misses what is held nor inflates it.
    let few = sampler.sample(12, &mut stream(20, "memory", 1));
    let only_outlines = WindowOptions {
        buffers: Vec::new(),
        ..WindowOptions::default()
    };
    let (windows, _) = build_windows(&few, 10.0, &[], &only_outlines);
    let options = ScalesOptions {
        corrections: vec![Correction::Isotropic],
        tested: vec![Correction::Isotropic],
        rmax: Some(20.0),
        sims: 12_000,
        ..ScalesOptions::default()
    };
    let estimate = options.sims as u64 * memory::bytes_per_simulation(50, 1);
    let (grew, run) = peak_growth(|| plan(&few, &windows, &options).run("m", &options, &|| {}));
    assert!(run.windows.iter().all(|w| w.tests.len() == 1));
    println!(
        "envelope test, 12 000 simulations: peak grew {grew} bytes, estimate {estimate} bytes"
    );
    assert!(grew <= estimate + 8 * MIB, "{grew} > {estimate}");
    assert!(grew * 10 >= estimate * 6, "{grew} far below {estimate}");
}
