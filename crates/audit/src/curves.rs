//! Sensitivity curves: the ratio R and z as the study area grows.
//!
//! The named windows are a handful of points on a continuum. To show where
//! the call changes between them, each analytic edge handling is evaluated
//! over the family of windows of the convex hull's shape scaled by s about
//! the hull's centroid (area s²·A_h, perimeter s·P_h), with the observed
//! points held fixed:
//!
//! * `none` — Clark & Evans (1954): depends on the area only.
//! * `donnelly` — Donnelly (1978) with the scaled perimeter.
//! * `border` — the guard zone (Diggle 2003, ch. 2). A point x is focal
//!   when its distance to the scaled outline is at least w. For a convex
//!   window that distance is min_i (s·h_i − u_i·(x − c)), with u_i the
//!   outward unit normal of edge i and h_i the edge's distance from the
//!   centroid c; so x is focal exactly when s ≥ s*(x) = max_i (w + u_i·(x −
//!   c)) / h_i. Sorting the points by s* once gives every curve point by a
//!   prefix sum. Drawn only for s ≥ 1, where every point lies inside.
//! * `toroidal` — defined on rectangles only, so no curve over the hull's
//!   shape; its rows appear as markers at their windows.
//!
//! Below s = 1 some points lie outside the scaled hull; the `none` and
//! `donnelly` curves there answer "what if someone had used an area this
//! small", which is how an area-only report reads.

use crate::edge::Edge;
use crate::sweep::{Audit, MIN_FOCAL};
use crate::window::WindowKind;
use geo::{Centroid, Coord, MultiPolygon};
use patternproof_core::nearest::nearest_distances;
use patternproof_core::{NnRatioTest, Xy, donnelly, guard_zone};
use serde::Serialize;

/// Curve points per line (log-spaced in area).
pub const STEPS: usize = 161;

/// One point of a curve.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct CurvePoint {
    /// Window area (unit²).
    pub area: f64,
    /// The ratio R.
    pub ratio: f64,
    /// The z value.
    pub z: f64,
}

/// One edge handling's curve over the scaled-hull family.
#[derive(Debug, Clone, Serialize)]
pub struct Curve {
    /// Edge handling.
    pub edge: Edge,
    /// Points in increasing area.
    pub points: Vec<CurvePoint>,
}

/// All curves of one audit.
#[derive(Debug, Clone, Serialize)]
pub struct Sensitivity {
    /// Area of the convex hull (s = 1).
    pub hull_area: f64,
    /// Smallest and largest area swept.
    pub area_range: [f64; 2],
    /// One curve per analytic edge handling that has one.
    pub curves: Vec<Curve>,
    /// Analytic edge handlings without a curve, and why.
    pub omitted: Vec<(Edge, String)>,
}

/// The curves for an audit of `points`. `None` without a hull window
/// (collinear or too few points).
pub fn sensitivity(points: &[Xy], audit: &Audit) -> Option<Sensitivity> {
    let hull = audit.windows.iter().find(|w| w.kind == WindowKind::Hull)?;
    let shape = hull.shape.as_ref()?;
    let perimeter = hull.perimeter?;
    let hull_area = hull.area;
    let n = points.len();
    let distances = nearest_distances(points)?;
    let mean_nn = audit.mean_nn;

    let (lo, hi) = area_range(audit, hull_area);
    let areas: Vec<f64> = (0..STEPS)
        .map(|k| lo * (hi / lo).powf(k as f64 / (STEPS - 1) as f64))
        .collect();

    let mut curves = Vec::new();
    let mut omitted = Vec::new();
    for &edge in audit.edges.iter().filter(|e| e.is_analytic()) {
        match edge {
            Edge::None => curves.push(Curve {
                edge,
                points: areas
                    .iter()
                    .filter_map(|&a| point(a, NnRatioTest::uncorrected(mean_nn, n, a)))
                    .collect(),
            }),
            Edge::Donnelly => curves.push(Curve {
                edge,
                points: areas
                    .iter()
                    .filter_map(|&a| {
                        let s = (a / hull_area).sqrt();
                        point(a, donnelly::test(mean_nn, n, a, s * perimeter))
                    })
                    .collect(),
            }),
            Edge::Border => match FocalOrder::new(shape, points, &distances, audit.guard) {
                Some(order) => curves.push(Curve {
                    edge,
                    points: areas
                        .iter()
                        .filter(|&&a| a >= hull_area * (1.0 - 1e-12))
                        .filter_map(|&a| {
                            let s = (a / hull_area).sqrt();
                            let (m, mean_focal) = order.at(s)?;
                            (m >= MIN_FOCAL)
                                .then(|| point(a, guard_zone::test(mean_focal, m, n, a)))
                                .flatten()
                        })
                        .collect(),
                }),
                None => omitted.push((edge, "the hull has no interior".to_string())),
            },
            Edge::Toroidal => omitted.push((
                edge,
                "defined on rectangles only: shown at its windows, no curve over the hull's shape"
                    .to_string(),
            )),
            Edge::Simulation => {}
        }
    }
    Some(Sensitivity {
        hull_area,
        area_range: [lo, hi],
        curves,
        omitted,
    })
}

