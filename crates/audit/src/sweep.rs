//! The sweep: every window × every edge handling, one row each.
//!
//! For each window the covered points are taken, their statistics measured
//! once ([`crate::simulation::measure`]), and the CSR simulations run once;
//! each edge handling then turns those numbers into a row. Rows that a
//! choice cannot produce (a torus on a non-rectangle, a simulation without
//! an outline) go to `skipped` with the reason, so the table never shows a
//! number that does not mean anything.

use crate::edge::Edge;
use crate::error::AuditError;
use crate::flip::{FlipEntry, flip_entries};
use crate::robustness::{Summary, summarise};
use crate::simulation::{Measure, PatternStats, measure, measure_known, simulate};
use crate::window::{NamedShape, Window, WindowKind, WindowOptions, build_windows};
use geo::Translate;
use patternproof_core::clark_evans::MIN_N_ANALYTIC;
use patternproof_core::monte_carlo::{quantile, two_sided_rank_p};
use patternproof_core::nearest::{mean, nearest_distances};
use patternproof_core::normal::two_sided_critical;
use patternproof_core::{Call, NnRatioTest, Xy, donnelly, guard_zone};
use patternproof_window::PreparedWindow;
use serde::Serialize;

/// Fewest focal points for which the guard-zone row is reported; below it
/// the row says so instead of giving a number (our choice: with fewer than
/// five focal distances the normal approximation is not worth printing).
pub const MIN_FOCAL: usize = 5;

/// Everything the sweep needs besides the data.
#[derive(Debug, Clone)]
pub struct AuditOptions {
    /// How the windows are built.
    pub windows: WindowOptions,
    /// Significance level, two-sided.
    pub alpha: f64,
    /// Edge handlings to sweep, in table order.
    pub edges: Vec<Edge>,
    /// Guard width for `border`; default the observed mean NN distance.
    pub guard: Option<f64>,
    /// Number of CSR simulations per window.
    pub sims: usize,
    /// Seed of all random streams.
    pub seed: u64,
}

impl Default for AuditOptions {
    fn default() -> Self {
        Self {
            windows: WindowOptions::default(),
            alpha: 0.05,
            edges: Edge::ALL.to_vec(),
            guard: None,
            sims: patternproof_core::default_sims::TEST_SIMS,
            seed: 1,
        }
    }
}

/// One row of the verdict table.
#[derive(Debug, Clone, Serialize)]
pub struct ResultRow {
    /// Window id.
    pub window: String,
    /// Edge handling.
    pub edge: Edge,
    /// Points covered by the window.
    pub n_used: usize,
    /// Focal points (guard zone only).
    pub focal: Option<usize>,
    /// Observed mean nearest-neighbour distance (focal points for `border`,
    /// torus distances for `toroidal`).
    pub mean_nn: Option<f64>,
    /// Expected mean under CSR (simulated mean for `simulation`).
    pub expected_nn: Option<f64>,
    /// mean_nn / expected_nn.
    pub ratio: Option<f64>,
    /// Standard error of the mean (standard deviation of the simulated
    /// means for `simulation`).
    pub se: Option<f64>,
    /// Standardised difference.
    pub z: Option<f64>,
    /// Two-sided p (rank p for `simulation`).
    pub p: Option<f64>,
    /// The call at α; `None` when the row has no number.
    pub call: Option<Call>,
    /// Caveats for this row.
    pub note: Option<String>,
    /// Share of the window's CSR simulations this analytic test calls
    /// significant at α: its real false-alarm rate here.
    pub size_under_csr: Option<f64>,
    /// Simulations behind the row (`simulation` only).
    pub sims: Option<usize>,
    /// Seed (`simulation` only).
    pub seed: Option<u64>,
    /// Mean of the simulated mean distances.
    pub sim_mean: Option<f64>,
    /// 2.5 % quantile of the simulated mean distances.
    pub sim_q025: Option<f64>,
    /// 97.5 % quantile of the simulated mean distances.
    pub sim_q975: Option<f64>,
}

