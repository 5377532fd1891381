//! One simulation test: 999 CSR patterns of n = 1 000 and n = 10 000 points
//! in a polygon window with a hole, each sampled and measured (mean
//! nearest-neighbour distance), as the audit's `simulation` row does; and
//! the same with the guard-zone statistic taken on every pattern, as the
//! full sweep does. Issue 10's goals: under 0.15 s and 1.5 s on two cores.

use criterion::{BenchmarkId, Criterion, criterion_group, criterion_main};
use patternproof_audit::simulation::{Measure, simulate};
use patternproof_benches::square_with_hole;
use patternproof_window::Outline;
use patternproof_window::Sampler;
use std::hint::black_box;
use std::time::Duration;

fn simulation(c: &mut Criterion) {
    let shape = square_with_hole();
    let sampler = Sampler::new(&shape).expect("the window has area");
    let mut g = c.benchmark_group("simulation-999");
    g.sample_size(10)
        .warm_up_time(Duration::from_millis(500))
        .measurement_time(Duration::from_secs(4));
    let plain = Measure {
        outline: None,
        guard: None,
        rectangle: None,
    };
    for n in [1_000usize, 10_000] {
        g.bench_function(BenchmarkId::new("mean-nn", n), |b| {
            b.iter(|| simulate(&sampler, n, 999, 1, "bench", black_box(plain), &|| {}))
        });
        // Guard width: the CSR mean spacing 0.5·sqrt(A/n).
        let w = 0.5 * (8_800.0 / n as f64).sqrt();
        let outline = Outline::new(&shape, Some(w));
        let guarded = Measure {
            outline: Some(&outline),
            guard: Some(w),
            rectangle: None,
        };
        g.bench_function(BenchmarkId::new("mean-nn+guard-zone", n), |b| {
            b.iter(|| simulate(&sampler, n, 999, 1, "bench", black_box(guarded), &|| {}))
        });
    }
    g.finish();
}

criterion_group!(benches, simulation);
criterion_main!(benches);
