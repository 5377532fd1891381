//! Kernel density audit: how much a density surface, the areas of its
//! isopleths and the place of its main hotspot depend on the kernel, the
//! bandwidth and the edge handling.
//!
//! A surface is computed for every kernel × bandwidth × edge handling on one
//! raster over the window, by linear binning and FFT convolution
//! ([`convolve`]). Each surface's isopleths ([`isopleth`]) are measured,
//! split into patches ([`patches`]) and compared with the reference
//! surface ([`overlap`]); [`verdict`] sums the spread up in one sentence.
//! `patternproof-report` renders the analysis (pictures, GeoTIFF, pages).

pub mod bandwidth;
pub mod convolve;
pub mod edge;
pub mod grid;
pub mod isopleth;
pub mod kernels;
pub mod overlap;
pub mod patches;
pub mod verdict;

use bandwidth::{BandwidthSpec, Lcv, Scott};
use edge::DensityEdge;
use geo::MultiPolygon;
use grid::Grid;
use kernels::Kernel;
use patternproof_core::Xy;
use patternproof_core::numbers::sig;
use patternproof_window::PreparedWindow;
use rayon::prelude::*;

/// What a density surface does and does not show; read with every report.
pub fn cautions() -> Vec<String> {
    vec![
        "A kernel density surface is a smoothed picture of where the recorded points are, for one kernel and one bandwidth. It does not show where events can happen, does not correct for where or how hard anyone looked, and carries no measure of its own uncertainty; isopleth areas are a property of the smoothing as much as of the data.".into(),
        "The surfaces, the isopleth polygons and the GeoTIFF are built from the point locations and can reveal them, most of all with small bandwidths. Point locations of people are personal data: do not share these files without the protection that the data's terms require.".into(),
        "Bandwidth selectors assume independent points. Successive fixes of a track are not independent, and likelihood cross-validation in particular tends to choose small bandwidths for them.".into(),
        "With edge handling `none` part of each kernel's mass falls outside the window (reported as mass_outside); isopleth shares are shares of the mass inside the window.".into(),
    ]
}

/// Whether a unit name means metres (areas in m² then also read in km²,
/// and a GeoTIFF declares the EPSG metre).
pub fn is_metre(unit: &str) -> bool {
    matches!(
        unit.trim().to_ascii_lowercase().as_str(),
        "m" | "metre" | "metres" | "meter" | "meters"
    )
}

/// Jaccard overlap at or above which the main hotspot counts as staying in place.
pub const HOTSPOT_OVERLAP: f64 = 0.5;

/// What to compute.
#[derive(Debug, Clone)]
pub struct Config {
    /// Kernels.
    pub kernels: Vec<Kernel>,
    /// Bandwidths.
    pub bandwidths: Vec<BandwidthSpec>,
    /// Edge handlings.
    pub edges: Vec<DensityEdge>,
    /// Isopleth levels as shares in (0, 1), ascending.
    pub levels: Vec<f64>,
    /// Cell side (default: about 250 cells on the long side).
    pub cell: Option<f64>,
    /// The reference surface.
    pub reference: (Kernel, BandwidthSpec, DensityEdge),
    /// Name of the distance unit (areas are in its square).
    pub unit: String,
}

/// Why an analysis cannot be done. Each variant is one kind of problem,
/// with the numbers involved.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub enum DensityError {
    /// Fewer than two points inside the window.
    #[error("only {0} point(s) inside the window; a density surface needs at least 2")]
    TooFewPoints(usize),
    /// The window has no area or no cell centre inside it.
    #[error("the window has no area at this cell size (no cell centre inside it)")]
    EmptyWindow,
    /// The raster would be too large.
    #[error("the raster would have {0} cells (at most {max} allowed)", max = grid::MAX_CELLS)]
    TooManyCells(usize),
    /// The points do not spread in both directions.
    #[error(
        "the points have no spread (all at one place or on one line through a single coordinate), so Scott's rule gives no bandwidth"
    )]
    Degenerate,
    /// Cross-validation found no bandwidth with a finite likelihood.
    #[error(
        "likelihood cross-validation with the {} kernel found no bandwidth on its grid at which every point has a neighbour",
        .0.name()
    )]
    LcvFailed(Kernel),
    /// A surface puts no mass on any cell: its kernel falls between the
    /// cell centres, so it has no isopleths.
    #[error(
        "the {surface} surface (bandwidth {}) puts no mass on any cell of {}: the kernel falls between the cell centres, so it has no isopleths and its areas would read 0",
        sig(*bandwidth, 4),
        sig(*cell, 4)
    )]
    NoMass {
        /// `kernel bandwidth-spec`, as the warnings name it.
        surface: String,
        /// The bandwidth used.
        bandwidth: f64,
        /// The cell side.
        cell: f64,
    },
}

