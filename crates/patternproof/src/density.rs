//! `density`: how much a kernel density surface, its isopleth areas and
//! its main hotspot depend on the kernel, the bandwidth and the edge
//! handling.

use crate::error::{Error, Refusal};
use crate::input::Input;
use geo::{Area, ConvexHull, MultiPoint, MultiPolygon, Point};
use patternproof_density::{Analysis, Config, DensityError, analyse};

/// The surfaces and the window they were estimated in.
#[derive(Debug, Clone)]
pub struct DensityResult {
    /// Surfaces, isopleths, hotspots and the verdict.
    pub analysis: Analysis,
    /// Where the window came from, in words.
    pub window_source: String,
    /// The window's area in the unit squared.
    pub window_area: f64,
}

/// Estimate every kernel × bandwidth × edge surface of `config` in the
/// first boundary of `input`, or in the convex hull of the points when it
/// has none.
///
/// ```
/// use patternproof::{BandwidthSpec, DensityConfig, DensityEdge, Input, Kernel, density};
///
/// // Thirty points on two rings; no boundary, so the window is their
/// // convex hull.
/// let points: Vec<[f64; 2]> = (0..30)
///     .map(|i| {
///         let (r, a) = (if i % 2 == 0 { 10.0 } else { 20.0 }, i as f64 * 0.7);
///         [50.0 + r * a.cos(), 50.0 + r * a.sin()]
///     })
///     .collect();
/// let config = DensityConfig {
///     kernels: vec![Kernel::Gaussian, Kernel::Quartic],
///     bandwidths: vec![BandwidthSpec::Scott],
///     edges: vec![DensityEdge::None],
///     levels: vec![0.5, 0.95],
///     cell: None,
///     reference: (Kernel::Gaussian, BandwidthSpec::Scott, DensityEdge::None),
///     unit: "m".into(),
/// };
/// let result = density(&Input::from_points(points, "m"), &config)?;
/// assert_eq!(result.window_source, "convex hull of the points");
/// assert!(result.window_area > 0.0 && result.window_area < std::f64::consts::PI * 400.0);
/// assert_eq!(result.analysis.surfaces.len(), 2); // one per kernel
/// # Ok::<(), patternproof::Error>(())
/// ```
pub fn density(input: &Input, config: &Config) -> Result<DensityResult, Error> {
    let (window, window_source): (MultiPolygon<f64>, String) = match input.boundaries.first() {
        Some(b) => (
            b.shape.clone(),
            format!("boundary {} ({})", b.name, b.source),
        ),
        None => {
            let mp = MultiPoint(
                input
                    .points
                    .iter()
                    .map(|p| Point::new(p[0], p[1]))
                    .collect(),
            );
            (
                MultiPolygon(vec![mp.convex_hull()]),
                "convex hull of the points".to_string(),
            )
        }
    };
    let window_area = window.unsigned_area();
    if window_area.is_nan() || window_area <= 0.0 {
        return Err(Error::refused(
            Refusal::NoTestableWindow,
            input.subject.clone(),
            "the window has no area (the points lie on one line or at one place)",
            "pass a study area with --boundary, or check the coordinates",
        ));
    }
    let analysis = analyse(&input.points, &window, config).map_err(|e| {
        let hint = match e {
            DensityError::TooManyCells(_) | DensityError::EmptyWindow => {
                "choose a --cell suited to the window's size"
            }
            DensityError::LcvFailed(_) => {
                "drop lcv from --bandwidths for this kernel, or use the gaussian kernel"
            }
            DensityError::NoMass { .. } => {
                "pass a --cell of at most half the bandwidth, or drop that bandwidth"
            }
            _ => "check the point file and the window",
        };
        Error::refused(Refusal::Setting, input.subject.clone(), e.to_string(), hint)
    })?;
    Ok(DensityResult {
        analysis,
        window_source,
        window_area,
    })
}
