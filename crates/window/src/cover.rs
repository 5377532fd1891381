//! Which points a window covers: `geo`'s point-in-polygon answer, asked a
//! million times without rescanning the whole outline each time.
//!
//! `geo`'s `Intersects<Coord>` for a polygon walks every edge of every
//! ring for each point (the winding-number rule, with robust orientation
//! tests), and first recomputes the polygon's bounding box, also over every
//! vertex. That is O(n · V) for n points against V vertices: for a million
//! points and a concave hull of tens of thousands of vertices it is most of
//! a minute. [`Cover`] gives the same answer, bit for bit, in about O(1) per
//! point.
//!
//! Why the answer is the same. In the winding-number rule an edge changes
//! the count, or reports the point as on the boundary, only when its y-range
//! holds the point's y; every other edge is skipped by the rule's first
//! comparisons. So each ring's edges are put into horizontal strips (an
//! edge into every strip its y-range touches) and a point is tested against
//! the edges of its own strip only, with the same comparisons and the same
//! robust orientation test (`geo`'s kernel). The strip of a y is
//! `floor((y − y0) · scale)`, which never decreases as y grows (every
//! rounding step is monotone), so an edge whose y-range holds y always
//! lies in y's strip. Skipping edges cannot change the sum, and the
//! "on the boundary" early exit does not depend on the order of the edges.
//! Holes, the multi-polygon bounding-box shortcut and the empty and
//! one-vertex rings are handled exactly as `geo` handles them; a point with
//! a non-finite coordinate is handed to `geo` itself.
//!
//! Cost: building is O(V + entries); a ring gets up to one strip per edge,
//! fewer when its edges are tall (a comb-like outline), so the strip lists
//! hold at most about 9·V entries. A query costs the edges of one strip,
//! a handful for the outlines the audit meets.

use geo::coordinate_position::CoordPos;
use geo::{Coord, GeoNum, Intersects, Kernel, LineString, MultiPolygon, Orientation};
use patternproof_core::Xy;
use rayon::prelude::*;

/// Point count from which [`Cover::covered`] splits the points over threads.
const PARALLEL_FROM: usize = 1 << 14;

/// Most strips one ring gets.
const MAX_STRIPS: usize = 1 << 22;

/// An outline prepared for "does this point intersect the shape?" (inside
/// or on the boundary, as `geo`'s `Intersects` says).
#[derive(Debug, Clone)]
pub struct Cover {
    /// The shape itself, for the rare point with a non-finite coordinate.
    shape: MultiPolygon<f64>,
    /// Bounding box of the exterior rings, as `geo` computes it.
    bbox: Option<[f64; 4]>,
    polygons: Vec<PolygonStrips>,
}

#[derive(Debug, Clone)]
struct PolygonStrips {
    exterior: RingStrips,
    holes: Vec<RingStrips>,
}

#[derive(Debug, Clone)]
enum RingStrips {
    /// No vertices: covers nothing.
    Empty,
    /// One vertex: only that point is on it.
    Single(Coord<f64>),
    /// Edges bucketed by y.
    Edges {
        y0: f64,
        scale: f64,
        strips: usize,
        /// Strip k holds `edges[start[k]..start[k + 1]]`.
        start: Vec<usize>,
        edges: Vec<[Coord<f64>; 2]>,
    },
}

