//! Timing run for docs/performance.md (issue: the K function at scale).
//! Not a test: `bench/scales.sh` runs it in release mode at 1 and 2
//! threads and prints the figures.
//!
//! 1. K̂ for n = 100 000 CSR points in a 10 km square, 50 distances up to
//!    98 m (π·98²·n/|W| ≈ 30 neighbours per point), one correction at a
//!    time: isotropic, border and translation in the square (closed-form
//!    weight), and translation in a 64-gon of the same area (tabulated
//!    overlaps).
//! 2. The envelope test of n = 2 000 points in the square with 999 CSR
//!    simulations (isotropic), sampling included.

use geo::{LineString, MultiPolygon, Polygon};
use patternproof_audit::streams::stream;
use patternproof_core::Rectangle;
use patternproof_scales::envelope::{mad_test, simulate};
use patternproof_scales::k_function::k_curves;
use patternproof_scales::translation::{OverlapTable, worth_a_table};
use patternproof_scales::{Correction, KWindow, distance_grid};
use patternproof_window::Sampler;
use std::time::Instant;

fn square(side: f64) -> MultiPolygon<f64> {
    MultiPolygon::new(vec![Polygon::new(
        LineString::from(vec![
            (0., 0.),
            (side, 0.),
            (side, side),
            (0., side),
            (0., 0.),
        ]),
        vec![],
    )])
}

fn polygon_of_area(area: f64, sides: usize) -> MultiPolygon<f64> {
    // Regular polygon: area = ½·sides·R²·sin(2π/sides).
    let t = 2.0 * std::f64::consts::PI / sides as f64;
    let r = (2.0 * area / (sides as f64 * t.sin())).sqrt();
    let c = r;
    let ring: Vec<(f64, f64)> = (0..=sides)
        .map(|k| {
            let a = t * (k % sides) as f64;
            (c + r * a.cos(), c + r * a.sin())
        })
        .collect();
    MultiPolygon::new(vec![Polygon::new(LineString::from(ring), vec![])])
}

fn best_of<T>(runs: usize, mut f: impl FnMut() -> T) -> (f64, T) {
    let mut best = f64::INFINITY;
    let mut last = None;
    for _ in 0..runs {
        let start = Instant::now();
        let out = f();
        best = best.min(start.elapsed().as_secs_f64());
        last = Some(out);
    }
    (best, last.expect("at least one run"))
}

fn main() {
    let side = 10_000.0;
    let shape = square(side);
    let rect = Rectangle {
        min: [0.0, 0.0],
        max: [side, side],
    };
    let region = KWindow::new(&shape, Some(rect)).expect("area");
    let sampler = Sampler::new(&shape).expect("area");
    let n = 100_000;
    let pts = sampler.sample(n, &mut stream(20_261_203, "k-bench", 0));
    let grid = distance_grid(98.0, 50);
    println!(
        "threads: {}",
        std::env::var("RAYON_NUM_THREADS").unwrap_or_else(|_| "default".into())
    );
    for c in [
        Correction::Isotropic,
        Correction::Border,
        Correction::Translation,
    ] {
        let (t, (_, notes)) = best_of(3, || k_curves(&pts, &region, &grid, &[c], true));
        println!(
            "K, n = {n}, 50 distances to 98 m, square, {:<11}: {t:.2} s ({} pairs)",
            c.as_str(),
            notes.pairs
        );
    }
    let gon = polygon_of_area(side * side, 64);
    let mut gon_region = KWindow::new(&gon, None).expect("area");
    let gon_pts = Sampler::new(&gon)
        .expect("area")
        .sample(n, &mut stream(20_261_203, "k-bench", 1));
    assert!(worth_a_table(&gon_region, n, 98.0, 1));
    let (t_table, table) = best_of(3, || OverlapTable::new(&gon_region, 98.0));
    gon_region.overlap_table = Some(table);
    let (t, _) = best_of(3, || {
        k_curves(
            &gon_pts,
            &gon_region,
            &grid,
            &[Correction::Translation],
            true,
        )
    });
    println!("K, n = {n}, 64-gon, translation: table {t_table:.2} s + curve {t:.2} s");

    let m = 2_000;
    let small = Sampler::new(&shape)
        .expect("area")
        .sample(m, &mut stream(20_261_203, "k-bench", 2));
    // r_max holding about 30 neighbours per point, as for the large
    // pattern, and the default rule (a quarter of the side), which holds
    // about 390.
    let rmax_30 = (30.0 * side * side / (std::f64::consts::PI * m as f64)).sqrt();
    let runs: Vec<f64> = match std::env::args().nth(1).as_deref() {
        Some("--quick") => vec![rmax_30],
        _ => vec![rmax_30, side / 4.0],
    };
    for rmax in runs {
        let grid = distance_grid(rmax, 50);
        let (t, p) = best_of(1, || {
            let (obs, _) = k_curves(&small, &region, &grid, &[Correction::Isotropic], true);
            let sims = simulate(
                &region,
                &sampler,
                m,
                &grid,
                &[Correction::Isotropic],
                999,
                1,
                "k-bench",
                &|| {},
            );
            let simulated = &sims[0];
            mad_test(Correction::Isotropic, &obs[0].l_minus_r, simulated, 0.05).p
        });
        println!(
            "envelope test, n = {m}, 999 simulations, 50 distances to {rmax:.0} m, isotropic: {t:.2} s (p = {p})"
        );
    }
}