/// One isopleth level of one surface.
#[derive(Debug, Clone)]
pub struct Level {
    /// The region.
    pub region: isopleth::Region,
    /// Number of 8-connected patches.
    pub patches: usize,
    /// Jaccard overlap with the reference surface's region at this level.
    pub overlap_with_reference: f64,
}

/// One surface and its measurements.
#[derive(Debug, Clone)]
pub struct Surface {
    /// Kernel.
    pub kernel: Kernel,
    /// The bandwidth as asked for.
    pub spec: BandwidthSpec,
    /// Edge handling.
    pub edge: DensityEdge,
    /// The bandwidth used, in the kernel's own parametrisation.
    pub bandwidth: f64,
    /// The Gaussian standard deviation with the same canonical smoothing.
    pub gaussian_equivalent: f64,
    /// How the bandwidth was found, in words.
    pub rule: String,
    /// The density raster.
    pub estimate: edge::Estimate,
    /// Per level.
    pub levels: Vec<Level>,
    /// Centre of the cell of highest density.
    pub peak: Xy,
    /// Jaccard overlap of the main hotspot (the patch of the lowest level's
    /// region that holds the peak) with the reference's.
    pub hotspot_overlap: f64,
    /// The main hotspot's cells.
    pub hotspot: Vec<bool>,
}

impl Surface {
    /// `kernel/bandwidth/edge`.
    pub fn label(&self) -> String {
        format!(
            "{}/{}/{}",
            self.kernel.name(),
            self.spec.label(),
            self.edge.name()
        )
    }
}

/// The whole analysis.
#[derive(Debug, Clone)]
pub struct Analysis {
    /// The raster.
    pub grid: Grid,
    /// Which cells are inside the window.
    pub mask: Vec<bool>,
    /// Points used (inside the window).
    pub points: Vec<Xy>,
    /// Points left out because they lie outside the window.
    pub outside: usize,
    /// Scott's rule.
    pub scott: Scott,
    /// Cross-validations run, one per kernel that needed it.
    pub lcv: Vec<Lcv>,
    /// Every kernel × bandwidth × edge, in that nesting order.
    pub surfaces: Vec<Surface>,
    /// The reference surface.
    pub reference: Surface,
    /// Index of the reference in `surfaces`, if it is one of them.
    pub reference_index: Option<usize>,
    /// The verdict.
    pub verdict: verdict::Verdict,
    /// Things to know that did not stop the run.
    pub warnings: Vec<String>,
    /// The configuration.
    pub config: Config,
}

struct Raw {
    kernel: Kernel,
    spec: BandwidthSpec,
    edge: DensityEdge,
    bandwidth: f64,
    rule: String,
    estimate: edge::Estimate,
}

fn measure(raw: Raw, grid: &Grid, mask: &[bool], levels: &[f64]) -> Surface {
    let order = isopleth::MassOrder::new(&raw.estimate.values, mask);
    // The first level's patches also give the hotspot below.
    let mut first_labels = None;
    let levels: Vec<Level> = levels
        .iter()
        .map(|l| {
            let r = order.region(&raw.estimate.values, mask, grid.cell_area(), *l);
            let (lab, n) = patches::label(&r.cells, grid.nx, grid.ny);
            first_labels.get_or_insert(lab);
            Level {
                region: r,
                patches: n,
                overlap_with_reference: 0.0,
            }
        })
        .collect();
    let vals = &raw.estimate.values;
    let mut best = 0;
    for k in 0..vals.len() {
        if vals[k] > vals[best] {
            best = k;
        }
    }
    let peak = grid.centre(best % grid.nx, best / grid.nx);
    let hotspot = match &first_labels {
        Some(lab) => {
            let id = lab[best];
            lab.iter().map(|x| *x == id && id != usize::MAX).collect()
        }
        None => vec![false; vals.len()],
    };
    Surface {
        gaussian_equivalent: raw.kernel.gaussian_equivalent(raw.bandwidth),
        kernel: raw.kernel,
        spec: raw.spec,
        edge: raw.edge,
        bandwidth: raw.bandwidth,
        rule: raw.rule,
        estimate: raw.estimate,
        levels,
        peak,
        hotspot_overlap: 0.0,
        hotspot,
    }
}