fn point(area: f64, t: Option<NnRatioTest>) -> Option<CurvePoint> {
    t.map(|t| CurvePoint {
        area,
        ratio: t.ratio,
        z: t.z,
    })
}

/// From half the smallest window to twice the largest, widened to take in
/// the flip thresholds when they lie within a factor of 100 of the hull.
fn area_range(audit: &Audit, hull_area: f64) -> (f64, f64) {
    let mut lo = hull_area;
    let mut hi = hull_area;
    for w in &audit.windows {
        lo = lo.min(w.area);
        hi = hi.max(w.area);
    }
    for f in &audit.flip {
        for a in [f.clustered_above_area, f.dispersed_below_area]
            .into_iter()
            .flatten()
        {
            if a.is_finite() && a > hull_area / 100.0 && a < hull_area * 100.0 {
                lo = lo.min(a);
                hi = hi.max(a);
            }
        }
    }
    (lo / 2.0, hi * 2.0)
}

/// Points sorted by the scale s* at which they become focal, with prefix
/// sums of their nearest-neighbour distances.
struct FocalOrder {
    thresholds: Vec<f64>,
    prefix: Vec<f64>,
}

impl FocalOrder {
    fn new(shape: &MultiPolygon<f64>, points: &[Xy], distances: &[f64], w: f64) -> Option<Self> {
        let polygon = shape.0.first()?;
        let c = polygon.centroid()?;
        let ring: Vec<Coord<f64>> = polygon.exterior().coords().copied().collect();
        // Signed area decides the orientation, so the normals point outward
        // whichever way the ring winds.
        let twice_area: f64 = ring
            .windows(2)
            .map(|e| e[0].x * e[1].y - e[1].x * e[0].y)
            .sum();
        if twice_area == 0.0 {
            return None;
        }
        let sign = twice_area.signum();
        let mut edges = Vec::new();
        for e in ring.windows(2) {
            let (dx, dy) = (e[1].x - e[0].x, e[1].y - e[0].y);
            let len = dx.hypot(dy);
            if len == 0.0 {
                continue;
            }
            // Outward normal of a counter-clockwise ring is (dy, −dx)/len.
            let u = [sign * dy / len, -sign * dx / len];
            let h = u[0] * (e[0].x - c.x()) + u[1] * (e[0].y - c.y());
            if h > 0.0 {
                edges.push((u, h));
            }
        }
        if edges.is_empty() {
            return None;
        }
        let mut order: Vec<(f64, f64)> = points
            .iter()
            .zip(distances)
            .map(|(p, &d)| {
                let s = edges
                    .iter()
                    .map(|(u, h)| (w + u[0] * (p[0] - c.x()) + u[1] * (p[1] - c.y())) / h)
                    .fold(f64::NEG_INFINITY, f64::max);
                (s, d)
            })
            .collect();
        order.sort_by(|a, b| a.0.total_cmp(&b.0).then(a.1.total_cmp(&b.1)));
        let mut prefix = Vec::with_capacity(order.len() + 1);
        prefix.push(0.0);
        for (_, d) in &order {
            prefix.push(prefix.last().copied().unwrap_or(0.0) + d);
        }
        Some(Self {
            thresholds: order.iter().map(|o| o.0).collect(),
            prefix,
        })
    }

