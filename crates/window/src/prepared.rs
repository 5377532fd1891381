//! One window, prepared once for every geometric question the analyses ask
//! of it many times: is a point in it, how far is a point from its outline,
//! which edges come near a circle, which raster cells it holds, and
//! uniform points inside it.
//!
//! The nearest-neighbour audit (guard zone), the K function (border,
//! isotropic) and the density surfaces all ask through this one type, so
//! they answer alike: the `border` row of the audit and the K function's
//! `border` correction count the same points at the same distance.
//!
//! Rules, stated once:
//! * **Inside** ([`PreparedWindow::contains`]) is closed: a point on the
//!   outline (a hole's outline included) is in the window, exactly as
//!   `geo`'s `Intersects` answers, bit for bit ([`crate::cover`]). Hull
//!   corners are data points and must be covered by their own hull.
//! * **Distance to the outline** is to the nearest ring edge, holes
//!   included; for a buffered hull (`hull+D`) it is to the exact buffer
//!   (D ± the distance to the hull's outline, [`crate::outline`]), not to
//!   the buffer's polygon, whose arcs are cut into chords.
//! * **Arcs of the isotropic weight** are judged by the crossing-parity
//!   rule ([`PreparedWindow::contains_by_crossings`]), which agrees with
//!   the closed rule everywhere off the outline.
//! * **Raster cells** ([`PreparedWindow::lattice_inside`]) follow the
//!   even–odd scanline rule through the cells' centres, the rule the
//!   density surfaces have always used; a centre exactly on the outline may
//!   fall either way (a set of zero area).

use crate::build::{Window, shape_area, shape_perimeter};
use crate::cover::Cover;
use crate::outline::Outline;
use crate::sampling::Sampler;
use geo::{BoundingRect, MultiPolygon, Polygon};
use patternproof_core::{Rectangle, Xy};
use rand::Rng;
use rstar::primitives::Line;
use rstar::{AABB, PointDistance, RTree};
use std::sync::OnceLock;

/// A window's outline prepared for repeated queries. Building is
/// O(V log V) for V outline vertices; each query touches only the edges
/// near the point (R*-tree, and for inside-ness edges bucketed by height).
#[derive(Debug, Clone)]
pub struct PreparedWindow {
    cover: Cover,
    area: f64,
    perimeter: f64,
    bounds: Option<Rectangle>,
    rectangle: Option<Rectangle>,
    /// Every ring edge of positive length, exteriors and holes alike.
    edges: RTree<Line<Xy>>,
    /// For a buffered hull: the hull and D, and the outline that measures
    /// from the exact buffer.
    buffered_hull: Option<(Polygon<f64>, f64, Outline)>,
    /// The triangulation for sampling, made on first use.
    sampler: OnceLock<Option<Sampler>>,
}

impl PreparedWindow {
    /// Prepare `shape`. `rectangle` is the caller's note that the shape is
    /// one axis-aligned rectangle without holes ([`Window::rectangle`]), so
    /// that closed forms may be used; `None` when it is not, or not known.
    pub fn new(shape: MultiPolygon<f64>, rectangle: Option<Rectangle>) -> Self {
        let bounds = shape.bounding_rect().map(|r| Rectangle {
            min: [r.min().x, r.min().y],
            max: [r.max().x, r.max().y],
        });
        let mut lines = Vec::new();
        for poly in &shape {
            for ring in std::iter::once(poly.exterior()).chain(poly.interiors()) {
                for seg in ring.lines() {
                    if seg.start != seg.end {
                        lines.push(Line::new(
                            [seg.start.x, seg.start.y],
                            [seg.end.x, seg.end.y],
                        ));
                    }
                }
            }
        }
        Self {
            area: shape_area(&shape),
            perimeter: shape_perimeter(&shape),
            bounds,
            rectangle,
            edges: RTree::bulk_load(lines),
            buffered_hull: None,
            sampler: OnceLock::new(),
            cover: Cover::new(shape),
        }
    }

    /// Prepare `buffered`, the buffer of the convex `hull` by `d`, so that
    /// distances to the outline are to the exact buffer (see
    /// [`Outline::around_buffered_hull`]). Everything else is asked of the
    /// buffer's polygon itself.
    pub fn buffered_hull(buffered: MultiPolygon<f64>, hull: &Polygon<f64>, d: f64) -> Self {
        let outline = Outline::around_buffered_hull(&buffered, hull, d, None);
        let mut w = Self::new(buffered, None);
        w.buffered_hull = Some((hull.clone(), d, outline));
        w
    }

