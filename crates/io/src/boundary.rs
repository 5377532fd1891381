//! Study-area boundary readers: GeoJSON Polygon/MultiPolygon (holes kept)
//! and WKT `POLYGON`/`MULTIPOLYGON` text.
//!
//! One file is one study area: all polygons in it together form the window
//! (a site in two parts, a meadow with a pond cut out). Its name is the
//! `name` property of a single feature, else the file stem.

use crate::coords::CoordSystem;
use crate::error::{InputError, InputErrorKind, read_text};
use crate::points::{declared_lonlat, is_geojson, legacy_crs};
use geo::{Geometry, MultiPolygon, Polygon};
use geojson::GeoJson;
use std::path::Path;
use std::str::FromStr;

/// A boundary as read, before projection and validation.
#[derive(Debug, Clone, PartialEq)]
pub struct RawBoundary {
    /// Name used in the window id `boundary:NAME`.
    pub name: String,
    /// The polygons, in file coordinates.
    pub shape: MultiPolygon<f64>,
    /// What the file itself says about its coordinates (WKT carries no
    /// system and follows the points).
    pub declared: Option<CoordSystem>,
    /// Whether `declared` is the file's own statement (a GeoJSON `crs`
    /// member, a GeoPackage coordinate-system row) rather than a format's
    /// default (RFC 7946 lon/lat for GeoJSON without one).
    pub stated: bool,
}

/// Read one boundary file (GeoJSON by extension or a leading `{`, else WKT).
pub fn read_boundary(path: &Path) -> Result<RawBoundary, InputError> {
    let text = read_text(path)?;
    if text.trim().is_empty() {
        return Err(InputError::new(
            InputErrorKind::Empty,
            path,
            "the boundary file is empty",
            "give a GeoJSON Polygon/MultiPolygon or WKT POLYGON text",
        ));
    }
    let stem = crate::points::one_line(
        path.file_stem()
            .and_then(|s| s.to_str())
            .unwrap_or("boundary"),
    );
    if is_geojson(path, &text) {
        read_geojson(path, &text, stem)
    } else {
        read_wkt(path, &text, stem)
    }
}

fn polygons_of(
    path: &Path,
    place: &str,
    g: Geometry<f64>,
    out: &mut Vec<Polygon<f64>>,
) -> Result<(), InputError> {
    match g {
        Geometry::Polygon(p) => out.push(p),
        Geometry::MultiPolygon(mp) => out.extend(mp.0),
        Geometry::Rect(r) => out.push(r.to_polygon()),
        other => {
            let kind = match other {
                Geometry::Point(_) | Geometry::MultiPoint(_) => "points",
                Geometry::LineString(_) | Geometry::MultiLineString(_) | Geometry::Line(_) => {
                    "lines"
                }
                _ => "another geometry type",
            };
            return Err(InputError::new(
                InputErrorKind::BadGeometry,
                path,
                format!("a boundary must be polygons, this holds {kind}"),
                "give the study area as a Polygon or MultiPolygon (close the ring: first point = last point)",
            )
            .at(place));
        }
    }
    Ok(())
}

/// The polygons of one GeoJSON geometry, appended to `out`.
fn geojson_polygons(
    path: &Path,
    place: &str,
    geometry: geojson::Geometry,
    out: &mut Vec<Polygon<f64>>,
) -> Result<(), InputError> {
    let g: Geometry<f64> = Geometry::try_from(geometry).map_err(|e| {
        InputError::new(
            InputErrorKind::BadGeometry,
            path,
            format!("cannot read the geometry ({e})"),
            "check the polygon's rings",
        )
        .at(place)
    })?;
    polygons_of(path, place, g, out)
}

fn no_geometry(path: &Path, place: &str) -> InputError {
    InputError::new(
        InputErrorKind::BadGeometry,
        path,
        "the feature has no geometry",
        "remove it or give it a Polygon",
    )
    .at(place)
}

/// Add one feature's polygons to the site `name`, a new site at the end
/// when the name is new: features sharing a name are parts of one site.
pub(crate) fn add_part(
    out: &mut Vec<RawBoundary>,
    name: String,
    polygons: Vec<Polygon<f64>>,
    declared: Option<CoordSystem>,
    stated: bool,
) {
    let name = crate::points::one_line(&name);
    match out.iter_mut().find(|b| b.name == name) {
        Some(b) => b.shape.0.extend(polygons),
        None => out.push(RawBoundary {
            name,
            shape: MultiPolygon(polygons),
            declared,
            stated,
        }),
    }
}

