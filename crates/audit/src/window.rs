//! Study-area variants ("windows").
//!
//! Every window is a value with an id, a kind, its area and perimeter, and
//! how many points fall outside it. Geometry comes from `geo`: bounding
//! rectangle, convex hull, concave hull, round-joined buffer (its default
//! join: arcs cut into segments of 0.2 rad), area, perimeter.
//!
//! Defaults, chosen so every data set gets the same family:
//! * buffers: 0.5×, 1× and 2× the observed mean nearest-neighbour distance,
//!   the spacing at which a surveyor plausibly draws a margin around the
//!   outermost finds;
//! * concave hull: `geo`'s concavity 2.0 (its default; smaller values cut
//!   deeper), no length threshold.

use geo::algorithm::Buffer;
use geo::{
    Area, BoundingRect, ConcaveHull, ConvexHull, Coord, Euclidean, Length, LineString, MultiPoint,
    MultiPolygon, Orientation, Point, Polygon, Rect as GeoRect,
};
use patternproof_core::Xy;
use patternproof_core::numbers::compact;
use patternproof_core::toroidal::Rect;
use serde::Serialize;

/// What a window is made from.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum WindowKind {
    /// Axis-aligned bounding rectangle of the points.
    Bbox,
    /// Convex hull of the points.
    Hull,
    /// Convex hull buffered outward (round joins).
    BufferedHull,
    /// Concave hull of the points.
    Concave,
    /// A user-supplied boundary.
    Boundary,
    /// A bare area value (`--area`): no outline.
    Area,
}

/// Largest buffer distance (in the data's unit) accepted for `hull+D`:
/// farther than any map position in any unit (the Earth's circumference
/// is 4·10⁷ m, 4·10¹⁰ mm), the same bound as for coordinates.
pub const MAX_BUFFER: f64 = 1e13;

/// Largest multiple of the mean nearest-neighbour distance accepted for a
/// buffer: a pattern of n points spans about √n such distances, so even
/// 10¹² points span 10⁶ of them; a larger buffer is a typing slip.
pub const MAX_BUFFER_MULTIPLE: f64 = 1e6;

/// One buffer distance of the `hull+D` family.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum BufferRule {
    /// A multiple of the observed mean nearest-neighbour distance.
    MeanNnMultiple(f64),
    /// A fixed distance in the data's unit.
    Distance(f64),
}

impl BufferRule {
    /// The default family: 0.5×, 1× and 2× the mean nearest-neighbour distance.
    pub fn defaults() -> Vec<BufferRule> {
        vec![
            BufferRule::MeanNnMultiple(0.5),
            BufferRule::MeanNnMultiple(1.0),
            BufferRule::MeanNnMultiple(2.0),
        ]
    }

    /// The distance for a data set with mean nearest-neighbour distance `mean_nn`.
    pub fn distance(self, mean_nn: f64) -> f64 {
        match self {
            BufferRule::MeanNnMultiple(k) => k * mean_nn,
            BufferRule::Distance(d) => d,
        }
    }

    /// Why the rule is out of range, if it is: not positive and finite,
    /// or beyond [`MAX_BUFFER`] / [`MAX_BUFFER_MULTIPLE`].
    pub fn problem(self) -> Option<String> {
        let (v, max, what) = match self {
            BufferRule::MeanNnMultiple(k) => (
                k,
                MAX_BUFFER_MULTIPLE,
                "times the mean nearest-neighbour distance (a pattern spans far fewer)",
            ),
            BufferRule::Distance(d) => (
                d,
                MAX_BUFFER,
                "units (farther than any map position in any unit)",
            ),
        };
        if !(v > 0.0 && v.is_finite()) {
            Some("not a positive distance".into())
        } else if v > max {
            Some(format!("more than {max:e} {what}"))
        } else {
            None
        }
    }

    /// As written on the command line: `0.5x` or `12`.
    pub fn describe(self) -> String {
        match self {
            BufferRule::MeanNnMultiple(k) => format!("{k}x"),
            BufferRule::Distance(d) => format!("{d}"),
        }
    }
}

/// One study-area variant.
#[derive(Debug, Clone, Serialize)]
pub struct Window {
    /// `bbox`, `hull`, `hull+12.5`, `concave`, `boundary`, `boundary:NAME`, `area`.
    pub id: String,
    /// What it is made from.
    pub kind: WindowKind,
    /// Buffer distance for `hull+D`.
    pub buffer: Option<f64>,
    /// Area in the unit squared.
    pub area: f64,
    /// Perimeter (all rings, holes included); `None` for a bare area.
    pub perimeter: Option<f64>,
    /// Points not covered by the window (not used in its rows).
    pub points_outside: usize,
    /// Where the window came from, for boundaries.
    pub source: Option<String>,
    /// The outline in planar coordinates; `None` for a bare area.
    #[serde(skip)]
    pub shape: Option<MultiPolygon<f64>>,
    /// The rectangle, when the window is an axis-aligned rectangle
    /// (torus distances are defined only there).
    #[serde(skip)]
    pub rectangle: Option<Rect>,
    /// Indices of the points the window covers.
    #[serde(skip)]
    pub inside: Vec<usize>,
    /// For `hull+D`: the convex hull the buffer surrounds. The guard zone
    /// measures from it exactly (see [`Outline::around_buffered_hull`]).
    #[serde(skip)]
    pub hull: Option<Polygon<f64>>,
}