impl RingStrips {
    fn new(ring: &LineString<f64>) -> Self {
        match ring.0.len() {
            0 => return RingStrips::Empty,
            1 => return RingStrips::Single(ring.0[0]),
            _ => {}
        }
        let lines: Vec<[Coord<f64>; 2]> = ring.lines().map(|l| [l.start, l.end]).collect();
        let (mut lo, mut hi) = (f64::INFINITY, f64::NEG_INFINITY);
        let mut rise = 0.0;
        for [a, b] in &lines {
            lo = lo.min(a.y).min(b.y);
            hi = hi.max(a.y).max(b.y);
            rise += (b.y - a.y).abs();
        }
        let height = hi - lo;
        let v = lines.len();
        // One strip per edge, unless the edges are so tall that the lists
        // would exceed about 9·V entries (each edge adds 1 + rise·scale).
        let strips = if height > 0.0 && rise > 0.0 && height.is_finite() && rise.is_finite() {
            let by_rise = (8.0 * v as f64 * height / rise).floor();
            (v as f64).min(by_rise).clamp(1.0, MAX_STRIPS as f64) as usize
        } else {
            1
        };
        let scale = if strips > 1 {
            strips as f64 / height
        } else {
            0.0
        };
        let strip = |y: f64| strip_of(y, lo, scale, strips);
        let mut start = vec![0usize; strips + 1];
        for [a, b] in &lines {
            let (s0, s1) = ordered(strip(a.y), strip(b.y));
            for k in s0..=s1 {
                start[k + 1] += 1;
            }
        }
        for k in 0..strips {
            start[k + 1] += start[k];
        }
        let mut fill = start[..strips].to_vec();
        let mut edges = vec![[Coord { x: 0.0, y: 0.0 }; 2]; start[strips]];
        for e in &lines {
            let (s0, s1) = ordered(strip(e[0].y), strip(e[1].y));
            for k in s0..=s1 {
                edges[fill[k]] = *e;
                fill[k] += 1;
            }
        }
        RingStrips::Edges {
            y0: lo,
            scale,
            strips,
            start,
            edges,
        }
    }

    /// `geo`'s `coord_pos_relative_to_ring`, over the edges of c's strip.
    fn position(&self, c: Coord<f64>) -> CoordPos {
        let (y0, scale, strips, start, edges) = match self {
            RingStrips::Empty => return CoordPos::Outside,
            RingStrips::Single(v) => {
                return if c == *v {
                    CoordPos::OnBoundary
                } else {
                    CoordPos::Outside
                };
            }
            RingStrips::Edges {
                y0,
                scale,
                strips,
                start,
                edges,
            } => (*y0, *scale, *strips, start, edges),
        };
        let k = strip_of(c.y, y0, scale, strips);
        let mut winding = 0i64;
        for &[s, e] in &edges[start[k]..start[k + 1]] {
            // The same comparisons, in the same order, as geo 0.33.
            if s.y <= c.y {
                if e.y >= c.y {
                    let o = <f64 as GeoNum>::Ker::orient2d(s, e, c);
                    if o == Orientation::CounterClockwise && e.y != c.y {
                        winding += 1;
                    } else if o == Orientation::Collinear && between(c.x, s.x, e.x) {
                        return CoordPos::OnBoundary;
                    }
                }
            } else if e.y <= c.y {
                let o = <f64 as GeoNum>::Ker::orient2d(s, e, c);
                if o == Orientation::Clockwise {
                    winding -= 1;
                } else if o == Orientation::Collinear && between(c.x, s.x, e.x) {
                    return CoordPos::OnBoundary;
                }
            }
        }
        if winding == 0 {
            CoordPos::Outside
        } else {
            CoordPos::Inside
        }
    }
}

impl PolygonStrips {
    /// `geo`'s `Polygon::intersects(&Coord)`: not outside the exterior and
    /// not strictly inside a hole.
    fn intersects(&self, c: Coord<f64>) -> bool {
        match self.exterior.position(c) {
            CoordPos::Outside => false,
            CoordPos::OnBoundary => true,
            CoordPos::Inside => {
                for hole in &self.holes {
                    match hole.position(c) {
                        CoordPos::Outside => {}
                        CoordPos::OnBoundary => return true,
                        CoordPos::Inside => return false,
                    }
                }
                true
            }
        }
    }
}

impl Cover {
    /// Bucket the edges of every ring of `shape`.
    pub fn new(shape: MultiPolygon<f64>) -> Self {
        let mut bbox: Option<[f64; 4]> = None;
        for c in shape.iter().flat_map(|p| &p.exterior().0) {
            let b = bbox.get_or_insert([c.x, c.y, c.x, c.y]);
            // geo's bounding box keeps the first value on ties and NaN.
            if c.x < b[0] {
                b[0] = c.x;
            }
            if c.y < b[1] {
                b[1] = c.y;
            }
            if c.x > b[2] {
                b[2] = c.x;
            }
            if c.y > b[3] {
                b[3] = c.y;
            }
        }
        let polygons = shape
            .iter()
            // An empty exterior covers nothing, whatever its holes.
            .filter(|p| !p.exterior().0.is_empty())
            .map(|p| PolygonStrips {
                exterior: RingStrips::new(p.exterior()),
                holes: p.interiors().iter().map(RingStrips::new).collect(),
            })
            .collect();
        Self {
            shape,
            bbox,
            polygons,
        }
    }

