//! Statistical properties of the estimators and the test, checked by
//! simulation with seeded streams (no timing, fixed seeds).

#![allow(clippy::unwrap_used, missing_docs)]

use approx::abs_diff_eq;
use geo::{LineString, MultiPolygon, Polygon};
use patternproof_audit::streams::stream;
use patternproof_scales::envelope::{mad_test, simulate};
use patternproof_scales::k_function::k_curves;
use patternproof_scales::rank_envelope::rank_envelope;
use patternproof_scales::{Correction, KWindow, ScalesOptions, run_scales};
use patternproof_window::Sampler;
use patternproof_window::{WindowOptions, build_windows};
use rand::RngExt;
use std::f64::consts::PI;

fn ring(v: &[(f64, f64)]) -> LineString<f64> {
    LineString::from(v.to_vec())
}

/// A 10 × 8 rectangle with a 3 × 2 hole: area 74.
fn holed() -> MultiPolygon<f64> {
    MultiPolygon::new(vec![Polygon::new(
        ring(&[(0., 0.), (10., 0.), (10., 8.), (0., 8.), (0., 0.)]),
        vec![ring(&[(3., 3.), (6., 3.), (6., 5.), (3., 5.), (3., 3.)])],
    )])
}

/// Ripley (1977): under CSR the isotropic estimator is unbiased for πr²;
/// so is the translation estimator (Ohser & Stoyan 1981) and, as a ratio
/// estimator, the border estimator nearly so. Mean over 300 seeded CSR
/// patterns of 40 points in a holed window, at three distances; tolerance
/// 4 standard errors of the Monte Carlo mean (two-sided, about 6e-5 per
/// check under normality).
#[test]
fn csr_mean_k_is_pi_r_squared() {
    // 20 × 16 with a 4 × 4 hole (area 304): every pattern has centres
    // 2.5 from the outline, so the border estimator is always defined.
    let shape = MultiPolygon::new(vec![Polygon::new(
        ring(&[(0., 0.), (20., 0.), (20., 16.), (0., 16.), (0., 0.)]),
        vec![ring(&[
            (8., 6.),
            (12., 6.),
            (12., 10.),
            (8., 10.),
            (8., 6.),
        ])],
    )]);
    let region = KWindow::new(&shape, None).unwrap();
    let sampler = Sampler::new(&shape).unwrap();
    let grid = [1.0, 1.75, 2.5];
    let m = 200;
    let mut values = vec![vec![Vec::new(); grid.len()]; 3];
    let mut uncorrected = 0.0;
    for k in 0..m {
        let pts = sampler.sample(60, &mut stream(11, "unbiased", k));
        let close: usize = patternproof_core::close_pairs::close_pairs(&pts, 2.5, false)
            .iter()
            .map(Vec::len)
            .sum();
        uncorrected += region.geometry.area() * 2.0 * close as f64 / (60.0 * 59.0) / m as f64;
        let (curves, _) = k_curves(&pts, &region, &grid, &Correction::ALL, false);
        for (c, curve) in curves.iter().enumerate() {
            for (g, v) in curve.k.iter().enumerate() {
                values[c][g].push(v.unwrap());
            }
        }
    }
    for (c, name) in ["border", "isotropic", "translation"].iter().enumerate() {
        for (g, r) in grid.iter().enumerate() {
            let v = &values[c][g];
            let mean = v.iter().sum::<f64>() / v.len() as f64;
            let var = v.iter().map(|x| (x - mean).powi(2)).sum::<f64>() / (v.len() - 1) as f64;
            let se = (var / v.len() as f64).sqrt();
            let want = PI * r * r;
            assert!(
                abs_diff_eq!(mean, want, epsilon = 4.0 * se),
                "{name} r={r}: mean {mean}, πr² {want}, se {se}"
            );
            // The check has teeth: 4 se stays below 10 % of πr², less
            // than the bias of the uncorrected count at r = 2.5 (checked
            // below).
            assert!(4.0 * se < 0.1 * want, "{name} r={r}: se {se} too loose");
        }
    }
    let want = PI * 2.5 * 2.5;
    assert!(
        uncorrected < 0.9 * want,
        "uncorrected {uncorrected} vs {want}"
    );
}