/// What the file declares, by the same rules as for points; `None` when
/// it cannot be told (then the points decide).
fn declared_system(crs: Option<&serde_json::Value>) -> Option<CoordSystem> {
    declared_lonlat(crs).map(|lonlat| {
        if lonlat {
            CoordSystem::LonLat
        } else {
            CoordSystem::Projected
        }
    })
}

/// The words for an unclosed ring, the same for every format: which
/// polygon, which ring, how many positions.
pub(crate) fn unclosed_ring(polygon: usize, ring: usize, positions: usize) -> String {
    let which = if ring == 0 {
        "the outer ring".to_string()
    } else {
        format!("hole {ring}")
    };
    format!(
        "polygon {}, ring {} ({which}) is not closed ({positions} positions; the first must equal the last, and a ring needs at least four)",
        polygon + 1,
        ring + 1
    )
}

/// The first ring that is not closed, as (polygon, ring, positions), the
/// indices 0-based. `polygons` gives, per polygon, each ring's positions.
fn first_unclosed<'a, P: PartialEq + 'a>(
    polygons: impl IntoIterator<Item = Vec<&'a [P]>>,
) -> Option<(usize, usize, usize)> {
    for (p, rings) in polygons.into_iter().enumerate() {
        for (r, ring) in rings.into_iter().enumerate() {
            // An EMPTY ring covers nothing and is left out later.
            if ring.is_empty() {
                continue;
            }
            let closed = ring.len() >= 4 && ring.first() == ring.last();
            if !closed {
                return Some((p, r, ring.len()));
            }
        }
    }
    None
}

fn unclosed_error(path: &Path, place: &str, (p, r, n): (usize, usize, usize)) -> InputError {
    InputError::new(
        InputErrorKind::BadGeometry,
        path,
        unclosed_ring(p, r, n),
        "repeat the first position at the end of the ring; if the export was cut short, export it again",
    )
    .at(place.to_string())
}

/// GeoJSON rings must be closed (RFC 7946 §3.1.6: first and last
/// positions equal, at least four positions); geo would close them
/// silently, hiding a truncated export.
fn check_rings(path: &Path, place: &str, g: &geojson::Geometry) -> Result<(), InputError> {
    let polygons: Vec<&geojson::PolygonType> = match &g.value {
        geojson::GeometryValue::Polygon { coordinates } => vec![coordinates],
        geojson::GeometryValue::MultiPolygon { coordinates } => coordinates.iter().collect(),
        _ => Vec::new(),
    };
    let rings = polygons.iter().map(|p| {
        p.iter()
            .map(|ring| ring.as_slice())
            .collect::<Vec<&[geojson::Position]>>()
    });
    match first_unclosed(rings) {
        Some(at) => Err(unclosed_error(path, place, at)),
        None => Ok(()),
    }
}

/// WKT rings must be closed as well (OGC 06-103r4, Simple Features §6.1.11:
/// a ring is a closed simple curve; WKT writes the closing point): the
/// same refusal as for GeoJSON, not the silent closing of the conversion.
fn check_wkt_rings(path: &Path, w: &wkt::Wkt<f64>) -> Result<(), InputError> {
    let polygons: Vec<&wkt::types::Polygon<f64>> = match w {
        wkt::Wkt::Polygon(p) => vec![p],
        wkt::Wkt::MultiPolygon(mp) => mp.polygons().iter().collect(),
        _ => Vec::new(),
    };
    let xy = |c: &wkt::types::Coord<f64>| (c.x, c.y);
    let rings: Vec<Vec<Vec<(f64, f64)>>> = polygons
        .iter()
        .map(|p| {
            p.rings()
                .iter()
                .map(|r| r.coords().iter().map(xy).collect())
                .collect()
        })
        .collect();
    let slices = rings.iter().map(|p| {
        p.iter()
            .map(|r| r.as_slice())
            .collect::<Vec<&[(f64, f64)]>>()
    });
    match first_unclosed(slices) {
        Some(at) => Err(unclosed_error(path, "WKT text", at)),
        None => Ok(()),
    }
}