    /// The shape it was built from.
    pub fn shape(&self) -> &MultiPolygon<f64> {
        &self.shape
    }

    /// True when `p` is inside `shape` or on its outline: the same answer
    /// as `shape.intersects(&Coord { x: p[0], y: p[1] })`.
    pub fn covers(&self, p: Xy) -> bool {
        let c = Coord { x: p[0], y: p[1] };
        if !(p[0].is_finite() && p[1].is_finite()) {
            return self.shape.intersects(&c);
        }
        if let Some(b) = self.bbox
            && (b[2] < c.x || b[3] < c.y || b[0] > c.x || b[1] > c.y)
        {
            return false;
        }
        self.polygons.iter().any(|poly| poly.intersects(c))
    }

    /// Indices of the points [`Cover::covers`], in increasing order
    /// (the same for any thread count).
    pub fn covered(&self, points: &[Xy]) -> Vec<usize> {
        if points.len() < PARALLEL_FROM {
            (0..points.len())
                .filter(|&i| self.covers(points[i]))
                .collect()
        } else {
            (0..points.len())
                .into_par_iter()
                .filter(|&i| self.covers(points[i]))
                .collect()
        }
    }
}

/// Strip of `y`: `floor((y − y0) · scale)` clamped into 0..strips.
/// Monotone in `y`.
#[inline]
fn strip_of(y: f64, y0: f64, scale: f64, strips: usize) -> usize {
    let t = (y - y0) * scale;
    if t > 0.0 {
        (t as usize).min(strips - 1)
    } else {
        0
    }
}

fn ordered(a: usize, b: usize) -> (usize, usize) {
    if a <= b { (a, b) } else { (b, a) }
}

