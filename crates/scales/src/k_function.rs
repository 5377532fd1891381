//! K̂(r), L̂(r) and L̂(r) − r on a grid of distances, for each edge
//! correction.
//!
//! K̂(r) = |W|/(n(n−1)) · Σ_{i≠j} w_ij · 1(d_ij ≤ r) for the weighted
//! corrections (isotropic, translation); the border estimator is described
//! in [`crate::border`]. L̂ = sqrt(K̂/π) (Besag 1977), so L̂(r) − r is 0 on
//! average under complete spatial randomness (CSR) and positive for
//! clustering at distance r.
//!
//! Every pair closer than r_max is visited once
//! ([`patternproof_core::close_pairs::PairSearch`], centre by centre); its
//! isotropic weights (both directions: the weight is not symmetric) and its
//! translation weight are computed once and added to the bin of its
//! distance, and a cumulative sum over the bins gives every distance of the
//! grid. No list of pairs is kept, so memory grows with n, not with the
//! number of pairs. Work is parallel over centres; sums are taken in centre
//! order, so the numbers do not depend on the thread count.

use crate::border;
use crate::isotropic;
use crate::k_window::KWindow;
use crate::translation;
use patternproof_core::Xy;
use patternproof_core::close_pairs::{Neighbours, PairSearch};
use rayon::prelude::*;
use serde::Serialize;
use std::f64::consts::PI;

/// An edge correction for K.
#[derive(Debug, Clone, Copy, PartialEq, Eq, PartialOrd, Ord, Hash, Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum Correction {
    /// Reduced sample: centres at least r from the outline.
    Border,
    /// Ripley's isotropic weight.
    Isotropic,
    /// Ohser–Stoyan translation weight.
    Translation,
}

impl Correction {
    /// All corrections, in report order.
    pub const ALL: [Correction; 3] = [
        Correction::Border,
        Correction::Isotropic,
        Correction::Translation,
    ];

    /// The command-line word.
    pub fn as_str(self) -> &'static str {
        match self {
            Correction::Border => "border",
            Correction::Isotropic => "isotropic",
            Correction::Translation => "translation",
        }
    }

    /// Parse a command-line word.
    pub fn parse(word: &str) -> Option<Self> {
        Self::ALL
            .into_iter()
            .find(|c| c.as_str() == word.trim().to_ascii_lowercase())
    }
}

/// The distance grid r_k = r_max·k/steps, k = 1..=steps (r = 0, where
/// every estimator is 0, is left out).
pub fn distance_grid(rmax: f64, steps: usize) -> Vec<f64> {
    (1..=steps)
        .map(|k| rmax * k as f64 / steps as f64)
        .collect()
}

/// One estimated curve.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct KCurve {
    /// The correction.
    pub correction: Correction,
    /// K̂ at each grid distance; `None` where undefined (border estimator
    /// with no centre far enough inside).
    pub k: Vec<Option<f64>>,
    /// L̂ = sqrt(K̂/π).
    pub l: Vec<Option<f64>>,
    /// L̂ − r.
    pub l_minus_r: Vec<Option<f64>>,
}

/// Counts of pairs that needed special handling, reported so that nothing
/// is silently altered.
#[derive(Debug, Clone, Copy, Default, PartialEq, Eq, Serialize)]
pub struct PairNotes {
    /// Unordered pairs closer than r_max.
    pub pairs: usize,
    /// Ordered pairs whose isotropic share fell below
    /// [`isotropic::MIN_SHARE`] (weight capped).
    pub isotropic_capped: usize,
    /// Pairs left out of the translation estimator because the shifted
    /// window did not overlap the window.
    pub translation_dropped: usize,
}

/// One pair's contribution, binned.
struct Contribution {
    bin: u32,
    /// Border: the bins' end (exclusive) for the centre i and for j.
    border_end: [u32; 2],
    iso: f64,
    trans: f64,
}

/// Pairs weighed between two merges of the parallel path: a bound on the
/// contributions held at once (32 bytes each, so about 8 MiB), whatever
/// the number of pairs in the pattern.
const WAVE_PAIRS: usize = 1 << 18;

