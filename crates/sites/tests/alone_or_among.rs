//! A site's row does not depend on which other sites are in the run.

#![allow(clippy::unwrap_used, missing_docs)]

use geo::{MultiPolygon, polygon};
use patternproof_audit::Edge;
use patternproof_audit::window::NamedShape;
use patternproof_protocol::{Adjust, Protocol, SCHEMA, WindowRule};
use patternproof_sites::{RunOptions, SiteInput, run_site, run_sites};
use rand::{RngExt, SeedableRng};

fn site(name: &str, seed: u64) -> SiteInput {
    let mut rng = rand_chacha::ChaCha8Rng::seed_from_u64(seed);
    let points = (0..30)
        .map(|_| [rng.random::<f64>() * 50.0, rng.random::<f64>() * 50.0])
        .collect();
    SiteInput {
        name: name.into(),
        points,
        boundary: Some(NamedShape {
            name: name.into(),
            source: "test".into(),
            shape: MultiPolygon(vec![polygon![
                (x: 0.0, y: 0.0), (x: 50.0, y: 0.0), (x: 50.0, y: 50.0), (x: 0.0, y: 50.0)
            ]]),
        }),
    }
}

fn protocol(adjust: Adjust) -> Protocol {
    Protocol {
        schema: SCHEMA.into(),
        window: WindowRule::Boundary,
        edge: Edge::Simulation,
        alpha: 0.05,
        sims: 39,
        seed: 5,
        adjust,
        min_n: 10,
        guard: None,
        concavity: 2.0,
        note: None,
    }
}

/// Alone and among ten others: the same row, bit for bit, except the
/// adjusted p and the call derived from it (which depend on the family by
/// definition of an adjustment). With no adjustment, everything matches.
#[test]
fn same_row_alone_or_among_ten() {
    let opts = RunOptions { sweep_sims: 9 };
    let target = site("plot-x", 99);
    let mut all: Vec<SiteInput> = (0..10).map(|k| site(&format!("other-{k}"), k)).collect();
    all.insert(4, target.clone());
    for adjust in [Adjust::None, Adjust::Holm] {
        let p = protocol(adjust);
        let alone = run_sites(std::slice::from_ref(&target), &p, opts);
        let among = run_sites(&all, &p, opts);
        let mut a = serde_json::to_value(&alone[0].row).unwrap();
        let mut b = serde_json::to_value(&among[4].row).unwrap();
        assert_eq!(b["site"], "plot-x");
        assert!(a["p"].is_number(), "the site was tested");
        if adjust == Adjust::Holm {
            assert_ne!(
                a["p_adjusted"], b["p_adjusted"],
                "Holm depends on the family"
            );
            for v in [&mut a, &mut b] {
                v["p_adjusted"] = serde_json::Value::Null;
                v["call"] = serde_json::Value::Null;
            }
        }
        assert_eq!(a, b, "{adjust:?}");
        // Also equal to the site run on its own, before any adjustment.
        let single = serde_json::to_value(&run_site(&target, &p, opts).row).unwrap();
        assert_eq!(single["ratio"], b["ratio"]);
        assert_eq!(single["p"], b["p"]);
    }
}

/// The progress total and the memory estimate count what a run does: a
/// boundary protocol's sweep builds bounding box, hull, concave hull, three
/// buffered hulls and the boundary (7 windows); sites below the minimum
/// are not simulated; the protocol window runs again when its number of
/// simulations differs from the sweep's.
#[test]
fn budget_counts_windows_and_simulations() {
    let p = protocol(Adjust::None);
    let opts = RunOptions { sweep_sims: 9 };
    let sites = vec![site("one", 1), site("two", 2)];
    assert_eq!(patternproof_sites::outlined_windows(&p, true), 7);
    assert_eq!(patternproof_sites::outlined_windows(&p, false), 6);
    // Both sites have 30 points and a boundary; the protocol asks for 39.
    assert_eq!(
        patternproof_sites::simulated_patterns(&sites, &p, opts),
        2 * (9 * 7 + 39)
    );
    let small = patternproof_sites::run_bytes(&sites, &p, opts, 2);
    let large = patternproof_sites::run_bytes(&sites, &p, RunOptions { sweep_sims: 90 }, 2);
    assert!(large > small, "{small} {large}");
    assert_eq!(
        patternproof_sites::run_bytes(
            &sites,
            &p,
            RunOptions {
                sweep_sims: usize::MAX
            },
            2
        ),
        u64::MAX
    );
}