fn read_geojson(path: &Path, text: &str, stem: String) -> Result<RawBoundary, InputError> {
    let gj: GeoJson = text.parse().map_err(|e| {
        InputError::new(InputErrorKind::Malformed, path, format!("not valid GeoJSON ({e})"), "check the file against RFC 7946; polygon rings need at least four positions, first = last")
    })?;
    crate::points::refuse_repeated_keys(path, text)?;
    let declared = declared_system(legacy_crs(&gj));
    let stated = legacy_crs(&gj).is_some();
    let features: Vec<(String, Option<geojson::Geometry>, Option<String>)> = match gj {
        GeoJson::FeatureCollection(fc) => fc
            .features
            .into_iter()
            .enumerate()
            .map(|(i, f)| {
                let name = f
                    .property("name")
                    .and_then(|v| v.as_str())
                    .map(str::to_string);
                (format!("feature {}", i + 1), f.geometry, name)
            })
            .collect(),
        GeoJson::Feature(f) => {
            let name = f
                .property("name")
                .and_then(|v| v.as_str())
                .map(str::to_string);
            vec![("feature 1".into(), f.geometry, name)]
        }
        GeoJson::Geometry(g) => vec![("geometry".into(), Some(g), None)],
    };
    let mut polys = Vec::new();
    let mut names = Vec::new();
    for (place, geometry, name) in features {
        let geometry = geometry.ok_or_else(|| no_geometry(path, &place))?;
        check_rings(path, &place, &geometry)?;
        geojson_polygons(path, &place, geometry, &mut polys)?;
        names.extend(name);
    }
    if polys.is_empty() {
        return Err(InputError::new(
            InputErrorKind::Empty,
            path,
            "the file holds no polygon",
            "give at least one Polygon or MultiPolygon feature",
        ));
    }
    let name = if names.len() == 1 {
        crate::points::one_line(&names.remove(0))
    } else {
        stem
    };
    Ok(RawBoundary {
        name,
        shape: MultiPolygon(polys),
        declared,
        stated,
    })
}

fn read_wkt(path: &Path, text: &str, stem: String) -> Result<RawBoundary, InputError> {
    let unreadable = |e: &dyn std::fmt::Display| {
        InputError::new(
            InputErrorKind::Malformed,
            path,
            format!("not readable as WKT ({e})"),
            "write the boundary as POLYGON ((x y, x y, ...)) or MULTIPOLYGON (...), or use GeoJSON",
        )
    };
    let w = wkt::Wkt::<f64>::from_str(text.trim()).map_err(|e| unreadable(&e))?;
    // The WKT reader stops after the first geometry and ignores the rest,
    // so a second polygon (or a note) after it would vanish unread.
    if let Some(end) = end_of_first_geometry(text) {
        let rest = text[end..].trim();
        if !rest.is_empty() {
            let line = text[..end].matches('\n').count() + 1;
            let shown: String = rest.chars().take(40).collect();
            return Err(InputError::new(
                InputErrorKind::Malformed,
                path,
                format!("text follows the first geometry, which ends on line {line}: `{shown}`"),
                "a WKT boundary file holds one geometry: put several polygons into one MULTIPOLYGON (or give each its own --boundary file), and remove anything else",
            ));
        }
    }
    check_wkt_rings(path, &w)?;
    let g = Geometry::<f64>::try_from(w).map_err(|e| unreadable(&e))?;
    let mut polys = Vec::new();
    polygons_of(path, "WKT text", g, &mut polys)?;
    Ok(RawBoundary {
        name: stem,
        shape: MultiPolygon(polys),
        declared: None,
        stated: false,
    })
}

/// The byte offset just past the first WKT geometry in `text`: after the
/// parenthesis that closes its first opening one, or after the word
/// `EMPTY` when that comes first. `None` when neither is found (the WKT
/// reader has refused such text already).
fn end_of_first_geometry(text: &str) -> Option<usize> {
    let open = text.find('(');
    let empty = text.to_ascii_uppercase().find("EMPTY");
    match (open, empty) {
        (_, Some(e)) if open.is_none_or(|o| e < o) => Some(e + "EMPTY".len()),
        (Some(o), _) => {
            let mut depth = 0usize;
            for (i, c) in text[o..].char_indices() {
                match c {
                    '(' => depth += 1,
                    ')' => {
                        depth = depth.saturating_sub(1);
                        if depth == 0 {
                            return Some(o + i + 1);
                        }
                    }
                    _ => {}
                }
            }
            None
        }
        _ => None,
    }
}

