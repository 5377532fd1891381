//! `windows.geojson`: every window outline as a polygon feature, so the
//! windows can be laid over the data in any GIS.
//!
//! Lon/lat input: outlines are projected back to lon/lat (RFC 7946), and
//! an outline that crosses ±180° of longitude is cut there into parts on
//! either side (RFC 7946 §3.1.9), so that a GIS does not draw it across
//! the whole globe; one around a pole is closed along the pole.
//! Projected input: coordinates stay planar and the file carries a legacy
//! `crs` member saying so (RFC 7946 has no other way to say it).

use crate::document::AuditReport;
use geo::{BooleanOps, Coord, LineString, MapCoords, MultiPolygon, Polygon, Rect, Translate};
use geojson::{Feature, FeatureCollection, GeoJson, Geometry, JsonObject};
use std::io;

/// Inverse projection, metres → lon/lat, when the input was lon/lat.
pub type Unproject<'a> = &'a dyn Fn(f64, f64) -> Option<[f64; 2]>;

/// Write `windows.geojson`.
pub fn write_outlines<W: io::Write>(
    report: &AuditReport,
    unproject: Option<Unproject<'_>>,
    mut out: W,
) -> io::Result<()> {
    let mut features = Vec::new();
    for w in &report.windows {
        let Some(shape) = &w.shape else { continue };
        let shape = match unproject {
            Some(f) => MultiPolygon(
                shape
                    .map_coords(|c| match f(c.x, c.y) {
                        Some([x, y]) => geo::coord! { x: x, y: y },
                        None => c,
                    })
                    .0
                    .into_iter()
                    .flat_map(split_at_antimeridian)
                    .collect(),
            ),
            None => shape.clone(),
        };
        let mut props = JsonObject::new();
        props.insert("id".into(), w.id.clone().into());
        props.insert(
            "kind".into(),
            serde_json::to_value(w.kind).unwrap_or_default(),
        );
        props.insert("area".into(), w.area.into());
        if let Some(p) = w.perimeter {
            props.insert("perimeter".into(), p.into());
        }
        if let Some(b) = w.buffer {
            props.insert("buffer".into(), b.into());
        }
        props.insert("points_outside".into(), w.points_outside.into());
        props.insert("unit".into(), report.input.unit.clone().into());
        features.push(Feature {
            bbox: None,
            geometry: Some(Geometry::from(&shape)),
            id: None,
            properties: Some(props),
            foreign_members: None,
        });
    }
    let foreign_members = if unproject.is_none() {
        let mut m = JsonObject::new();
        m.insert(
            "crs".into(),
            serde_json::json!({"type": "name", "properties": {"name": format!("planar coordinates of {}, unit {}", report.input.points_file, report.input.unit)}}),
        );
        Some(m)
    } else {
        None
    };
    let fc = GeoJson::FeatureCollection(FeatureCollection {
        bbox: None,
        features,
        foreign_members,
    });
    serde_json::to_writer_pretty(&mut out, &fc)?;
    out.write_all(b"\n")
}

/// Longitudes made continuous along a ring: each step is taken the short
/// way round, so a ring crossing ±180° runs on past it (to 185° rather
/// than −175°). Returns the ring and whether any step crossed.
fn unwrapped(ring: &LineString<f64>) -> (Vec<Coord<f64>>, bool) {
    let mut out: Vec<Coord<f64>> = Vec::with_capacity(ring.0.len());
    let mut crossed = false;
    let mut previous: Option<(f64, f64)> = None;
    for c in &ring.0 {
        let x = match previous {
            None => c.x,
            Some((given, continued)) => {
                let step = c.x - given;
                crossed |= step.abs() > 180.0;
                continued + step - 360.0 * (step / 360.0).round()
            }
        };
        previous = Some((c.x, x));
        out.push(Coord { x, y: c.y });
    }
    (out, crossed)
}

/// A continuous ring that winds once around a pole (its longitudes end a
/// full turn from where they began) closed along that pole, so that it
/// bounds the cap it encircles; any other ring as it is.
fn closed_at_pole(mut ring: Vec<Coord<f64>>) -> Vec<Coord<f64>> {
    let (Some(first), Some(last)) = (ring.first().copied(), ring.last().copied()) else {
        return ring;
    };
    if (last.x - first.x).abs() < 180.0 {
        return ring;
    }
    let mean_lat = ring.iter().map(|c| c.y).sum::<f64>() / ring.len() as f64;
    let pole = if mean_lat >= 0.0 { 90.0 } else { -90.0 };
    ring.push(Coord { x: last.x, y: pole });
    ring.push(Coord {
        x: first.x,
        y: pole,
    });
    ring.push(first);
    ring
}

/// The overlay that cuts the parts works on an integer grid fitted to the
/// polygon and can leave the cut up to a few 10⁻⁷ degrees (centimetres)
/// off ±180° (or the pole off ±90°): vertices within 10⁻⁶ degrees of an
/// edge of the lon/lat range are put on it.
fn onto_the_edges(c: Coord<f64>) -> Coord<f64> {
    let snap = |v: f64, edge: f64| {
        if (v.abs() - edge).abs() < 1e-6 {
            edge.copysign(v)
        } else {
            v
        }
    };
    Coord {
        x: snap(c.x, 180.0),
        y: snap(c.y, 90.0),
    }
}