/// The per-bin sums of the pair weights, before the cumulative sum over
/// the grid, with the pair notes.
struct Sums {
    iso: Vec<f64>,
    trans: Vec<f64>,
    border: Vec<f64>,
    notes: PairNotes,
}

impl Sums {
    fn new(steps: usize) -> Self {
        Self {
            iso: vec![0.0; steps + 1],
            trans: vec![0.0; steps + 1],
            border: vec![0.0; steps + 1],
            notes: PairNotes::default(),
        }
    }

    /// Add contributions in the order given. Every caller adds them in
    /// centre order and, within a centre, in neighbour order, so the sums
    /// take the same floating-point path for any thread count and any
    /// split into waves.
    fn add(&mut self, contributions: &[Contribution]) {
        self.notes.pairs += contributions.len();
        for c in contributions {
            let bin = c.bin as usize;
            self.iso[bin] += c.iso;
            self.trans[bin] += c.trans;
            for end in c.border_end {
                let end = end as usize;
                if end > bin {
                    self.border[bin] += 1.0;
                    self.border[end] -= 1.0;
                }
            }
        }
    }
}

/// K̂, L̂ and L̂ − r of `points` (all inside `region`) on `grid` for each
/// correction in `corrections`. `parallel` spreads centres over threads
/// (the observed pattern); simulations call it with `false` and run in
/// parallel themselves.
///
/// Memory grows with n, not with the number of pairs: the pairs of each
/// centre are weighed as the range search finds them and added to the
/// distance bins, and the parallel path holds at most about
/// `WAVE_PAIRS` weighed pairs between two merges.
pub fn k_curves(
    points: &[Xy],
    region: &KWindow,
    grid: &[f64],
    corrections: &[Correction],
    parallel: bool,
) -> (Vec<KCurve>, PairNotes) {
    let n = points.len();
    let steps = grid.len();
    let rmax = grid.last().copied().unwrap_or(0.0);
    let want = |c: Correction| corrections.contains(&c);
    let (do_iso, do_trans, do_border) = (
        want(Correction::Isotropic),
        want(Correction::Translation),
        want(Correction::Border),
    );
    let search = PairSearch::new(points, rmax);
    // Distance of every point to the polygon's edges: the isotropic
    // shortcut (a circle shorter than it lies wholly inside, weight
    // exactly 1, no edge search).
    let b = if do_iso {
        border::edge_distances(region, points, parallel)
    } else {
        Vec::new()
    };
    // The border estimator's rule, from the distance to the outline: the
    // same as `b` except in a buffered hull, measured from the exact
    // buffer there. At most `steps` (≤ the CLI's 10 000), so it fits a u32.
    let border_end: Vec<u32> = if !do_border {
        Vec::new()
    } else if do_iso && !region.geometry.is_buffered_hull() {
        b.iter()
            .map(|&d| border::counted_up_to(grid, d) as u32)
            .collect()
    } else {
        border::counted_ends(region, grid, points, parallel)
    };
    let iso_weight = |i: usize, d: f64| -> (f64, bool) {
        if d < b[i] {
            (1.0, false)
        } else {
            isotropic::weight(region, points[i], d)
        }
    };

    // Weigh the pairs (i, j > i) of centres `from..to`, appending to `out`;
    // returns the capped and dropped counts.
    let weigh = |from: usize,
                 to: usize,
                 near: &mut Neighbours,
                 out: &mut Vec<Contribution>|
     -> (usize, usize) {
        let (mut capped, mut dropped) = (0, 0);
        for i in from..to {
            search.neighbours_into(i, near);
            for &(j, d) in near.iter() {
                let bin = grid.partition_point(|&r| r < d);
                if bin >= steps {
                    continue;
                }
                let iso = if do_iso {
                    let (a, ca) = iso_weight(i, d);
                    let (c, cc) = iso_weight(j, d);
                    capped += usize::from(ca) + usize::from(cc);
                    a + c
                } else {
                    0.0
                };
                let trans = if do_trans {
                    let v = [points[i][0] - points[j][0], points[i][1] - points[j][1]];
                    match translation::weight(region, v) {
                        Some(w) => 2.0 * w,
                        None => {
                            dropped += 1;
                            0.0
                        }
                    }
                } else {
                    0.0
                };
                let ends = if do_border {
                    [border_end[i], border_end[j]]
                } else {
                    [0, 0]
                };
                out.push(Contribution {
                    bin: bin as u32,
                    border_end: ends,
                    iso,
                    trans,
                });
            }
        }
        (capped, dropped)
    };

    let mut sums = Sums::new(steps);
    let mut near = Neighbours::new();
    let mut out = Vec::new();
    if parallel {
        // Waves of centres: each wave is weighed in parallel, chunk by
        // chunk, and merged in chunk order before the next starts. A wave
        // is sized from the pairs per centre seen so far, to hold about
        // WAVE_PAIRS pairs; the size changes only the memory held, not
        // the sums (see `Sums::add`).
        let threads = rayon::current_num_threads().max(1);
        // Small at first, since a centre may have any number of pairs.
        let mut wave = 16 * threads;
        let mut next = 0;
        while next < n {
            let end = (next + wave).min(n);
            let chunk = (end - next).div_ceil(8 * threads).max(1);
            let starts: Vec<usize> = (next..end).step_by(chunk).collect();
            let parts: Vec<(Vec<Contribution>, usize, usize)> = starts
                .into_par_iter()
                .map_init(Neighbours::new, |near, from| {
                    let mut part = Vec::new();
                    let (capped, dropped) = weigh(from, (from + chunk).min(end), near, &mut part);
                    (part, capped, dropped)
                })
                .collect();
            let mut seen = 0;
            for (part, capped, dropped) in &parts {
                sums.add(part);
                sums.notes.isotropic_capped += capped;
                sums.notes.translation_dropped += dropped;
                seen += part.len();
            }
            let per_centre = seen as f64 / (end - next) as f64;
            // At most four times the last wave: the next centres may lie in
            // a denser part of the pattern.
            let fits = (WAVE_PAIRS as f64 / per_centre.max(1.0)) as usize;
            wave = fits.clamp(1, 4 * (end - next));
            next = end;
        }
    } else {
        for i in 0..n {
            out.clear();
            let (capped, dropped) = weigh(i, i + 1, &mut near, &mut out);
            sums.add(&out);
            sums.notes.isotropic_capped += capped;
            sums.notes.translation_dropped += dropped;
        }
    }

    let cumulative = |v: &[f64]| -> Vec<f64> {
        v[..steps]
            .iter()
            .scan(0.0, |s, &x| {
                *s += x;
                Some(*s)
            })
            .collect()
    };
    let scale = if n > 1 {
        region.geometry.area() / (n as f64 * (n - 1) as f64)
    } else {
        f64::NAN
    };
    let mut curves = Vec::new();
    for &c in corrections {
        let k: Vec<Option<f64>> = match c {
            Correction::Isotropic => cumulative(&sums.iso)
                .into_iter()
                .map(|s| (n > 1).then_some(s * scale))
                .collect(),
            Correction::Translation => cumulative(&sums.trans)
                .into_iter()
                .map(|s| (n > 1).then_some(s * scale))
                .collect(),
            Correction::Border => {
                let counts = cumulative(&sums.border);
                let centres: Vec<usize> = (0..steps)
                    .map(|k| border_end.iter().filter(|&&e| e as usize > k).count())
                    .collect();
                border::estimate(region.geometry.area(), n, &counts, &centres)
            }
        };
        curves.push(curve(c, k, grid));
    }
    (curves, sums.notes)
}

