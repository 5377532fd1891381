//! Writing one polygon layer into a fresh GeoPackage, returned as bytes.
//!
//! The database is built in memory and serialised with
//! `sqlite3_serialize`, so the caller can put the bytes into an output
//! folder that is written whole or not at all, and no temporary file is
//! involved. The same rows give the same bytes: there is no clock in the
//! file unless the caller passes one as `last_change`, rows go in in the
//! given order, and the page layout depends only on the bundled SQLite
//! version.
//!
//! What the file holds (OGC GeoPackage 1.3, OGC 12-128r17):
//! - `PRAGMA application_id` 0x47504B47 ("GPKG") and `user_version` 10300
//!   (§1.1.1.1.1, Requirement 2);
//! - `gpkg_spatial_ref_sys` with the three rows every GeoPackage has
//!   (srs_id 4326, −1 and 0; §1.1.2.1.2) and the layer's own row;
//! - `gpkg_contents` with the layer's extent (§1.1.3);
//! - `gpkg_geometry_columns` (§2.1.5);
//! - the feature table, key `fid INTEGER PRIMARY KEY AUTOINCREMENT`,
//!   geometry column `geom` of type MULTIPOLYGON (§2.1.6).

use crate::blob;
use crate::read::{GpkgError, SpatialRef, quote_identifier};
use geo::{BoundingRect, MultiPolygon};
use rusqlite::Connection;

/// `application_id` of GeoPackage 1.2 and later: "GPKG".
pub const APPLICATION_ID: u32 = 0x4750_4B47;
/// `user_version` for GeoPackage 1.3.0.
pub const USER_VERSION: u32 = 10300;
/// `last_change` when no time is given: a fixed value so reruns give the
/// same bytes.
pub const FIXED_LAST_CHANGE: &str = "1970-01-01T00:00:00.000Z";

/// The definition of srs_id 4326 as the standard's required row gives it.
pub const WGS84_DEFINITION: &str = r#"GEOGCS["WGS 84",DATUM["WGS_1984",SPHEROID["WGS 84",6378137,298.257223563,AUTHORITY["EPSG","7030"]],AUTHORITY["EPSG","6326"]],PRIMEM["Greenwich",0,AUTHORITY["EPSG","8901"]],UNIT["degree",0.0174532925199433,AUTHORITY["EPSG","9122"]],AUTHORITY["EPSG","4326"]]"#;

/// The three rows every GeoPackage's `gpkg_spatial_ref_sys` holds.
pub fn required_srs() -> [SpatialRef; 3] {
    [
        SpatialRef {
            srs_id: 4326,
            name: "WGS 84 geodetic".into(),
            organization: "EPSG".into(),
            organization_id: 4326,
            definition: WGS84_DEFINITION.into(),
            description: Some(
                "longitude/latitude coordinates in decimal degrees on the WGS 84 spheroid".into(),
            ),
        },
        SpatialRef {
            srs_id: -1,
            name: "Undefined cartesian SRS".into(),
            organization: "NONE".into(),
            organization_id: -1,
            definition: "undefined".into(),
            description: Some("undefined cartesian coordinate reference system".into()),
        },
        SpatialRef {
            srs_id: 0,
            name: "Undefined geographic SRS".into(),
            organization: "NONE".into(),
            organization_id: 0,
            definition: "undefined".into(),
            description: Some("undefined geographic coordinate reference system".into()),
        },
    ]
}

/// An attribute value.
#[derive(Debug, Clone, PartialEq)]
pub enum Value {
    /// SQL NULL.
    Null,
    /// INTEGER.
    Integer(i64),
    /// REAL (non-finite values are written as NULL).
    Real(f64),
    /// TEXT.
    Text(String),
}

/// The SQL type of an attribute column.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum ColumnType {
    /// INTEGER.
    Integer,
    /// REAL (the standard's DOUBLE).
    Real,
    /// TEXT.
    Text,
}

impl ColumnType {
    fn sql(self) -> &'static str {
        match self {
            ColumnType::Integer => "INTEGER",
            ColumnType::Real => "REAL",
            ColumnType::Text => "TEXT",
        }
    }
}

/// One polygon layer to write.
#[derive(Debug, Clone)]
pub struct PolygonLayer {
    /// Table name.
    pub table: String,
    /// `gpkg_contents.identifier`.
    pub identifier: String,
    /// `gpkg_contents.description`.
    pub description: String,
    /// The coordinate system of the geometries (added to
    /// `gpkg_spatial_ref_sys` unless it is one of the required rows).
    pub srs: SpatialRef,
    /// `gpkg_contents.last_change`, `YYYY-MM-DDTHH:MM:SS.SSSZ`.
    pub last_change: String,
    /// Attribute columns after `fid` and `geom`.
    pub columns: Vec<(String, ColumnType)>,
    /// Rows: geometry and one value per column.
    pub rows: Vec<(MultiPolygon<f64>, Vec<Value>)>,
}