    /// Prepare a window of the sweep: a buffered hull measured from its
    /// hull, every other window from its own outline. `None` for a bare
    /// area (`--area`), which has no outline.
    pub fn of(window: &Window) -> Option<Self> {
        let shape = window.shape.clone()?;
        Some(match (&window.hull, window.buffer) {
            (Some(hull), Some(d)) => Self::buffered_hull(shape, hull, d),
            _ => Self::new(shape, window.rectangle),
        })
    }

    /// The outline.
    pub fn shape(&self) -> &MultiPolygon<f64> {
        self.cover.shape()
    }

    /// Area |W| (all polygons, holes taken out).
    pub fn area(&self) -> f64 {
        self.area
    }

    /// Perimeter: the length of every ring, holes included.
    pub fn perimeter(&self) -> f64 {
        self.perimeter
    }

    /// The bounding rectangle; `None` for a shape without vertices.
    pub fn bounds(&self) -> Option<Rectangle> {
        self.bounds
    }

    /// Set when the window is one axis-aligned rectangle without holes.
    pub fn rectangle(&self) -> Option<Rectangle> {
        self.rectangle
    }

    /// True when `p` is inside the window or on its outline (`geo`'s
    /// `Intersects`, bit for bit).
    pub fn contains(&self, p: Xy) -> bool {
        self.cover.covers(p)
    }

    /// The crossing-parity rule: a horizontal ray from `p` to the right
    /// crosses the rings an odd number of times exactly when `p` is
    /// inside. Off the outline it answers as [`PreparedWindow::contains`];
    /// on it (or within rounding of it) it may go either way. The
    /// isotropic edge weight judges its arcs by this rule, and changing
    /// rule would move K̂ in its last digits, so it stays.
    pub fn contains_by_crossings(&self, p: Xy) -> bool {
        let Some(b) = self.bounds else {
            return false;
        };
        if p[0] > b.max[0] || p[0] < b.min[0] {
            return false;
        }
        let env = AABB::from_corners(p, [b.max[0] + 1.0, p[1]]);
        let mut inside = false;
        for l in self.edges.locate_in_envelope_intersecting(&env) {
            let (a, b) = (l.from, l.to);
            if (a[1] > p[1]) != (b[1] > p[1]) {
                let x = a[0] + (p[1] - a[1]) / (b[1] - a[1]) * (b[0] - a[0]);
                if x > p[0] {
                    inside = !inside;
                }
            }
        }
        inside
    }

    /// Indices of the points [`PreparedWindow::contains`], increasing
    /// (the same for any thread count).
    pub fn covered(&self, points: &[Xy]) -> Vec<usize> {
        self.cover.covered(points)
    }

    /// Distance from `p` to the outline (holes included); for a buffered
    /// hull, to the exact buffer.
    pub fn distance_to_outline(&self, p: Xy) -> f64 {
        match &self.buffered_hull {
            Some((_, _, outline)) => outline.distance_to_outline(p),
            None => self.distance_to_edges(p),
        }
    }

    /// Distance from `p` to the nearest edge of the window's own polygon
    /// (holes included). The same as [`PreparedWindow::distance_to_outline`]
    /// except for a buffered hull, whose polygon lies inside the exact
    /// buffer by up to its chords' sagitta: a circle about `p` shorter than
    /// this lies wholly inside the polygon.
    pub fn distance_to_edges(&self, p: Xy) -> f64 {
        self.edges
            .nearest_neighbor(&p)
            .map_or(f64::INFINITY, |l| l.distance_2(&p).sqrt())
    }

    /// Whether outline distances are to an exact buffer rather than to
    /// the polygon ([`PreparedWindow::buffered_hull`]).
    pub fn is_buffered_hull(&self) -> bool {
        self.buffered_hull.is_some()
    }

    /// The outline prepared for the guard zone's question "is this point
    /// at least `w` from the outline?" at one width, asked of every point
    /// of every simulated pattern ([`Outline::clear_of`]); it answers as
    /// `distance_to_outline(p) >= w`.
    pub fn guard_zone(&self, w: f64) -> Outline {
        match &self.buffered_hull {
            Some((hull, d, _)) => Outline::around_buffered_hull(self.shape(), hull, *d, Some(w)),
            None => Outline::new(self.shape(), Some(w)),
        }
    }