/// A user boundary handed to the window builder.
#[derive(Debug, Clone)]
pub struct NamedShape {
    /// Name for `boundary:NAME`.
    pub name: String,
    /// Where it came from.
    pub source: String,
    /// The polygons.
    pub shape: MultiPolygon<f64>,
}

/// Settings for building windows.
#[derive(Debug, Clone)]
pub struct WindowOptions {
    /// Buffer distances for the `hull+D` family.
    pub buffers: Vec<BufferRule>,
    /// `--area`.
    pub area: Option<f64>,
    /// Concavity passed to `geo`'s concave hull.
    pub concavity: f64,
}

impl Default for WindowOptions {
    fn default() -> Self {
        Self {
            buffers: BufferRule::defaults(),
            area: None,
            concavity: 2.0,
        }
    }
}

/// Area of all polygons.
pub fn shape_area(shape: &MultiPolygon<f64>) -> f64 {
    shape.unsigned_area()
}

/// Perimeter: the length of every ring, exterior and interior.
pub fn shape_perimeter(shape: &MultiPolygon<f64>) -> f64 {
    shape
        .iter()
        .map(|p| {
            Euclidean.length(p.exterior())
                + p.interiors()
                    .iter()
                    .map(|r| Euclidean.length(r))
                    .sum::<f64>()
        })
        .sum()
}

/// The windows of one data set, in table order, and notes on any that
/// could not be built.
pub fn build_windows(
    points: &[Xy],
    mean_nn: f64,
    boundaries: &[NamedShape],
    options: &WindowOptions,
) -> (Vec<Window>, Vec<String>) {
    let mut windows = Vec::new();
    let mut notes = Vec::new();
    let multipoint: MultiPoint<f64> = points.iter().map(|p| Point::new(p[0], p[1])).collect();

    match multipoint.bounding_rect() {
        Some(r) if r.width() > 0.0 && r.height() > 0.0 => {
            let rect = Rect {
                min: [r.min().x, r.min().y],
                max: [r.max().x, r.max().y],
            };
            windows.push(from_shape(
                "bbox",
                WindowKind::Bbox,
                None,
                None,
                MultiPolygon::new(vec![r.to_polygon()]),
                Some(rect),
                points,
                Coverage::All,
            ));
        }
        _ => notes.push(
            "bbox skipped: the points lie on one line, so the bounding rectangle has zero area"
                .into(),
        ),
    }

    let hull = multipoint.convex_hull();
    if hull.unsigned_area() > 0.0 {
        let hull_shape = MultiPolygon::new(vec![hull.clone()]);
        windows.push(from_shape(
            "hull",
            WindowKind::Hull,
            None,
            None,
            hull_shape,
            None,
            points,
            Coverage::All,
        ));
        let mut distances: Vec<f64> = Vec::new();
        for d in options.buffers.iter().map(|b| b.distance(mean_nn)) {
            // `2x` and the distance it comes to are one window, not two.
            if !distances.contains(&d) {
                distances.push(d);
            }
        }
        for d in distances {
            if !(d > 0.0 && d.is_finite()) {
                notes.push(format!(
                    "hull+{} skipped: a buffer must be a positive distance",
                    compact(d)
                ));
                continue;
            }
            let buffered = hull.buffer(d);
            // A buffer far beyond the data (1e100) overflows the outline's
            // arithmetic; such a window has no area to test, and saying so
            // beats a row with area 0.
            let area = buffered.unsigned_area();
            if !(area.is_finite() && area > 0.0) {
                notes.push(format!(
                    "hull+{} skipped: buffering the hull by {d:e} gives no finite area (give a buffer the size of the study area)",
                    compact(d)
                ));
                continue;
            }
            // Two buffers that round to one label keep their full digits.
            let mut id = format!("hull+{}", compact(d));
            if windows.iter().any(|w: &Window| w.id == id) {
                id = format!("hull+{d}");
            }
            let mut window = from_shape(
                &id,
                WindowKind::BufferedHull,
                Some(d),
                None,
                buffered,
                None,
                points,
                buffered_coverage(&hull, d),
            );
            window.hull = Some(hull.clone());
            windows.push(window);
        }
        let concave = multipoint.concave_hull_with_options(
            geo::algorithm::concave_hull::ConcaveHullOptions {
                concavity: options.concavity,
                length_threshold: 0.0,
            },
        );
        if concave.unsigned_area() > 0.0 {
            windows.push(from_shape(
                "concave",
                WindowKind::Concave,
                None,
                None,
                MultiPolygon::new(vec![concave]),
                None,
                points,
                Coverage::Test,
            ));
        } else {
            notes.push("concave skipped: the concave hull has zero area".into());
        }
    } else {
        notes.push("hull, hull+D and concave skipped: the points are collinear or identical, so the convex hull has zero area".into());
    }

    let single = boundaries.len() == 1;
    for b in boundaries {
        let id = if single {
            "boundary".to_string()
        } else {
            format!("boundary:{}", b.name)
        };
        let rect = axis_rectangle(&b.shape);
        let mut w = from_shape(
            &id,
            WindowKind::Boundary,
            None,
            Some(b.source.clone()),
            b.shape.clone(),
            rect,
            points,
            Coverage::Test,
        );
        if windows.iter().any(|o| o.id == w.id) {
            w.id = format!("{}#{}", w.id, windows.len());
        }
        windows.push(w);
    }

    if let Some(a) = options.area {
        windows.push(Window {
            id: "area".into(),
            kind: WindowKind::Area,
            buffer: None,
            area: a,
            perimeter: None,
            points_outside: 0,
            source: Some("--area".into()),
            shape: None,
            rectangle: None,
            inside: (0..points.len()).collect(),
            hull: None,
        });
    }
    (windows, notes)
}

