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
    Area, BoundingRect, ConcaveHull, ConvexHull, Euclidean, Length, MultiPoint, MultiPolygon,
    Point, Polygon, Rect as GeoRect,
};
use patternproof_core::Rectangle;
use patternproof_core::Xy;
use patternproof_core::numbers::compact;
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
    pub rectangle: Option<Rectangle>,
    /// Indices of the points the window covers.
    #[serde(skip)]
    pub inside: Vec<usize>,
    /// For `hull+D`: the convex hull the buffer surrounds. The guard zone
    /// measures from it exactly (see [`crate::Outline::around_buffered_hull`]).
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
            let rect = Rectangle {
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
    rectangle: Option<Rectangle>,
    points: &[Xy],
    coverage: Coverage,
) -> Window {
    // Intersects counts points on the outline as inside: hull vertices are
    // data points and must be covered by their own hull.
    let inside: Vec<usize> = match coverage {
        Coverage::All => (0..points.len()).collect(),
        Coverage::Test => crate::cover::Cover::new(shape.clone()).covered(points),
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
fn axis_rectangle(shape: &MultiPolygon<f64>) -> Option<Rectangle> {
    if shape.0.len() != 1 || !shape.0[0].interiors().is_empty() {
        return None;
    }
    let r: GeoRect<f64> = shape.bounding_rect()?;
    let fits = shape.0[0]
        .exterior()
        .coords()
        .all(|c| (c.x == r.min().x || c.x == r.max().x) && (c.y == r.min().y || c.y == r.max().y));
    let same_area = (shape.unsigned_area() - r.unsigned_area()).abs() <= 1e-9 * r.unsigned_area();
    (fits && same_area).then_some(Rectangle {
        min: [r.min().x, r.min().y],
        max: [r.max().x, r.max().y],
    })
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
    /// (The id's number format itself is tested with `core::numbers`.)
    fn buffer_ids_stay_distinct_and_huge_buffers_are_skipped() {
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
}
