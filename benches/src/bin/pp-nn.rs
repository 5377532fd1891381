//! `pp-nn POINTS.csv [RUNS]`: read a CSV with header `x,y` and time only
//! the exact nearest-neighbour computation (`nearest_distances`, the engine
//! the audit uses: bucket grid, R*-tree fallback) and the mean of the
//! distances, RUNS times (default 5). Prints one line:
//!
//! `n=… mean=… best_s=… runs_s=…,…`
//!
//! The mean is printed with 17 significant digits, enough to compare with
//! another engine to 1e-9 relative. Thread count: `RAYON_NUM_THREADS`.
//! `PP_ENGINE=curve|rstar` times one engine alone instead of the audit's
//! choice (`auto`, the default).

use patternproof_core::Xy;
use patternproof_core::nearest::{
    curve_tree_distances, mean, nearest_distances, tree_nearest_distances,
};
use std::io::BufRead;
use std::time::Instant;

fn main() {
    let args: Vec<String> = std::env::args().skip(1).collect();
    let Some(path) = args.first() else {
        eprintln!("usage: pp-nn POINTS.csv [RUNS]");
        std::process::exit(2);
    };
    let runs: usize = args.get(1).and_then(|r| r.parse().ok()).unwrap_or(5);
    let points = match read_xy(path) {
        Ok(p) => p,
        Err(e) => {
            eprintln!("pp-nn: {path}: {e}");
            std::process::exit(2);
        }
    };
    let engine = std::env::var("PP_ENGINE").unwrap_or_else(|_| "auto".into());
    let run: fn(&[Xy]) -> Option<Vec<f64>> = match engine.as_str() {
        "auto" => nearest_distances,
        "curve" => curve_tree_distances,
        "rstar" => tree_nearest_distances,
        other => {
            eprintln!("pp-nn: PP_ENGINE={other}: choose auto, curve or rstar");
            std::process::exit(2);
        }
    };
    let mut times = Vec::new();
    let mut result = None;
    for _ in 0..runs.max(1) {
        let start = Instant::now();
        let d = run(&points);
        let m = d.as_deref().and_then(mean);
        times.push(start.elapsed().as_secs_f64());
        result = m;
    }
    let Some(m) = result else {
        eprintln!("pp-nn: fewer than two points");
        std::process::exit(2);
    };
    let best = times.iter().copied().fold(f64::INFINITY, f64::min);
    let all: Vec<String> = times.iter().map(|t| format!("{t:.4}")).collect();
    println!(
        "n={} mean={m:.17e} best_s={best:.4} runs_s={}",
        points.len(),
        all.join(",")
    );
}

/// A plain `x,y` reader (the header line is skipped): the timing is about
/// the nearest-neighbour engine, not the full input checks of the CLI.
fn read_xy(path: &str) -> std::io::Result<Vec<Xy>> {
    let file = std::io::BufReader::with_capacity(1 << 20, std::fs::File::open(path)?);
    let mut out = Vec::new();
    for (k, line) in file.lines().enumerate() {
        let line = line?;
        if k == 0 {
            continue;
        }
        let bad =
            || std::io::Error::new(std::io::ErrorKind::InvalidData, format!("line {}", k + 1));
        let (x, y) = line.split_once(',').ok_or_else(bad)?;
        out.push([
            x.trim().parse().map_err(|_| bad())?,
            y.trim().parse().map_err(|_| bad())?,
        ]);
    }
    Ok(out)
}