/// How a window learns which points it covers.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
enum Coverage {
    /// Every point, by construction: the bounding rectangle (its sides are
    /// the extreme coordinates), the convex hull (geo builds it with exact
    /// orientation tests, so every point is inside or on it) and a buffered
    /// hull whose buffer clears the hull by far more than rounding.
    All,
    /// Test each point ([`crate::cover::Cover`], geo's answer without
    /// rescanning the outline per point). Concave hulls are tested too:
    /// geo's digging step does not promise to keep every point inside.
    Test,
}

#[allow(clippy::too_many_arguments)] // one call per window kind, all named
fn from_shape(
    id: &str,
    kind: WindowKind,
    buffer: Option<f64>,
    source: Option<String>,
    shape: MultiPolygon<f64>,
    rectangle: Option<Rect>,
    points: &[Xy],
    coverage: Coverage,
) -> Window {
    // Intersects counts points on the outline as inside: hull vertices are
    // data points and must be covered by their own hull.
    let inside: Vec<usize> = match coverage {
        Coverage::All => (0..points.len()).collect(),
        Coverage::Test => crate::cover::Cover::new(&shape).covered(points),
    };
    Window {
        id: id.to_string(),
        kind,
        buffer,
        area: shape_area(&shape),
        perimeter: Some(shape_perimeter(&shape)),
        points_outside: points.len() - inside.len(),
        source,
        shape: Some(shape),
        rectangle,
        inside,
        hull: None,
    }
}

/// [`Coverage::All`] for a buffer of `d` around the convex `hull` when `d`
/// is at least a millionth of the hull's size: geo's buffer rounds its
/// outline to about a billionth of the extent, and its chords stay within
/// d·(1 − cos 0.2) of the exact offset, so the outline keeps more than
/// 0.9·d from every hull point. A smaller buffer is tested point by point.
fn buffered_coverage(hull: &Polygon<f64>, d: f64) -> Coverage {
    let Some(r) = hull.bounding_rect() else {
        return Coverage::Test;
    };
    let size = r.width()
        + r.height()
        + [r.min().x, r.min().y, r.max().x, r.max().y]
            .iter()
            .fold(0.0f64, |m, v| m.max(v.abs()));
    if d.is_finite() && d >= 1e-6 * size {
        Coverage::All
    } else {
        Coverage::Test
    }
}

/// The rectangle, when `shape` is one axis-aligned rectangle without holes.
fn axis_rectangle(shape: &MultiPolygon<f64>) -> Option<Rect> {
    if shape.0.len() != 1 || !shape.0[0].interiors().is_empty() {
        return None;
    }
    let r: GeoRect<f64> = shape.bounding_rect()?;
    let fits = shape.0[0]
        .exterior()
        .coords()
        .all(|c| (c.x == r.min().x || c.x == r.max().x) && (c.y == r.min().y || c.y == r.max().y));
    let same_area = (shape.unsigned_area() - r.unsigned_area()).abs() <= 1e-9 * r.unsigned_area();
    (fits && same_area).then_some(Rect {
        min: [r.min().x, r.min().y],
        max: [r.max().x, r.max().y],
    })
}

/// Distance from `p` to the nearest edge of any ring of `shape`.
pub fn distance_to_outline(shape: &MultiPolygon<f64>, p: Xy) -> f64 {
    use geo::Distance;
    let point = Point::new(p[0], p[1]);
    let ring = |r: &LineString<f64>| Euclidean.distance(&point, r);
    shape
        .iter()
        .flat_map(|poly: &Polygon<f64>| std::iter::once(poly.exterior()).chain(poly.interiors()))
        .map(ring)
        .fold(f64::INFINITY, f64::min)
}