/// Run the analysis on `points` in `window`.
pub fn analyse(
    points: &[Xy],
    window: &MultiPolygon<f64>,
    config: &Config,
) -> Result<Analysis, DensityError> {
    let mut warnings = Vec::new();
    // Points on the outline are in the window (PreparedWindow::contains).
    let window = PreparedWindow::new(window.clone(), None);
    let inside: Vec<Xy> = points
        .iter()
        .copied()
        .filter(|&p| window.contains(p))
        .collect();
    let outside = points.len() - inside.len();
    if outside > 0 {
        warnings.push(format!(
            "{outside} point(s) lie outside the window and are left out of every surface"
        ));
    }
    if inside.len() < 2 {
        return Err(DensityError::TooFewPoints(inside.len()));
    }
    let grid = Grid::over(&window, config.cell).ok_or(DensityError::EmptyWindow)?;
    if grid.len() > grid::MAX_CELLS {
        return Err(DensityError::TooManyCells(grid.len()));
    }
    let mask = grid.mask(&window);
    if !mask.iter().any(|m| *m) {
        return Err(DensityError::EmptyWindow);
    }
    let scott = bandwidth::scott(&inside);
    if !(scott.bandwidth.is_finite() && scott.bandwidth > 0.0) {
        return Err(DensityError::Degenerate);
    }
    let mut kernels_needing_lcv: Vec<Kernel> = Vec::new();
    if config.bandwidths.contains(&BandwidthSpec::Lcv) {
        kernels_needing_lcv.extend(config.kernels.iter().copied());
    }
    if config.reference.1 == BandwidthSpec::Lcv
        && !kernels_needing_lcv.contains(&config.reference.0)
    {
        kernels_needing_lcv.push(config.reference.0);
    }
    let bins = grid.bin(&inside, None);
    let mut lcvs = Vec::new();
    for k in kernels_needing_lcv {
        let r = bandwidth::lcv(&inside, k, k.from_gaussian(scott.bandwidth), &grid, &bins)
            .ok_or(DensityError::LcvFailed(k))?;
        if r.at_grid_edge {
            warnings.push(format!(
                "likelihood cross-validation with the {} kernel chose {:.4}, an end of its grid; the maximiser may lie outside it",
                k.name(),
                r.chosen
            ));
        }
        lcvs.push(r);
    }
    let resolve = |k: Kernel, s: BandwidthSpec| -> (f64, String) {
        let hs = k.from_gaussian(scott.bandwidth);
        let conv = if k == Kernel::Gaussian {
            String::new()
        } else {
            " (canonical equivalent of the Gaussian value)".to_string()
        };
        match s {
            BandwidthSpec::Scott => (hs, format!("Scott's rule σ·n^(−1/6){conv}")),
            BandwidthSpec::ScottTimes(m) => (m * hs, format!("{m} × Scott's rule{conv}")),
            BandwidthSpec::Fixed(v) => (v, format!("fixed value ({})", k.bandwidth_meaning())),
            BandwidthSpec::Lcv => {
                let h = lcvs.iter().find(|l| l.kernel == k).map_or(hs, |l| l.chosen);
                (
                    h,
                    "likelihood cross-validation (leave-one-out log density)".to_string(),
                )
            }
        }
    };
    let mut jobs = Vec::new();
    for &k in &config.kernels {
        for &s in &config.bandwidths {
            for &e in &config.edges {
                let (h, rule) = resolve(k, s);
                jobs.push((k, s, e, h, rule));
            }
        }
    }
    let (rk, rs, re) = config.reference;
    let (rh, rrule) = resolve(rk, rs);
    jobs.push((rk, rs, re, rh, rrule));
    for (k, s, _, h, _) in &jobs {
        if *h < 2.0 * grid.cell {
            let w = format!(
                "bandwidth {} ({} {}) is less than two cells of {}; the raster cannot resolve it: pass a smaller --cell",
                sig(*h, 4),
                k.name(),
                s.label(),
                sig(grid.cell, 4)
            );
            if !warnings.contains(&w) {
                warnings.push(w);
            }
        }
    }
    let mut surfaces: Vec<Surface> = jobs
        .into_par_iter()
        .map(|(k, s, e, h, rule)| {
            let estimate = edge::estimate(&inside, &grid, &mask, k, h, e);
            measure(
                Raw {
                    kernel: k,
                    spec: s,
                    edge: e,
                    bandwidth: h,
                    rule,
                    estimate,
                },
                &grid,
                &mask,
                &config.levels,
            )
        })
        .collect();
    // An empty surface has no isopleths: its areas would read 0 and drag
    // every range down, so it stops the run instead.
    if let Some(s) = surfaces
        .iter()
        .find(|s| !(s.estimate.mass_inside > 0.0 && s.estimate.mass_inside.is_finite()))
    {
        return Err(DensityError::NoMass {
            surface: format!("{} {}", s.kernel.name(), s.spec.label()),
            bandwidth: s.bandwidth,
            cell: grid.cell,
        });
    }
    let mut reference = surfaces.pop().ok_or(DensityError::EmptyWindow)?;
    let compare = |s: &mut Surface, r: &Surface| {
        for (l, rl) in s.levels.iter_mut().zip(&r.levels) {
            l.overlap_with_reference = overlap::jaccard(&l.region.cells, &rl.region.cells);
        }
        s.hotspot_overlap = overlap::jaccard(&s.hotspot, &r.hotspot);
    };
    let snapshot = reference.clone();
    compare(&mut reference, &snapshot);
    for s in &mut surfaces {
        compare(s, &snapshot);
    }
    let reference_index = surfaces
        .iter()
        .position(|s| s.kernel == rk && s.spec == rs && s.edge == re);
    let verdict = verdict::verdict(&surfaces, &config.levels, &config.unit);
    Ok(Analysis {
        grid,
        mask,
        points: inside,
        outside,
        scott,
        lcv: lcvs,
        surfaces,
        reference,
        reference_index,
        verdict,
        warnings,
        config: config.clone(),
    })
}

