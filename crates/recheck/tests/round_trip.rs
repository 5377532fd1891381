//! Round trips: figures computed by the audit on seeded, invented point
//! patterns, printed with 2–3 decimals as a paper would, must recheck as
//! consistent; the same figures with one of them moved beyond its rounding
//! must recheck as inconsistent.
//!
//! Sources of the expectations: the relations of Clark & Evans (1954)
//! (R = D/E, E = 0.5·sqrt(A/n), z = (R − 1)·sqrt(n)·0.5/0.26136, the
//! two-sided normal p), which the audit's uncorrected rows obey exactly;
//! Donnelly (1978) for the corrected rows. Every pattern and every case
//! below is invented.

#![allow(clippy::unwrap_used, missing_docs)]

use approx::abs_diff_eq;
use patternproof_audit::{Audit, AuditOptions, Edge, WindowKind, run_audit};
use patternproof_core::Xy;
use patternproof_recheck::attribution::sweep_options;
use patternproof_recheck::reported::{Quantity, parse};
use patternproof_recheck::{Figures, Recheck, recheck};
use rand::{RngExt, SeedableRng};
use rand_chacha::ChaCha8Rng;

/// An invented point pattern in a 100 × 70 rectangle.
#[derive(Debug, Clone, Copy)]
enum Pattern {
    /// Complete spatial randomness.
    Csr,
    /// Parents uniform, children normal around them (sd in units).
    Clustered { parents: usize, sd: f64 },
    /// Simple sequential inhibition: no two points closer than `r`.
    Inhibited { r: f64 },
}

fn points(pattern: Pattern, n: usize, seed: u64) -> Vec<Xy> {
    let mut rng = ChaCha8Rng::seed_from_u64(seed);
    let (w, h) = (100.0, 70.0);
    let mut out: Vec<Xy> = Vec::with_capacity(n);
    match pattern {
        Pattern::Csr => {
            while out.len() < n {
                out.push([rng.random::<f64>() * w, rng.random::<f64>() * h]);
            }
        }
        Pattern::Clustered { parents, sd } => {
            let centres: Vec<Xy> = (0..parents)
                .map(|_| {
                    [
                        10.0 + rng.random::<f64>() * (w - 20.0),
                        10.0 + rng.random::<f64>() * (h - 20.0),
                    ]
                })
                .collect();
            while out.len() < n {
                let c = centres[out.len() % parents];
                // Box–Muller.
                let (u1, u2): (f64, f64) = (rng.random::<f64>().max(1e-12), rng.random());
                let rad = (-2.0 * u1.ln()).sqrt() * sd;
                let a = 2.0 * std::f64::consts::PI * u2;
                out.push([c[0] + rad * a.cos(), c[1] + rad * a.sin()]);
            }
        }
        Pattern::Inhibited { r } => {
            let mut tries = 0;
            while out.len() < n && tries < 1_000_000 {
                tries += 1;
                let p = [rng.random::<f64>() * w, rng.random::<f64>() * h];
                if out.iter().all(|q| (q[0] - p[0]).hypot(q[1] - p[1]) >= r) {
                    out.push(p);
                }
            }
            assert_eq!(out.len(), n, "inhibition radius too large for n");
        }
    }
    out
}

/// Which figures the invented paper prints.
const RZP: &[Quantity] = &[Quantity::Ratio, Quantity::Z, Quantity::P];
const RZ: &[Quantity] = &[Quantity::Ratio, Quantity::Z];
const ZP: &[Quantity] = &[Quantity::Z, Quantity::P];
const RDE: &[Quantity] = &[Quantity::Ratio, Quantity::MeanNn, Quantity::ExpectedNn];
const RDA: &[Quantity] = &[Quantity::Ratio, Quantity::MeanNn, Quantity::Area];
const DAZ: &[Quantity] = &[Quantity::MeanNn, Quantity::Area, Quantity::Z];
const EAZP: &[Quantity] = &[
    Quantity::ExpectedNn,
    Quantity::Area,
    Quantity::Z,
    Quantity::P,
];
const ALL: &[Quantity] = &Quantity::ALL;