/// L̂ and L̂ − r from K̂.
pub fn curve(correction: Correction, k: Vec<Option<f64>>, grid: &[f64]) -> KCurve {
    let l: Vec<Option<f64>> = k
        .iter()
        .map(|v| v.map(|x| (x.max(0.0) / PI).sqrt()))
        .collect();
    let l_minus_r = l.iter().zip(grid).map(|(v, r)| v.map(|x| x - r)).collect();
    KCurve {
        correction,
        k,
        l,
        l_minus_r,
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use approx::relative_eq;
    use geo::{LineString, MultiPolygon, Polygon};

    fn holed() -> KWindow {
        let ring = |v: Vec<(f64, f64)>| LineString::from(v);
        let shape = MultiPolygon::new(vec![Polygon::new(
            ring(vec![(0., 0.), (20., 0.), (20., 16.), (0., 16.), (0., 0.)]),
            vec![ring(vec![
                (8., 6.),
                (12., 6.),
                (12., 10.),
                (8., 10.),
                (8., 6.),
            ])],
        )]);
        KWindow::new(&shape, None).expect("area")
    }

    fn pattern(region: &KWindow, n: usize) -> Vec<Xy> {
        let mut v = Vec::new();
        let mut k = 0u32;
        while v.len() < n {
            k += 1;
            let t = f64::from(k);
            let p = [
                (t * 0.754_877_666).fract() * 20.0,
                (t * 0.569_840_29).fract() * 16.0,
            ];
            if region.geometry.contains(p) {
                v.push(p);
            }
        }
        v
    }

    /// The tabulated translation overlaps move K̂ by a negligible amount:
    /// against exact per-pair intersections (geo boolean operations) on
    /// 400 points in a window with a hole, within 2e-5 relative at every r.
    #[test]
    fn translation_table_keeps_k() {
        let mut reg = holed();
        let pts = pattern(&reg, 400);
        let grid = distance_grid(4.0, 8);
        let c = [Correction::Translation];
        let (exact, _) = k_curves(&pts, &reg, &grid, &c, true);
        reg.overlap_table = Some(translation::OverlapTable::new(&reg, 4.0));
        let (tabled, _) = k_curves(&pts, &reg, &grid, &c, true);
        let mut worst: f64 = 0.0;
        for (a, b) in exact[0].k.iter().zip(&tabled[0].k) {
            let (a, b) = (a.unwrap_or(f64::NAN), b.unwrap_or(f64::NAN));
            worst = worst.max((a - b).abs() / a);
        }
        println!("translation table: worst relative change of K {worst:.2e}");
        assert!(worst < 2e-5, "{worst}");
        assert_ne!(exact[0].k, tabled[0].k, "the table was used");
    }

    /// Every correction against the O(n²) double loop over all ordered
    /// pairs, written straight from the formulas (brute force).
    #[test]
    fn all_corrections_match_brute_force() {
        let reg = holed();
        let pts = pattern(&reg, 120);
        let grid = distance_grid(3.0, 10);
        let (curves, notes) = k_curves(&pts, &reg, &grid, &Correction::ALL, true);
        let n = pts.len() as f64;
        for (k, &r) in grid.iter().enumerate() {
            let (mut iso, mut tr, mut bc, mut centres) = (0.0, 0.0, 0.0, 0usize);
            for i in 0..pts.len() {
                let bi = reg.geometry.distance_to_outline(pts[i]);
                if bi >= r {
                    centres += 1;
                }
                for j in 0..pts.len() {
                    if i == j {
                        continue;
                    }
                    let d = (pts[i][0] - pts[j][0]).hypot(pts[i][1] - pts[j][1]);
                    if d <= r {
                        iso += 1.0 / isotropic::inside_share(&reg, pts[i], d);
                        let v = [pts[i][0] - pts[j][0], pts[i][1] - pts[j][1]];
                        tr += reg.geometry.area() / translation::overlap_area_polygon(&reg, v);
                        if bi >= r {
                            bc += 1.0;
                        }
                    }
                }
            }
            let want_iso = reg.geometry.area() / (n * (n - 1.0)) * iso;
            let want_tr = reg.geometry.area() / (n * (n - 1.0)) * tr;
            let want_b = reg.geometry.area() * bc / ((n - 1.0) * centres as f64);
            let got = |c: usize| curves[c].k[k].expect("defined");
            assert!(
                relative_eq!(got(0), want_b, epsilon = 1e-9, max_relative = 1e-9),
                "border r={r}"
            );
            assert!(
                relative_eq!(got(1), want_iso, epsilon = 1e-9, max_relative = 1e-9),
                "iso r={r}"
            );
            assert!(
                relative_eq!(got(2), want_tr, epsilon = 1e-9, max_relative = 1e-9),
                "trans r={r}"
            );
        }
        assert_eq!(notes.isotropic_capped, 0);
        assert_eq!(notes.translation_dropped, 0);
    }
}
