//! Complete spatial randomness in the exact window, and the statistics the
//! audit takes on every pattern, observed or simulated.
//!
//! Conditional on n (Besag & Diggle 1977): each simulated pattern is n
//! independent uniform points in the window, holes honoured
//! (`patternproof_window::sampling`). The same [`PatternStats`] is computed for the
//! observed pattern and for each simulation, so the simulation rows and the
//! false-alarm rates of the analytic rows come from one pass.

use crate::streams::stream;
use patternproof_core::Rectangle;
use patternproof_core::Xy;
use patternproof_core::nearest::{Distances, mean};
use patternproof_window::{Outline, Sampler};
use rayon::prelude::*;

/// What to measure on each pattern.
#[derive(Debug, Clone, Copy)]
pub struct Measure<'a> {
    /// Window outline, indexed, for the guard zone.
    pub outline: Option<&'a Outline>,
    /// Guard width for the border method; `None` skips it.
    pub guard: Option<f64>,
    /// The rectangle, for torus distances; `None` skips them.
    pub rectangle: Option<Rectangle>,
}

/// The statistics of one pattern.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct PatternStats {
    /// Mean nearest-neighbour distance over all points.
    pub mean_nn: f64,
    /// Mean over the focal points of the guard zone, with their count.
    pub border: Option<(f64, usize)>,
    /// Mean torus nearest-neighbour distance.
    pub torus_mean: Option<f64>,
}

/// Measure one pattern; `None` for fewer than two points.
pub fn measure(points: &[Xy], m: Measure<'_>) -> Option<PatternStats> {
    measure_with(points, m, &mut Distances::new())
}

/// [`measure`] for a pattern whose plain nearest-neighbour distances
/// `plane` (input order) are already known; no torus distances (`m` must
/// not ask for them). `None` for fewer than two points or a length
/// mismatch.
pub fn measure_known(points: &[Xy], m: Measure<'_>, plane: &[f64]) -> Option<PatternStats> {
    if points.len() < 2 || plane.len() != points.len() || m.rectangle.is_some() {
        return None;
    }
    Some(stats_from(points, m, plane, &[]))
}

/// [`measure`] with the distance buffers supplied by the caller, so a loop
/// over many patterns reuses them instead of allocating per pattern.
fn measure_with(points: &[Xy], m: Measure<'_>, ws: &mut Distances) -> Option<PatternStats> {
    // Plane and torus distances from one bucket grid over the pattern.
    if !ws.measure(points, m.rectangle) {
        return None;
    }
    Some(stats_from(points, m, &ws.plane, &ws.torus))
}

/// The statistics from the plain distances `d` and the torus distances
/// (empty when not measured).
fn stats_from(points: &[Xy], m: Measure<'_>, d: &[f64], torus: &[f64]) -> PatternStats {
    let mean_nn = mean(d).unwrap_or(f64::NAN);
    let border = match (m.outline, m.guard) {
        (Some(outline), Some(w)) => {
            // A focal point's neighbour may be any point, so its distance is
            // the one already found over the whole pattern. Summed in input
            // order, exactly as `mean` sums a slice.
            let mut focal = 0usize;
            let sum: f64 = points
                .iter()
                .zip(d)
                .filter(|(p, _)| outline.clear_of(**p, w))
                .map(|(_, &di)| {
                    focal += 1;
                    di
                })
                .sum();
            let mean_focal = if focal == 0 {
                f64::NAN
            } else {
                sum / focal as f64
            };
            Some((mean_focal, focal))
        }
        _ => None,
    };
    let torus_mean = mean(torus);
    PatternStats {
        mean_nn,
        border,
        torus_mean,
    }
}