/// One figure moved beyond its rounding, in a direction no edge correction
/// can explain (both corrections shrink |z| for a given R and lengthen E).
#[derive(Debug, Clone, Copy)]
enum Perturb {
    /// z moved away from 0.
    ZAway(f64),
    /// R moved towards (or across) 1.
    RToward1(f64),
    /// p set to a tenth of its value (or to 0.2 when printed as a bound).
    PSmaller,
    /// The area multiplied by this factor (> 1).
    AreaTimes(f64),
    /// D multiplied by this factor (< 1).
    DTimes(f64),
    /// E multiplied by this factor (< 1).
    ETimes(f64),
    /// n halved.
    NHalved,
}

struct Case {
    label: &'static str,
    pattern: Pattern,
    n: usize,
    seed: u64,
    window: WindowKind,
    r_decimals: usize,
    given: &'static [Quantity],
    perturb: Perturb,
}

const CL: Pattern = Pattern::Clustered {
    parents: 6,
    sd: 3.0,
};
const CL_LOOSE: Pattern = Pattern::Clustered {
    parents: 12,
    sd: 6.0,
};
const INH: Pattern = Pattern::Inhibited { r: 4.0 };
const INH_WIDE: Pattern = Pattern::Inhibited { r: 6.0 };

/// Invented cases (no real data): pattern, size, seed, window, printing.
const CASES: &[Case] = &[
    Case {
        label: "csr-64-bbox",
        pattern: Pattern::Csr,
        n: 64,
        seed: 1,
        window: WindowKind::Bbox,
        r_decimals: 2,
        given: RZP,
        perturb: Perturb::ZAway(0.5),
    },
    Case {
        label: "csr-64-hull",
        pattern: Pattern::Csr,
        n: 64,
        seed: 2,
        window: WindowKind::Hull,
        r_decimals: 3,
        given: RZP,
        perturb: Perturb::RToward1(0.05),
    },
    Case {
        label: "csr-100-buffered",
        pattern: Pattern::Csr,
        n: 100,
        seed: 3,
        window: WindowKind::BufferedHull,
        r_decimals: 2,
        given: ALL,
        perturb: Perturb::AreaTimes(1.5),
    },
    Case {
        label: "csr-150-concave",
        pattern: Pattern::Csr,
        n: 150,
        seed: 4,
        window: WindowKind::Concave,
        r_decimals: 3,
        given: RDE,
        perturb: Perturb::DTimes(0.8),
    },
    Case {
        label: "csr-30-bbox",
        pattern: Pattern::Csr,
        n: 30,
        seed: 5,
        window: WindowKind::Bbox,
        r_decimals: 2,
        given: ZP,
        perturb: Perturb::PSmaller,
    },
    Case {
        label: "csr-200-hull",
        pattern: Pattern::Csr,
        n: 200,
        seed: 6,
        window: WindowKind::Hull,
        r_decimals: 3,
        given: EAZP,
        perturb: Perturb::ETimes(0.8),
    },
    Case {
        label: "clustered-64-bbox",
        pattern: CL,
        n: 64,
        seed: 7,
        window: WindowKind::Bbox,
        r_decimals: 2,
        given: RZP,
        perturb: Perturb::NHalved,
    },
    Case {
        label: "clustered-64-hull",
        pattern: CL,
        n: 64,
        seed: 8,
        window: WindowKind::Hull,
        r_decimals: 2,
        given: RZ,
        perturb: Perturb::ZAway(0.4),
    },
    Case {
        label: "clustered-120-buffered",
        pattern: CL,
        n: 120,
        seed: 9,
        window: WindowKind::BufferedHull,
        r_decimals: 3,
        given: RDA,
        perturb: Perturb::AreaTimes(1.3),
    },
    Case {
        label: "clustered-120-concave",
        pattern: CL,
        n: 120,
        seed: 10,
        window: WindowKind::Concave,
        r_decimals: 3,
        given: ALL,
        perturb: Perturb::PSmaller,
    },
    Case {
        label: "clustered-200-bbox",
        pattern: CL_LOOSE,
        n: 200,
        seed: 11,
        window: WindowKind::Bbox,
        r_decimals: 2,
        given: DAZ,
        perturb: Perturb::DTimes(0.8),
    },
    Case {
        label: "clustered-250-hull",
        pattern: CL_LOOSE,
        n: 250,
        seed: 12,
        window: WindowKind::Hull,
        r_decimals: 3,
        given: RZP,
        perturb: Perturb::RToward1(0.04),
    },
    Case {
        label: "clustered-40-bbox",
        pattern: CL,
        n: 40,
        seed: 13,
        window: WindowKind::Bbox,
        r_decimals: 2,
        given: RDE,
        perturb: Perturb::ETimes(0.8),
    },
    Case {
        label: "clustered-300-buffered",
        pattern: CL_LOOSE,
        n: 300,
        seed: 14,
        window: WindowKind::BufferedHull,
        r_decimals: 3,
        given: RZP,
        perturb: Perturb::ZAway(0.3),
    },
    Case {
        label: "inhibited-64-bbox",
        pattern: INH,
        n: 64,
        seed: 15,
        window: WindowKind::Bbox,
        r_decimals: 2,
        given: RZP,
        perturb: Perturb::NHalved,
    },
    Case {
        label: "inhibited-100-hull",
        pattern: INH,
        n: 100,
        seed: 16,
        window: WindowKind::Hull,
        r_decimals: 3,
        given: ALL,
        perturb: Perturb::ZAway(0.5),
    },
    Case {
        label: "inhibited-100-concave",
        pattern: INH,
        n: 100,
        seed: 17,
        window: WindowKind::Concave,
        r_decimals: 2,
        given: RDA,
        perturb: Perturb::AreaTimes(1.4),
    },
    Case {
        label: "inhibited-80-buffered",
        pattern: INH_WIDE,
        n: 80,
        seed: 18,
        window: WindowKind::BufferedHull,
        r_decimals: 3,
        given: EAZP,
        perturb: Perturb::PSmaller,
    },
    Case {
        label: "inhibited-50-bbox",
        pattern: INH_WIDE,
        n: 50,
        seed: 19,
        window: WindowKind::Bbox,
        r_decimals: 3,
        given: DAZ,
        perturb: Perturb::ZAway(0.5),
    },
    Case {
        label: "inhibited-120-hull",
        pattern: INH,
        n: 120,
        seed: 20,
        window: WindowKind::Hull,
        r_decimals: 2,
        given: RZ,
        perturb: Perturb::RToward1(0.05),
    },
    Case {
        label: "csr-400-bbox",
        pattern: Pattern::Csr,
        n: 400,
        seed: 21,
        window: WindowKind::Bbox,
        r_decimals: 3,
        given: ALL,
        perturb: Perturb::DTimes(0.85),
    },
    Case {
        label: "clustered-90-hull",
        pattern: CL,
        n: 90,
        seed: 22,
        window: WindowKind::Hull,
        r_decimals: 3,
        given: ALL,
        perturb: Perturb::NHalved,
    },
];

