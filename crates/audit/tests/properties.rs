//! Properties of the sweep (proptest): the statistics do not depend on
//! where the pattern sits, how it is turned, its scale or the order of the
//! points; windows nest as geometry says they must.

#![allow(clippy::unwrap_used, missing_docs)]

use approx::{abs_diff_eq, relative_eq};
use patternproof_audit::{AuditOptions, Edge, WindowKind, run_audit};
use patternproof_core::Xy;
use proptest::prelude::*;

fn options() -> AuditOptions {
    AuditOptions {
        sims: 0,
        edges: vec![Edge::None, Edge::Donnelly, Edge::Border],
        ..AuditOptions::default()
    }
}

/// (window kind, edge) → (R, z, p) for the rotation-invariant windows.
fn stats(points: &[Xy]) -> Vec<(WindowKind, Edge, f64, f64, f64)> {
    let a = run_audit(points, &[], &options(), &|| {}).unwrap();
    a.results
        .iter()
        .filter_map(|r| {
            let w = a.windows.iter().find(|w| w.id == r.window)?;
            // The bounding box turns with the axes and the concave hull's
            // construction is not exactly rotation-equivariant; hull and
            // buffered hulls are.
            if matches!(w.kind, WindowKind::Hull | WindowKind::BufferedHull) {
                Some((w.kind, r.edge, r.ratio?, r.z?, r.p?))
            } else {
                None
            }
        })
        .collect()
}

fn pattern() -> impl Strategy<Value = Vec<Xy>> {
    prop::collection::vec((0.0f64..100.0, 0.0f64..60.0), 12..40)
        .prop_map(|v| v.into_iter().map(|(x, y)| [x, y]).collect())
}

fn close(
    a: &[(WindowKind, Edge, f64, f64, f64)],
    b: &[(WindowKind, Edge, f64, f64, f64)],
    tol: f64,
) -> bool {
    a.len() == b.len()
        && a.iter().zip(b).all(|(x, y)| {
            x.0 == y.0
                && x.1 == y.1
                && relative_eq!(y.2, x.2, epsilon = tol, max_relative = tol)
                && relative_eq!(y.3, x.3, epsilon = tol, max_relative = tol)
                && abs_diff_eq!(y.4, x.4, epsilon = tol.max(1e-12))
        })
}

/// 24 cases from a fixed seed, so every run (and CI) checks the same
/// patterns; `PROPTEST_CASES` and `PROPTEST_RNG_SEED` explore further, e.g.
/// `PROPTEST_CASES=20000 PROPTEST_RNG_SEED=7 cargo test --release -p
/// patternproof-audit --test properties`.
fn config() -> ProptestConfig {
    let from_env = ProptestConfig::default();
    ProptestConfig {
        cases: if std::env::var_os("PROPTEST_CASES").is_some() {
            from_env.cases
        } else {
            24
        },
        rng_seed: if std::env::var_os("PROPTEST_RNG_SEED").is_some() {
            from_env.rng_seed
        } else {
            proptest::test_runner::RngSeed::Fixed(0x7061_7474_6572_6e00)
        },
        ..from_env
    }
}

proptest! {
    #![proptest_config(config())]

    /// Translation, rotation and uniform scaling of the points (and so of
    /// every window drawn from them) leave R, z and p unchanged: the
    /// statistic is a ratio of lengths (Clark & Evans 1954; common
    /// practice: a test of scale-free structure). The guard width follows
    /// the scale because it defaults to the mean nearest-neighbour distance.
    #[test]
    fn invariant_under_similarity(points in pattern(), dx in -1e4f64..1e4, dy in -1e4f64..1e4,
                                  angle in 0.0f64..std::f64::consts::TAU, scale in 0.2f64..20.0) {
        let (s, c) = angle.sin_cos();
        let moved: Vec<Xy> = points
            .iter()
            .map(|p| [scale * (c * p[0] - s * p[1]) + dx, scale * (s * p[0] + c * p[1]) + dy])
            .collect();
        let a = stats(&points);
        let b = stats(&moved);
        prop_assert!(close(&a, &b, 1e-6), "{a:?}\n{b:?}");
    }

    /// Any permutation of the points gives the same statistics.
    #[test]
    fn invariant_under_permutation(points in pattern(), seed in any::<u64>()) {
        let mut shuffled = points.clone();
        let mut state = seed | 1;
        for i in (1..shuffled.len()).rev() {
            state ^= state << 13; state ^= state >> 7; state ^= state << 17;
            shuffled.swap(i, (state % (i as u64 + 1)) as usize);
        }
        prop_assert!(close(&stats(&points), &stats(&shuffled), 1e-9));
    }

    /// Windows: hull ≤ bbox; buffered hulls grow with the buffer and hold
    /// the hull (area and containment).
    #[test]
    fn windows_nest(points in pattern()) {
        let a = run_audit(&points, &[], &options(), &|| {}).unwrap();
        let area = |k: WindowKind| a.windows.iter().find(|w| w.kind == k).map(|w| w.area);
        let hull = area(WindowKind::Hull).unwrap();
        prop_assert!(hull <= area(WindowKind::Bbox).unwrap() * (1.0 + 1e-12));
        let mut buffered: Vec<(f64, f64)> = a
            .windows
            .iter()
            .filter(|w| w.kind == WindowKind::BufferedHull)
            .map(|w| (w.buffer.unwrap(), w.area))
            .collect();
        buffered.sort_by(|x, y| x.0.total_cmp(&y.0));
        prop_assert!(!buffered.is_empty());
        prop_assert!(buffered[0].1 > hull);
        prop_assert!(buffered.windows(2).all(|w| w[1].1 > w[0].1));
        for w in a.windows.iter().filter(|w| w.kind == WindowKind::BufferedHull) {
            prop_assert_eq!(w.points_outside, 0);
        }
    }
}