impl ResultRow {
    pub(crate) fn empty(window: &str, edge: Edge, n_used: usize) -> Self {
        Self {
            window: window.to_string(),
            edge,
            n_used,
            focal: None,
            mean_nn: None,
            expected_nn: None,
            ratio: None,
            se: None,
            z: None,
            p: None,
            call: None,
            note: None,
            size_under_csr: None,
            sims: None,
            seed: None,
            sim_mean: None,
            sim_q025: None,
            sim_q975: None,
        }
    }

    fn with_test(mut self, t: NnRatioTest, alpha: f64) -> Self {
        self.mean_nn = Some(t.mean_nn);
        self.expected_nn = Some(t.expected);
        self.ratio = Some(t.ratio);
        self.se = Some(t.se);
        self.z = Some(t.z);
        self.p = Some(t.p);
        self.call = Some(Call::from_p(t.p, t.z, alpha));
        self
    }
}

/// A (window, edge) pair that has no row, and why.
#[derive(Debug, Clone, Serialize)]
pub struct Skipped {
    /// Window id.
    pub window: String,
    /// Edge handling.
    pub edge: Edge,
    /// Why there is no row.
    pub reason: String,
}

/// The full result of one audit.
#[derive(Debug, Clone, Serialize)]
pub struct Audit {
    /// Points analysed.
    pub n: usize,
    /// Observed mean nearest-neighbour distance of all points.
    pub mean_nn: f64,
    /// Two-sided critical value at α.
    pub z_crit: f64,
    /// Significance level.
    pub alpha: f64,
    /// Guard width used by `border`.
    pub guard: f64,
    /// Whether the guard width was the default (the mean NN distance).
    pub guard_is_default: bool,
    /// Simulations per window.
    pub sims: usize,
    /// Seed.
    pub seed: u64,
    /// Edge handlings swept.
    pub edges: Vec<Edge>,
    /// The windows, in table order.
    pub windows: Vec<Window>,
    /// The verdict table.
    pub results: Vec<ResultRow>,
    /// Pairs without a row.
    pub skipped: Vec<Skipped>,
    /// Notes on windows that could not be built.
    pub notes: Vec<String>,
    /// Flip thresholds, one entry per analytic edge handling.
    pub flip: Vec<FlipEntry>,
    /// Counts, unanimity and the plain-language verdict.
    pub summary: Summary,
    /// Simulated mean distances per window (for pictures), same order as
    /// `windows`; empty where there was no simulation.
    #[serde(skip)]
    pub simulated_means: Vec<Vec<f64>>,
}

impl Audit {
    /// Why no row has a number: the notes on windows that could not be
    /// built, then each distinct reason a choice was skipped.
    pub fn why_untested(&self) -> String {
        // Reasons in first-seen order, each with the edge handlings it hit.
        let mut reasons: Vec<(&str, Vec<String>)> = Vec::new();
        for s in &self.skipped {
            let edge = s.edge.to_string();
            match reasons.iter_mut().find(|(r, _)| *r == s.reason) {
                Some((_, edges)) if !edges.contains(&edge) => edges.push(edge),
                Some(_) => {}
                None => reasons.push((&s.reason, vec![edge])),
            }
        }
        let mut why = self.notes.clone();
        why.extend(
            reasons
                .into_iter()
                .map(|(r, edges)| format!("{}: {r}", edges.join(", "))),
        );
        why.join("; ")
    }
}

/// The windows of one data set and what every analysis in them needs,
/// built once in coordinates centred on the data: UTM-sized values
/// (~5·10⁶ m) would otherwise cost digits in areas, buffers and outline
/// distances. The nearest-neighbour sweep ([`run_in`]) and the K function
/// share one frame, so `audit --scales` builds every window once.
#[derive(Debug, Clone)]
pub struct Frame {
    /// The whole-numbered origin subtracted from every coordinate (the
    /// shift by a whole number is exact).
    pub origin: Xy,
    /// The points in local coordinates, in input order.
    pub points: Vec<Xy>,
    /// Each point's nearest-neighbour distance, in input order.
    pub distances: Vec<f64>,
    /// Their mean.
    pub mean_nn: f64,
    /// The windows, in local coordinates.
    pub windows: Vec<Window>,
    /// Why windows were left out.
    pub notes: Vec<String>,
}