#[cfg(test)]
#[allow(clippy::unwrap_used)] // a failed unwrap is a failed test
mod tests {
    use super::*;

    /// The refusals that follow from the points or the flags, each from a
    /// natural input: one point inside, every point at one place (Scott's
    /// σ is 0), and a cell so small that the 30 × 30 window needs
    /// (30 / 0.001 + 2)² = 900 120 004 cells.
    #[test]
    fn refusals_name_their_kind_and_numbers() {
        let square = MultiPolygon::new(vec![geo::Polygon::new(
            geo::LineString::from(vec![
                (0.0, 0.0),
                (30.0, 0.0),
                (30.0, 30.0),
                (0.0, 30.0),
                (0.0, 0.0),
            ]),
            vec![],
        )]);
        let config = |cell: f64| Config {
            kernels: vec![Kernel::Gaussian],
            bandwidths: vec![BandwidthSpec::Fixed(2.0)],
            edges: vec![DensityEdge::None],
            levels: vec![0.5],
            cell: Some(cell),
            reference: (
                Kernel::Gaussian,
                BandwidthSpec::Fixed(2.0),
                DensityEdge::None,
            ),
            unit: "m".into(),
        };
        let e = analyse(&[[5.0, 5.0], [50.0, 5.0]], &square, &config(1.0)).unwrap_err();
        assert_eq!(e, DensityError::TooFewPoints(1));
        let e = analyse(&[[5.0, 5.0], [5.0, 5.0]], &square, &config(1.0)).unwrap_err();
        assert_eq!(e, DensityError::Degenerate);
        let spread = [[5.0, 5.0], [12.0, 20.0], [25.0, 9.0]];
        let e = analyse(&spread, &square, &config(0.001)).unwrap_err();
        assert_eq!(e, DensityError::TooManyCells(900_120_004));
        assert_eq!(
            e.to_string(),
            "the raster would have 900120004 cells (at most 16000000 allowed)"
        );
    }

