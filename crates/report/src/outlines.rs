//! `windows.geojson`: every window outline as a polygon feature, so the
//! windows can be laid over the data in any GIS.
//!
//! Lon/lat input: outlines are projected back to lon/lat (RFC 7946).
//! Projected input: coordinates stay planar and the file carries a legacy
//! `crs` member saying so (RFC 7946 has no other way to say it).

use crate::document::AuditReport;
use geo::MapCoords;
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
            Some(f) => shape.map_coords(|c| match f(c.x, c.y) {
                Some([x, y]) => geo::coord! { x: x, y: y },
                None => c,
            }),
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