/// Centre `points` and `boundaries` and build the windows of `options`.
pub fn frame(
    points: &[Xy],
    boundaries: &[NamedShape],
    options: &WindowOptions,
) -> Result<Frame, AuditError> {
    let n = points.len();
    if n < 2 {
        return Err(AuditError::TooFewPoints { n });
    }
    if let Some(index) = points
        .iter()
        .position(|p| !(p[0].is_finite() && p[1].is_finite()))
    {
        return Err(AuditError::NotFinite { index });
    }
    let origin = centre(points);
    let local: Vec<Xy> = points
        .iter()
        .map(|p| [p[0] - origin[0], p[1] - origin[1]])
        .collect();
    let local_boundaries: Vec<NamedShape> = boundaries
        .iter()
        .map(|b| NamedShape {
            shape: b.shape.translate(-origin[0], -origin[1]),
            ..b.clone()
        })
        .collect();
    // Two finite points or more always have distances: the checks above.
    let distances = nearest_distances(&local).ok_or(AuditError::TooFewPoints { n })?;
    let mean_nn = mean(&distances).ok_or(AuditError::TooFewPoints { n })?;
    let (windows, notes) = build_windows(&local, mean_nn, &local_boundaries, options);
    Ok(Frame {
        origin,
        points: local,
        distances,
        mean_nn,
        windows,
        notes,
    })
}

/// Run the sweep. Refused ([`AuditError`]) when α is not in (0, 1), fewer
/// than two points are given or a coordinate is not finite. `tick` is
/// called once per simulated pattern (progress bars).
pub fn run_audit(
    points: &[Xy],
    boundaries: &[NamedShape],
    options: &AuditOptions,
    tick: &(dyn Fn() + Sync),
) -> Result<Audit, AuditError> {
    let alpha = options.alpha;
    two_sided_critical(alpha).ok_or(AuditError::Alpha { alpha })?;
    let frame = frame(points, boundaries, &options.windows)?;
    run_in(&frame, options, tick)
}

/// The sweep in the windows of `frame` (built with `options.windows`),
/// with the windows' outlines moved back to the caller's coordinates in
/// the result.
pub fn run_in(
    frame: &Frame,
    options: &AuditOptions,
    tick: &(dyn Fn() + Sync),
) -> Result<Audit, AuditError> {
    let alpha = options.alpha;
    let z_crit = two_sided_critical(alpha).ok_or(AuditError::Alpha { alpha })?;
    let (origin, points, all_nn) = (frame.origin, &frame.points[..], frame.mean_nn);
    let all_distances = &frame.distances;
    let (mut windows, notes) = (frame.windows.clone(), frame.notes.clone());
    let guard = options.guard.unwrap_or(all_nn);
    let mut results = Vec::new();
    let mut skipped = Vec::new();
    let mut simulated_means = Vec::new();

    for w in &windows {
        // A window that covers every point sees the same pattern, so its
        // plain distances are the ones just measured (same engine, same
        // bits): only its torus distances, if any, need a new search.
        let known = (w.inside.len() == points.len()).then_some(&all_distances[..]);
        let (rows, skips, sim_means) = rows_of_window(points, w, guard, options, tick, known);
        results.extend(rows);
        skipped.extend(skips);
        simulated_means.push(sim_means);
    }
    let flip = flip_entries(points.len(), all_nn, z_crit, &windows, &options.edges);
    // Back to the caller's coordinates for outlines and rectangles.
    for w in &mut windows {
        if let Some(s) = &w.shape {
            w.shape = Some(s.translate(origin[0], origin[1]));
        }
        if let Some(r) = &mut w.rectangle {
            r.min = [r.min[0] + origin[0], r.min[1] + origin[1]];
            r.max = [r.max[0] + origin[0], r.max[1] + origin[1]];
        }
    }
    let summary = summarise(&results, &windows, points.len(), options.alpha);
    Ok(Audit {
        n: points.len(),
        mean_nn: all_nn,
        z_crit,
        alpha: options.alpha,
        guard,
        guard_is_default: options.guard.is_none(),
        sims: options.sims,
        seed: options.seed,
        edges: options.edges.clone(),
        windows,
        results,
        skipped,
        notes,
        flip,
        summary,
        simulated_means,
    })
}

