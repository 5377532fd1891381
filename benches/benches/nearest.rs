//! The nearest-neighbour engine alone (`nearest_distances`, the audit's
//! choice of bucket grid, Z-order tree or R*-tree), on seeded uniform and
//! Thomas-clustered points at 1 k to 1 M, plus torus distances of the
//! uniform points in their square.

use criterion::{BenchmarkId, Criterion, Throughput, criterion_group, criterion_main};
use patternproof_benches::{SIDE, SIZES, thomas, uniform};
use patternproof_core::Rectangle;
use patternproof_core::nearest::nearest_distances;
use patternproof_core::toroidal::torus_nearest_distances;
use std::hint::black_box;
use std::time::Duration;

fn plane(c: &mut Criterion) {
    let mut g = c.benchmark_group("nearest");
    g.sample_size(10)
        .warm_up_time(Duration::from_millis(500))
        .measurement_time(Duration::from_secs(2));
    for &n in &SIZES {
        g.throughput(Throughput::Elements(n as u64));
        for (name, points) in [("uniform", uniform(n, 1)), ("thomas", thomas(n, 1))] {
            g.bench_with_input(BenchmarkId::new(name, n), &points, |b, p| {
                b.iter(|| nearest_distances(black_box(p)))
            });
        }
        let square = Rectangle {
            min: [0.0, 0.0],
            max: [SIDE, SIDE],
        };
        g.bench_with_input(
            BenchmarkId::new("torus-uniform", n),
            &uniform(n, 1),
            |b, p| b.iter(|| torus_nearest_distances(black_box(p), square)),
        );
    }
    g.finish();
}

criterion_group!(benches, plane);
criterion_main!(benches);