/// UTM-sized coordinates (5·10⁶ m) with points on a 1/64 m grid give the
/// same statistics as the same pattern near the origin, to 1e-9 relative
/// (issue 9's precision requirement; the dyadic grid makes the shift
/// itself exact, so any difference would be the computation's own).
#[test]
fn far_from_the_origin_same_statistics() {
    let mut state: u64 = 0x9e37_79b9_7f4a_7c15;
    let mut next = |m: u64| {
        state ^= state << 13;
        state ^= state >> 7;
        state ^= state << 17;
        (state % m) as f64 / 64.0
    };
    let near: Vec<Xy> = (0..80).map(|_| [next(6400), next(4000)]).collect();
    let far: Vec<Xy> = near.iter().map(|p| [p[0] + 5e6, p[1] + 5e6]).collect();
    let opts = AuditOptions {
        sims: 0,
        edges: vec![Edge::None, Edge::Donnelly, Edge::Border, Edge::Toroidal],
        ..AuditOptions::default()
    };
    let a = run_audit(&near, &[], &opts, &|| {}).unwrap();
    let b = run_audit(&far, &[], &opts, &|| {}).unwrap();
    let rel = |x: f64, y: f64| (x - y).abs() / x.abs().max(1e-300);
    assert_eq!(a.windows.len(), b.windows.len());
    for (w, v) in a.windows.iter().zip(&b.windows) {
        assert!(
            rel(w.area, v.area) < 1e-9,
            "{} area {} vs {}",
            w.id,
            w.area,
            v.area
        );
    }
    assert_eq!(a.results.len(), b.results.len());
    for (r, s) in a.results.iter().zip(&b.results) {
        for (x, y) in [(r.ratio, s.ratio), (r.z, s.z), (r.p, s.p)] {
            if let (Some(x), Some(y)) = (x, y) {
                assert!(rel(x, y) < 1e-9, "{}/{}: {x} vs {y}", r.window, r.edge);
            }
        }
    }
}

/// Found by `invariant_under_similarity`: with the default guard (the mean
/// nearest-neighbour distance) the `1x` buffered hull puts hull corners
/// exactly at the guard width. Measured on the buffer's polygon, whose
/// corners geo's buffer snaps to a grid, a corner of shallow turn (index 22)
/// lay 1.3e-8·w short of the guard width before a turn of 1.48 rad and
/// 1.4e-9·w beyond it after, and the focal count went from 15 to 16. The
/// guard is now measured from the exact buffer, so the guard-zone rows
/// agree (reference: the statistic's scale-free definition, Clark & Evans
/// 1954).
#[test]
fn buffered_hull_corner_at_the_guard_width_does_not_turn_with_the_data() {
    let points: Vec<Xy> = vec![
        [11.999231972939164, 10.552225862723796],
        [93.8503930809546, 4.874402939255958],
        [33.39759799291769, 26.094479755153014],
        [72.18656970854634, 16.206936322370517],
        [1.099044943562722, 17.41229618224697],
        [24.124889229093107, 42.29095623795132],
        [4.742233102818042, 40.5156002590593],
        [89.98838205694562, 21.05379035765372],
        [31.856766068023333, 17.024572515911277],
        [75.29468815511393, 18.75092013466643],
        [99.7964712620391, 45.4188901711388],
        [50.9055851608086, 40.03953229256689],
        [61.08911952519677, 50.63117017300114],
        [73.09699887885166, 22.763319059204076],
        [95.60996092171901, 32.75943090901348],
        [23.20562379368186, 33.6852187224403],
        [61.96842756269819, 0.7514122012489168],
        [4.52821131263028, 41.40249383772729],
        [54.74635018067944, 44.21437324415849],
        [0.2816090510407577, 18.437864130726464],
        [80.80253499481903, 45.131065491452645],
        [92.53927132544382, 11.320222280499111],
        [22.08222628981056, 44.26986005832984],
        [48.533635220750064, 13.275243514047608],
        [81.38409335013267, 2.822579951523539],
    ];
    let (dx, dy, angle, scale) = (
        -6260.556867662532,
        -1934.1334392656963,
        1.4820521818428054f64,
        6.6089737880659465,
    );
    let (s, c) = angle.sin_cos();
    let moved: Vec<Xy> = points
        .iter()
        .map(|p| {
            [
                scale * (c * p[0] - s * p[1]) + dx,
                scale * (s * p[0] + c * p[1]) + dy,
            ]
        })
        .collect();
    let focal = |pts: &[Xy]| -> Vec<(String, Option<usize>)> {
        let a = run_audit(pts, &[], &options(), &|| {}).unwrap();
        a.results
            .iter()
            .filter(|r| r.edge == Edge::Border && r.window.starts_with("hull"))
            .map(|r| {
                (
                    r.window.split('+').next().unwrap_or("").to_string(),
                    r.focal,
                )
            })
            .collect()
    };
    let before = focal(&points);
    assert_eq!(before.len(), 4, "hull and three buffered hulls: {before:?}");
    assert_eq!(before, focal(&moved));
    assert!(close(&stats(&points), &stats(&moved), 1e-6));
}