/// A whole-numbered point near the middle of the data's bounding box:
/// the origin of the local coordinates every computation works in (the
/// shift by a whole number is exact).
pub fn centre(points: &[Xy]) -> Xy {
    let (mut lo, mut hi) = ([f64::INFINITY; 2], [f64::NEG_INFINITY; 2]);
    for p in points {
        for k in 0..2 {
            lo[k] = lo[k].min(p[k]);
            hi[k] = hi[k].max(p[k]);
        }
    }
    let mid = |k: usize| {
        let m = ((lo[k] + hi[k]) / 2.0).round();
        if m.is_finite() { m } else { 0.0 }
    };
    [mid(0), mid(1)]
}

/// The rows of one window: its observed statistics, its simulations and
/// one row per edge handling (or a `Skipped` entry). Public so that a
/// multi-site run can re-run a single window with more simulations.
pub fn window_rows(
    points: &[Xy],
    w: &Window,
    guard: f64,
    options: &AuditOptions,
    tick: &(dyn Fn() + Sync),
) -> (Vec<ResultRow>, Vec<Skipped>, Vec<f64>) {
    rows_of_window(points, w, guard, options, tick, None)
}

/// [`window_rows`], given the plain nearest-neighbour distances of the
/// window's points when they are already known.
fn rows_of_window(
    points: &[Xy],
    w: &Window,
    guard: f64,
    options: &AuditOptions,
    tick: &(dyn Fn() + Sync),
    known: Option<&[f64]>,
) -> (Vec<ResultRow>, Vec<Skipped>, Vec<f64>) {
    let alpha = options.alpha;
    let mut rows = Vec::new();
    let mut skips = Vec::new();
    let skip = |edge: Edge, reason: &str| Skipped {
        window: w.id.clone(),
        edge,
        reason: reason.to_string(),
    };
    // A window that covers every point uses them as they are (no copy).
    let used: std::borrow::Cow<[Xy]> = if w.inside.len() == points.len() {
        std::borrow::Cow::Borrowed(points)
    } else {
        std::borrow::Cow::Owned(w.inside.iter().map(|&i| points[i]).collect())
    };
    let n = used.len();
    if n < 2 {
        for &e in &options.edges {
            skips.push(skip(e, &format!("only {n} point(s) inside the window")));
        }
        return (rows, skips, Vec::new());
    }
    let wants = |e: Edge| options.edges.contains(&e);
    // Prepared only when asked something: the guard zone or simulations.
    let prepared = (wants(Edge::Border) || options.sims > 0)
        .then(|| PreparedWindow::of(w))
        .flatten();
    let outline = if wants(Edge::Border) {
        prepared.as_ref().map(|p| p.guard_zone(guard))
    } else {
        None
    };
    let m = Measure {
        outline: outline.as_ref(),
        guard: wants(Edge::Border).then_some(guard),
        rectangle: if wants(Edge::Toroidal) {
            w.rectangle
        } else {
            None
        },
    };
    let observed = match known {
        Some(d) if m.rectangle.is_none() => measure_known(&used, m, d),
        _ => measure(&used, m),
    };
    let Some(observed) = observed else {
        return (rows, skips, Vec::new());
    };
    let sims: Vec<PatternStats> = match (&prepared, options.sims) {
        (Some(prepared), k) if k > 0 => match prepared.sampler() {
            Some(sampler) => simulate(sampler, n, k, options.seed, &w.id, m, tick),
            None => Vec::new(),
        },
        _ => Vec::new(),
    };
    // The one per-simulation list kept after this window: the simulation
    // row and `simulation.svg` need the whole distribution.
    let means: Vec<f64> = sims.iter().map(|s| s.mean_nn).collect();
    let outside_note = (w.points_outside > 0).then(|| {
        format!(
            "{} point(s) outside this window are left out",
            w.points_outside
        )
    });
    let is_rect = w.rectangle.is_some();
    let perimeter = w.perimeter;
    let area = w.area;

    for &edge in &options.edges {
        if edge.is_analytic() && n < MIN_N_ANALYTIC {
            skips.push(skip(
                edge,
                &format!(
                    "only {n} point(s): closed-form rows need at least {MIN_N_ANALYTIC} (the normal approximation is not trusted below that; common practice); read the simulation row"
                ),
            ));
            continue;
        }
        let mut notes: Vec<String> = outside_note.iter().cloned().collect();
        let row = ResultRow::empty(&w.id, edge, n);
        let row = match edge {
            Edge::None => {
                let Some(t) = NnRatioTest::uncorrected(observed.mean_nn, n, area) else {
                    skips.push(skip(edge, "the window has no positive area"));
                    continue;
                };
                let mut r = row.with_test(t, alpha);
                r.size_under_csr = false_alarm_rate(
                    &sims,
                    |s| NnRatioTest::uncorrected(s.mean_nn, n, area),
                    alpha,
                );
                r
            }
            Edge::Donnelly => {
                let Some(p) = perimeter else {
                    skips.push(skip(
                        edge,
                        "a bare area has no perimeter for Donnelly's correction",
                    ));
                    continue;
                };
                let Some(t) = donnelly::test(observed.mean_nn, n, area, p) else {
                    skips.push(skip(edge, "the window has no positive area"));
                    continue;
                };
                if !is_rect {
                    notes
                        .push("approximation: Donnelly's formula was fitted for rectangles".into());
                }
                if n < donnelly::DONNELLY_MIN_N {
                    notes.push(format!(
                        "n = {n} is below the n ≥ 7 the formula was fitted for"
                    ));
                }
                let mut r = row.with_test(t, alpha);
                r.size_under_csr =
                    false_alarm_rate(&sims, |s| donnelly::test(s.mean_nn, n, area, p), alpha);
                r
            }
            Edge::Border => {
                let Some((mean_focal, focal)) = observed.border else {
                    skips.push(skip(edge, "a bare area has no outline for a guard zone"));
                    continue;
                };
                let mut r = if focal < MIN_FOCAL {
                    notes.push(format!(
                        "only {focal} point(s) lie at least {guard:.4} from the outline; fewer than {MIN_FOCAL} focal points give no usable test (narrow the guard with --guard)"
                    ));
                    row
                } else {
                    match guard_zone::test(mean_focal, focal, n, area) {
                        Some(t) => row.with_test(t, alpha),
                        None => row,
                    }
                };
                r.focal = Some(focal);
                if focal == n {
                    // A buffered hull whose buffer is at least the guard
                    // does this by construction.
                    notes.push(format!(
                        "every point lies at least {guard:.4} from the outline, so the guard zone leaves none out and this row repeats `none`"
                    ));
                }
                if focal >= MIN_FOCAL {
                    r.size_under_csr = false_alarm_rate(
                        &sims,
                        |s| {
                            s.border.and_then(|(mf, k)| {
                                if k >= MIN_FOCAL {
                                    guard_zone::test(mf, k, n, area)
                                } else {
                                    None
                                }
                            })
                        },
                        alpha,
                    );
                }
                r
            }
            Edge::Toroidal => {
                let Some(t_mean) = observed.torus_mean else {
                    skips.push(skip(
                        edge,
                        if w.kind == WindowKind::Area {
                            "a bare area has no outline to wrap"
                        } else {
                            "torus distances need an axis-aligned rectangle"
                        },
                    ));
                    continue;
                };
                let Some(t) = NnRatioTest::uncorrected(t_mean, n, area) else {
                    continue;
                };
                let mut r = row.with_test(t, alpha);
                r.size_under_csr = false_alarm_rate(
                    &sims,
                    |s| {
                        s.torus_mean
                            .and_then(|tm| NnRatioTest::uncorrected(tm, n, area))
                    },
                    alpha,
                );
                r
            }
            Edge::Simulation => {
                if sims.is_empty() {
                    skips.push(skip(
                        edge,
                        if w.shape.is_none() {
                            "a bare area has no outline to simulate in"
                        } else if options.sims == 0 {
                            "no simulations were run (--sims 0)"
                        } else {
                            "the window has no area to draw simulated points in"
                        },
                    ));
                    continue;
                }
                simulation_row(row, observed.mean_nn, &means, options)
            }
        };
        let mut row = row;
        if !notes.is_empty() {
            row.note = Some(notes.join("; "));
        }
        rows.push(row);
    }
    (rows, skips, means)
}

