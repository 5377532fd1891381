//! `pp-read POINTS.csv`: load a point file exactly as `patternproof audit`
//! does (`Dataset::load`: streaming CSV reader, checks, duplicate count)
//! and print the point count, the time taken and the peak resident memory
//! (`VmHWM`), next to the 16 bytes per point the coordinates themselves
//! need. For the scale figures of issue 9 in docs/performance.md.

use patternproof_io::{Dataset, LoadOptions};
use std::path::PathBuf;
use std::time::Instant;

fn main() {
    let Some(path) = std::env::args().nth(1).map(PathBuf::from) else {
        eprintln!("usage: pp-read POINTS.csv");
        std::process::exit(2);
    };
    let before = patternproof_benches::peak_rss_kib().unwrap_or(0);
    let start = Instant::now();
    let data = match Dataset::load(&path, &[], &LoadOptions::default()) {
        Ok(d) => d,
        Err(e) => {
            eprintln!("pp-read: {e}");
            std::process::exit(2);
        }
    };
    let seconds = start.elapsed().as_secs_f64();
    let peak = patternproof_benches::peak_rss_kib().unwrap_or(0);
    let n = data.points.len();
    let coords_mib = (n * 16) as f64 / (1024.0 * 1024.0);
    println!(
        "n={n} duplicates={} seconds={seconds:.2} peak_rss_mib={:.1} start_rss_mib={:.1} coordinates_mib={coords_mib:.1}",
        data.duplicates,
        peak as f64 / 1024.0,
        before as f64 / 1024.0,
    );
}