fn sql(e: rusqlite::Error) -> GpkgError {
    GpkgError::Sql(e.to_string())
}

/// Build the GeoPackage in memory and return its bytes.
pub fn polygon_layer_bytes(layer: &PolygonLayer) -> Result<Vec<u8>, GpkgError> {
    let mut conn = Connection::open_in_memory().map_err(sql)?;
    conn.execute_batch(&format!(
        "PRAGMA page_size = 4096;
         PRAGMA application_id = {APPLICATION_ID};
         PRAGMA user_version = {USER_VERSION};
         CREATE TABLE gpkg_spatial_ref_sys (
           srs_name TEXT NOT NULL,
           srs_id INTEGER PRIMARY KEY,
           organization TEXT NOT NULL,
           organization_coordsys_id INTEGER NOT NULL,
           definition TEXT NOT NULL,
           description TEXT
         );
         CREATE TABLE gpkg_contents (
           table_name TEXT NOT NULL PRIMARY KEY,
           data_type TEXT NOT NULL,
           identifier TEXT UNIQUE,
           description TEXT DEFAULT '',
           last_change DATETIME NOT NULL DEFAULT (strftime('%Y-%m-%dT%H:%M:%fZ','now')),
           min_x DOUBLE, min_y DOUBLE, max_x DOUBLE, max_y DOUBLE,
           srs_id INTEGER,
           CONSTRAINT fk_gc_r_srs_id FOREIGN KEY (srs_id) REFERENCES gpkg_spatial_ref_sys(srs_id)
         );
         CREATE TABLE gpkg_geometry_columns (
           table_name TEXT NOT NULL,
           column_name TEXT NOT NULL,
           geometry_type_name TEXT NOT NULL,
           srs_id INTEGER NOT NULL,
           z TINYINT NOT NULL,
           m TINYINT NOT NULL,
           CONSTRAINT pk_geom_cols PRIMARY KEY (table_name, column_name),
           CONSTRAINT uk_gc_table_name UNIQUE (table_name),
           CONSTRAINT fk_gc_tn FOREIGN KEY (table_name) REFERENCES gpkg_contents(table_name),
           CONSTRAINT fk_gc_srs FOREIGN KEY (srs_id) REFERENCES gpkg_spatial_ref_sys (srs_id)
         );"
    ))
    .map_err(sql)?;
    let tx = conn.transaction().map_err(sql)?;
    {
        let mut srs_rows: Vec<SpatialRef> = required_srs().to_vec();
        if !srs_rows.iter().any(|s| s.srs_id == layer.srs.srs_id) {
            srs_rows.push(layer.srs.clone());
        }
        let mut insert = tx
            .prepare(
                "INSERT INTO gpkg_spatial_ref_sys (srs_name, srs_id, organization, organization_coordsys_id, definition, description) VALUES (?1, ?2, ?3, ?4, ?5, ?6)",
            )
            .map_err(sql)?;
        for s in &srs_rows {
            insert
                .execute(rusqlite::params![
                    s.name,
                    s.srs_id,
                    s.organization,
                    s.organization_id,
                    s.definition,
                    s.description
                ])
                .map_err(sql)?;
        }

        let table = quote_identifier(&layer.table)?;
        let mut ddl = format!(
            "CREATE TABLE {table} (fid INTEGER PRIMARY KEY AUTOINCREMENT NOT NULL, geom MULTIPOLYGON"
        );
        for (name, kind) in &layer.columns {
            ddl.push_str(&format!(", {} {}", quote_identifier(name)?, kind.sql()));
        }
        ddl.push(')');
        tx.execute_batch(&ddl).map_err(sql)?;

        let extent = layer
            .rows
            .iter()
            .filter_map(|(g, _)| g.bounding_rect())
            .reduce(|a, b| {
                geo::Rect::new(
                    geo::coord! { x: a.min().x.min(b.min().x), y: a.min().y.min(b.min().y) },
                    geo::coord! { x: a.max().x.max(b.max().x), y: a.max().y.max(b.max().y) },
                )
            });
        tx.execute(
            "INSERT INTO gpkg_contents (table_name, data_type, identifier, description, last_change, min_x, min_y, max_x, max_y, srs_id) VALUES (?1, 'features', ?2, ?3, ?4, ?5, ?6, ?7, ?8, ?9)",
            rusqlite::params![
                layer.table,
                layer.identifier,
                layer.description,
                layer.last_change,
                extent.map(|r| r.min().x),
                extent.map(|r| r.min().y),
                extent.map(|r| r.max().x),
                extent.map(|r| r.max().y),
                layer.srs.srs_id
            ],
        )
        .map_err(sql)?;
        tx.execute(
            "INSERT INTO gpkg_geometry_columns (table_name, column_name, geometry_type_name, srs_id, z, m) VALUES (?1, 'geom', 'MULTIPOLYGON', ?2, 0, 0)",
            rusqlite::params![layer.table, layer.srs.srs_id],
        )
        .map_err(sql)?;

        let names: Vec<String> = std::iter::once(Ok("geom".to_string()))
            .chain(layer.columns.iter().map(|(n, _)| quote_identifier(n)))
            .collect::<Result<_, _>>()?;
        let marks: Vec<String> = (1..=names.len()).map(|k| format!("?{k}")).collect();
        let mut insert = tx
            .prepare(&format!(
                "INSERT INTO {table} ({}) VALUES ({})",
                names.join(", "),
                marks.join(", ")
            ))
            .map_err(sql)?;
        for (shape, values) in &layer.rows {
            let mut params: Vec<rusqlite::types::Value> = Vec::with_capacity(names.len());
            params.push(rusqlite::types::Value::Blob(blob::encode_multi_polygon(
                shape,
                layer.srs.srs_id,
            )));
            for v in values {
                params.push(match v {
                    Value::Null => rusqlite::types::Value::Null,
                    Value::Integer(i) => rusqlite::types::Value::Integer(*i),
                    Value::Real(x) if x.is_finite() => rusqlite::types::Value::Real(*x),
                    Value::Real(_) => rusqlite::types::Value::Null,
                    Value::Text(t) => rusqlite::types::Value::Text(t.clone()),
                });
            }
            if params.len() != names.len() {
                return Err(GpkgError::Sql(format!(
                    "a row has {} values for {} columns",
                    params.len() - 1,
                    names.len() - 1
                )));
            }
            insert
                .execute(rusqlite::params_from_iter(params))
                .map_err(sql)?;
        }
    }
    tx.commit().map_err(sql)?;
    conn.execute_batch("VACUUM").map_err(sql)?;
    let data = conn.serialize("main").map_err(sql)?;
    Ok(data.to_vec())
}