fn simulation_row(
    mut row: ResultRow,
    observed: f64,
    means: &[f64],
    options: &AuditOptions,
) -> ResultRow {
    let k = means.len() as f64;
    let sim_mean = means.iter().sum::<f64>() / k;
    let sd =
        (means.iter().map(|m| (m - sim_mean).powi(2)).sum::<f64>() / (k - 1.0).max(1.0)).sqrt();
    let p = two_sided_rank_p(observed, means);
    row.mean_nn = Some(observed);
    row.expected_nn = Some(sim_mean);
    row.ratio = Some(observed / sim_mean);
    if sd > 0.0 {
        row.se = Some(sd);
        row.z = Some((observed - sim_mean) / sd);
    }
    row.p = Some(p);
    row.call = Some(Call::from_p(p, observed - sim_mean, options.alpha));
    row.sims = Some(means.len());
    row.seed = Some(options.seed);
    row.sim_mean = Some(sim_mean);
    row.sim_q025 = quantile(means, 0.025);
    row.sim_q975 = quantile(means, 0.975);
    let smallest = 2.0 / (k + 1.0);
    if smallest > options.alpha {
        row.note = Some(format!(
            "{} simulations cannot reach p ≤ {}: the smallest two-sided rank p is {smallest:.3}",
            means.len(),
            options.alpha
        ));
    }
    row
}

