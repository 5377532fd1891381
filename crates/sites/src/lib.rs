//! One locked protocol applied to every site of a study.
//!
//! For each site: the protocol's window and edge handling give the site's
//! row (the number a comparison across sites may use); the site's own full
//! sweep, as `patternproof audit` runs it, says whether some other
//! defensible window or edge handling would flip its call
//! (`window-sensitive`). Across sites the p-values are adjusted as the
//! protocol says.
//!
//! Each site's random streams derive from the protocol seed and the site's
//! name only ([`site_seed`]), so a site's row is the same whether it runs
//! alone or among hundreds of others.
//!
//! | module | job |
//! |---|---|
//! | [`folder_name`] | a safe, unique folder name for each site's report |
//! | [`pick`] | finds the protocol's window among a site's windows |
//! | [`document`] | the `sites.json` document: counts, notes and one row per site |
//!
//! `patternproof-report` renders the run (`sites.csv`, `sites.md`, the
//! forest picture, the pages and the per-site folders).

pub mod document;
pub mod folder_name;
pub mod pick;

use patternproof_audit::simulation;
use patternproof_audit::streams::label_hash;
use patternproof_audit::sweep::window_rows;
use patternproof_audit::window::{BufferRule, NamedShape, WindowOptions};
use patternproof_audit::{Audit, AuditOptions, Edge, ResultRow, run_audit};
use patternproof_core::normal::two_sided_critical;
use patternproof_core::{Call, Xy};
use patternproof_protocol::{Protocol, WindowRule};
use rand::{Rng, SeedableRng};
use rayon::prelude::*;
use serde::Serialize;

/// One site as read.
#[derive(Debug, Clone)]
pub struct SiteInput {
    /// Site name (file stem or site-field value).
    pub name: String,
    /// Planar points.
    pub points: Vec<Xy>,
    /// The site's own boundary, when given.
    pub boundary: Option<NamedShape>,
}

/// Tested, or listed with the reason it was not.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum Status {
    /// The protocol row exists.
    Tested,
    /// Listed, not tested; see `reason`.
    NotTested,
}

/// One line of `sites.csv`.
#[derive(Debug, Clone, Serialize)]
pub struct SiteRow {
    /// Site name.
    pub site: String,
    /// Points read for the site.
    pub n: usize,
    /// Tested or not.
    pub status: Status,
    /// Why not tested.
    pub reason: Option<String>,
    /// Id of the protocol window at this site.
    pub window: Option<String>,
    /// Its area.
    pub window_area: Option<f64>,
    /// Mean nearest-neighbour distance of the points the window covers.
    pub mean_nn: Option<f64>,
    /// The ratio R of the protocol row.
    pub ratio: Option<f64>,
    /// Normal-approximation 95 % interval of R: R ± 1.96·SE/E.
    pub ratio_low: Option<f64>,
    /// Upper end of that interval.
    pub ratio_high: Option<f64>,
    /// z of the protocol row.
    pub z: Option<f64>,
    /// Two-sided p of the protocol row (rank p for `simulation`).
    pub p: Option<f64>,
    /// p adjusted across the tested sites as the protocol says.
    pub p_adjusted: Option<f64>,
    /// The call at α from the adjusted p.
    pub call: Option<Call>,
    /// The call from the unadjusted p (what the site alone would claim).
    pub call_unadjusted: Option<Call>,
    /// Whether another window or edge handling of the site's own sweep
    /// gives a different call than the protocol row.
    pub window_sensitive: Option<bool>,
    /// The sweep rows that disagree, as `window/edge: call`.
    pub flips: Vec<String>,
    /// The seed of the site's streams.
    pub seed: u64,
}

/// A site's row with its full sweep (for its own report folder).
#[derive(Debug, Clone)]
pub struct SiteRun {
    /// The row.
    pub row: SiteRow,
    /// The sweep, when the site had enough points for one.
    pub audit: Option<Audit>,
}

/// The options a run adds to the protocol.
#[derive(Debug, Clone, Copy)]
pub struct RunOptions {
    /// Simulations per window in each site's window-sensitivity sweep
    /// (the protocol window gets the protocol's number).
    pub sweep_sims: usize,
}