    /// Two refusals that follow from the window and the kernel: a band
    /// 0.001 wide along the diagonal, on 1-unit cells whose centres lie
    /// at y − x = j − i − 0.4995 (the raster is centred on the band's
    /// box), holds no cell centre; and a uniform disc kernel gives the one
    /// point 3000 units from a 5 × 4 cluster no neighbour at any bandwidth
    /// of the cross-validation grid: Scott's σ·n^(−1/6) is 278.5 (by hand
    /// from the 21 points), 557 as a disc radius (canonical ratio
    /// (16/π)^(1/6) / (1/4π)^(1/6) = 2), and the grid ends at 2² × 557 ≈
    /// 2230 < 3000.
    #[test]
    fn an_empty_raster_and_a_failed_cross_validation_name_their_kind() {
        let ring = |c: Vec<(f64, f64)>| {
            MultiPolygon::new(vec![geo::Polygon::new(geo::LineString::from(c), vec![])])
        };
        let config = |kernel: Kernel, bandwidth: BandwidthSpec, cell: f64| Config {
            kernels: vec![kernel],
            bandwidths: vec![bandwidth],
            edges: vec![DensityEdge::None],
            levels: vec![0.5],
            cell: Some(cell),
            reference: (kernel, bandwidth, DensityEdge::None),
            unit: "m".into(),
        };
        let band = ring(vec![
            (0.0, 0.0),
            (100.0, 100.0),
            (100.0, 100.001),
            (0.0, 0.001),
            (0.0, 0.0),
        ]);
        let on_band = [[10.0, 10.0005], [50.0, 50.0005]];
        let fixed = BandwidthSpec::Fixed(2.0);
        let e = analyse(&on_band, &band, &config(Kernel::Gaussian, fixed, 1.0)).unwrap_err();
        assert_eq!(e, DensityError::EmptyWindow);

        let field = ring(vec![
            (0.0, 0.0),
            (4000.0, 0.0),
            (4000.0, 4000.0),
            (0.0, 4000.0),
            (0.0, 0.0),
        ]);
        let mut points: Vec<Xy> = (0..20)
            .map(|k| [10.0 + (k % 5) as f64, 10.0 + (k / 5) as f64])
            .collect();
        points.push([3010.0, 10.0]);
        let lcv = config(Kernel::Uniform, BandwidthSpec::Lcv, 10.0);
        let e = analyse(&points, &field, &lcv).unwrap_err();
        assert_eq!(e, DensityError::LcvFailed(Kernel::Uniform));
    }

    /// Issue 20: a kernel whose height 1/h² overflows (h = 10⁻³⁰⁰) or
    /// underflows (h = 10³⁰⁰) leaves no finite mass on the raster; the run
    /// stops naming the surface instead of reporting isopleth areas of 0.
    /// A narrow kernel that the raster merely coarsens (h = 0.1 on 1-unit
    /// cells: the binned points keep their mass) still gives a surface.
    #[test]
    fn a_surface_without_mass_stops_the_run() {
        let pts: Vec<Xy> = (0..40)
            .map(|k| [(k % 8) as f64 * 3.0 + 2.2, (k / 8) as f64 * 3.0 + 2.7])
            .collect();
        let square = MultiPolygon::new(vec![geo::Polygon::new(
            geo::LineString::from(vec![
                (0.0, 0.0),
                (30.0, 0.0),
                (30.0, 30.0),
                (0.0, 30.0),
                (0.0, 0.0),
            ]),
            vec![],
        )]);
        let config = |h: f64| Config {
            kernels: vec![Kernel::Gaussian],
            bandwidths: vec![BandwidthSpec::Fixed(h)],
            edges: vec![DensityEdge::None],
            levels: vec![0.5],
            cell: Some(1.0),
            reference: (Kernel::Gaussian, BandwidthSpec::Fixed(h), DensityEdge::None),
            unit: "m".into(),
        };
        for h in [1e-300, 1e300] {
            let e = analyse(&pts, &square, &config(h)).unwrap_err();
            assert!(
                matches!(&e, DensityError::NoMass { bandwidth, .. } if *bandwidth == h),
                "{e:?}"
            );
            assert!(
                e.to_string().contains("puts no mass on any cell of 1.000"),
                "{e}"
            );
        }
        let a = analyse(&pts, &square, &config(0.1)).unwrap();
        assert!(a.reference.estimate.mass_inside > 0.5);
        assert!(a.warnings.iter().any(|w| w.contains("less than two cells")));
    }

    /// Bandwidths beyond what floating point can hold are refused when
    /// parsed: the kernel's height 1/h² would under- or overflow.
    #[test]
    fn absurd_bandwidths_are_not_parsed() {
        assert_eq!(BandwidthSpec::parse("1e300"), None);
        assert_eq!(BandwidthSpec::parse("1e-300"), None);
        assert_eq!(BandwidthSpec::parse("1e300x"), None);
        assert_eq!(
            BandwidthSpec::parse("1e13"),
            Some(BandwidthSpec::Fixed(1e13))
        );
        assert_eq!(
            BandwidthSpec::parse("1e-6x"),
            Some(BandwidthSpec::ScottTimes(1e-6))
        );
    }
}
