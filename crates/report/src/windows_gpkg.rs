//! `windows.gpkg`: every window outline as one polygon layer of a
//! GeoPackage, so the windows open in any GIS beside the data, with their
//! coordinate system recorded.
//!
//! Unlike `windows.geojson` (which goes back to lon/lat, as RFC 7946
//! wants), the outlines stay in the plane the report measured them in: the
//! input's projected system, or for lon/lat input the equal-area
//! projection, recorded as its own `gpkg_spatial_ref_sys` row. So a GIS
//! that measures the polygons gets the report's areas. The layout is
//! described in `docs/windows-gpkg.md`.

use crate::document::AuditReport;
use patternproof_gpkg::SpatialRef;
use patternproof_gpkg::write::{ColumnType, PolygonLayer, Value, polygon_layer_bytes};

/// The layer's table name.
pub const TABLE: &str = "windows";

/// The GeoPackage bytes. `last_change` is the time written into
/// `gpkg_contents` (pass [`patternproof_gpkg::write::FIXED_LAST_CHANGE`]
/// for reproducible bytes).
pub fn windows_gpkg(
    report: &AuditReport,
    srs: &SpatialRef,
    last_change: &str,
) -> Result<Vec<u8>, patternproof_gpkg::GpkgError> {
    let columns = vec![
        ("id".to_string(), ColumnType::Text),
        ("kind".to_string(), ColumnType::Text),
        ("area".to_string(), ColumnType::Real),
        ("perimeter".to_string(), ColumnType::Real),
        ("buffer".to_string(), ColumnType::Real),
        ("points_outside".to_string(), ColumnType::Integer),
        ("unit".to_string(), ColumnType::Text),
    ];
    let rows = report
        .windows
        .iter()
        .filter_map(|w| {
            let shape = w.shape.as_ref()?;
            let kind = serde_json::to_value(w.kind)
                .ok()
                .and_then(|v| v.as_str().map(str::to_string))
                .unwrap_or_default();
            Some((
                shape.clone(),
                vec![
                    Value::Text(w.id.clone()),
                    Value::Text(kind),
                    Value::Real(w.area),
                    w.perimeter.map_or(Value::Null, Value::Real),
                    w.buffer.map_or(Value::Null, Value::Real),
                    Value::Integer(i64::try_from(w.points_outside).unwrap_or(i64::MAX)),
                    Value::Text(report.input.unit.clone()),
                ],
            ))
        })
        .collect();
    polygon_layer_bytes(&PolygonLayer {
        table: TABLE.into(),
        identifier: "patternproof windows".into(),
        description: format!(
            "study-area windows of the audit of {} (area in {unit}², perimeter in {unit})",
            report.input.points_file,
            unit = report.input.unit
        ),
        srs: srs.clone(),
        last_change: last_change.into(),
        columns,
        rows,
    })
}