impl Default for RunOptions {
    /// A screening sweep: [`SCREEN_SIMS`](patternproof_core::default_sims::SCREEN_SIMS)
    /// per window, by the one rule of `patternproof_core::default_sims`.
    fn default() -> Self {
        Self {
            sweep_sims: patternproof_core::default_sims::SCREEN_SIMS,
        }
    }
}

/// The seed of a site's streams: from the protocol seed and the site's
/// name only.
pub fn site_seed(seed: u64, name: &str) -> u64 {
    rand_chacha::ChaCha8Rng::seed_from_u64(seed ^ label_hash(&format!("site:{name}"))).next_u64()
}

/// Run every site (in parallel; the order of `inputs` is kept) and adjust
/// the p-values across the tested sites.
pub fn run_sites(inputs: &[SiteInput], protocol: &Protocol, opts: RunOptions) -> Vec<SiteRun> {
    run_sites_with(inputs, protocol, opts, &|| {})
}

/// [`run_sites`], calling `tick` once per simulated pattern (progress
/// bars; [`simulated_patterns`] gives the total).
pub fn run_sites_with(
    inputs: &[SiteInput],
    protocol: &Protocol,
    opts: RunOptions,
    tick: &(dyn Fn() + Sync),
) -> Vec<SiteRun> {
    let mut runs: Vec<SiteRun> = inputs
        .par_iter()
        .map(|s| run_site_with(s, protocol, opts, tick))
        .collect();
    adjust(&mut runs, protocol);
    runs
}

/// The windows with an outline a site's sweep builds (and simulates in):
/// bounding box, hull, concave hull, the default buffers plus the
/// protocol's own, and the site's boundary. An upper bound, since a
/// window that cannot be drawn is left out.
pub fn outlined_windows(protocol: &Protocol, has_boundary: bool) -> usize {
    let extra = match protocol.window {
        WindowRule::HullPlus { .. } | WindowRule::HullPlusKnn { .. } => 1,
        _ => 0,
    };
    3 + BufferRule::defaults().len() + extra + usize::from(has_boundary)
}

/// Simulated patterns of a run at most (the progress bar's total): every
/// site's sweep, and the protocol window again when the protocol asks for
/// another number of simulations than the sweep.
pub fn simulated_patterns(inputs: &[SiteInput], protocol: &Protocol, opts: RunOptions) -> u64 {
    let again = if protocol.sims == opts.sweep_sims {
        0
    } else {
        protocol.sims as u64
    };
    inputs
        .iter()
        .filter(|s| s.points.len() >= protocol.min_n)
        .map(|s| {
            let windows = outlined_windows(protocol, s.boundary.is_some()) as u64;
            (opts.sweep_sims as u64)
                .saturating_mul(windows)
                .saturating_add(again)
        })
        .fold(0u64, u64::saturating_add)
}

/// The memory a run needs beyond its input, with `threads` threads.
///
/// Kept until the folders are written: each site's sweep with its
/// simulated means (8 bytes per simulation and window). Per thread, for
/// the site in flight: the statistics of the window being simulated
/// ([`simulation::BYTES_WHILE_SIMULATING`] per simulation, the protocol's
/// number when larger), the copies of its means the report takes while
/// its folder is rendered (16 bytes per simulation and window), and its
/// points' share of the sweep ([`simulation::bytes_per_point`]).
pub fn run_bytes(
    inputs: &[SiteInput],
    protocol: &Protocol,
    opts: RunOptions,
    threads: usize,
) -> u64 {
    let sweep = opts.sweep_sims as u64;
    let mut kept = 0u64;
    let (mut widest, mut largest) = (0u64, 0u64);
    for s in inputs {
        let windows = outlined_windows(protocol, s.boundary.is_some()) as u64;
        kept = kept.saturating_add((8 * windows).saturating_mul(sweep));
        widest = widest.max(windows);
        let points = (s.points.len() as u64)
            .saturating_mul(simulation::bytes_per_point(windows as usize, 1));
        largest = largest.max(points);
    }
    let simulating =
        simulation::BYTES_WHILE_SIMULATING.saturating_mul(sweep.max(protocol.sims as u64));
    let rendering = (16 * widest).saturating_mul(sweep);
    let per_thread = simulating.saturating_add(rendering).saturating_add(largest);
    kept.saturating_add(per_thread.saturating_mul(threads as u64))
}