#[cfg(test)]
mod tests {
    use super::*;

    fn grid(k: usize, step: f64) -> Vec<Xy> {
        let mut v = Vec::new();
        for i in 0..k {
            for j in 0..k {
                v.push([i as f64 * step, j as f64 * step]);
            }
        }
        v
    }

    /// Ids keep three significant digits at any size; two buffers that
    /// round alike keep their full digits; a buffer too large for the
    /// outline's arithmetic is skipped with a note, not given area 0.
    #[test]
    fn buffer_ids_stay_distinct_and_huge_buffers_are_skipped() {
        assert_eq!(compact(4.4135), "4.41");
        assert_eq!(compact(17.66), "17.7");
        assert_eq!(compact(176.6), "177");
        assert_eq!(compact(0.5), "0.5");
        assert_eq!(compact(0.0044135), "0.00441");
        assert_eq!(compact(1e100), "1e100");
        assert_eq!(compact(2.5e-7), "2.5e-7");
        assert_eq!(compact(1234567.0), "1.23e6");
        let pts = grid(4, 1.0);
        let options = WindowOptions {
            buffers: vec![
                BufferRule::Distance(0.001),
                BufferRule::Distance(0.0010001),
                BufferRule::Distance(1e200),
                BufferRule::MeanNnMultiple(1.0),
                BufferRule::Distance(1.0),
            ],
            ..WindowOptions::default()
        };
        let (windows, notes) = build_windows(&pts, 1.0, &[], &options);
        let ids: Vec<&str> = windows.iter().map(|w| w.id.as_str()).collect();
        assert_eq!(
            ids,
            [
                "bbox",
                "hull",
                "hull+0.001",
                "hull+0.0010001",
                "hull+1",
                "concave"
            ]
        );
        assert_eq!(notes.len(), 1, "{notes:?}");
        assert!(
            notes[0].starts_with(
                "hull+1e200 skipped: buffering the hull by 1e200 gives no finite area"
            ),
            "{}",
            notes[0]
        );
    }

    /// A 5 × 5 grid with step 2 spans 8 × 8: bbox and hull are the same
    /// square (area 64, perimeter 32, by hand); every point is covered.
    #[test]
    fn grid_windows_by_hand() {
        let pts = grid(5, 2.0);
        let (w, notes) = build_windows(&pts, 2.0, &[], &WindowOptions::default());
        assert!(notes.is_empty(), "{notes:?}");
        let bbox = &w[0];
        assert_eq!(bbox.id, "bbox");
        assert!((bbox.area - 64.0).abs() < 1e-12);
        assert!((bbox.perimeter.expect("bbox has a perimeter") - 32.0).abs() < 1e-12);
        assert_eq!(bbox.points_outside, 0);
        assert!(bbox.rectangle.is_some());
        let hull = &w[1];
        assert!((hull.area - 64.0).abs() < 1e-9);
        assert_eq!(hull.points_outside, 0);
        let ids: Vec<&str> = w.iter().map(|x| x.id.as_str()).collect();
        assert_eq!(
            ids,
            ["bbox", "hull", "hull+1", "hull+2", "hull+4", "concave"]
        );
    }

    /// Steiner's formula (METHODS.md): buffered area A + P·D + π·D², less
    /// at most the arc-segmentation loss π·D²·(1 − sin θ/θ); geo joins with
    /// chords of up to about 0.4 rad (floor(angle/0.2) chords per corner).
    #[test]
    fn buffered_hull_area_follows_steiner() {
        let pts = grid(5, 2.0);
        let (w, _) = build_windows(&pts, 2.0, &[], &WindowOptions::default());
        for win in w.iter().filter(|x| x.kind == WindowKind::BufferedHull) {
            let d = win.buffer.expect("buffered hulls have a buffer");
            let steiner = 64.0 + 32.0 * d + std::f64::consts::PI * d * d;
            let slack = std::f64::consts::PI * d * d * (1.0 - 0.4f64.sin() / 0.4) + 1e-9;
            assert!(
                win.area <= steiner + 1e-9 && win.area >= steiner - slack,
                "{} {} {}",
                win.id,
                win.area,
                steiner
            );
        }
    }

    /// Collinear points: the hull has zero area, so hull, hull+D and concave
    /// are skipped with a note; a diagonal line still has a bounding
    /// rectangle, a horizontal one does not.
    #[test]
    fn collinear_points_skip_area_windows_with_a_note() {
        let diagonal: Vec<Xy> = (0..10).map(|i| [i as f64, 2.0 * i as f64]).collect();
        let (w, notes) = build_windows(&diagonal, 2.2, &[], &WindowOptions::default());
        assert_eq!(w.len(), 1);
        assert_eq!(w[0].id, "bbox");
        assert!((w[0].area - 9.0 * 18.0).abs() < 1e-12);
        assert_eq!(notes.len(), 1);
        let flat: Vec<Xy> = (0..10).map(|i| [i as f64, 3.0]).collect();
        let (w, notes) = build_windows(&flat, 1.0, &[], &WindowOptions::default());
        assert!(w.is_empty());
        assert_eq!(notes.len(), 2);
    }

