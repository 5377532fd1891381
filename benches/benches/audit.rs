//! The whole sweep (`run_audit`: windows, observed statistics, simulations,
//! rows, flip thresholds, summary), without file reading or report writing:
//! the demo meadow with every edge handling and 999 simulations per window;
//! seeded uniform points at 1 k to 1 M with the analytic edge handlings
//! only (`--sims 0`); and 1 k and 10 k with the default 999 simulations.

use criterion::{BenchmarkId, Criterion, criterion_group, criterion_main};
use patternproof_audit::window::NamedShape;
use patternproof_audit::{AuditOptions, Edge, run_audit};
use patternproof_benches::{SIZES, uniform};
use patternproof_io::{Dataset, LoadOptions};
use std::hint::black_box;
use std::path::Path;
use std::time::Duration;

fn audit(c: &mut Criterion) {
    let mut g = c.benchmark_group("audit");
    g.sample_size(10)
        .warm_up_time(Duration::from_millis(500))
        .measurement_time(Duration::from_secs(3));

    let demo = Path::new(env!("CARGO_MANIFEST_DIR")).join("../demo-data");
    let data = Dataset::load(
        &demo.join("meadow-burrows.csv"),
        &[demo.join("meadow-boundary.geojson")],
        &LoadOptions::default(),
    )
    .expect("the demo data loads");
    let shapes: Vec<NamedShape> = data
        .boundaries
        .iter()
        .map(|b| NamedShape {
            name: b.name.clone(),
            source: b.file.display().to_string(),
            shape: b.shape.clone(),
        })
        .collect();
    let all = AuditOptions::default();
    g.bench_function("demo-999", |b| {
        b.iter(|| run_audit(black_box(&data.points), &shapes, &all, &|| {}))
    });

    let analytic = AuditOptions {
        edges: vec![Edge::None, Edge::Donnelly, Edge::Border, Edge::Toroidal],
        sims: 0,
        ..AuditOptions::default()
    };
    for &n in &SIZES {
        let points = uniform(n, 5);
        g.bench_with_input(BenchmarkId::new("analytic", n), &points, |b, p| {
            b.iter(|| run_audit(black_box(p), &[], &analytic, &|| {}))
        });
    }
    for n in [1_000usize, 10_000] {
        let points = uniform(n, 5);
        g.bench_with_input(BenchmarkId::new("default-999", n), &points, |b, p| {
            b.iter(|| run_audit(black_box(p), &[], &all, &|| {}))
        });
    }
    g.finish();
}

criterion_group!(benches, audit);
criterion_main!(benches);