/// `sims` CSR patterns of `n` points in the sampler's window, measured.
/// Stream `k` of label `label` drives simulation `k`, so the result is the
/// same for any thread count. `tick` is called once per simulation. Each
/// worker keeps one point buffer and one set of distance buffers for all
/// the patterns it draws (`map_init`), so nothing is allocated per pattern.
pub fn simulate(
    sampler: &Sampler,
    n: usize,
    sims: usize,
    seed: u64,
    label: &str,
    m: Measure<'_>,
    tick: &(dyn Fn() + Sync),
) -> Vec<PatternStats> {
    if n < 2 {
        return Vec::new();
    }
    // Collected by index straight into one vector of `sims` entries (a
    // flattened collect would gather chunks in lists and copy them again).
    // A pattern of n ≥ 2 points always measures, so the fallback below is
    // never taken.
    (0..sims)
        .into_par_iter()
        .map_init(
            || (Vec::with_capacity(n), Distances::new()),
            |(pts, ws), k| {
                let mut rng = stream(seed, label, k as u64);
                sampler.sample_into(n, &mut rng, pts);
                let s = measure_with(pts, m, ws);
                tick();
                s.unwrap_or(PatternStats {
                    mean_nn: f64::NAN,
                    border: None,
                    torus_mean: None,
                })
            },
        )
        .collect()
}

/// Bytes a window's simulations hold per simulated pattern while the
/// window is simulated: its [`PatternStats`] until the rows are made, and
/// the sorted copy of the mean distances the quantiles take.
pub const BYTES_WHILE_SIMULATING: u64 = std::mem::size_of::<PatternStats>() as u64 + 8;

/// Bytes kept per simulated pattern of every window until the report is
/// written: its mean distance (the simulation row and `simulation.svg`
/// need the whole distribution: rank p, quantiles, histogram), held by the
/// audit and by the report made from it.
pub const BYTES_KEPT: u64 = 2 * 8;

/// Bytes per point of the data set beyond the points themselves: window
/// membership lists (8 per window), the centred copy and a window's own
/// copy (16 + 16), the observed distances and their grid (about 56), and
/// on each thread one simulated pattern with its grid and distances
/// (about 90).
pub fn bytes_per_point(windows: usize, threads: usize) -> u64 {
    8 * windows as u64 + 88 + 90 * threads as u64
}

/// The memory an audit needs beyond its input: `n` points, `windows`
/// windows with an outline (those simulated), `threads` threads, `sims`
/// simulations per window. Saturates rather than wrapping.
pub fn run_bytes(n: usize, windows: usize, threads: usize, sims: usize) -> u64 {
    let per_sim = BYTES_WHILE_SIMULATING + BYTES_KEPT * windows as u64;
    (n as u64)
        .saturating_mul(bytes_per_point(windows, threads))
        .saturating_add((sims as u64).saturating_mul(per_sim))
}