/// The audit's uncorrected row for the case's window (sims 0; the guard
/// zone and the torus are left out here to keep the test quick).
fn audit_row(c: &Case) -> (Audit, usize, usize) {
    let pts = points(c.pattern, c.n, c.seed);
    let options = AuditOptions {
        edges: vec![Edge::None, Edge::Donnelly],
        ..sweep_options(None)
    };
    let audit = run_audit(&pts, &[], &options, &|| {}).unwrap();
    let wi = audit
        .windows
        .iter()
        .position(|w| w.kind == c.window)
        .unwrap();
    let id = audit.windows[wi].id.clone();
    let ri = audit
        .results
        .iter()
        .position(|r| r.window == id && r.edge == Edge::None)
        .unwrap();
    (audit, wi, ri)
}

/// The figures as an invented paper prints them: R with 2–3 decimals, z
/// with 2, p with 3 (or "<0.001"), D and E with 3, the area with none.
fn printed(c: &Case, audit: &Audit, wi: usize, ri: usize) -> Vec<(Quantity, String)> {
    let r = &audit.results[ri];
    let area = audit.windows[wi].area;
    let p = r.p.unwrap();
    c.given
        .iter()
        .map(|&q| {
            let text = match q {
                Quantity::Ratio => format!("{:.*}", c.r_decimals, r.ratio.unwrap()),
                Quantity::Z => format!("{:.2}", r.z.unwrap()),
                Quantity::P if p < 0.001 => "<0.001".to_string(),
                Quantity::P => format!("{p:.3}"),
                Quantity::MeanNn => format!("{:.3}", r.mean_nn.unwrap()),
                Quantity::ExpectedNn => format!("{:.3}", r.expected_nn.unwrap()),
                Quantity::Area => format!("{area:.0}"),
            };
            (q, text)
        })
        .collect()
}