    /// Ring edges whose bounding box meets the square around `c` of
    /// half-width `r`: every edge a circle of radius `r` about `c` can cut.
    pub fn edges_near(&self, c: Xy, r: f64) -> impl Iterator<Item = &Line<Xy>> {
        let env = AABB::from_corners([c[0] - r, c[1] - r], [c[0] + r, c[1] + r]);
        self.edges.locate_in_envelope_intersecting(&env)
    }

    /// The triangulation behind [`PreparedWindow::sample`]; `None` when the
    /// window has no area. Built on first use.
    pub fn sampler(&self) -> Option<&Sampler> {
        self.sampler
            .get_or_init(|| Sampler::new(self.shape()))
            .as_ref()
    }

    /// `n` independent uniform points in the window, drawn from `rng`
    /// ([`Sampler::sample`]); empty when the window has no area.
    pub fn sample<R: Rng>(&self, n: usize, rng: &mut R) -> Vec<Xy> {
        self.sampler().map_or_else(Vec::new, |s| s.sample(n, rng))
    }

    /// Which centres of the lattice `origin + ((i + ½)·cell, (j + ½)·cell)`,
    /// `i < nx`, `j < ny`, lie inside, row by row (index `j·nx + i`): for
    /// each row the crossings of the horizontal line through its centres
    /// with the ring edges (an edge crosses when exactly one end lies at or
    /// below the line), sorted, and the centres between the first and
    /// second crossing, third and fourth, and so on (even–odd rule).
    pub fn lattice_inside(&self, origin: Xy, cell: f64, nx: usize, ny: usize) -> Vec<bool> {
        let mut mask = vec![false; nx * ny];
        let Some(b) = self.bounds.filter(|_| nx > 0) else {
            return mask;
        };
        let mut xs: Vec<f64> = Vec::new();
        for j in 0..ny {
            let y = origin[1] + (j as f64 + 0.5) * cell;
            xs.clear();
            let row = AABB::from_corners([b.min[0], y], [b.max[0], y]);
            for l in self.edges.locate_in_envelope_intersecting(&row) {
                let ([ax, ay], [bx, by]) = (l.from, l.to);
                if (ay <= y) != (by <= y) {
                    xs.push(ax + (y - ay) / (by - ay) * (bx - ax));
                }
            }
            xs.sort_by(f64::total_cmp);
            for pair in xs.chunks_exact(2) {
                let from = ((pair[0] - origin[0]) / cell - 0.5).ceil().max(0.0) as usize;
                let to = ((pair[1] - origin[0]) / cell - 0.5).floor();
                if to < 0.0 {
                    continue;
                }
                let to = (to as usize).min(nx - 1);
                for i in from..=to {
                    mask[j * nx + i] = true;
                }
            }
        }
        mask
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::test_shapes::{Gen, rectangle, rectangle_with_hole};
    use geo::{Buffer, Contains, Coord, Distance, Euclidean, Intersects, LineString, Point};
    use rand::SeedableRng;
    use rand_chacha::ChaCha8Rng;

    /// A holed square beside a wobbly 40-gon with a triangular hole: holes
    /// and several polygons in one window.
    fn two_parts(g: &mut Gen) -> MultiPolygon<f64> {
        let gon: Vec<(f64, f64)> = (0..40)
            .map(|k| {
                let t = std::f64::consts::TAU * k as f64 / 40.0;
                let r = 8.0 * (1.0 + 0.3 * (g.unit() - 0.5));
                (30.0 + r * t.cos(), 5.0 + r * t.sin())
            })
            .collect();
        let mut square = rectangle_with_hole(10.0, 10.0, [4.0, 4.0, 6.0, 6.0]);
        square.0.push(Polygon::new(
            LineString::from(gon),
            vec![LineString::from(vec![
                (28.0, 4.0),
                (32.0, 4.0),
                (30.0, 7.0),
            ])],
        ));
        square
    }

    /// Seeded points over the shape's box grown by a fifth, plus every
    /// vertex and a point along every edge of every ring (on the outline).
    fn probes(shape: &MultiPolygon<f64>, g: &mut Gen) -> Vec<Xy> {
        let r = shape.bounding_rect().expect("non-empty shape");
        let (w, h) = (r.width() * 1.4, r.height() * 1.4);
        let (x0, y0) = (r.min().x - r.width() * 0.2, r.min().y - r.height() * 0.2);
        let mut out: Vec<Xy> = (0..4_000)
            .map(|_| [x0 + g.unit() * w, y0 + g.unit() * h])
            .collect();
        for poly in shape {
            for ring in std::iter::once(poly.exterior()).chain(poly.interiors()) {
                for l in ring.lines() {
                    let t = g.unit();
                    out.push([l.start.x, l.start.y]);
                    out.push([
                        l.start.x + t * (l.end.x - l.start.x),
                        l.start.y + t * (l.end.y - l.start.y),
                    ]);
                }
            }
        }
        out
    }

    /// Brute force: geo's `Euclidean` distance from `p` to every ring.
    fn ring_distance(shape: &MultiPolygon<f64>, p: Xy) -> f64 {
        let q = Point::new(p[0], p[1]);
        shape
            .iter()
            .flat_map(|poly| std::iter::once(poly.exterior()).chain(poly.interiors()))
            .map(|r| Euclidean.distance(&q, r))
            .fold(f64::INFINITY, f64::min)
    }

    /// Outside reference: geo's `Intersects` (inside or on the outline)
    /// answers `contains` and `covered` for every probe, and geo's
    /// `Contains` (strictly inside) agrees with both `contains` and
    /// `contains_by_crossings` off the outline; geo's
    /// `Euclidean` point-to-ring distance, taken over every ring, answers
    /// `distance_to_outline` (to 1e-12); the guard zone says "clear of w"
    /// exactly when that distance is at least w. On a holed square, a
    /// window of two holed parts, and the outline points themselves.
    #[test]
    fn contains_and_distance_agree_with_geo_on_holes_and_several_parts() {
        let mut g = Gen(0x0DDB_1A5E_5BAD_5EED);
        for shape in [
            rectangle_with_hole(10.0, 10.0, [4.0, 4.0, 6.0, 6.0]),
            two_parts(&mut g),
        ] {
            let w = PreparedWindow::new(shape.clone(), None);
            let pts = probes(&shape, &mut g);
            let mut on_outline = 0;
            for &p in &pts {
                let c = Coord { x: p[0], y: p[1] };
                let on = shape.intersects(&c);
                assert_eq!(w.contains(p), on, "{p:?}");
                let want = ring_distance(&shape, p);
                if want > 0.0 {
                    assert_eq!(w.contains(p), shape.contains(&c), "{p:?}");
                    // The crossing rule is not robust within rounding of
                    // an edge (a point placed on one may land either side).
                    if want > 1e-9 {
                        assert_eq!(w.contains_by_crossings(p), shape.contains(&c), "{p:?}");
                    }
                } else {
                    // On the outline as far as geo's distance can tell;
                    // Intersects (checked above) is the exact answer.
                    on_outline += usize::from(on);
                }
                assert!((w.distance_to_outline(p) - want).abs() < 1e-12, "{p:?}");
            }
            // At least every vertex; points along edges may round off it.
            assert!(on_outline >= 10, "{on_outline}");
            let all: Vec<usize> = (0..pts.len())
                .filter(|&i| {
                    shape.intersects(&Coord {
                        x: pts[i][0],
                        y: pts[i][1],
                    })
                })
                .collect();
            assert_eq!(w.covered(&pts), all);
            for width in [0.3, 1.0, 2.5] {
                let zone = w.guard_zone(width);
                for &p in &pts {
                    assert_eq!(
                        zone.clear_of(p, width),
                        w.distance_to_outline(p) >= width,
                        "{p:?} {width}"
                    );
                }
            }
        }
    }

    /// Area and perimeter by hand: a 10 × 10 square with a 2 × 2 hole has
    /// area 96 and rings of length 40 + 8; its bounding rectangle is the
    /// square.
    #[test]
    fn area_perimeter_and_bounds_by_hand() {
        let w = PreparedWindow::new(rectangle_with_hole(10.0, 10.0, [4.0, 4.0, 6.0, 6.0]), None);
        assert!((w.area() - 96.0).abs() < 1e-12);
        assert!((w.perimeter() - 48.0).abs() < 1e-12);
        let b = w.bounds().expect("bounds");
        assert_eq!((b.min, b.max), ([0.0, 0.0], [10.0, 10.0]));
        assert!(w.rectangle().is_none());
        let empty = PreparedWindow::new(MultiPolygon::new(vec![]), None);
        assert!(empty.bounds().is_none() && empty.sampler().is_none());
        assert!(!empty.contains([0.0, 0.0]));
    }

    /// A buffered hull measures to the exact buffer: D + t from a point t
    /// inside the hull's outline, D − t from one outside (the parallel body
    /// of a convex set; Steiner's formula rests on the same fact,
    /// METHODS.md), with t from geo's `Euclidean` distance to the hull and
    /// the side from geo's `Intersects`. The buffer's polygon, measured
    /// directly, agrees only to its chords' sagitta d·(1 − cos 0.2).
    #[test]
    fn buffered_hull_distance_is_to_the_exact_buffer() {
        let hull = Polygon::new(
            LineString::from(vec![
                (0.0, 0.0),
                (40.0, -3.0),
                (70.0, 20.0),
                (30.0, 45.0),
                (-5.0, 22.0),
                (0.0, 0.0),
            ]),
            vec![],
        );
        let d = 6.0;
        let buffered = hull.buffer(d);
        let w = PreparedWindow::buffered_hull(buffered.clone(), &hull, d);
        let polygon = PreparedWindow::new(buffered.clone(), None);
        let mut g = Gen(0x5EED_CAFE_F00D_0001);
        // Chords of up to about 0.4 rad at small corners (see build.rs).
        let sagitta = d * (1.0 - 0.2f64.cos());
        let mut apart = 0;
        let mut pts = probes(&MultiPolygon::new(vec![hull.clone()]), &mut g);
        pts.retain(|&p| polygon.contains(p));
        for &p in &pts {
            let q = Point::new(p[0], p[1]);
            let t = Euclidean.distance(&q, hull.exterior());
            let exact = if hull.intersects(&q) { d + t } else { d - t };
            let got = w.distance_to_outline(p);
            assert!((got - exact).abs() <= 1e-12 * exact.max(1.0), "{p:?}");
            let chord = polygon.distance_to_outline(p);
            assert_eq!(w.distance_to_edges(p), chord);
            assert!((chord - exact).abs() <= sagitta + 1e-9, "{p:?}");
            apart += usize::from((chord - exact).abs() > 1e-9);
        }
        assert!(apart > 0, "the polygon and the exact buffer must differ");
        assert_eq!(w.area(), polygon.area());
    }

    /// Raster cells: against geo's `Contains` at every lattice centre off
    /// the outline, on the two-part window (holes included).
    #[test]
    fn lattice_cells_agree_with_geo_contains() {
        let mut g = Gen(0x1357_9BDF_2468_ACE0);
        let shape = two_parts(&mut g);
        let w = PreparedWindow::new(shape.clone(), None);
        let (origin, cell, nx, ny) = ([-1.3, -4.1], 0.37, 120, 60);
        let mask = w.lattice_inside(origin, cell, nx, ny);
        let mut inside = 0;
        for j in 0..ny {
            for i in 0..nx {
                let p = [
                    origin[0] + (i as f64 + 0.5) * cell,
                    origin[1] + (j as f64 + 0.5) * cell,
                ];
                if ring_distance(&shape, p) > 1e-9 {
                    let c = Coord { x: p[0], y: p[1] };
                    assert_eq!(mask[j * nx + i], shape.contains(&c), "{p:?}");
                }
                inside += usize::from(mask[j * nx + i]);
            }
        }
        // About the area over the cell area: 96 + π·8² − 6 ≈ 291 → ~2 100 cells.
        let expect = w.area() / (cell * cell);
        assert!(
            (inside as f64 - expect).abs() < 0.05 * expect,
            "{inside} {expect}"
        );
    }

    /// Sampling draws the very numbers the triangulation's own sampler
    /// draws from the same generator (today's random streams), and every
    /// point lands in the window (geo's `Intersects`).
    #[test]
    fn sampling_reproduces_the_sampler_stream() {
        let shape = rectangle_with_hole(10.0, 10.0, [2.0, 2.0, 6.0, 6.0]);
        let w = PreparedWindow::new(shape.clone(), None);
        let a = w.sample(500, &mut ChaCha8Rng::seed_from_u64(7));
        let b = Sampler::new(&shape)
            .expect("area")
            .sample(500, &mut ChaCha8Rng::seed_from_u64(7));
        assert_eq!(a, b);
        assert!(
            a.iter()
                .all(|p| shape.intersects(&Coord { x: p[0], y: p[1] }))
        );
        let small = PreparedWindow::new(rectangle(3.0, 2.0), None);
        let pts = small.sample(200, &mut ChaCha8Rng::seed_from_u64(8));
        assert!(
            pts.iter()
                .all(|p| (0.0..=3.0).contains(&p[0]) && (0.0..=2.0).contains(&p[1]))
        );
        assert_eq!(small.area(), 6.0);
    }
}
