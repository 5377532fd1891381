//! Uniform sampling in a polygon window with a hole (triangulated once,
//! then a triangle picked by area and a point folded into it), 1 k to 1 M
//! points per pattern.

use criterion::{BenchmarkId, Criterion, Throughput, criterion_group, criterion_main};
use patternproof_audit::streams::stream;
use patternproof_benches::{SIZES, square_with_hole};
use patternproof_window::Sampler;
use std::hint::black_box;
use std::time::Duration;

fn sampling(c: &mut Criterion) {
    let shape = square_with_hole();
    let sampler = Sampler::new(&shape).expect("the window has area");
    let mut g = c.benchmark_group("sampling");
    g.sample_size(10)
        .warm_up_time(Duration::from_millis(500))
        .measurement_time(Duration::from_secs(2));
    for &n in &SIZES {
        g.throughput(Throughput::Elements(n as u64));
        let mut out = Vec::with_capacity(n);
        g.bench_function(BenchmarkId::new("square-with-hole", n), |b| {
            let mut k = 0u64;
            b.iter(|| {
                k += 1;
                sampler.sample_into(n, &mut stream(7, "bench", k), &mut out);
                black_box(out.len())
            })
        });
    }
    g.bench_function("triangulate", |b| {
        b.iter(|| Sampler::new(black_box(&shape)))
    });
    g.finish();
}

criterion_group!(benches, sampling);
criterion_main!(benches);