#[cfg(test)]
#[allow(clippy::unwrap_used)] // a failed unwrap is a failed test
mod tests {
    use super::*;
    use crate::read::GeoPackage;
    use geo::{LineString, Polygon};

    fn layer() -> PolygonLayer {
        let shell = LineString::from(vec![(0.0, 0.0), (10.0, 0.0), (10.0, 10.0), (0.0, 10.0)]);
        let hole = LineString::from(vec![(4.0, 4.0), (6.0, 4.0), (6.0, 6.0), (4.0, 6.0)]);
        PolygonLayer {
            table: "windows".into(),
            identifier: "test windows".into(),
            description: String::new(),
            srs: required_srs()[1].clone(),
            last_change: FIXED_LAST_CHANGE.into(),
            columns: vec![
                ("id".into(), ColumnType::Text),
                ("area".into(), ColumnType::Real),
            ],
            rows: vec![(
                MultiPolygon(vec![Polygon::new(shell, vec![hole])]),
                vec![Value::Text("square".into()), Value::Real(96.0)],
            )],
        }
    }

    /// Written bytes read back through the reader; the same input gives
    /// the same bytes (no clock in the file).
    #[test]
    fn round_trip_and_same_bytes() {
        let bytes = polygon_layer_bytes(&layer()).unwrap();
        assert_eq!(&bytes[..16], b"SQLite format 3\0");
        // SQLite file format §1.3: application_id is the big-endian u32 at offset 68,
        // user_version the one at offset 60.
        assert_eq!(&bytes[68..72], &APPLICATION_ID.to_be_bytes());
        assert_eq!(&bytes[60..64], &USER_VERSION.to_be_bytes());
        assert_eq!(bytes, polygon_layer_bytes(&layer()).unwrap());

        let dir = tempfile::tempdir().unwrap();
        let path = dir.path().join("w.gpkg");
        std::fs::write(&path, &bytes).unwrap();
        let g = GeoPackage::open(&path).unwrap();
        assert_eq!(g.application_id().unwrap(), APPLICATION_ID);
        let l = g.layer("windows").unwrap();
        assert_eq!(
            (l.geometry_type.as_str(), l.count, l.srs_id),
            ("MULTIPOLYGON", 1, -1)
        );
        let f = g.features(&l, Some("id"), None).unwrap();
        assert_eq!(f[0].value.as_deref(), Some("square"));
        assert!(
            matches!(&f[0].shape, Some(blob::Shape::Polygons(mp)) if mp.0[0].interiors().len() == 1)
        );
        for id in [4326, -1, 0] {
            assert!(
                g.spatial_ref(id).unwrap().is_some(),
                "required srs row {id}"
            );
        }
    }
}