fn perturbed(c: &Case, audit: &Audit, wi: usize, ri: usize) -> (usize, Vec<(Quantity, String)>) {
    let r = &audit.results[ri];
    let mut figs = printed(c, audit, wi, ri);
    let mut n = r.n_used;
    let set = |figs: &mut Vec<(Quantity, String)>, q: Quantity, t: String| {
        let slot = figs
            .iter_mut()
            .find(|(x, _)| *x == q)
            .unwrap_or_else(|| panic!("{}: {q:?} not printed", c.label));
        slot.1 = t;
    };
    match c.perturb {
        Perturb::ZAway(d) => {
            let z = r.z.unwrap();
            set(&mut figs, Quantity::Z, format!("{:.2}", z + d * z.signum()));
        }
        Perturb::RToward1(d) => {
            let v = r.ratio.unwrap();
            set(
                &mut figs,
                Quantity::Ratio,
                format!("{:.*}", c.r_decimals, v + d * (1.0 - v).signum()),
            );
        }
        Perturb::PSmaller => {
            let p = r.p.unwrap();
            let t = if p < 0.001 {
                "0.200".to_string()
            } else {
                format!("{:.2e}", p / 10.0)
            };
            set(&mut figs, Quantity::P, t);
        }
        Perturb::AreaTimes(k) => set(
            &mut figs,
            Quantity::Area,
            format!("{:.0}", audit.windows[wi].area * k),
        ),
        Perturb::DTimes(k) => set(
            &mut figs,
            Quantity::MeanNn,
            format!("{:.3}", r.mean_nn.unwrap() * k),
        ),
        Perturb::ETimes(k) => set(
            &mut figs,
            Quantity::ExpectedNn,
            format!("{:.3}", r.expected_nn.unwrap() * k),
        ),
        Perturb::NHalved => n = r.n_used / 2,
    }
    (n, figs)
}

fn run(n: usize, figs: &[(Quantity, String)]) -> Recheck {
    let f = figs.iter().fold(Figures::new(n, false), |f, (q, t)| {
        f.with(parse(t, *q).unwrap())
    });
    recheck(&f, None)
}

fn describe(n: usize, figs: &[(Quantity, String)]) -> String {
    let mut s = format!("n = {n}");
    for (q, t) in figs {
        s.push_str(&format!(", {} = {t}", q.symbol()));
    }
    s
}

#[test]
fn at_least_twenty_invented_cases() {
    assert!(CASES.len() >= 20);
}

/// Unperturbed: consistent with no condition; the intervals the recheck
/// reports hold the audit's full-precision values.
#[test]
fn printed_figures_recheck_as_consistent() {
    for c in CASES {
        let (audit, wi, ri) = audit_row(c);
        let row = &audit.results[ri];
        let figs = printed(c, &audit, wi, ri);
        let rc = run(row.n_used, &figs);
        let what = format!("{}: {}", c.label, describe(row.n_used, &figs));
        assert_eq!(rc.consistent, Some(true), "{what}: {}", rc.verdict);
        assert_eq!(rc.verdict, "consistent", "{what}");
        assert!(rc.checks.iter().all(|ch| ch.ok != Some(false)), "{what}");
        let implied = rc
            .implied
            .unwrap_or_else(|| panic!("{what}: no implied intervals"));
        // The true values lie inside the implied intervals (a published
        // relation holds exactly for them, so they are a witness).
        assert!(
            implied.ratio.contains(row.ratio.unwrap()),
            "{what}: R {} not in {}",
            row.ratio.unwrap(),
            implied.ratio
        );
        assert!(
            implied.z.contains(row.z.unwrap()),
            "{what}: z {} not in {}",
            row.z.unwrap(),
            implied.z
        );
        if c.given.contains(&Quantity::MeanNn) || c.given.contains(&Quantity::ExpectedNn) {
            let a = rc
                .implied_area
                .unwrap_or_else(|| panic!("{what}: no implied area"));
            let true_area = audit.windows[wi].area;
            assert!(a.contains(true_area), "{what}: area {true_area} not in {a}");
            // And it is tight: within 2 % of the true area, since the
            // distances carry 3 decimals.
            assert!(
                a.high - a.low < 0.04 * true_area,
                "{what}: area interval {a} is loose"
            );
        } else {
            assert!(
                rc.implied_area.is_none(),
                "{what}: R, z and p cannot fix an area"
            );
        }
        if let Some(zc) = rc.checks.iter().find(|ch| ch.name == "z from R and n")
            && let Some(iv) = zc.recomputed
        {
            assert!(iv.contains(row.z.unwrap()), "{what}: recomputed z {iv}");
        }
    }
}