/// The MAD test holds its size: 200 CSR data sets of 20 points, each tested with 19
/// simulations at α = 0.05 (exact size 1/20). Rejections follow
/// Binomial(200, 0.05); 2 ≤ X ≤ 22 has probability above 0.999
/// (binomial tail sums). The ERL test on the same curves is exact up to
/// ties, which only make it reject less, so its count must stay ≤ 22; and
/// wherever its band shows a departure its p-value must be ≤ α.
#[test]
fn global_tests_hold_their_size() {
    let shape = holed();
    let region = KWindow::new(&shape, None).unwrap();
    let sampler = Sampler::new(&shape).unwrap();
    let grid: Vec<f64> = (1..=6).map(|k| 0.25 * f64::from(k)).collect();
    let mut rejections = 0;
    let mut rank_rejections = 0;
    for rep in 0..200u64 {
        let pts = sampler.sample(20, &mut stream(5, "size-observed", rep));
        let (obs, _) = k_curves(&pts, &region, &grid, &[Correction::Isotropic], false);
        let sims = simulate(
            &region,
            &sampler,
            20,
            &grid,
            &[Correction::Isotropic],
            19,
            5,
            &format!("size-{rep}"),
            &|| {},
        );
        let simulated = &sims[0];
        let erl = rank_envelope(&obs[0].l_minus_r, simulated, 0.05);
        if erl.p <= 0.05 {
            rank_rejections += 1;
        } else {
            assert!(erl.departure.iter().all(|&d| d == 0), "ERL p > α, outside");
        }
        let t = mad_test(Correction::Isotropic, &obs[0].l_minus_r, simulated, 0.05);
        if t.p <= 0.05 {
            rejections += 1;
            assert!(
                t.departure.iter().any(|&d| d != 0),
                "p ≤ α but inside the band"
            );
        } else {
            assert!(
                t.departure.iter().all(|&d| d == 0),
                "p > α but outside the band"
            );
        }
    }
    assert!(
        (2..=22).contains(&rejections),
        "{rejections} rejections of 200"
    );
    assert!(rank_rejections <= 22, "{rank_rejections} ERL rejections");
    // Not a test that cannot fail: a broken order (say, the most extreme
    // curve ranked last) would reject almost never or almost always.
    assert!(rank_rejections >= 1, "{rank_rejections} ERL rejections");
}

/// A seeded Thomas cluster process (Gaussian offspring about uniform
/// parents) is detected: p at its minimum 1/40 with 39 simulations, and
/// the departure is clustering at small r.
#[test]
fn detects_a_thomas_cluster_process() {
    let shape = holed();
    let region = KWindow::new(&shape, None).unwrap();
    let sampler = Sampler::new(&shape).unwrap();
    let mut rng = stream(3, "thomas", 0);
    let parents = sampler.sample(6, &mut rng);
    let mut pts = Vec::new();
    for p in &parents {
        for _ in 0..8 {
            let (u, v): (f64, f64) = (rng.random(), rng.random());
            let rad = 0.3 * (-2.0 * (1.0 - u).ln()).sqrt();
            let q = [
                p[0] + rad * (2.0 * PI * v).cos(),
                p[1] + rad * (2.0 * PI * v).sin(),
            ];
            if region.geometry.contains(q) {
                pts.push(q);
            }
        }
    }
    assert!(pts.len() > 30);
    let grid: Vec<f64> = (1..=8).map(|k| 0.25 * f64::from(k)).collect();
    let (obs, _) = k_curves(&pts, &region, &grid, &[Correction::Isotropic], true);
    let sims = simulate(
        &region,
        &sampler,
        pts.len(),
        &grid,
        &[Correction::Isotropic],
        39,
        3,
        "thomas-sims",
        &|| {},
    );
    let simulated = &sims[0];
    let t = mad_test(Correction::Isotropic, &obs[0].l_minus_r, simulated, 0.05);
    assert!(abs_diff_eq!(t.p, 1.0 / 40.0, epsilon = 1e-12), "p {}", t.p);
    assert_eq!(t.departure[1], 1, "{:?}", t.departure);
    assert!(t.departure.iter().all(|&d| d >= 0));
    // The ERL test sees it too: the observed curve is above every
    // simulated one at some distance (extreme rank 1) and its p is small.
    let erl = rank_envelope(&obs[0].l_minus_r, simulated, 0.05);
    assert_eq!(erl.extreme_rank, 1);
    assert!(erl.p <= 0.05, "ERL p {}", erl.p);
    assert!(erl.departure.iter().all(|&d| d >= 0), "{:?}", erl.departure);
}

/// Same seed, same numbers for 1 and 2 threads: the whole run serialised.
#[test]
fn identical_for_one_and_two_threads() {
    let shape = holed();
    let sampler = Sampler::new(&shape).unwrap();
    let pts = sampler.sample(40, &mut stream(8, "threads", 0));
    let (windows, _) = build_windows(&pts, 0.7, &[], &WindowOptions::default());
    let options = ScalesOptions {
        corrections: Correction::ALL.to_vec(),
        tested: vec![Correction::Isotropic, Correction::Border],
        rmax: Some(1.5),
        steps: 6,
        sims: 9,
        seed: 4,
        alpha: 0.1,
    };
    let run = |threads: usize| {
        let pool = rayon::ThreadPoolBuilder::new()
            .num_threads(threads)
            .build()
            .unwrap();
        pool.install(|| {
            let r = run_scales(&pts, &windows, "m", &options, &|| {});
            serde_json::to_string(&r).unwrap()
        })
    };
    let one = run(1);
    assert_eq!(one, run(2));
    assert!(one.contains("\"statistic\""));
}
