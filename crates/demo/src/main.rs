//! Writes patternproof's demo data: an invented restored meadow, surveyed
//! on a local grid in metres, with the burrows of a ground-nesting bee.
//!
//! The scenario is made up. The site outline is an irregular polygon with
//! a pond cut out; burrows come in aggregations (a Thomas cluster process:
//! parents uniform in the site, offspring normally scattered around them)
//! plus scattered single nests, and none lie in the pond. The survey grid's
//! origin is the site's south-west corner, so every coordinate lies between
//! 0 and 180: exactly the kind of planar data a careless reader might take
//! for degrees.
//!
//! Usage: `cargo run -p patternproof-demo -- [OUT_DIR]` (default
//! `demo-data`). Same seed, same bytes.

use geo::{Contains, LineString, Point, Polygon};
use rand::{RngExt, SeedableRng};
use rand_chacha::ChaCha8Rng;
use std::fmt::Write as _;
use std::path::{Path, PathBuf};

/// The seed of the published demo files.
const SEED: u64 = 20_261_202;

fn main() {
    let args: Vec<String> = std::env::args().skip(1).collect();
    if args.first().map(String::as_str) == Some("--bench-sites") {
        // `--bench-sites DIR COUNT N`: synthetic sites for bench/sites.sh.
        let parse = |k: usize, d: usize| args.get(k).and_then(|v| v.parse().ok()).unwrap_or(d);
        let dir = PathBuf::from(args.get(1).cloned().unwrap_or_else(|| "bench-sites".into()));
        if let Err(e) = write_bench_sites(&dir, parse(2, 200), parse(3, 500)) {
            eprintln!("patternproof-demo: error: {e}");
            std::process::exit(2);
        }
        return;
    }
    let out: PathBuf = args
        .first()
        .map(PathBuf::from)
        .unwrap_or_else(|| "demo-data".into());
    if let Err(e) = write_all(&out) {
        eprintln!("patternproof-demo: error: {e}");
        std::process::exit(2);
    }
}

fn write_all(out: &Path) -> std::io::Result<()> {
    std::fs::create_dir_all(out)?;
    let site = meadow_outline();
    let pond = pond_outline();
    let region = Polygon::new(site.clone(), vec![pond.clone()]);
    let burrows = burrows(&region, SEED);

    let mut csv = String::from("burrow,x,y\n");
    for (i, p) in burrows.iter().enumerate() {
        let _ = writeln!(csv, "B{:03},{:.2},{:.2}", i + 1, p[0], p[1]);
    }
    std::fs::write(out.join("meadow-burrows.csv"), csv)?;

    let ring = |r: &LineString<f64>| -> serde_json::Value {
        serde_json::Value::Array(
            r.coords()
                .map(|c| serde_json::json!([round2(c.x), round2(c.y)]))
                .collect(),
        )
    };
    let boundary = serde_json::json!({
        "type": "FeatureCollection",
        "crs": { "type": "name", "properties": { "name": "local survey grid, metres" } },
        "features": [{
            "type": "Feature",
            "properties": { "name": "meadow", "note": "invented site; the pond is a hole" },
            "geometry": { "type": "Polygon", "coordinates": [ring(&site), ring(&pond)] }
        }]
    });
    let mut text = serde_json::to_string_pretty(&boundary).map_err(std::io::Error::other)?;
    text.push('\n');
    std::fs::write(out.join("meadow-boundary.geojson"), text)?;
    println!(
        "wrote {} burrows and the site outline to {}",
        burrows.len(),
        out.display()
    );
    write_plots(out)?;
    write_marsh_hare_track(out)?;
    Ok(())
}

