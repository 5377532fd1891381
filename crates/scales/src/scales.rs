//! The whole run: every window of the audit sweep × every correction, the
//! envelope test per window, the bands and the verdict sentences.

use crate::envelope::{EnvelopeTest, global_tests, simulate, stream_label};
use crate::k_function::{Correction, KCurve, PairNotes, distance_grid, k_curves};
use crate::k_window::KWindow;
use crate::translation;
use crate::verdict::{Band, bands, sentence};
use patternproof_core::Xy;
use patternproof_core::numbers::sig;
use patternproof_window::{Window, WindowKind};
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
            sims: patternproof_core::default_sims::SCREEN_SIMS,
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
pub fn default_rmax(regions: &[&KWindow]) -> Option<f64> {
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

/// The fewest simulations that can give a global band at `alpha`:
/// ⌊α(N + 1)⌋ ≥ 1 (the rule of [`crate::envelope`]).
pub fn fewest_simulations(alpha: f64) -> usize {
    ((1.0 - 1e-9) / alpha).ceil().max(1.0) as usize - 1
}

/// A caution when the run simulated too few patterns for any departure
/// to show at its α: the verdict "no departure" then says nothing.
fn too_few_simulations(options: &ScalesOptions) -> Option<String> {
    let fewest = fewest_simulations(options.alpha);
    (options.sims > 0 && options.sims < fewest && !options.tested.is_empty()).then(|| {
        format!(
            "{} simulations are too few for a test at α = {}: the smallest possible p is 1/{} = {:.3}, so no departure can show. Use at least {fewest} (--sims {fewest}).",
            options.sims,
            options.alpha,
            options.sims + 1,
            1.0 / (options.sims + 1) as f64
        )
    })
}

/// Distances beyond the widest window's diagonal separate no two points,
/// so K is flat there under the data and under CSR alike: "no departure"
/// up to such an r_max says nothing about those distances.
fn beyond_every_window(rmax: f64, widest: f64, unit: &str) -> Option<String> {
    (widest > 0.0 && rmax > widest).then(|| {
        format!(
            "r_max = {} {unit} is beyond the widest window (its bounding rectangle's diagonal is {} {unit}): no two points of any window are farther apart, so the curves beyond {} {unit} show nothing, and neither a departure nor its absence there is a finding. Use an r_max within the windows, e.g. the default.",
            sig(rmax, 4),
            sig(widest, 4),
            sig(widest, 4)
        )
    })
}

/// Decide how the translation overlaps of one window are found, and
/// tabulate them when the run weighs many pairs
/// ([`translation::worth_a_table`]).
fn translation_weights(
    region: &mut KWindow,
    n: usize,
    rmax: f64,
    options: &ScalesOptions,
) -> Option<&'static str> {
    if !options.corrections.contains(&Correction::Translation) {
        return None;
    }
    if region.geometry.rectangle().is_some() {
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

/// The windows of a run, prepared and checked, before any estimate or
/// simulation: what the command needs to forecast the run's memory and
/// time before starting it.
pub struct Plan<'a> {
    points: &'a [Xy],
    /// The analysable windows with their prepared outlines (translation
    /// overlap tables included).
    usable: Vec<(&'a Window, KWindow, Option<&'static str>)>,
    skipped: Vec<Skipped>,
    rmax: f64,
    rmax_rule: String,
    grid: Vec<f64>,
}

/// Prepare every window of `windows` for `options`: outlines, the shared
/// distance grid, translation tables where worth it.
pub fn plan<'a>(points: &'a [Xy], windows: &'a [Window], options: &ScalesOptions) -> Plan<'a> {
    let mut skipped = Vec::new();
    let mut usable: Vec<(&Window, KWindow)> = Vec::new();
    for w in windows {
        if w.shape.is_none() {
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
        match KWindow::of(w) {
            Some(r) => usable.push((w, r)),
            None => skipped.push(Skipped {
                window: w.id.clone(),
                reason: "the outline has no area".into(),
            }),
        }
    }
    let regions: Vec<&KWindow> = usable.iter().map(|(_, r)| r).collect();
    let (rmax, rmax_rule) = match options.rmax {
        Some(r) => (r, "given with --rmax".to_string()),
        None => (
            default_rmax(&regions).unwrap_or(0.0),
            "default: a quarter of the shorter side of the bounding rectangle of the window where that side is smallest".to_string(),
        ),
    };
    let usable = usable
        .into_iter()
        .map(|(w, mut region)| {
            let how = translation_weights(&mut region, w.inside.len(), rmax, options);
            (w, region, how)
        })
        .collect();
    Plan {
        points,
        usable,
        skipped,
        rmax,
        rmax_rule,
        grid: distance_grid(rmax, options.steps),
    }
}

impl Plan<'_> {
    /// Windows that will be analysed.
    pub fn windows(&self) -> usize {
        self.usable.len()
    }

    /// Simulated patterns the run will draw (each one `tick`).
    pub fn simulated_patterns(&self, options: &ScalesOptions) -> usize {
        if options.tested.is_empty() {
            return 0;
        }
        options.sims.saturating_mul(self.usable.len())
    }

    /// Seconds one thread takes for one simulated pattern of every window
    /// together, from one trial pattern per window (own random stream, so
    /// no result changes). For the forecast only.
    pub fn trial_seconds(&self, options: &ScalesOptions) -> f64 {
        let mut seconds = 0.0;
        for (w, region, _) in &self.usable {
            let Some(sampler) = region.geometry.sampler() else {
                continue;
            };
            let started = std::time::Instant::now();
            let mut rng = patternproof_audit::streams::stream(
                options.seed,
                &format!("trial:{}", stream_label(&w.id)),
                0,
            );
            let pts = sampler.sample(w.inside.len(), &mut rng);
            let _ = k_curves(&pts, region, &self.grid, &options.tested, false);
            seconds += started.elapsed().as_secs_f64();
        }
        seconds
    }

    /// The curves, tests and bands of one window.
    fn window(
        &self,
        w: &Window,
        region: &KWindow,
        translation_weights: Option<&'static str>,
        options: &ScalesOptions,
        tick: &(dyn Fn() + Sync),
    ) -> WindowScales {
        let grid = &self.grid;
        let pts: Vec<Xy> = w.inside.iter().map(|&i| self.points[i]).collect();
        let (curves, pair_notes) = k_curves(&pts, region, grid, &options.corrections, true);
        let mut tests = Vec::new();
        if options.sims > 0
            && !options.tested.is_empty()
            && let Some(sampler) = region.geometry.sampler()
        {
            let sims = simulate(
                region,
                sampler,
                pts.len(),
                grid,
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
                tests.push(global_tests(c, &observed, &sims[t], options.alpha));
            }
        }
        let window_bands = tests.iter().map(|t| bands(&t.departure, grid)).collect();
        WindowScales {
            id: w.id.clone(),
            kind: w.kind,
            area: region.geometry.area(),
            n: pts.len(),
            points_outside: w.points_outside,
            curves,
            tests,
            bands: window_bands,
            pairs: pair_notes,
            translation_weights,
        }
    }

    /// Run every window. `tick` is called once per simulated pattern.
    pub fn run(self, unit: &str, options: &ScalesOptions, tick: &(dyn Fn() + Sync)) -> ScalesRun {
        let results: Vec<WindowScales> = self
            .usable
            .iter()
            .map(|(w, region, how)| self.window(w, region, *how, options, tick))
            .collect();
        let widest = self
            .usable
            .iter()
            .map(|(_, region, _)| region.bounds.width().hypot(region.bounds.height()))
            .fold(0.0, f64::max);
        let Plan {
            points,
            skipped,
            rmax,
            rmax_rule,
            grid,
            ..
        } = self;
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
            cautions: cautions()
                .into_iter()
                .chain(too_few_simulations(options))
                .chain(beyond_every_window(rmax, widest, unit))
                .collect(),
        }
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
    plan(points, windows, options).run(unit, options, tick)
}