    /// The guard-zone answers with the cell grid (and its per-cell
    /// segment lists) agree with geo's point-to-ring distance, the outside
    /// reference, on 3 000 seeded points per width around a 60-sided
    /// polygon with a 7-sided hole, for guard widths from about a tenth of
    /// the shape down to a hundredth; the grid-free tree path is checked
    /// too.
    #[test]
    fn guard_grid_agrees_with_geo_distance_on_a_many_sided_polygon() {
        let ring = |n: usize, r: f64, c: [f64; 2], wobble: f64| {
            let pts: Vec<(f64, f64)> = (0..=n)
                .map(|k| {
                    let t = std::f64::consts::TAU * (k % n) as f64 / n as f64;
                    let rr = r * (1.0 + wobble * (3.0 * t).sin());
                    (c[0] + rr * t.cos(), c[1] + rr * t.sin())
                })
                .collect();
            LineString::from(pts)
        };
        let shape = MultiPolygon::new(vec![Polygon::new(
            ring(60, 50.0, [0.0, 0.0], 0.2),
            vec![ring(7, 10.0, [5.0, -3.0], 0.0)],
        )]);
        let mut g = crate::test_shapes::Gen(0x2545_F491_4F6C_DD1D);
        let mut unit = || g.unit();
        let plain = Outline::new(&shape, None);
        // 0.01 would need 10⁸ cells of w/2: the grid gets wider cells
        // (more than w across, so none is blocked outright) instead.
        for w in [0.6, 2.5, 9.0, 0.01] {
            let o = Outline::new(&shape, Some(w));
            let g = o.grid.as_ref().expect("guard grid");
            assert!(w > 0.1 || g.cell > w, "{w} {}", g.cell);
            for _ in 0..3_000 {
                let p = [unit() * 130.0 - 65.0, unit() * 130.0 - 65.0];
                let want = distance_to_outline(&shape, p) >= w;
                assert_eq!(o.clear_of(p, w), want, "{p:?} {w}");
                assert_eq!(plain.clear_of(p, w), want, "{p:?} {w} (tree)");
            }
        }
    }

    /// The buffered hull's guard test against geo: the exact buffer of a
    /// convex set lies D + t from a point t inside its outline and D − t
    /// from a point t outside (the parallel body of a convex set; Steiner's
    /// formula rests on the same fact, METHODS.md), with t from geo's
    /// `Euclidean` distance and the side from geo's `Intersects`. Checked
    /// for guards below, at and above D, on points sampled over the buffered
    /// polygon, and on the hull's corners and points along its edges, which
    /// sit exactly at D.
    #[test]
    fn buffered_hull_guard_measures_from_the_exact_buffer() {
        use geo::{Distance, Intersects};
        let corners = [
            (0.0, 0.0),
            (40.0, -3.0),
            (70.0, 20.0),
            (69.0, 31.0),
            (30.0, 45.0),
            (-5.0, 22.0),
        ];
        let hull = Polygon::new(
            LineString::from(
                corners
                    .iter()
                    .chain(&corners[..1])
                    .copied()
                    .collect::<Vec<_>>(),
            ),
            vec![],
        );
        let d = 6.0;
        let buffered = hull.buffer(d);
        let exact = |p: Xy| {
            let q = Point::new(p[0], p[1]);
            let t = Euclidean.distance(&q, hull.exterior());
            if hull.intersects(&q) { d + t } else { d - t }
        };
        let mut g = crate::test_shapes::Gen(0x9E37_79B9_7F4A_7C15);
        let mut unit = || g.unit();
        let inside_buffer = crate::cover::Cover::new(&buffered);
        let mut probes: Vec<Xy> = Vec::new();
        while probes.len() < 4_000 {
            let p = [unit() * 90.0 - 12.0, unit() * 70.0 - 10.0];
            if !inside_buffer.covered(&[p]).is_empty() {
                probes.push(p);
            }
        }
        let on_outline: Vec<Xy> = corners
            .iter()
            .zip(corners.iter().cycle().skip(1))
            .flat_map(|(a, b)| {
                (0..4).map(move |k| {
                    let t = k as f64 / 4.0;
                    [a.0 + t * (b.0 - a.0), a.1 + t * (b.1 - a.1)]
                })
            })
            .collect();
        for w in [2.0, 5.0, d, 7.5, 13.0] {
            let o = Outline::around_buffered_hull(&buffered, &hull, d, Some(w));
            let tree_only = Outline::around_buffered_hull(&buffered, &hull, d, None);
            for &p in &probes {
                let want = exact(p) >= w;
                assert_eq!(o.clear_of(p, w), want, "{p:?} w {w}");
                assert_eq!(tree_only.clear_of(p, w), want, "{p:?} w {w} (tree)");
            }
            for &p in &on_outline {
                assert_eq!(o.clear_of(p, w), w <= d, "{p:?} w {w} on the hull");
            }
        }
        // The buffer's polygon, measured directly, agrees except within its
        // chords' sagitta d·(1 − cos 0.1) of the guard width.
        let polygon = Outline::new(&buffered, Some(5.0));
        let exact_outline = Outline::around_buffered_hull(&buffered, &hull, d, Some(5.0));
        let sagitta = d * (1.0 - 0.1f64.cos());
        for &p in &probes {
            if (exact(p) - 5.0).abs() > sagitta {
                assert_eq!(
                    polygon.clear_of(p, 5.0),
                    exact_outline.clear_of(p, 5.0),
                    "{p:?}"
                );
            }
        }
    }

