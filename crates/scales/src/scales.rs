//! The whole run: every window of the audit sweep × every correction, the
//! envelope test per window, the bands and the verdict sentences.

use crate::envelope::{EnvelopeTest, global_tests, simulate, stream_label};
use crate::k_function::{Correction, KCurve, PairNotes, distance_grid, k_curves};
use crate::region::Region;
use crate::translation;
use crate::verdict::{Band, bands, sentence};
use patternproof_audit::sampling::Sampler;
use patternproof_audit::{Window, WindowKind};
use patternproof_core::Xy;
use serde::Serialize;

/// Schema id of `scales.json` (docs/scales-schema.md).
pub const SCHEMA: &str = "patternproof.scales/2";

/// Settings of a run.
#[derive(Debug, Clone)]
pub struct ScalesOptions {
    /// Corrections whose curves are estimated.
    pub corrections: Vec<Correction>,
    /// Corrections that get the simulation envelope test (each also in
    /// `corrections`).
    pub tested: Vec<Correction>,
    /// Largest distance; `None` for the default rule ([`default_rmax`]).
    pub rmax: Option<f64>,
    /// Number of grid distances.
    pub steps: usize,
    /// CSR simulations per window (0: no test).
    pub sims: usize,
    /// Seed of every random stream.
    pub seed: u64,
    /// Significance level of the global test.
    pub alpha: f64,
}

impl Default for ScalesOptions {
    fn default() -> Self {
        Self {
            corrections: Correction::ALL.to_vec(),
            tested: vec![Correction::Isotropic],
            rmax: None,
            steps: 50,
            sims: 99,
            seed: 1,
            alpha: 0.05,
        }
    }
}

/// Results of one window.
#[derive(Debug, Clone, Serialize)]
pub struct WindowScales {
    /// Window id (as in the audit).
    pub id: String,
    /// Window kind.
    pub kind: WindowKind,
    /// Area |W| used in K̂.
    pub area: f64,
    /// Points inside the window (the pattern analysed).
    pub n: usize,
    /// Points of the data set outside it (not used).
    pub points_outside: usize,
    /// One curve per correction, in the order of the options.
    pub curves: Vec<KCurve>,
    /// One test per tested correction.
    pub tests: Vec<EnvelopeTest>,
    /// The departure bands of each test, same order as `tests`.
    pub bands: Vec<Vec<Band>>,
    /// Pair counts and special cases.
    pub pairs: PairNotes,
    /// How the translation weights' overlap areas were found: `closed form`
    /// (rectangle), `exact` (one polygon intersection per pair), `table`
    /// (interpolated from exact intersections on a polar grid, for runs
    /// with many pairs); `None` when translation was not estimated.
    pub translation_weights: Option<&'static str>,
}

/// A window that could not be analysed, and why.
#[derive(Debug, Clone, Serialize)]
pub struct Skipped {
    /// Window id.
    pub window: String,
    /// Why.
    pub reason: String,
}

/// The verdict sentence of one tested correction.
#[derive(Debug, Clone, Serialize)]
pub struct Verdict {
    /// The correction of the test.
    pub correction: Correction,
    /// The sentence across windows.
    pub sentence: String,
}

/// Everything `scales.json` holds.
#[derive(Debug, Clone, Serialize)]
pub struct ScalesRun {
    /// [`SCHEMA`].
    pub schema: &'static str,
    /// Points in the data set.
    pub n_points: usize,
    /// Unit of distances.
    pub unit: String,
    /// Largest distance of the grid.
    pub rmax: f64,
    /// How r_max was chosen.
    pub rmax_rule: String,
    /// The distance grid.
    pub r: Vec<f64>,
    /// Corrections estimated.
    pub corrections: Vec<Correction>,
    /// Corrections tested.
    pub tested: Vec<Correction>,
    /// Simulations per window.
    pub sims: usize,
    /// Seed.
    pub seed: u64,
    /// Significance level.
    pub alpha: f64,
    /// Per window.
    pub windows: Vec<WindowScales>,
    /// Windows left out.
    pub skipped: Vec<Skipped>,
    /// One sentence per tested correction.
    pub verdicts: Vec<Verdict>,
    /// What the test does and does not show.
    pub cautions: Vec<String>,
}

/// The default r_max: a quarter of the shorter side of the bounding
/// rectangle, taken for the smallest such side over all windows, so that
/// every window shares one distance grid and the bands can be compared.
/// A quarter of the shorter side is the usual rule of thumb: beyond it
/// few centres see whole circles and every estimator gets noisy.
pub fn default_rmax(regions: &[&Region]) -> Option<f64> {
    regions
        .iter()
        .map(|r| r.shorter_side() / 4.0)
        .filter(|v| *v > 0.0 && v.is_finite())
        .min_by(f64::total_cmp)
}

/// The fixed cautions of every run.
pub fn cautions() -> Vec<String> {
    vec![
        "The envelope test compares the pattern with complete spatial randomness in each window separately; a departure says the points are not CSR in that window at those distances, not why (first-order trend in intensity looks like clustering).".into(),
        "Only the global band is a test over the whole distance range; the pointwise envelope is drawn for orientation and is exceeded somewhere far more often than α under CSR.".into(),
        "Two global tests are run on the same simulated curves: MAD (its band decides the distance bands and the verdict) and the rank envelope with ERL ordering (Myllymäki et al. 2017), which weighs every distance alike where MAD is decided by the distances where L̂ − r varies most. When they disagree, say so; reporting only the smaller p is a choice made after seeing the data.".into(),
        "Bands are read on a grid of distances; a band '4–40 m' covers the grid points from 4 to 40 m.".into(),
        "Point locations of people are personal data: keep the input and any map of it under the same protection as the original records.".into(),
    ]
}