/// Six invented 40 m × 40 m survey plots of the same meadow, laid out 100 m
/// apart on the survey grid, for the multi-site run. By construction:
/// `plot-a` and `plot-b` are strongly clustered and `plot-c` is strongly
/// regular under every window; `plot-d` (nests only in a central 16 m
/// square) and `plot-e` (nests only in a 14 m strip along the west edge)
/// look clustered inside their plot boundary and random inside their own
/// hull, so they are window-sensitive; `plot-f` has too few nests to test.
fn write_plots(out: &Path) -> std::io::Result<()> {
    let dir = out.join("plots");
    std::fs::create_dir_all(&dir)?;
    let mut rng = ChaCha8Rng::seed_from_u64(SEED + 1);
    let mut features = Vec::new();
    for (k, name) in ["plot-a", "plot-b", "plot-c", "plot-d", "plot-e", "plot-f"]
        .iter()
        .enumerate()
    {
        let x0 = 100.0 * k as f64;
        let local: Vec<[f64; 2]> = match *name {
            "plot-a" => thomas(&mut rng, 5, 8, 1.5),
            "plot-b" => thomas(&mut rng, 6, 7, 1.2),
            "plot-c" => {
                let mut v = Vec::new();
                for i in 0..8 {
                    for j in 0..8 {
                        v.push([
                            4.25 + 4.5 * i as f64 + (rng.random::<f64>() - 0.5),
                            4.25 + 4.5 * j as f64 + (rng.random::<f64>() - 0.5),
                        ]);
                    }
                }
                v
            }
            "plot-d" => (0..30)
                .map(|_| {
                    [
                        12.0 + 16.0 * rng.random::<f64>(),
                        12.0 + 16.0 * rng.random::<f64>(),
                    ]
                })
                .collect(),
            "plot-e" => (0..28)
                .map(|_| {
                    [
                        1.0 + 13.0 * rng.random::<f64>(),
                        1.0 + 38.0 * rng.random::<f64>(),
                    ]
                })
                .collect(),
            _ => (0..7)
                .map(|_| [40.0 * rng.random::<f64>(), 40.0 * rng.random::<f64>()])
                .collect(),
        };
        let mut csv = String::from("nest,x,y\n");
        for (i, p) in local.iter().enumerate() {
            let _ = writeln!(csv, "N{:02},{:.2},{:.2}", i + 1, p[0] + x0, p[1]);
        }
        std::fs::write(dir.join(format!("{name}.csv")), csv)?;
        features.push(serde_json::json!({
            "type": "Feature",
            "properties": { "name": name },
            "geometry": { "type": "Polygon", "coordinates": [[
                [x0, 0.0], [x0 + 40.0, 0.0], [x0 + 40.0, 40.0], [x0, 40.0], [x0, 0.0]
            ]] }
        }));
    }
    let fc = serde_json::json!({
        "type": "FeatureCollection",
        "crs": { "type": "name", "properties": { "name": "local survey grid, metres" } },
        "features": features
    });
    let mut text = serde_json::to_string_pretty(&fc).map_err(std::io::Error::other)?;
    text.push('\n');
    std::fs::write(out.join("plots-boundaries.geojson"), text)?;
    println!("wrote six survey plots to {}", dir.display());
    Ok(())
}

/// `count` synthetic sites of `n` points each (every third clustered, the
/// rest CSR in a 100 m square), seeded, for the multi-site benchmark.
fn write_bench_sites(dir: &Path, count: usize, n: usize) -> std::io::Result<()> {
    std::fs::create_dir_all(dir)?;
    let mut rng = ChaCha8Rng::seed_from_u64(SEED + 2);
    for k in 0..count {
        let pts: Vec<[f64; 2]> = if k % 3 == 0 {
            thomas(&mut rng, n / 10, 10, 1.5)
                .into_iter()
                .map(|p| [p[0] * 2.5, p[1] * 2.5])
                .collect()
        } else {
            (0..n)
                .map(|_| [100.0 * rng.random::<f64>(), 100.0 * rng.random::<f64>()])
                .collect()
        };
        let mut csv = String::from("x,y\n");
        for p in pts {
            let _ = writeln!(csv, "{:.3},{:.3}", p[0], p[1]);
        }
        std::fs::write(dir.join(format!("site-{k:03}.csv")), csv)?;
    }
    println!(
        "wrote {count} synthetic sites of {n} points to {}",
        dir.display()
    );
    Ok(())
}

/// A Thomas cluster process in a 40 m square plot (offspring kept inside).
fn thomas(rng: &mut ChaCha8Rng, parents: usize, per: usize, sigma: f64) -> Vec<[f64; 2]> {
    let mut v = Vec::new();
    for _ in 0..parents {
        let c = [
            4.0 + 32.0 * rng.random::<f64>(),
            4.0 + 32.0 * rng.random::<f64>(),
        ];
        let mut made = 0;
        while made < per {
            let (u1, u2): (f64, f64) = (rng.random::<f64>().max(1e-12), rng.random());
            let r = (-2.0 * u1.ln()).sqrt() * sigma;
            let p = [
                c[0] + r * (std::f64::consts::TAU * u2).cos(),
                c[1] + r * (std::f64::consts::TAU * u2).sin(),
            ];
            if (0.0..40.0).contains(&p[0]) && (0.0..40.0).contains(&p[1]) {
                v.push(p);
                made += 1;
            }
        }
    }
    v
}

fn round2(x: f64) -> f64 {
    (x * 100.0).round() / 100.0
}

/// An irregular field edge, counter-clockwise, metres.
fn meadow_outline() -> LineString<f64> {
    LineString::from(vec![
        (0.0, 12.0),
        (38.0, 0.0),
        (96.0, 4.0),
        (150.0, 0.0),
        (176.0, 22.0),
        (172.0, 70.0),
        (180.0, 104.0),
        (140.0, 118.0),
        (84.0, 112.0),
        (40.0, 120.0),
        (8.0, 96.0),
        (14.0, 54.0),
        (0.0, 12.0),
    ])
}