/// RFC 7946 §3.1.9: a polygon in lon/lat that crosses the antimeridian,
/// cut into the parts on either side, each ending on ±180° exactly. A
/// polygon that does not cross is returned unchanged.
fn split_at_antimeridian(polygon: Polygon<f64>) -> Vec<Polygon<f64>> {
    let (shell, mut crossed) = unwrapped(polygon.exterior());
    let holes: Vec<Vec<Coord<f64>>> = polygon
        .interiors()
        .iter()
        .map(|h| {
            let (ring, c) = unwrapped(h);
            crossed |= c;
            ring
        })
        .collect();
    if !crossed {
        return vec![polygon];
    }
    let shell = closed_at_pole(shell);
    let (lo, hi) = shell
        .iter()
        .fold((f64::INFINITY, f64::NEG_INFINITY), |(lo, hi), c| {
            (lo.min(c.x), hi.max(c.x))
        });
    let middle = 0.5 * (lo + hi);
    // Each hole is unwrapped on its own; shift it by whole turns to lie
    // beside the shell.
    let holes: Vec<LineString<f64>> = holes
        .into_iter()
        .map(|h| {
            let h = closed_at_pole(h);
            let mean = h.iter().map(|c| c.x).sum::<f64>() / h.len().max(1) as f64;
            let turns = ((mean - middle) / 360.0).round();
            LineString(
                h.into_iter()
                    .map(|c| Coord {
                        x: c.x - 360.0 * turns,
                        y: c.y,
                    })
                    .collect(),
            )
        })
        .collect();
    let continuous = Polygon::new(LineString(shell), holes);
    // One strip of longitudes −180..180 per whole turn the polygon reaches.
    let first = ((lo + 180.0) / 360.0).floor() as i64;
    let last = ((hi + 180.0) / 360.0).floor() as i64;
    let mut parts = Vec::new();
    for turn in first..=last {
        let west = -180.0 + 360.0 * turn as f64;
        let strip = Rect::new(
            Coord { x: west, y: -90.0 },
            Coord {
                x: west + 360.0,
                y: 90.0,
            },
        )
        .to_polygon();
        for part in continuous.intersection(&strip) {
            parts.push(
                part.translate(-360.0 * turn as f64, 0.0)
                    .map_coords(onto_the_edges),
            );
        }
    }
    parts
}

#[cfg(test)]
mod tests {
    use super::*;
    use approx::abs_diff_eq;
    use geo::Area;

    fn ring(points: &[(f64, f64)]) -> LineString<f64> {
        LineString::from(points.to_vec())
    }

    fn longitudes(p: &Polygon<f64>) -> (f64, f64) {
        p.exterior()
            .0
            .iter()
            .fold((f64::INFINITY, f64::NEG_INFINITY), |(lo, hi), c| {
                (lo.min(c.x), hi.max(c.x))
            })
    }

    /// A 10° × 10° square from 175° E to 175° W (written as the unprojected
    /// outline would be: 175, −175) becomes two 5° × 10° rectangles, one
    /// ending on +180°, the other on −180°. Hand-computed.
    #[test]
    fn an_outline_across_the_antimeridian_is_cut_in_two() {
        let square = Polygon::new(
            ring(&[
                (175.0, -20.0),
                (-175.0, -20.0),
                (-175.0, -10.0),
                (175.0, -10.0),
                (175.0, -20.0),
            ]),
            vec![],
        );
        let mut parts = split_at_antimeridian(square);
        parts.sort_by(|a, b| longitudes(a).0.total_cmp(&longitudes(b).0));
        assert_eq!(parts.len(), 2);
        let (west, east) = (&parts[0], &parts[1]);
        assert_eq!(longitudes(west), (-180.0, -175.0));
        assert_eq!(longitudes(east), (175.0, 180.0));
        for p in &parts {
            assert!(
                abs_diff_eq!(p.unsigned_area(), 50.0, epsilon = 1e-6),
                "{p:?}"
            );
        }
    }

    /// A square around the north pole, its corners at 88.5858° N (1.4142°
    /// from the pole) and longitudes 45°, 135°, −135°, −45°: closed along
    /// the pole, it covers every longitude from 88.5858° N up, an area of
    /// 360 × 1.4142 = 509.1 degree² in the lon/lat plane, cut at ±180°.
    #[test]
    fn an_outline_around_a_pole_is_closed_along_it() {
        let lat = 90.0 - 2f64.sqrt();
        let square = Polygon::new(
            ring(&[
                (45.0, lat),
                (135.0, lat),
                (-135.0, lat),
                (-45.0, lat),
                (45.0, lat),
            ]),
            vec![],
        );
        let parts = split_at_antimeridian(square);
        let area: f64 = parts.iter().map(|p| p.unsigned_area()).sum();
        assert!(
            abs_diff_eq!(area, 360.0 * 2f64.sqrt(), epsilon = 1e-4),
            "{area}"
        );
        for p in &parts {
            let (lo, hi) = longitudes(p);
            assert!((-180.0..=180.0).contains(&lo) && (-180.0..=180.0).contains(&hi));
            assert!(p.exterior().0.iter().any(|c| c.y == 90.0), "{p:?}");
        }
        let west = parts
            .iter()
            .map(|p| longitudes(p).0)
            .fold(f64::INFINITY, f64::min);
        let east = parts
            .iter()
            .map(|p| longitudes(p).1)
            .fold(f64::NEG_INFINITY, f64::max);
        assert_eq!((west, east), (-180.0, 180.0));
    }

    /// An outline that stays on one side is returned exactly as it was,
    /// so reports of ordinary data keep their bytes.
    #[test]
    fn an_outline_away_from_the_antimeridian_is_untouched() {
        let square = Polygon::new(
            ring(&[
                (10.0, 40.0),
                (11.0, 40.0),
                (11.0, 41.0),
                (10.0, 41.0),
                (10.0, 40.0),
            ]),
            vec![ring(&[
                (10.2, 40.2),
                (10.4, 40.2),
                (10.4, 40.4),
                (10.2, 40.2),
            ])],
        );
        assert_eq!(split_at_antimeridian(square.clone()), vec![square]);
    }
}