/// Share of simulated CSR patterns that `test` calls significant at α.
fn false_alarm_rate(
    sims: &[PatternStats],
    test: impl Fn(&PatternStats) -> Option<NnRatioTest>,
    alpha: f64,
) -> Option<f64> {
    let mut used = 0usize;
    let mut rejected = 0usize;
    for s in sims {
        if let Some(t) = test(s) {
            used += 1;
            if t.p <= alpha {
                rejected += 1;
            }
        }
    }
    (used > 0).then(|| rejected as f64 / used as f64)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::simulation::Measure;
    use approx::abs_diff_eq;

    /// Geometry (the buffer of a convex set holds every point at least D
    /// from its outline): with the default guard, the mean nearest-neighbour
    /// distance, the `1x` buffered hull leaves no point out, so its
    /// guard-zone row equals the `none` row and says so; the `0.5x` buffer
    /// leaves the hull's corners out.
    #[test]
    fn guard_equal_to_the_buffer_leaves_no_point_out() {
        let mut g = crate::test_shapes::Gen(0x5EED_0000_0000_0001);
        let points: Vec<Xy> = (0..150)
            .map(|_| [g.unit() * 90.0, g.unit() * 60.0])
            .collect();
        let opts = AuditOptions {
            sims: 0,
            edges: vec![Edge::None, Edge::Border],
            ..AuditOptions::default()
        };
        let a = run_audit(&points, &[], &opts, &|| {}).expect("audit");
        let row = |window: &str, edge: Edge| {
            a.results
                .iter()
                .find(|r| r.window == window && r.edge == edge)
                .expect("row")
        };
        let buffered: Vec<&Window> = a
            .windows
            .iter()
            .filter(|w| w.kind == WindowKind::BufferedHull)
            .collect();
        assert_eq!(buffered.len(), 3);
        let at_guard = buffered
            .iter()
            .find(|w| w.buffer == Some(a.guard))
            .expect("the 1x buffer equals the guard");
        let border = row(&at_guard.id, Edge::Border);
        assert_eq!(border.focal, Some(150));
        assert_eq!(border.ratio, row(&at_guard.id, Edge::None).ratio);
        assert!(
            border
                .note
                .as_deref()
                .unwrap_or("")
                .contains("repeats `none`")
        );
        let half = buffered
            .iter()
            .find(|w| w.buffer.is_some_and(|d| d < a.guard))
            .expect("0.5x");
        let focal = row(&half.id, Edge::Border).focal.expect("focal");
        assert!(focal < 150, "{focal}");
        assert!(
            !row(&half.id, Edge::Border)
                .note
                .as_deref()
                .unwrap_or("")
                .contains("repeats")
        );
    }

    /// Known result (Donnelly 1978; Diggle 2003, ch. 2): in a small square
    /// under CSR the uncorrected test rejects more often than α, and
    /// Donnelly's corrected mean is closer to the simulated mean than
    /// 0.5·sqrt(A/n). n = 30, 2 000 seeded patterns in a 10 × 10 square.
    #[test]
    fn csr_in_a_small_square_shows_the_edge_bias() {
        let sq = crate::test_shapes::rectangle(10.0, 10.0);
        let sampler = patternproof_window::Sampler::new(&sq).expect("square has area");
        let m = Measure {
            outline: None,
            guard: None,
            rectangle: None,
        };
        let (n, k) = (30, 2_000);
        let stats = simulate(&sampler, n, k, 5, "small-square", m, &|| {});
        let sim_mean = stats.iter().map(|s| s.mean_nn).sum::<f64>() / k as f64;
        let plain = 0.5 * (100.0f64 / n as f64).sqrt();
        let corrected = donnelly::expected_mean(n, 100.0, 40.0);
        assert!(
            (corrected - sim_mean).abs() < (plain - sim_mean).abs(),
            "sim {sim_mean}, plain {plain}, Donnelly {corrected}"
        );
        let rate = false_alarm_rate(
            &stats,
            |s| NnRatioTest::uncorrected(s.mean_nn, n, 100.0),
            0.05,
        )
        .expect("simulations ran");
        // Binomial tolerance: 0.05 + 3·sqrt(0.05·0.95/2000) = 0.0646.
        assert!(rate > 0.0646, "uncorrected false-alarm rate {rate}");
        let d_rate = false_alarm_rate(&stats, |s| donnelly::test(s.mean_nn, n, 100.0, 40.0), 0.05)
            .expect("simulations ran");
        assert!(
            abs_diff_eq!(d_rate, 0.05, epsilon = 0.03),
            "Donnelly false-alarm rate {d_rate}"
        );
    }

    /// The Monte Carlo test holds its size (Besag & Diggle 1977): over 300
    /// CSR patterns, each tested with 99 simulations, the rejection rate at
    /// α = 0.05 stays within a binomial tolerance (3 standard errors:
    /// 0.05 ± 0.038).
    #[test]
    fn simulation_test_holds_its_size() {
        let sq = crate::test_shapes::rectangle(10.0, 10.0);
        let sampler = patternproof_window::Sampler::new(&sq).expect("square has area");
        let m = Measure {
            outline: None,
            guard: None,
            rectangle: None,
        };
        let observed = simulate(&sampler, 30, 300, 8, "observed", m, &|| {});
        let mut rejected = 0;
        for (i, o) in observed.iter().enumerate() {
            let sims = simulate(&sampler, 30, 99, 9, &format!("null-{i}"), m, &|| {});
            let means: Vec<f64> = sims.iter().map(|s| s.mean_nn).collect();
            if two_sided_rank_p(o.mean_nn, &means) <= 0.05 {
                rejected += 1;
            }
        }
        let rate = rejected as f64 / 300.0;
        assert!(
            abs_diff_eq!(rate, 0.05, epsilon = 0.038),
            "simulation test size {rate}"
        );
    }
}