    #[test]
    fn outline_distance_includes_holes() {
        let shape = crate::test_shapes::rectangle_with_hole(10.0, 10.0, [4.0, 4.0, 6.0, 6.0]);
        assert!((distance_to_outline(&shape, [3.0, 5.0]) - 1.0).abs() < 1e-12);
        assert!((distance_to_outline(&shape, [1.0, 5.0]) - 1.0).abs() < 1e-12);
        assert!(axis_rectangle(&shape).is_none());
        // The indexed outline agrees with the direct distance (brute force).
        // Grid answers and tree answers both checked on a dense lattice.
        for w in [0.4, 0.99, 1.0, 1.01, 2.0] {
            let o = Outline::new(&shape, Some(w));
            for i in 0..=40 {
                for j in 0..=40 {
                    let p = [i as f64 * 0.25, j as f64 * 0.25 + 0.013];
                    let want = distance_to_outline(&shape, p) >= w;
                    assert_eq!(o.clear_of(p, w), want, "{p:?} {w}");
                    assert_eq!(
                        o.clear_of(p, w + 1e-3),
                        distance_to_outline(&shape, p) >= w + 1e-3
                    );
                }
            }
        }
    }
}

/// A window's outline prepared for the guard zone's question "is this
/// point at least w from every edge?", asked for every point of every
/// simulated pattern.
///
/// Segments sit in an R*-tree; on top, a grid of cells w/2 wide records
/// where the answer is the same for the whole cell. Distance to the outline
/// changes by at most the distance moved, so a cell whose centre is at
/// least w + h from the outline (h its half-diagonal) is clear throughout,
/// and one whose centre is closer than w − h is blocked throughout. Each
/// cell in between keeps the few segments within w + 1.5·h of its centre
/// (every segment that can come within w of a point of the cell), and a
/// point there is tested against those alone, with the same segment
/// distance the tree would compute. The answers are exact.
#[derive(Debug, Clone)]
pub struct Outline {
    tree: rstar::RTree<rstar::primitives::Line<Xy>>,
    grid: Option<GuardGrid>,
    /// Set for a buffered hull: the tree and grid then index the hull's
    /// edges, and distances to the window's outline follow from these.
    offset: Option<HullOffset>,
}

/// A convex hull and the buffer distance D drawn around it. The exact
/// buffer's outline lies D + t from a point t inside the hull's outline,
/// and D − t from a point t outside it (the offset of a convex set).
#[derive(Debug, Clone)]
struct HullOffset {
    /// The hull's corners, counter-clockwise, not closed.
    corners: Vec<Coord<f64>>,
    d: f64,
    /// A point inside the hull and the square of a radius around it that
    /// the hull holds (shrunk far beyond rounding): most points are inside
    /// this disc and need no orientation test.
    centre: Coord<f64>,
    inner_squared: f64,
}

impl HullOffset {
    fn new(hull: &Polygon<f64>, d: f64) -> Option<Self> {
        let mut corners: Vec<Coord<f64>> = hull.exterior().0.clone();
        if corners.len() > 1 && corners.first() == corners.last() {
            corners.pop();
        }
        if corners.len() < 3 {
            return None;
        }
        if hull.exterior().signed_area() < 0.0 {
            corners.reverse();
        }
        let h = corners.len() as f64;
        let centre = Coord {
            x: corners.iter().map(|c| c.x).sum::<f64>() / h,
            y: corners.iter().map(|c| c.y).sum::<f64>() / h,
        };
        // The distance from the corners' mean (inside a convex polygon) to
        // the nearest edge line; the disc of that radius lies inside.
        let mut inner = f64::INFINITY;
        for (k, a) in corners.iter().enumerate() {
            let b = corners[(k + 1) % corners.len()];
            let (ex, ey) = (b.x - a.x, b.y - a.y);
            let len = ex.hypot(ey);
            if len > 0.0 {
                inner = inner.min((ex * (centre.y - a.y) - ey * (centre.x - a.x)) / len);
            }
        }
        let inner = if inner.is_finite() && inner > 0.0 {
            inner * (1.0 - 1e-9)
        } else {
            0.0
        };
        Some(Self {
            corners,
            d,
            centre,
            inner_squared: inner * inner,
        })
    }