/// The pond, clockwise (a hole), roughly an ellipse of 34 × 22 m.
fn pond_outline() -> LineString<f64> {
    let (cx, cy, rx, ry) = (108.0, 62.0, 17.0, 11.0);
    let k = 16;
    let mut v: Vec<(f64, f64)> = (0..k)
        .map(|i| {
            let t = -(i as f64) * std::f64::consts::TAU / k as f64;
            (round2(cx + rx * t.cos()), round2(cy + ry * t.sin()))
        })
        .collect();
    v.push(v[0]);
    LineString::from(v)
}

/// Thomas process (parents uniform, offspring N(parent, σ²) each axis)
/// plus scattered single nests, all kept inside the site and out of the pond.
fn burrows(region: &Polygon<f64>, seed: u64) -> Vec<[f64; 2]> {
    let mut rng = ChaCha8Rng::seed_from_u64(seed);
    let inside = |p: [f64; 2]| region.contains(&Point::new(p[0], p[1]));
    let uniform = |rng: &mut ChaCha8Rng| loop {
        let p = [rng.random::<f64>() * 180.0, rng.random::<f64>() * 120.0];
        if inside(p) {
            return p;
        }
    };
    let mut out = Vec::new();
    let (parents, per_parent, sigma) = (10, 6, 5.0);
    for _ in 0..parents {
        let c = uniform(&mut rng);
        let k = per_parent - 3 + (rng.random::<f64>() * 7.0) as usize;
        let mut made = 0;
        while made < k {
            // Box–Muller for a standard normal pair.
            let (u1, u2): (f64, f64) = (rng.random::<f64>().max(1e-12), rng.random());
            let r = (-2.0 * u1.ln()).sqrt() * sigma;
            let p = [
                c[0] + r * (std::f64::consts::TAU * u2).cos(),
                c[1] + r * (std::f64::consts::TAU * u2).sin(),
            ];
            if inside(p) {
                out.push([round2(p[0]), round2(p[1])]);
                made += 1;
            }
        }
    }
    for _ in 0..80 {
        let p = uniform(&mut rng);
        out.push([round2(p[0]), round2(p[1])]);
    }
    out
}

/// An invented telemetry track of a fictional marsh hare on a local grid in
/// metres: 600 fixes of a seeded correlated random walk that keeps returning
/// to two core areas (the western one used about twice as much), for
/// `patternproof density`.
fn write_marsh_hare_track(out: &Path) -> std::io::Result<()> {
    let mut rng = ChaCha8Rng::seed_from_u64(SEED + 8);
    let mut normal = move || {
        let u: f64 = rng.random::<f64>().max(1e-12);
        let v: f64 = rng.random::<f64>();
        (
            (-2.0 * u.ln()).sqrt() * (std::f64::consts::TAU * v).cos(),
            v,
        )
    };
    let cores: [[f64; 2]; 2] = [[420.0, 610.0], [1480.0, 930.0]];
    let (mut x, mut y) = (cores[0][0], cores[0][1]);
    let mut heading: f64 = 0.3;
    let mut core = 0usize;
    let mut csv = String::from("fix,x,y\n");
    for fix in 1..=600 {
        // Switch core now and then: 1 in 100 fixes from the west, 1 in 50 from the east.
        let (_, u) = normal();
        if (core == 0 && u < 0.01) || (core == 1 && u < 0.02) {
            core = 1 - core;
        }
        let (z, _) = normal();
        heading += 0.7 * z;
        let (cx, cy) = (cores[core][0], cores[core][1]);
        let d = ((cx - x).powi(2) + (cy - y).powi(2)).sqrt();
        if d > 120.0 {
            // Turn part of the way towards the core.
            let want = (cy - y).atan2(cx - x);
            let mut diff = want - heading;
            while diff > std::f64::consts::PI {
                diff -= std::f64::consts::TAU;
            }
            while diff < -std::f64::consts::PI {
                diff += std::f64::consts::TAU;
            }
            heading += 0.5 * diff;
        }
        let (z2, _) = normal();
        let step = if d > 300.0 { 90.0 } else { 30.0 } * (1.0 + 0.4 * z2).max(0.1);
        x += step * heading.cos();
        y += step * heading.sin();
        let _ = writeln!(csv, "{fix},{:.1},{:.1}", x, y);
    }
    std::fs::write(out.join("marsh-hare-track.csv"), csv)?;
    println!(
        "wrote 600 fixes of the invented marsh hare track to {}",
        out.display()
    );
    Ok(())
}