/// Seconds one thread takes to draw and measure one CSR pattern of
/// `points.len()` points with every statistic (nearest neighbours, guard
/// zone, torus), from a short trial in the points' bounding rectangle:
/// patterns are drawn until `enough` seconds have passed or `most` are
/// done. For forecasts only; it draws from its own stream and changes no
/// result. `None` for fewer than two points or a degenerate rectangle.
pub fn trial_seconds(points: &[Xy], enough: f64, most: usize) -> Option<f64> {
    let n = points.len();
    let (mut lo, mut hi) = ([f64::INFINITY; 2], [f64::NEG_INFINITY; 2]);
    for p in points {
        for k in 0..2 {
            lo[k] = lo[k].min(p[k]);
            hi[k] = hi[k].max(p[k]);
        }
    }
    let (w, h) = (hi[0] - lo[0], hi[1] - lo[1]);
    if n < 2 || !(w > 0.0 && h > 0.0 && w.is_finite() && h.is_finite()) {
        return None;
    }
    let shape = geo::MultiPolygon::new(vec![
        geo::Rect::new(geo::coord! { x: 0.0, y: 0.0 }, geo::coord! { x: w, y: h }).to_polygon(),
    ]);
    let sampler = Sampler::new(&shape)?;
    let guard = 0.5 * (w * h / n as f64).sqrt();
    let outline = Outline::new(&shape, Some(guard));
    let m = Measure {
        outline: Some(&outline),
        guard: Some(guard),
        rectangle: Some(Rectangle {
            min: [0.0, 0.0],
            max: [w, h],
        }),
    };
    // One thread, as each simulation runs on one thread of the pool.
    let pool = rayon::ThreadPoolBuilder::new()
        .num_threads(1)
        .build()
        .ok()?;
    pool.install(|| {
        let (mut pts, mut ws) = (Vec::with_capacity(n), Distances::new());
        let started = std::time::Instant::now();
        let mut done = 0usize;
        while done < most.max(1) {
            let mut rng = stream(0, "trial", done as u64);
            sampler.sample_into(n, &mut rng, &mut pts);
            measure_with(&pts, m, &mut ws)?;
            done += 1;
            if started.elapsed().as_secs_f64() >= enough {
                break;
            }
        }
        Some(started.elapsed().as_secs_f64() / done as f64)
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    /// The same seed gives bit-identical results on 1 and 2 threads.
    #[test]
    fn identical_for_one_and_two_threads() {
        let sq = crate::test_shapes::rectangle(50.0, 20.0);
        let sampler = Sampler::new(&sq).expect("rectangle has area");
        let m = Measure {
            outline: Some(&Outline::new(&sq, Some(2.0))),
            guard: Some(2.0),
            rectangle: Some(Rectangle {
                min: [0.0, 0.0],
                max: [50.0, 20.0],
            }),
        };
        let run = |threads| {
            rayon::ThreadPoolBuilder::new()
                .num_threads(threads)
                .build()
                .expect("thread pool")
                .install(|| simulate(&sampler, 40, 64, 11, "bbox", m, &|| {}))
        };
        assert_eq!(run(1), run(2));
    }
}

#[cfg(test)]
mod budget {
    use super::*;

    /// By hand: a pattern's statistics take 48 bytes (three f64, a count
    /// and two tags, padded), so 56 while simulating; 7 windows keep
    /// 7 × 16 more. A billion simulations of the demo's 143 points then
    /// need 168 GB, far beyond a workstation: the command refuses them.
    #[test]
    fn figures_by_hand() {
        assert_eq!(BYTES_WHILE_SIMULATING, 56);
        assert_eq!(bytes_per_point(7, 2), 56 + 88 + 180);
        assert_eq!(
            run_bytes(143, 7, 2, 1_000_000_000),
            143 * 324 + 1_000_000_000 * (56 + 112)
        );
        assert_eq!(run_bytes(usize::MAX, 7, 2, usize::MAX), u64::MAX);
        // The trial measures real patterns; only its being a positive
        // number is checked here, never its value.
        let pts: Vec<Xy> = (0..50)
            .map(|k| [f64::from(k % 7), f64::from(k / 7)])
            .collect();
        assert!(trial_seconds(&pts, 0.0, 2).is_some_and(|s| s >= 0.0));
        assert_eq!(trial_seconds(&pts[..1], 0.0, 2), None);
    }
}

#[cfg(test)]
mod csr_sanity {
    use super::*;
    use approx::abs_diff_eq;

    /// Clark & Evans (1954): under CSR the mean nearest-neighbour distance
    /// is 0.5·sqrt(A/n); on a torus there is no edge bias, so the mean R
    /// over many seeded CSR patterns is 1 within its standard error. With
    /// n = 200 fixed (a binomial rather than Poisson pattern) the exact mean
    /// exceeds the Poisson value by about 1/(8n) = 0.06 %, far inside the
    /// tolerance.
    #[test]
    fn mean_ratio_on_a_torus_is_one() {
        let sq = crate::test_shapes::rectangle(30.0, 20.0);
        let sampler = Sampler::new(&sq).expect("rectangle has area");
        let m = Measure {
            outline: None,
            guard: None,
            rectangle: Some(Rectangle {
                min: [0.0, 0.0],
                max: [30.0, 20.0],
            }),
        };
        let n = 200;
        let stats = simulate(&sampler, n, 400, 2026, "torus-sanity", m, &|| {});
        let expected = 0.5 * (600.0 / n as f64).sqrt();
        let r: Vec<f64> = stats
            .iter()
            .map(|s| s.torus_mean.expect("rectangle gives torus distances") / expected)
            .collect();
        let k = r.len() as f64;
        let mean = r.iter().sum::<f64>() / k;
        let sd = (r.iter().map(|x| (x - mean).powi(2)).sum::<f64>() / (k - 1.0)).sqrt();
        let se = sd / k.sqrt();
        assert!(
            abs_diff_eq!(mean, 1.0, epsilon = 3.0 * se),
            "mean R {mean}, se {se}"
        );
        // The plain (uncorrected) mean in the same square is biased upward.
        let plain: f64 = stats.iter().map(|s| s.mean_nn / expected).sum::<f64>() / k;
        assert!(plain > 1.0 + 3.0 * se, "plain mean R {plain}");
    }
}