/// Perturbed beyond rounding: inconsistent, and no edge correction is
/// offered as the explanation.
#[test]
fn perturbed_figures_recheck_as_inconsistent() {
    for c in CASES {
        let (audit, wi, ri) = audit_row(c);
        let (n, figs) = perturbed(c, &audit, wi, ri);
        let rc = run(n, &figs);
        let what = format!("{} ({:?}): {}", c.label, c.perturb, describe(n, &figs));
        assert_eq!(rc.consistent, Some(false), "{what}: {}", rc.verdict);
        assert!(
            rc.verdict.starts_with("inconsistent: "),
            "{what}: {}",
            rc.verdict
        );
        assert!(rc.checks.iter().any(|ch| ch.ok == Some(false)), "{what}");
        assert!(
            rc.explanations
                .iter()
                .filter(|e| e.name == "donnelly" || e.name == "guard-zone")
                .all(|e| !e.fits),
            "{what}: a correction was said to explain a perturbation"
        );
    }
}

/// The Donnelly rows of the audit: the plain checks fail (Donnelly's z is
/// not (R − 1)·sqrt(n)·0.5/0.26136), the verdict is "consistent only if"
/// Donnelly's correction was used, and the range of window shapes it
/// reports holds the window's own perimeter/sqrt(area) (Donnelly 1978).
#[test]
fn donnelly_rows_are_explained_by_donnelly() {
    for (i, c) in CASES
        .iter()
        .enumerate()
        .filter(|(i, c)| i % 3 == 0 && c.n >= 40)
    {
        let (audit, wi, _) = audit_row(c);
        let w = &audit.windows[wi];
        let row = audit
            .results
            .iter()
            .find(|r| r.window == w.id && r.edge == Edge::Donnelly)
            .unwrap();
        let figs = vec![
            (Quantity::Ratio, format!("{:.3}", row.ratio.unwrap())),
            (Quantity::Z, format!("{:.2}", row.z.unwrap())),
        ];
        let rc = run(row.n_used, &figs);
        let what = format!(
            "case {i} {} donnelly: {}",
            c.label,
            describe(row.n_used, &figs)
        );
        let shape = w.perimeter.unwrap() / w.area.sqrt();
        let z_check = rc
            .checks
            .iter()
            .find(|ch| ch.name == "z from R and n")
            .unwrap();
        if z_check.ok == Some(true) {
            // Tiny departures from R = 1 leave both readings within rounding.
            assert!(
                abs_diff_eq!(row.z.unwrap(), 0.0, epsilon = 0.5),
                "{what}: plain z fits a clear departure"
            );
            continue;
        }
        // Inconsistent as printed (the plain z fails), consistent only
        // under Donnelly, which these ordinary windows make plausible.
        assert_eq!(rc.consistent, Some(false), "{what}: {}", rc.verdict);
        assert!(
            rc.verdict.starts_with(
                "inconsistent as printed; consistent only if Donnelly's edge correction was used"
            ),
            "{what}: {}",
            rc.verdict
        );
        let reading = rc
            .consistent_if
            .iter()
            .find(|r| r.reading == "donnelly")
            .unwrap();
        assert!(reading.rating.plausible, "{what}: shape {shape}");
        let d = rc
            .explanations
            .iter()
            .find(|e| e.name == "donnelly")
            .unwrap();
        assert!(
            d.range.unwrap().contains(shape),
            "{what}: shape {shape} not in {:?}",
            d.range
        );
    }
}
