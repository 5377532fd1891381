//! Seeded synthetic data for patternproof's benchmarks and for
//! `bench/compare`.
//!
//! Everything is invented and reproducible: the same seed gives the same
//! points, bit for bit, on every platform (ChaCha8 streams, no thread-local
//! generator). The shapes:
//!
//! * [`uniform`]: complete spatial randomness in a square;
//! * [`thomas`]: a Thomas cluster process with tight clusters (parents
//!   uniform, offspring normally scattered around them, about
//!   [`THOMAS_PER_CLUSTER`] each), the hard case for a bucket grid;
//! * [`square_with_hole`]: a square window with a square hole, for the
//!   sampling and simulation benchmarks.
//!
//! The criterion benchmarks live in `benches/`; the programs in `src/bin/`
//! (`pp-points`, `pp-nn`, `pp-read`) are what `bench/compare` and the
//! memory measurements of `docs/performance.md` run.

use geo::{LineString, MultiPolygon, Polygon};
use patternproof_core::Xy;
use rand::{RngExt, SeedableRng};
use rand_chacha::ChaCha8Rng;

/// Side of the square the synthetic points fill (metres, say).
pub const SIDE: f64 = 10_000.0;

/// Mean number of offspring per parent in [`thomas`].
pub const THOMAS_PER_CLUSTER: usize = 100;

/// The sizes every benchmark runs at.
pub const SIZES: [usize; 4] = [1_000, 10_000, 100_000, 1_000_000];

/// `n` independent uniform points in `[0, SIDE)²`.
pub fn uniform(n: usize, seed: u64) -> Vec<Xy> {
    let mut rng = ChaCha8Rng::seed_from_u64(seed);
    (0..n)
        .map(|_| [rng.random::<f64>() * SIDE, rng.random::<f64>() * SIDE])
        .collect()
}

/// `n` points of a Thomas cluster process in `[0, SIDE)²`: n / 100 parents
/// uniform in the square, each point assigned to a parent at random and
/// scattered around it with a normal deviation σ = 0.05 × the mean parent
/// spacing on each axis (tight clusters, far apart). Offspring falling
/// outside the square are drawn again, so exactly `n` points result.
pub fn thomas(n: usize, seed: u64) -> Vec<Xy> {
    let mut rng = ChaCha8Rng::seed_from_u64(seed);
    let parents = (n / THOMAS_PER_CLUSTER).max(1);
    let centres: Vec<Xy> = (0..parents)
        .map(|_| [rng.random::<f64>() * SIDE, rng.random::<f64>() * SIDE])
        .collect();
    let sigma = 0.05 * SIDE / (parents as f64).sqrt();
    let mut out = Vec::with_capacity(n);
    while out.len() < n {
        let c = centres[((rng.random::<f64>() * parents as f64) as usize).min(parents - 1)];
        // Box–Muller: two independent standard normal deviates.
        let (u1, u2): (f64, f64) = (rng.random::<f64>().max(1e-300), rng.random());
        let r = (-2.0 * u1.ln()).sqrt() * sigma;
        let t = std::f64::consts::TAU * u2;
        let p = [c[0] + r * t.cos(), c[1] + r * t.sin()];
        if (0.0..SIDE).contains(&p[0]) && (0.0..SIDE).contains(&p[1]) {
            out.push(p);
        }
    }
    out
}

/// A 100 × 100 square with a 40 × 30 rectangular hole off centre:
/// area 10 000 − 1 200 = 8 800.
pub fn square_with_hole() -> MultiPolygon<f64> {
    let outer = LineString::from(vec![
        (0.0, 0.0),
        (100.0, 0.0),
        (100.0, 100.0),
        (0.0, 100.0),
        (0.0, 0.0),
    ]);
    // Clockwise, as a hole.
    let hole = LineString::from(vec![
        (20.0, 50.0),
        (20.0, 80.0),
        (60.0, 80.0),
        (60.0, 50.0),
        (20.0, 50.0),
    ]);
    MultiPolygon::new(vec![Polygon::new(outer, vec![hole])])
}

/// Write points as a CSV with header `x,y`, each value in Rust's shortest
/// round-trip form, so any reader (Python's `float` included) gets the
/// same doubles back.
pub fn write_csv(path: &std::path::Path, points: &[Xy]) -> std::io::Result<()> {
    use std::io::Write;
    let mut w = std::io::BufWriter::with_capacity(1 << 20, std::fs::File::create(path)?);
    writeln!(w, "x,y")?;
    for p in points {
        writeln!(w, "{},{}", p[0], p[1])?;
    }
    w.flush()
}

/// Peak resident memory of this process so far (`VmHWM` in
/// `/proc/self/status`), in KiB; `None` where that file does not exist.
pub fn peak_rss_kib() -> Option<u64> {
    let status = std::fs::read_to_string("/proc/self/status").ok()?;
    status
        .lines()
        .find_map(|l| l.strip_prefix("VmHWM:"))
        .and_then(|v| v.trim().trim_end_matches("kB").trim().parse().ok())
}