/// The boundaries of many sites in one GeoJSON FeatureCollection, one
/// site per value of the property `field` (features sharing a value are
/// parts of one site). In file order of first appearance.
pub fn read_named_boundaries(path: &Path, field: &str) -> Result<Vec<RawBoundary>, InputError> {
    let text = read_text(path)?;
    let gj: GeoJson = text.parse().map_err(|e| {
        InputError::new(
            InputErrorKind::Malformed,
            path,
            format!("not valid GeoJSON ({e})"),
            "give a FeatureCollection of Polygon/MultiPolygon features, each with the site's name in a property",
        )
    })?;
    crate::points::refuse_repeated_keys(path, &text)?;
    let GeoJson::FeatureCollection(fc) = gj else {
        return Err(InputError::new(
            InputErrorKind::Malformed,
            path,
            "site boundaries must be a FeatureCollection",
            "put one Polygon/MultiPolygon feature per site in a FeatureCollection",
        ));
    };
    let crs = fc.foreign_members.as_ref().and_then(|m| m.get("crs"));
    let (declared, stated) = (declared_system(crs), crs.is_some());
    let mut out: Vec<RawBoundary> = Vec::new();
    for (i, f) in fc.features.into_iter().enumerate() {
        let place = format!("feature {}", i + 1);
        let name = match f.property(field) {
            Some(serde_json::Value::String(s)) if !s.trim().is_empty() => s.clone(),
            Some(serde_json::Value::Number(n)) => n.to_string(),
            _ => {
                return Err(InputError::new(
                    InputErrorKind::MissingValue,
                    path,
                    format!("the feature has no `{field}` property naming its site"),
                    format!("give every feature a `{field}` property, or choose another with --boundary-field"),
                )
                .at(place));
            }
        };
        let geometry = f.geometry.ok_or_else(|| no_geometry(path, &place))?;
        check_rings(path, &place, &geometry)?;
        let mut polys = Vec::new();
        geojson_polygons(path, &place, geometry, &mut polys)?;
        add_part(&mut out, name, polys, declared, stated);
    }
    if out.is_empty() {
        return Err(InputError::new(
            InputErrorKind::Empty,
            path,
            "the file holds no site boundary",
            "add one Polygon feature per site",
        ));
    }
    Ok(out)
}

#[cfg(test)]
#[allow(clippy::unwrap_used)] // a failed unwrap is a failed test
mod tests {
    use super::*;
    use crate::test_files::file;
    use approx::assert_abs_diff_eq;
    use geo::Area;

    /// Area of a 10×10 square with a 2×2 hole: 96 (arithmetic).
    #[test]
    fn wkt_polygon_with_hole() {
        let f = file(
            ".wkt",
            "POLYGON ((0 0, 10 0, 10 10, 0 10, 0 0), (4 4, 6 4, 6 6, 4 6, 4 4))",
        );
        let b = read_boundary(f.path()).unwrap();
        assert_abs_diff_eq!(b.shape.unsigned_area(), 96.0, epsilon = 1e-12);
        assert_eq!(b.declared, None);
    }

    #[test]
    fn geojson_feature_name_is_used() {
        let body = r#"{"type":"FeatureCollection","features":[{"type":"Feature","properties":{"name":"north"},"geometry":{"type":"Polygon","coordinates":[[[0,0],[1,0],[1,1],[0,1],[0,0]]]}}]}"#;
        let f = file(".geojson", body);
        let b = read_boundary(f.path()).unwrap();
        assert_eq!(b.name, "north");
        assert_eq!(b.declared, Some(CoordSystem::LonLat));
    }

    #[test]
    fn lines_are_not_boundaries() {
        let f = file(".wkt", "LINESTRING (0 0, 1 1)");
        let e = read_boundary(f.path()).unwrap_err();
        assert_eq!(e.kind, InputErrorKind::BadGeometry, "{e}");
        assert!(e.what.contains("lines"), "{e}");
    }