    /// Focal count and mean focal distance at scale s.
    fn at(&self, s: f64) -> Option<(usize, f64)> {
        let m = self.thresholds.partition_point(|&t| t <= s);
        (m > 0).then(|| (m, self.prefix[m] / m as f64))
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::sweep::{AuditOptions, run_audit};
    use approx::{abs_diff_eq, relative_eq};
    use geo::{Contains, Scale};
    use patternproof_window::Outline;
    use rand::RngExt;
    use rand::SeedableRng;

    fn pattern(n: usize, seed: u64) -> Vec<Xy> {
        let mut rng = rand_chacha::ChaCha8Rng::seed_from_u64(seed);
        (0..n)
            .map(|_| [rng.random::<f64>() * 80.0, rng.random::<f64>() * 50.0])
            .collect()
    }

    fn audit(points: &[Xy]) -> Audit {
        let opts = AuditOptions {
            sims: 0,
            edges: vec![Edge::None, Edge::Donnelly, Edge::Border, Edge::Toroidal],
            ..AuditOptions::default()
        };
        run_audit(points, &[], &opts, &|| {}).expect("audit")
    }

    /// At s = 1 the curves reproduce the sweep's own `hull` rows: the same
    /// formulas (Clark & Evans 1954; Donnelly 1978) and, for the guard
    /// zone, the same focal set found here by the supporting-line
    /// construction and there by exact point-to-outline distances.
    #[test]
    fn curves_pass_through_the_hull_rows() {
        let points = pattern(120, 7);
        let a = audit(&points);
        let s = sensitivity(&points, &a).expect("curves");
        let hull = a.windows.iter().find(|w| w.id == "hull").expect("hull");
        for curve in &s.curves {
            let row = a
                .results
                .iter()
                .find(|r| r.window == "hull" && r.edge == curve.edge)
                .expect("row");
            // Evaluate the family exactly at the hull's area.
            let at = match curve.edge {
                Edge::None => point(
                    hull.area,
                    NnRatioTest::uncorrected(a.mean_nn, 120, hull.area),
                ),
                Edge::Donnelly => point(
                    hull.area,
                    donnelly::test(a.mean_nn, 120, hull.area, hull.perimeter.expect("p")),
                ),
                Edge::Border => {
                    let d = nearest_distances(&points).expect("d");
                    let order =
                        FocalOrder::new(hull.shape.as_ref().expect("shape"), &points, &d, a.guard)
                            .expect("order");
                    let (m, mf) = order.at(1.0 + 1e-12).expect("focal");
                    assert_eq!(Some(m), row.focal, "focal count");
                    point(hull.area, guard_zone::test(mf, m, 120, hull.area))
                }
                _ => unreachable!(),
            }
            .expect("point");
            let ratio = row.ratio.expect("ratio");
            assert!(
                relative_eq!(at.ratio, ratio, max_relative = 1e-9),
                "{:?}",
                curve.edge
            );
            assert!(
                abs_diff_eq!(at.z, row.z.expect("z"), epsilon = 1e-9),
                "{:?}",
                curve.edge
            );
        }
        assert_eq!(s.omitted.len(), 1, "toroidal has no curve");
        assert_eq!(s.omitted[0].0, Edge::Toroidal);
    }

    /// The focal threshold s*(x) is exact: scaling the hull by s*(x) puts
    /// x at distance w from the outline, checked with geo's exact
    /// point-to-segment distance (`Outline`).
    #[test]
    fn focal_threshold_puts_the_point_at_the_guard_width() {
        let points = pattern(60, 3);
        let a = audit(&points);
        let hull = a.windows.iter().find(|w| w.id == "hull").expect("hull");
        let shape = hull.shape.as_ref().expect("shape");
        let c = shape.0[0].centroid().expect("centroid");
        let w = 4.0;
        let d = nearest_distances(&points).expect("d");
        let order = FocalOrder::new(shape, &points, &d, w).expect("order");
        // Check the first, a middle and the last threshold.
        for &k in &[0usize, 30, 59] {
            let s = order.thresholds[k];
            // geo's plain `scale` works about the bounding-box centre.
            let scaled = shape.scale_around_point(s, s, c);
            let outline = Outline::new(&scaled, None);
            // Focal: inside the scaled window and clear of its outline.
            let inside = |i: usize| scaled.contains(&geo::Point::new(points[i][0], points[i][1]));
            let clear: Vec<usize> = (0..points.len())
                .filter(|&i| inside(i) && outline.clear_of(points[i], w * (1.0 - 1e-9)))
                .collect();
            assert!(
                clear.len() > k,
                "at s*, at least k+1 points are focal: k={k} s={s} clear={}",
                clear.len()
            );
            let strict: Vec<usize> = (0..points.len())
                .filter(|&i| inside(i) && outline.clear_of(points[i], w * (1.0 + 1e-9)))
                .collect();
            assert!(strict.len() <= k + 1, "just above w, at most k+1 are focal");
        }
    }

    /// The swept range holds every window and the flip thresholds near the
    /// hull, and the `none` curve crosses z = −z_crit exactly at the
    /// closed-form threshold (Clark & Evans 1954 rearranged).
    #[test]
    fn range_and_crossing() {
        let points = pattern(150, 11);
        let a = audit(&points);
        let s = sensitivity(&points, &a).expect("curves");
        for w in &a.windows {
            assert!(w.area > s.area_range[0] && w.area < s.area_range[1]);
        }
        let none = &s.curves[0];
        assert_eq!(none.edge, Edge::None);
        let flip = a.flip.iter().find(|f| f.edge == Edge::None).expect("flip");
        let t = flip.clustered_above_area.expect("threshold");
        assert!(t > s.area_range[0] && t < s.area_range[1]);
        let cross = none
            .points
            .windows(2)
            .find(|p| (p[0].z + a.z_crit) * (p[1].z + a.z_crit) <= 0.0)
            .expect("crossing");
        assert!(cross[0].area <= t && t <= cross[1].area);
        // Every curve runs in increasing area.
        for c in &s.curves {
            assert!(c.points.windows(2).all(|p| p[0].area < p[1].area));
        }
    }
}