/// Seconds the whole run would take on `threads` threads, forecast from
/// `trial`, the seconds one thread takes for one simulated pattern of
/// `trial_n` points (the cost of a pattern grows about linearly with its
/// points).
pub fn forecast_seconds(
    inputs: &[SiteInput],
    protocol: &Protocol,
    opts: RunOptions,
    trial: f64,
    trial_n: usize,
    threads: usize,
) -> f64 {
    let per_point = trial / trial_n.max(1) as f64;
    let again = if protocol.sims == opts.sweep_sims {
        0.0
    } else {
        protocol.sims as f64
    };
    let work: f64 = inputs
        .iter()
        .filter(|s| s.points.len() >= protocol.min_n)
        .map(|s| {
            let windows = outlined_windows(protocol, s.boundary.is_some()) as f64;
            (opts.sweep_sims as f64 * windows + again) * s.points.len() as f64
        })
        .sum();
    work * per_point / threads.max(1) as f64
}

/// Fill `p_adjusted` and `call` across the tested sites.
pub fn adjust(runs: &mut [SiteRun], protocol: &Protocol) {
    let tested: Vec<usize> = (0..runs.len())
        .filter(|&i| runs[i].row.p.is_some())
        .collect();
    let p: Vec<f64> = tested.iter().filter_map(|&i| runs[i].row.p).collect();
    let adjusted = protocol.adjust.apply(&p);
    for (&i, pa) in tested.iter().zip(adjusted) {
        let row = &mut runs[i].row;
        row.p_adjusted = Some(pa);
        let direction = row.z.or(row.ratio.map(|r| r - 1.0)).unwrap_or(0.0);
        row.call = Some(Call::from_p(pa, direction, protocol.alpha));
    }
}

fn not_tested(input: &SiteInput, seed: u64, reason: String) -> SiteRun {
    SiteRun {
        row: SiteRow {
            site: input.name.clone(),
            n: input.points.len(),
            status: Status::NotTested,
            reason: Some(reason),
            window: None,
            window_area: None,
            mean_nn: None,
            ratio: None,
            ratio_low: None,
            ratio_high: None,
            z: None,
            p: None,
            p_adjusted: None,
            call: None,
            call_unadjusted: None,
            window_sensitive: None,
            flips: Vec::new(),
            seed,
        },
        audit: None,
    }
}

/// One site: its sweep, its protocol row, its sensitivity flag.
pub fn run_site(input: &SiteInput, protocol: &Protocol, opts: RunOptions) -> SiteRun {
    run_site_with(input, protocol, opts, &|| {})
}