    /// Whether `p` is inside or on the hull, by exact orientation tests
    /// (geo's robust kernel): a data point, which the hull holds by
    /// construction, is never found outside, however the data are turned.
    /// A binary search over the fan of corners from the first, O(log h).
    fn contains(&self, p: Xy) -> bool {
        use geo::kernels::{Kernel, RobustKernel};
        let (dx, dy) = (p[0] - self.centre.x, p[1] - self.centre.y);
        if dx * dx + dy * dy < self.inner_squared {
            return true;
        }
        let v = &self.corners;
        let p = Coord { x: p[0], y: p[1] };
        let right = |a: Coord<f64>, b: Coord<f64>| {
            RobustKernel::orient2d(a, b, p) == Orientation::Clockwise
        };
        let last = v.len() - 1;
        if right(v[0], v[1])
            || RobustKernel::orient2d(v[0], v[last], p) == Orientation::CounterClockwise
        {
            return false;
        }
        // Invariant: p is not right of the ray v0→v[lo]; it is right of
        // v0→v[hi], or on the closing side v0→v[last].
        let (mut lo, mut hi) = (1, last);
        while hi - lo > 1 {
            let mid = (lo + hi) / 2;
            if right(v[0], v[mid]) {
                hi = mid;
            } else {
                lo = mid;
            }
        }
        !right(v[lo], v[lo + 1])
    }
}

#[derive(Debug, Clone)]
struct GuardGrid {
    w: f64,
    origin: Xy,
    cell: f64,
    nx: usize,
    ny: usize,
    /// 0 = test the cell's segments, 1 = clear, 2 = blocked.
    state: Vec<u8>,
    /// For cell c, its candidate segments are
    /// `segments[near[c]..near[c + 1]]` (empty unless state is 0).
    near: Vec<u32>,
    segments: Vec<rstar::primitives::Line<Xy>>,
}

/// Largest grid the guard test builds (cells); a larger window gets wider
/// cells instead (more of them undecided, the answers just as exact).
const MAX_GUARD_CELLS: f64 = 1_048_576.0;

impl Outline {
    /// The outline of a buffered convex hull, for the guard zone: a point
    /// is clear of width w when it is at least w from the exact buffer of
    /// `hull` by `d`, measured from the hull itself (D ± the distance to
    /// the hull's outline) rather than from the buffer's polygon. Why: the
    /// polygon's corners are snapped to a grid by geo's buffer, and the
    /// default guard width equals the `1x` buffer, so hull corners and
    /// points on hull edges lie at the guard width up to that snapping; a
    /// turned or shifted copy of the data would otherwise count them
    /// differently. The polygon stays within d·(1 − cos 0.1) of the exact
    /// buffer (arcs cut every 0.2 rad), so the two outlines differ by less
    /// than 0.5 % of d. Falls back to the buffer's own outline `buffered`
    /// when the hull has fewer than three corners.
    pub fn around_buffered_hull(
        buffered: &MultiPolygon<f64>,
        hull: &Polygon<f64>,
        d: f64,
        guard: Option<f64>,
    ) -> Self {
        let Some(offset) = HullOffset::new(hull, d) else {
            return Self::new(buffered, guard);
        };
        // The hull's outline is searched for |w − D| (see `clear_of`).
        let width = guard.map(|w| (w - d).abs()).filter(|r| *r > 0.0);
        let mut outline = Self::new(&MultiPolygon::new(vec![hull.clone()]), width);
        outline.offset = Some(offset);
        outline
    }