    /// Site boundaries refuse an unclosed ring as a single boundary does
    /// (RFC 7946 §3.1.6: first and last positions equal, at least four): a
    /// ring cut short is the mark of a truncated export, not a shape to
    /// close silently.
    #[test]
    fn site_boundaries_refuse_unclosed_rings() {
        let f = file(
            ".geojson",
            r#"{"type":"FeatureCollection","features":[
              {"type":"Feature","properties":{"name":"a"},"geometry":{"type":"Polygon","coordinates":[[[0,0],[4,0],[4,4],[0,4],[0,0]]]}},
              {"type":"Feature","properties":{"name":"b"},"geometry":{"type":"Polygon","coordinates":[[[5,0],[9,0],[9,4],[5,4]]]}}]}"#,
        );
        let e = read_named_boundaries(f.path(), "name").unwrap_err();
        assert_eq!(e.kind, InputErrorKind::BadGeometry, "{e}");
        assert!(e.what.contains("not closed"), "{}", e.what);
        assert_eq!(e.location.as_deref(), Some("feature 2"));
    }

    /// Issue 20: an unclosed WKT ring is refused like an unclosed GeoJSON
    /// ring, naming the polygon and the ring, instead of being closed
    /// silently by the conversion (OGC Simple Features: a ring is closed).
    #[test]
    fn wkt_refuses_unclosed_rings_like_geojson() {
        let f = file(".wkt", "POLYGON ((0 0, 10 0, 10 10, 0 10))");
        let e = read_boundary(f.path()).unwrap_err();
        assert_eq!(e.kind, InputErrorKind::BadGeometry, "{e}");
        assert_eq!(e.location.as_deref(), Some("WKT text"));
        assert!(
            e.what
                .contains("polygon 1, ring 1 (the outer ring) is not closed (4 positions"),
            "{}",
            e.what
        );
        let f = file(
            ".wkt",
            "MULTIPOLYGON (((0 0, 10 0, 10 10, 0 10, 0 0)), ((20 0, 30 0, 30 10, 20 10, 20 0), (22 2, 24 2, 24 4, 22 4)))",
        );
        let e = read_boundary(f.path()).unwrap_err();
        assert_eq!(e.kind, InputErrorKind::BadGeometry, "{e}");
        assert!(
            e.what.contains("polygon 2, ring 2 (hole 1) is not closed"),
            "{}",
            e.what
        );
        // Closed but with three positions: not a ring either.
        let f = file(".wkt", "POLYGON ((0 0, 10 0, 0 0))");
        let e = read_boundary(f.path()).unwrap_err();
        assert_eq!(e.kind, InputErrorKind::BadGeometry, "{e}");
        assert!(e.what.contains("at least four"), "{e}");
        // The same ring as GeoJSON gets the same words.
        let g = file(
            ".geojson",
            r#"{"type":"Polygon","coordinates":[[[0,0],[10,0],[10,10],[0,10]]]}"#,
        );
        let e = read_boundary(g.path()).unwrap_err();
        assert_eq!(e.kind, InputErrorKind::BadGeometry, "{e}");
        assert!(
            e.what
                .contains("polygon 1, ring 1 (the outer ring) is not closed (4 positions"),
            "{}",
            e.what
        );
    }

    /// Issue 20: the WKT reader stops after the first geometry, so a second
    /// polygon (or a note) after it would be dropped unread: refused with
    /// the line where the first ends. EMPTY members are not errors.
    #[test]
    fn wkt_refuses_text_after_the_first_geometry() {
        let square = "POLYGON ((0 0, 10 0, 10 10, 0 10, 0 0))";
        let f = file(
            ".wkt",
            &format!("{square}\nPOLYGON ((20 0, 30 0, 30 10, 20 0))\n"),
        );
        let e = read_boundary(f.path()).unwrap_err();
        assert_eq!(e.kind, InputErrorKind::Malformed, "{e}");
        assert!(
            e.what
                .contains("text follows the first geometry, which ends on line 1: `POLYGON ((20 0"),
            "{}",
            e.what
        );
        assert!(e.hint.contains("MULTIPOLYGON"));
        let f = file(".wkt", "POLYGON EMPTY the meadow");
        let e = read_boundary(f.path()).unwrap_err();
        assert_eq!(e.kind, InputErrorKind::Malformed, "{e}");
        assert!(e.what.contains("`the meadow`"), "{e}");
        let f = file(".wkt", &format!("  {square}  \n\n"));
        assert_eq!(read_boundary(f.path()).unwrap().shape.0.len(), 1);
        let f = file(
            ".wkt",
            "MULTIPOLYGON (EMPTY, ((0 0, 10 0, 10 10, 0 10, 0 0), EMPTY))",
        );
        let b = read_boundary(f.path()).unwrap();
        assert_eq!(b.shape.0.len(), 2, "the EMPTY part is dropped later");
    }
}