/// Decide how the translation overlaps of one window are found, and
/// tabulate them when the run weighs many pairs
/// ([`translation::worth_a_table`]).
fn translation_weights(
    region: &mut Region,
    n: usize,
    rmax: f64,
    options: &ScalesOptions,
) -> Option<&'static str> {
    if !options.corrections.contains(&Correction::Translation) {
        return None;
    }
    if region.rectangle.is_some() {
        return Some("closed form");
    }
    let patterns = 1 + if options.tested.contains(&Correction::Translation) {
        options.sims
    } else {
        0
    };
    if translation::worth_a_table(region, n, rmax, patterns) {
        region.overlap_table = Some(translation::OverlapTable::new(region, rmax));
        Some("table")
    } else {
        Some("exact")
    }
}

/// Run every window. `tick` is called once per simulated pattern.
pub fn run_scales(
    points: &[Xy],
    windows: &[Window],
    unit: &str,
    options: &ScalesOptions,
    tick: &(dyn Fn() + Sync),
) -> ScalesRun {
    let mut skipped = Vec::new();
    let mut usable: Vec<(&Window, Region)> = Vec::new();
    for w in windows {
        let Some(shape) = &w.shape else {
            skipped.push(Skipped {
                window: w.id.clone(),
                reason:
                    "a bare area has no outline, so no edge correction or simulation is possible"
                        .into(),
            });
            continue;
        };
        if w.inside.len() < 2 {
            skipped.push(Skipped {
                window: w.id.clone(),
                reason: format!("only {} point(s) inside the window", w.inside.len()),
            });
            continue;
        }
        match Region::new(shape, w.rectangle) {
            Some(r) => usable.push((w, r)),
            None => skipped.push(Skipped {
                window: w.id.clone(),
                reason: "the outline has no area".into(),
            }),
        }
    }
    let regions: Vec<&Region> = usable.iter().map(|(_, r)| r).collect();
    let (rmax, rmax_rule) = match options.rmax {
        Some(r) => (r, "given with --rmax".to_string()),
        None => (
            default_rmax(&regions).unwrap_or(0.0),
            "default: a quarter of the shorter side of the bounding rectangle of the window where that side is smallest".to_string(),
        ),
    };
    let grid = distance_grid(rmax, options.steps);
    let mut results = Vec::new();
    for (w, region) in &usable {
        let pts: Vec<Xy> = w.inside.iter().map(|&i| points[i]).collect();
        let mut region = region.clone();
        let translation_weights = translation_weights(&mut region, pts.len(), rmax, options);
        let region = &region;
        let (curves, pair_notes) = k_curves(&pts, region, &grid, &options.corrections, true);
        let mut tests = Vec::new();
        if options.sims > 0 && !options.tested.is_empty() {
            if let Some(sampler) = Sampler::new(&region.shape) {
                let sims = simulate(
                    region,
                    &sampler,
                    pts.len(),
                    &grid,
                    &options.tested,
                    options.sims,
                    options.seed,
                    &stream_label(&w.id),
                    tick,
                );
                for (t, &c) in options.tested.iter().enumerate() {
                    let observed = curves
                        .iter()
                        .find(|k| k.correction == c)
                        .map(|k| k.l_minus_r.clone())
                        .unwrap_or_else(|| vec![None; grid.len()]);
                    let simulated: Vec<Vec<Option<f64>>> =
                        sims.iter().map(|s| s[t].clone()).collect();
                    tests.push(global_tests(c, &observed, &simulated, options.alpha));
                }
            }
        }
        let window_bands = tests.iter().map(|t| bands(&t.departure, &grid)).collect();
        results.push(WindowScales {
            id: w.id.clone(),
            kind: w.kind,
            area: region.area,
            n: pts.len(),
            points_outside: w.points_outside,
            curves,
            tests,
            bands: window_bands,
            pairs: pair_notes,
            translation_weights,
        });
    }
    let verdicts = options
        .tested
        .iter()
        .filter(|_| options.sims > 0)
        .map(|&c| {
            let tested: Vec<(&str, &[i8])> = results
                .iter()
                .filter_map(|w| {
                    w.tests
                        .iter()
                        .find(|t| t.correction == c)
                        .map(|t| (w.id.as_str(), t.departure.as_slice()))
                })
                .collect();
            Verdict {
                correction: c,
                sentence: sentence(&tested, &grid, unit),
            }
        })
        .collect();
    ScalesRun {
        schema: SCHEMA,
        n_points: points.len(),
        unit: unit.to_string(),
        rmax,
        rmax_rule,
        r: grid,
        corrections: options.corrections.clone(),
        tested: options.tested.clone(),
        sims: options.sims,
        seed: options.seed,
        alpha: options.alpha,
        windows: results,
        skipped,
        verdicts,
        cautions: cautions(),
    }
}