/// geo's `value_in_between`: `value` within the closed range of the bounds.
fn between(value: f64, a: f64, b: f64) -> bool {
    if a < b {
        value >= a && value <= b
    } else {
        value >= b && value <= a
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::test_shapes::Gen;
    use geo::{BoundingRect, ConcaveHull, ConvexHull, MultiPoint, Point, Polygon};

    fn ring(n: usize, r: f64, c: [f64; 2], wobble: f64, g: &mut Gen) -> LineString<f64> {
        let pts: Vec<(f64, f64)> = (0..=n)
            .map(|k| {
                let t = std::f64::consts::TAU * (k % n) as f64 / n as f64;
                let rr = r * (1.0 + wobble * (g.unit() - 0.5));
                let rr = if k == n { r } else { rr };
                (c[0] + rr * t.cos(), c[1] + rr * t.sin())
            })
            .collect();
        let mut ls = LineString::from(pts);
        ls.close();
        ls
    }

    /// Outside reference: geo's own `Intersects<Coord>` for every query,
    /// on shapes with many vertices, holes, several polygons, axis-aligned
    /// edges, and queries on vertices, on edges and on the vertices' rows.
    #[test]
    fn agrees_with_geo_intersects_everywhere() {
        let mut g = Gen(0x1234_5678_9ABC_DEF1);
        let mut shapes = Vec::new();
        // A wobbly 300-gon with two holes, and a second polygon beside it.
        let outer = ring(300, 50.0, [0.0, 0.0], 0.6, &mut g);
        let h1 = ring(40, 8.0, [10.0, 5.0], 0.3, &mut g);
        let h2 = ring(7, 5.0, [-15.0, -12.0], 0.0, &mut g);
        let beside = ring(25, 10.0, [90.0, 0.0], 0.8, &mut g);
        shapes.push(MultiPolygon::new(vec![
            Polygon::new(outer, vec![h1, h2]),
            Polygon::new(beside, vec![]),
        ]));
        // A rectangle with a rectangular hole (horizontal edges, shared ys).
        shapes.push(MultiPolygon::new(vec![Polygon::new(
            LineString::from(vec![(0.0, 0.0), (10.0, 0.0), (10.0, 10.0), (0.0, 10.0)]),
            vec![LineString::from(vec![
                (2.0, 2.0),
                (6.0, 2.0),
                (6.0, 6.0),
                (2.0, 6.0),
            ])],
        )]));
        // A comb: tall teeth, so the strip count is cut back.
        let mut comb = vec![(0.0, 0.0)];
        for k in 0..60 {
            let x = k as f64;
            comb.push((x, 100.0));
            comb.push((x + 0.5, 100.0));
            comb.push((x + 0.5, 1.0));
            comb.push((x + 1.0, 1.0));
        }
        comb.push((60.0, 0.0));
        shapes.push(MultiPolygon::new(vec![Polygon::new(
            LineString::from(comb),
            vec![],
        )]));
        // Convex and concave hulls of seeded points.
        let cloud: MultiPoint<f64> = (0..2_000)
            .map(|_| Point::new(g.unit() * 70.0 - 35.0, g.unit() * 40.0 - 20.0))
            .collect();
        shapes.push(MultiPolygon::new(vec![cloud.convex_hull()]));
        shapes.push(MultiPolygon::new(vec![cloud.concave_hull()]));
        for (k, shape) in shapes.iter().enumerate() {
            let cover = Cover::new(shape.clone());
            // Queries over the shape's bounding box grown by a fifth.
            let r = shape.bounding_rect().expect("non-empty shape");
            let (w, h) = (r.width() * 1.4, r.height() * 1.4);
            let (x0, y0) = (r.min().x - r.width() * 0.2, r.min().y - r.height() * 0.2);
            let any = |g: &mut Gen| [x0 + g.unit() * w, y0 + g.unit() * h];
            let mut queries: Vec<Xy> = (0..20_000).map(|_| any(&mut g)).collect();
            for poly in shape {
                for r in std::iter::once(poly.exterior()).chain(poly.interiors()) {
                    for l in r.lines() {
                        let t = g.unit();
                        queries.push([l.start.x, l.start.y]);
                        queries.push([
                            l.start.x + t * (l.end.x - l.start.x),
                            l.start.y + t * (l.end.y - l.start.y),
                        ]);
                        queries.push([any(&mut g)[0], l.start.y]);
                    }
                }
            }
            let mut on_either_side = [0, 0];
            for p in &queries {
                let want = shape.intersects(&Coord { x: p[0], y: p[1] });
                assert_eq!(cover.covers(*p), want, "shape {k} at {p:?}");
                on_either_side[usize::from(want)] += 1;
            }
            assert!(on_either_side[0] > 100 && on_either_side[1] > 100, "{k}");
            let all: Vec<usize> = (0..queries.len())
                .filter(|&i| {
                    shape.intersects(&Coord {
                        x: queries[i][0],
                        y: queries[i][1],
                    })
                })
                .collect();
            assert_eq!(cover.covered(&queries), all, "shape {k}");
        }
    }

    #[test]
    fn empty_and_degenerate_rings() {
        let empty = MultiPolygon::<f64>::new(vec![]);
        assert!(!Cover::new(empty).covers([0.0, 0.0]));
        let flat = MultiPolygon::new(vec![Polygon::new(
            LineString::from(vec![(0.0, 1.0), (5.0, 1.0), (9.0, 1.0)]),
            vec![],
        )]);
        let cover = Cover::new(flat.clone());
        for p in [[3.0, 1.0], [0.0, 1.0], [10.0, 1.0], [3.0, 2.0]] {
            assert_eq!(
                cover.covers(p),
                flat.intersects(&Coord { x: p[0], y: p[1] }),
                "{p:?}"
            );
        }
        let square = MultiPolygon::new(vec![Polygon::new(
            LineString::from(vec![(0.0, 0.0), (1.0, 0.0), (1.0, 1.0), (0.0, 1.0)]),
            vec![],
        )]);
        let cover = Cover::new(square);
        assert!(cover.covers([0.5, 0.5]));
        assert!(cover.covers([1.0, 0.25]));
        assert!(!cover.covers([1.0 + 1e-12, 0.25]));
        assert!(!cover.covers([f64::NAN, 0.5]));
    }
}