    /// Index every ring edge of `shape`; with `guard` = Some(w), also
    /// build the cell grid for that width.
    pub fn new(shape: &MultiPolygon<f64>, guard: Option<f64>) -> Self {
        let mut lines = Vec::new();
        for poly in shape {
            for ring in std::iter::once(poly.exterior()).chain(poly.interiors()) {
                for seg in ring.lines() {
                    lines.push(rstar::primitives::Line::new(
                        [seg.start.x, seg.start.y],
                        [seg.end.x, seg.end.y],
                    ));
                }
            }
        }
        let mut outline = Self {
            tree: rstar::RTree::bulk_load(lines),
            grid: None,
            offset: None,
        };
        if let (Some(w), Some(r)) = (guard, shape.bounding_rect())
            && w > 0.0
            && w.is_finite()
        {
            let cell = (w / 2.0).max((r.width() * r.height() / MAX_GUARD_CELLS).sqrt());
            let nx = (r.width() / cell).ceil() as usize + 1;
            let ny = (r.height() / cell).ceil() as usize + 1;
            if nx.saturating_mul(ny) <= 2 * MAX_GUARD_CELLS as usize
                && outline.tree.size() < u32::MAX as usize / 4
            {
                let h = cell * std::f64::consts::FRAC_1_SQRT_2;
                let origin = [r.min().x, r.min().y];
                // Any point of the cell is within h of its centre (1.5·h
                // leaves room for rounding at the cell walls).
                let reach = w + 1.5 * h;
                // Only cells whose centre lies within `reach` of some
                // segment's bounding box can be anything but clear: a centre
                // farther than that from every segment puts every point of
                // the cell more than w + h/2 from the outline.
                let mut near_outline = vec![false; nx * ny];
                let index = |v: f64, o: f64, count: usize| -> usize {
                    // Centre i sits at o + (i + 0.5)·cell.
                    let t = ((v - o) / cell - 0.5).floor();
                    if t <= 0.0 {
                        0
                    } else {
                        (t as usize).min(count - 1)
                    }
                };
                for line in outline.tree.iter() {
                    let (a, b) = (line.from, line.to);
                    let (x0, x1) = (a[0].min(b[0]) - reach, a[0].max(b[0]) + reach);
                    let (y0, y1) = (a[1].min(b[1]) - reach, a[1].max(b[1]) + reach);
                    // One cell of slack on each side for the rounding of
                    // the index itself.
                    let (i0, i1) = (
                        index(x0, origin[0], nx).saturating_sub(1),
                        (index(x1, origin[0], nx) + 2).min(nx - 1),
                    );
                    let (j0, j1) = (
                        index(y0, origin[1], ny).saturating_sub(1),
                        (index(y1, origin[1], ny) + 2).min(ny - 1),
                    );
                    for j in j0..=j1 {
                        near_outline[j * nx + i0..=j * nx + i1].fill(true);
                    }
                }
                let mut state = Vec::with_capacity(nx * ny);
                let mut near = Vec::with_capacity(nx * ny + 1);
                let mut segments = Vec::new();
                near.push(0u32);
                for j in 0..ny {
                    for i in 0..nx {
                        if !near_outline[j * nx + i] {
                            state.push(1);
                            near.push(segments.len() as u32);
                            continue;
                        }
                        let c = [
                            origin[0] + (i as f64 + 0.5) * cell,
                            origin[1] + (j as f64 + 0.5) * cell,
                        ];
                        let d = outline.distance(c);
                        let s = if d - h >= w {
                            1
                        } else if d + h < w {
                            2
                        } else {
                            0
                        };
                        if s == 0 {
                            segments.extend(
                                outline
                                    .tree
                                    .locate_within_distance(c, reach * reach)
                                    .copied(),
                            );
                        }
                        state.push(s);
                        near.push(segments.len() as u32);
                    }
                }
                if segments.len() < u32::MAX as usize {
                    outline.grid = Some(GuardGrid {
                        w,
                        origin,
                        cell,
                        nx,
                        ny,
                        state,
                        near,
                        segments,
                    });
                }
            }
        }
        outline
    }

    fn distance(&self, p: Xy) -> f64 {
        use rstar::PointDistance;
        self.tree
            .nearest_neighbor(&p)
            .map_or(f64::INFINITY, |line| line.distance_2(&p).sqrt())
    }

    /// True when `p` is at least `w` from the window's outline: from every
    /// edge, or for a buffered hull from the exact buffer.
    pub fn clear_of(&self, p: Xy, w: f64) -> bool {
        let Some(o) = &self.offset else {
            return self.edges_clear_of(p, w);
        };
        // With t the distance from p to the hull's outline, the buffer's
        // outline is D + t away inside the hull and D − t outside.
        let r = (w - o.d).abs();
        if w > o.d {
            // Needs t ≥ w − D inside; nothing outside is far enough.
            self.edges_clear_of(p, r) && o.contains(p)
        } else if w < o.d {
            // Everything inside qualifies; outside needs t ≤ D − w.
            !self.edges_clear_of(p, r) || o.contains(p) || self.distance(p) <= r
        } else {
            o.contains(p)
        }
    }

    /// True when `p` is at least `w` from every indexed edge.
    fn edges_clear_of(&self, p: Xy, w: f64) -> bool {
        use rstar::PointDistance;
        if let Some(g) = &self.grid
            && g.w == w
        {
            // Cell (floor(fx), floor(fy)); for fx ≥ 0 truncation is the
            // floor, and floor(fx) < nx exactly when fx < nx.
            let fx = (p[0] - g.origin[0]) / g.cell;
            let fy = (p[1] - g.origin[1]) / g.cell;
            if fx >= 0.0 && fy >= 0.0 && fx < g.nx as f64 && fy < g.ny as f64 {
                let c = fy as usize * g.nx + fx as usize;
                return match g.state[c] {
                    1 => true,
                    2 => false,
                    // Strictly closer than w disqualifies.
                    _ => !g.segments[g.near[c] as usize..g.near[c + 1] as usize]
                        .iter()
                        .any(|line| line.distance_2(&p) < w * w),
                };
            }
        }
        // Strictly closer than w disqualifies; the query is inclusive, so
        // a segment at exactly w is filtered back in.
        !self
            .tree
            .locate_within_distance(p, w * w)
            .any(|line| line.distance_2(&p) < w * w)
    }
}