/// [`run_site`], calling `tick` once per simulated pattern.
pub fn run_site_with(
    input: &SiteInput,
    protocol: &Protocol,
    opts: RunOptions,
    tick: &(dyn Fn() + Sync),
) -> SiteRun {
    let seed = site_seed(protocol.seed, &input.name);
    let n = input.points.len();
    if n < protocol.min_n {
        return not_tested(
            input,
            seed,
            format!(
                "{n} point(s), fewer than the protocol's minimum of {}",
                protocol.min_n
            ),
        );
    }
    if protocol.window.needs_boundary() && input.boundary.is_none() {
        return not_tested(
            input,
            seed,
            "the protocol uses each site's boundary and this site has none".into(),
        );
    }
    let mut buffers = BufferRule::defaults();
    let extra = match protocol.window {
        WindowRule::HullPlus { distance } => Some(BufferRule::Distance(distance)),
        WindowRule::HullPlusKnn { k } => Some(BufferRule::MeanNnMultiple(k)),
        _ => None,
    };
    if let Some(b) = extra
        && !buffers.contains(&b)
    {
        buffers.push(b);
    }
    let options = AuditOptions {
        windows: WindowOptions {
            buffers,
            area: None,
            concavity: protocol.concavity,
        },
        alpha: protocol.alpha,
        edges: Edge::ALL.to_vec(),
        guard: protocol.guard,
        sims: opts.sweep_sims,
        seed,
    };
    let shapes: Vec<NamedShape> = input.boundary.iter().cloned().collect();
    let Ok(audit) = run_audit(&input.points, &shapes, &options, tick) else {
        return not_tested(input, seed, "no sweep could run on these points".into());
    };
    let Some(w) = pick::protocol_window(&audit, &protocol.window) else {
        let reason = format!(
            "the protocol window ({}) cannot be drawn here{}",
            protocol.window.describe(),
            if audit.notes.is_empty() {
                String::new()
            } else {
                format!(": {}", audit.notes.join("; "))
            }
        );
        return SiteRun {
            audit: Some(audit),
            ..not_tested(input, seed, reason)
        };
    };
    if protocol.window.needs_boundary() && w.points_outside > 0 {
        let reason = format!(
            "{} point(s) lie outside the site's boundary: fix the boundary or the points (nothing is dropped silently)",
            w.points_outside
        );
        return SiteRun {
            audit: Some(audit),
            ..not_tested(input, seed, reason)
        };
    }
    // The protocol row, with the protocol's number of simulations.
    let row: Option<ResultRow> = if protocol.sims == opts.sweep_sims {
        audit
            .results
            .iter()
            .find(|r| r.window == w.id && r.edge == protocol.edge)
            .cloned()
    } else {
        let one = AuditOptions {
            edges: vec![protocol.edge],
            sims: protocol.sims,
            ..options.clone()
        };
        let (rows, _, _) = window_rows(&input.points, w, audit.guard, &one, tick);
        rows.into_iter().find(|r| r.edge == protocol.edge)
    };
    let Some(row) = row.filter(|r| r.p.is_some()) else {
        let why = audit
            .skipped
            .iter()
            .find(|s| s.window == w.id && s.edge == protocol.edge)
            .map_or(
                "the protocol's edge handling gives no test here".to_string(),
                |s| s.reason.clone(),
            );
        let window = w.id.clone();
        let area = w.area;
        let mut run = not_tested(input, seed, why);
        run.row.window = Some(window);
        run.row.window_area = Some(area);
        run.audit = Some(audit);
        return run;
    };
    let crit = two_sided_critical(0.05).unwrap_or(1.959_963_984_540_054);
    let half = match (row.se, row.expected_nn) {
        (Some(se), Some(e)) if e > 0.0 => Some(crit * se / e),
        _ => None,
    };
    let flips: Vec<String> = audit
        .results
        .iter()
        .filter(|r| r.call.is_some() && r.call != row.call)
        // A simulation row with too few simulations to reach α cannot
        // disagree meaningfully; it is not counted as a flip.
        .filter(|r| {
            r.edge != Edge::Simulation
                || r.sims
                    .is_some_and(|k| 2.0 / (k as f64 + 1.0) <= protocol.alpha)
        })
        .map(|r| {
            format!(
                "{}/{}: {}",
                r.window,
                r.edge,
                patternproof_core::call::call_word(r.call)
            )
        })
        .collect();
    SiteRun {
        row: SiteRow {
            site: input.name.clone(),
            n,
            status: Status::Tested,
            reason: None,
            window: Some(w.id.clone()),
            window_area: Some(w.area),
            mean_nn: row.mean_nn,
            ratio: row.ratio,
            ratio_low: row.ratio.zip(half).map(|(r, h)| r - h),
            ratio_high: row.ratio.zip(half).map(|(r, h)| r + h),
            z: row.z,
            p: row.p,
            p_adjusted: None,
            call: row.call,
            call_unadjusted: row.call,
            window_sensitive: Some(!flips.is_empty()),
            flips,
            seed,
        },
        audit: Some(audit),
    }
}
