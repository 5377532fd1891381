//! Reading feature layers: the layer list, the spatial reference table,
//! column names, and the features themselves.
//!
//! Every query is fixed text with bound parameters. The only names that
//! ever enter SQL text are a layer's table, its geometry column, its key
//! column and a requested attribute column, and each of them is first
//! found in the file's own catalogue (`gpkg_contents`,
//! `gpkg_geometry_columns`, `pragma_table_info`) and then quoted as an
//! identifier. A user's `--where` value is bound as a parameter, never
//! pasted. The file is opened read-only and `query_only`, so even a query
//! that went wrong could not change it.
//!
//! A layer may be a view, and a view may run any query, an endless
//! recursive one included. So every statement on the connection shares one
//! budget of SQLite virtual-machine steps, counted by a progress handler
//! and proportional to the file's size ([`step_budget`]): far more than
//! reading plain tables needs, and finite. Counting steps, not seconds,
//! keeps the refusal the same on every machine.

use crate::blob::{self, BlobError, Shape};
use rusqlite::types::ValueRef;
use rusqlite::{Connection, OpenFlags, OptionalExtension};
use std::fmt;
use std::path::Path;
use std::sync::Arc;
use std::sync::atomic::{AtomicU64, Ordering};

/// The SQLite file header (SQLite file format §1.3: the first 16 bytes).
const SQLITE_MAGIC: &[u8; 16] = b"SQLite format 3\0";

/// SQLite virtual-machine steps between two calls of the progress handler.
const STEPS_PER_CALL: u64 = 10_000;

/// The steps every file may use, whatever its size.
const BASE_STEPS: u64 = 100_000_000;

/// Further steps per byte of the file. Reading a plain table costs about
/// ten steps a row, and a row takes at least ten bytes, so this is a
/// hundred times what the reader's queries need on any plain layer.
const STEPS_PER_BYTE: u64 = 100;

/// The step budget of all queries on a file of `bytes` bytes.
pub fn step_budget(bytes: u64) -> u64 {
    BASE_STEPS.saturating_add(bytes.saturating_mul(STEPS_PER_BYTE))
}

/// A GeoPackage opened for reading.
pub struct GeoPackage {
    conn: Connection,
    /// SQLite steps the budget allows.
    budget: u64,
}

impl fmt::Debug for GeoPackage {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.debug_struct("GeoPackage").finish_non_exhaustive()
    }
}

/// One feature layer, as the catalogue describes it.
#[derive(Debug, Clone, PartialEq)]
pub struct Layer {
    /// The table name (also the layer's name).
    pub name: String,
    /// The geometry column.
    pub column: String,
    /// The declared geometry type (`POINT`, `MULTIPOLYGON`, `GEOMETRY`…).
    pub geometry_type: String,
    /// The layer's spatial reference system id.
    pub srs_id: i32,
    /// Rows in the table.
    pub count: i64,
    /// Whether the layer is a view (a stored query) rather than a table.
    pub view: bool,
}

impl fmt::Display for Layer {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        write!(
            f,
            "`{}` ({}, {} feature{})",
            self.name,
            self.geometry_type,
            self.count,
            if self.count == 1 { "" } else { "s" }
        )
    }
}

/// One row of `gpkg_spatial_ref_sys`.
#[derive(Debug, Clone, PartialEq)]
pub struct SpatialRef {
    /// `srs_id`, the key the layers refer to.
    pub srs_id: i32,
    /// `srs_name`.
    pub name: String,
    /// `organization` (e.g. `EPSG`, `NONE`).
    pub organization: String,
    /// `organization_coordsys_id`.
    pub organization_id: i64,
    /// `definition`: WKT, or `undefined`.
    pub definition: String,
    /// `description`.
    pub description: Option<String>,
}

impl SpatialRef {
    /// `EPSG:4326`-style label, or the name for other organisations.
    pub fn label(&self) -> String {
        if self.organization.eq_ignore_ascii_case("NONE") {
            format!("{} (srs_id {})", self.name, self.srs_id)
        } else {
            format!(
                "{}:{} ({})",
                self.organization, self.organization_id, self.name
            )
        }
    }
}

/// An attribute filter: rows whose `field` equals `value` (compared by
/// SQLite's `=`, so a number column matches the text `2024`).
#[derive(Debug, Clone, PartialEq)]
pub struct Filter {
    /// A column of the layer.
    pub field: String,
    /// The value, bound as a parameter.
    pub value: String,
}

/// One feature as read.
#[derive(Debug, Clone, PartialEq)]
pub struct Feature {
    /// The row's key (`fid` or the rowid).
    pub fid: i64,
    /// The geometry; `None` for SQL NULL or an empty geometry.
    pub shape: Option<Shape>,
    /// The srs_id written in the blob's header.
    pub blob_srs_id: Option<i32>,
    /// The requested attribute as text; `None` for NULL or when none was asked.
    pub value: Option<String>,
}

/// Why a GeoPackage could not be read. Each variant is one kind of
/// problem, with the names and numbers involved.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub enum GpkgError {
    /// The file does not exist.
    #[error("cannot read the file ({0})")]
    NotFound(String),
    /// The file could not be read at all.
    #[error("cannot read the file ({0})")]
    Io(String),
    /// The file is not an SQLite database.
    #[error("not a GeoPackage: {0}")]
    NotSqlite(String),
    /// SQLite could open it but it lacks the GeoPackage tables.
    #[error("not a GeoPackage: {0}")]
    NotGeoPackage(String),
    /// A query failed (a damaged file, usually).
    #[error("the GeoPackage could not be read ({0})")]
    Sql(String),
    /// No feature layer has this name.
    #[error("there is no feature layer named `{name}`{}", layers_note(layers))]
    NoSuchLayer {
        /// The name asked for.
        name: String,
        /// The feature layers there are.
        layers: Vec<Layer>,
    },
    /// The layer has no column of this name.
    #[error("layer `{layer}` has no column named `{column}` (columns: {})", columns.join(", "))]
    NoSuchColumn {
        /// The layer.
        layer: String,
        /// The name asked for.
        column: String,
        /// The columns there are.
        columns: Vec<String>,
    },
    /// The catalogue names something the file does not hold.
    #[error("layer `{layer}`: {problem}")]
    BrokenLayer {
        /// The layer.
        layer: String,
        /// What is wrong.
        problem: String,
    },
    /// The queries on the file used up their step budget: a layer is a
    /// view over an endless (or very slow) query.
    #[error(
        "{} did not finish within {} million SQLite steps, far more than reading a plain table of this file's size needs (the query may never end)",
        step_subject(layer.as_deref(), *view),
        budget / 1_000_000
    )]
    TooManySteps {
        /// The layer being read, when known.
        layer: Option<String>,
        /// Whether that layer is a view rather than a table.
        view: bool,
        /// The budget, in SQLite steps.
        budget: u64,
    },
    /// One feature's geometry blob is malformed.
    #[error("layer `{layer}`, feature fid {fid}: {problem}")]
    Geometry {
        /// The layer.
        layer: String,
        /// The row's key.
        fid: i64,
        /// What is wrong with the blob.
        problem: BlobError,
    },
}

/// The end of the missing-layer message: what the file holds instead.
fn layers_note(layers: &[Layer]) -> String {
    if layers.is_empty() {
        " (the file holds no feature layer)".to_string()
    } else {
        format!("; the layers are {}", list(layers))
    }
}

/// What ran out of steps, as the message's subject.
fn step_subject(layer: Option<&str>, view: bool) -> String {
    match (layer, view) {
        (Some(l), true) => format!("layer `{l}` is a view whose query"),
        (Some(l), false) => format!("reading layer `{l}`"),
        (None, _) => "reading the file's catalogue".to_string(),
    }
}

/// The layers as one line for messages.
pub fn list(layers: &[Layer]) -> String {
    layers
        .iter()
        .map(|l| l.to_string())
        .collect::<Vec<_>>()
        .join(", ")
}

fn sql(e: rusqlite::Error) -> GpkgError {
    match &e {
        rusqlite::Error::SqliteFailure(code, _)
            if code.code == rusqlite::ErrorCode::OperationInterrupted =>
        {
            // Only the step budget interrupts; the caller names the layer.
            GpkgError::TooManySteps {
                layer: None,
                view: false,
                budget: 0,
            }
        }
        rusqlite::Error::SqliteFailure(code, _)
            if matches!(
                code.code,
                rusqlite::ErrorCode::NotADatabase | rusqlite::ErrorCode::DatabaseCorrupt
            ) =>
        {
            GpkgError::NotSqlite(format!("SQLite reports the file as damaged ({e})"))
        }
        _ => GpkgError::Sql(e.to_string()),
    }
}

/// Quote a name as an SQL identifier (`"…"`, inner quotes doubled). Only
/// names read from the file's own catalogue are passed here.
pub fn quote_identifier(name: &str) -> Result<String, GpkgError> {
    if name.contains('\0') {
        return Err(GpkgError::BrokenLayer {
            layer: name.replace('\0', "\\0"),
            problem: "the name holds a NUL character".into(),
        });
    }
    Ok(format!("\"{}\"", name.replace('"', "\"\"")))
}

/// Does the file start like an SQLite database?
pub fn looks_like_sqlite(path: &Path) -> bool {
    use std::io::Read;
    let mut head = [0u8; 16];
    std::fs::File::open(path)
        .and_then(|mut f| f.read_exact(&mut head))
        .is_ok_and(|()| &head == SQLITE_MAGIC)
}

impl GeoPackage {
    /// Open read-only and check that the GeoPackage tables are there.
    pub fn open(path: &Path) -> Result<Self, GpkgError> {
        let meta = std::fs::metadata(path).map_err(|e| match e.kind() {
            std::io::ErrorKind::NotFound => GpkgError::NotFound(e.to_string()),
            _ => GpkgError::Io(e.to_string()),
        })?;
        if !meta.is_file() {
            return Err(GpkgError::Io("not a regular file".into()));
        }
        if !looks_like_sqlite(path) {
            return Err(GpkgError::NotSqlite(
                "the file does not start with the SQLite header (\"SQLite format 3\"), so it is not a GeoPackage or it is damaged".into(),
            ));
        }
        let conn = Connection::open_with_flags(
            path,
            OpenFlags::SQLITE_OPEN_READ_ONLY | OpenFlags::SQLITE_OPEN_NO_MUTEX,
        )
        .map_err(sql)?;
        let budget = step_budget(meta.len());
        let calls = Arc::new(AtomicU64::new(0));
        let allowed = budget / STEPS_PER_CALL;
        conn.progress_handler(
            STEPS_PER_CALL as std::os::raw::c_int,
            Some(move || calls.fetch_add(1, Ordering::Relaxed) >= allowed),
        )
        .map_err(sql)?;
        // Belt and braces: no writes, and no functions called from the
        // file's own schema (views, triggers) beyond SQLite's built-ins.
        conn.execute_batch("PRAGMA query_only = ON; PRAGMA trusted_schema = OFF;")
            .map_err(sql)?;
        let gpkg = Self { conn, budget };
        for table in [
            "gpkg_contents",
            "gpkg_geometry_columns",
            "gpkg_spatial_ref_sys",
        ] {
            if !gpkg.has_table(table)? {
                return Err(GpkgError::NotGeoPackage(format!(
                    "it is an SQLite database without the `{table}` table that every GeoPackage has"
                )));
            }
        }
        Ok(gpkg)
    }

    fn has_table(&self, name: &str) -> Result<bool, GpkgError> {
        Ok(self.table_kind(name)?.is_some())
    }

    /// `table` or `view` for a name in the schema, `None` when absent.
    fn table_kind(&self, name: &str) -> Result<Option<String>, GpkgError> {
        self.conn
            .query_row(
                "SELECT type FROM sqlite_schema WHERE type IN ('table', 'view') AND name = ?1",
                [name],
                |r| r.get::<_, String>(0),
            )
            .optional()
            .map_err(|e| self.within_budget(sql(e), None))
    }

    /// Complete a budget refusal with the budget and, when the caller
    /// knows it, the layer (name, is a view) being read.
    fn within_budget(&self, e: GpkgError, reading: Option<(&str, bool)>) -> GpkgError {
        match e {
            GpkgError::TooManySteps { layer, view, .. } => {
                let (layer, view) = match (layer, reading) {
                    (Some(l), _) => (Some(l), view),
                    (None, Some((name, is_view))) => (Some(name.to_string()), is_view),
                    (None, None) => (None, false),
                };
                GpkgError::TooManySteps {
                    layer,
                    view,
                    budget: self.budget,
                }
            }
            other => other,
        }
    }

    /// `PRAGMA application_id` (0x47504B47, "GPKG", for GeoPackage 1.2 and later).
    pub fn application_id(&self) -> Result<u32, GpkgError> {
        self.conn
            .query_row("PRAGMA application_id", [], |r| r.get::<_, i64>(0))
            .map(|v| v as u32)
            .map_err(|e| self.within_budget(sql(e), None))
    }

    /// Every feature layer, by name.
    pub fn layers(&self) -> Result<Vec<Layer>, GpkgError> {
        self.read_layers().map_err(|e| self.within_budget(e, None))
    }

    fn read_layers(&self) -> Result<Vec<Layer>, GpkgError> {
        let mut stmt = self
            .conn
            .prepare(
                "SELECT c.table_name, g.column_name, g.geometry_type_name, g.srs_id \
                 FROM gpkg_contents AS c JOIN gpkg_geometry_columns AS g ON g.table_name = c.table_name \
                 WHERE lower(c.data_type) = 'features' ORDER BY c.table_name",
            )
            .map_err(sql)?;
        let rows = stmt
            .query_map([], |r| {
                Ok((
                    r.get::<_, String>(0)?,
                    r.get::<_, String>(1)?,
                    r.get::<_, String>(2)?,
                    r.get::<_, i64>(3)?,
                ))
            })
            .map_err(sql)?;
        let mut out = Vec::new();
        for row in rows {
            let (name, column, geometry_type, srs_id) = row.map_err(sql)?;
            let Some(kind) = self.table_kind(&name)? else {
                return Err(GpkgError::BrokenLayer {
                    layer: name,
                    problem: "gpkg_contents lists it but the file has no such table".into(),
                });
            };
            let view = kind == "view";
            let count = self
                .conn
                .query_row(
                    &format!("SELECT count(*) FROM {}", quote_identifier(&name)?),
                    [],
                    |r| r.get::<_, i64>(0),
                )
                .map_err(|e| self.within_budget(sql(e), Some((&name, view))))?;
            let srs_id = i32::try_from(srs_id).map_err(|_| GpkgError::BrokenLayer {
                layer: name.clone(),
                problem: format!("srs_id {srs_id} is out of range"),
            })?;
            out.push(Layer {
                name,
                column,
                geometry_type,
                srs_id,
                count,
                view,
            });
        }
        Ok(out)
    }

    /// The layer of this exact name (compared with the catalogue, never
    /// used as SQL before that).
    pub fn layer(&self, name: &str) -> Result<Layer, GpkgError> {
        let layers = self.layers()?;
        match layers.iter().find(|l| l.name == name) {
            Some(l) => Ok(l.clone()),
            None => Err(GpkgError::NoSuchLayer {
                name: name.to_string(),
                layers,
            }),
        }
    }

    /// A row of `gpkg_spatial_ref_sys`.
    pub fn spatial_ref(&self, srs_id: i32) -> Result<Option<SpatialRef>, GpkgError> {
        self.conn
            .query_row(
                "SELECT srs_id, srs_name, organization, organization_coordsys_id, definition, description \
                 FROM gpkg_spatial_ref_sys WHERE srs_id = ?1",
                [srs_id],
                |r| {
                    Ok(SpatialRef {
                        srs_id: r.get(0)?,
                        name: r.get::<_, Option<String>>(1)?.unwrap_or_default(),
                        organization: r.get::<_, Option<String>>(2)?.unwrap_or_default(),
                        organization_id: r.get::<_, Option<i64>>(3)?.unwrap_or_default(),
                        definition: r.get::<_, Option<String>>(4)?.unwrap_or_default(),
                        description: r.get(5)?,
                    })
                },
            )
            .optional()
            .map_err(|e| self.within_budget(sql(e), None))
    }

    /// Column names of a layer, with the primary-key column if any.
    pub fn columns(&self, layer: &Layer) -> Result<(Vec<String>, Option<String>), GpkgError> {
        self.read_columns(layer)
            .map_err(|e| self.within_budget(e, Some((&layer.name, layer.view))))
    }

    fn read_columns(&self, layer: &Layer) -> Result<(Vec<String>, Option<String>), GpkgError> {
        let mut stmt = self
            .conn
            .prepare("SELECT name, pk FROM pragma_table_info(?1) ORDER BY cid")
            .map_err(sql)?;
        let rows = stmt
            .query_map([&layer.name], |r| {
                Ok((r.get::<_, String>(0)?, r.get::<_, i64>(1)?))
            })
            .map_err(sql)?;
        let mut names = Vec::new();
        let mut keys = Vec::new();
        for row in rows {
            let (name, pk) = row.map_err(sql)?;
            if pk > 0 {
                keys.push(name.clone());
            }
            names.push(name);
        }
        let key = (keys.len() == 1).then(|| keys.remove(0));
        Ok((names, key))
    }

    /// The features of a layer, in key order: the geometry, and the
    /// attribute `attribute` as text if asked; only rows passing `filter`.
    pub fn features(
        &self,
        layer: &Layer,
        attribute: Option<&str>,
        filter: Option<&Filter>,
    ) -> Result<Vec<Feature>, GpkgError> {
        self.read_features(layer, attribute, filter)
            .map_err(|e| self.within_budget(e, Some((&layer.name, layer.view))))
    }

    fn read_features(
        &self,
        layer: &Layer,
        attribute: Option<&str>,
        filter: Option<&Filter>,
    ) -> Result<Vec<Feature>, GpkgError> {
        let (columns, key) = self.columns(layer)?;
        let known = |name: &str| -> Result<String, GpkgError> {
            if columns.iter().any(|c| c == name) {
                quote_identifier(name)
            } else {
                Err(GpkgError::NoSuchColumn {
                    layer: layer.name.clone(),
                    column: name.to_string(),
                    columns: columns.clone(),
                })
            }
        };
        let geom = known(&layer.column).map_err(|_| GpkgError::BrokenLayer {
            layer: layer.name.clone(),
            problem: format!(
                "gpkg_geometry_columns names the geometry column `{}`, which the table does not have",
                layer.column
            ),
        })?;
        // A view has no rowid and declares no key: its `fid` column if it
        // has one, else the rows are numbered in the order the view gives.
        let fid = match (&key, layer.view) {
            (Some(k), _) => Some(quote_identifier(k)?),
            (None, false) => Some("rowid".to_string()),
            (None, true) if columns.iter().any(|c| c == "fid") => Some(quote_identifier("fid")?),
            (None, true) => None,
        };
        let value = match attribute {
            Some(a) => known(a)?,
            None => "NULL".to_string(),
        };
        let table = quote_identifier(&layer.name)?;
        let key_column = fid.as_deref().unwrap_or("NULL");
        let mut text = format!("SELECT {key_column}, {geom}, {value} FROM {table}");
        let mut params: Vec<&str> = Vec::new();
        if let Some(f) = filter {
            text.push_str(&format!(" WHERE {} = ?1", known(&f.field)?));
            params.push(&f.value);
        }
        if let Some(fid) = &fid {
            text.push_str(&format!(" ORDER BY {fid}"));
        }
        let mut stmt = self.conn.prepare(&text).map_err(sql)?;
        let mut rows = stmt
            .query(rusqlite::params_from_iter(params.iter()))
            .map_err(sql)?;
        let mut out = Vec::new();
        while let Some(row) = rows.next().map_err(sql)? {
            let fid: i64 = match row.get_ref(0).map_err(sql)? {
                ValueRef::Integer(i) => i,
                _ => out.len() as i64 + 1,
            };
            let (shape, blob_srs_id) = match row.get_ref(1).map_err(sql)? {
                ValueRef::Null => (None, None),
                ValueRef::Blob(b) => {
                    let d = blob::decode(b).map_err(|problem| GpkgError::Geometry {
                        layer: layer.name.clone(),
                        fid,
                        problem,
                    })?;
                    (d.shape, Some(d.header.srs_id))
                }
                other => {
                    return Err(GpkgError::Geometry {
                        layer: layer.name.clone(),
                        fid,
                        problem: BlobError::Wkb(format!(
                            "the geometry column holds {} instead of a blob",
                            kind(other)
                        )),
                    });
                }
            };
            let value = match row.get_ref(2).map_err(sql)? {
                ValueRef::Null => None,
                ValueRef::Integer(i) => Some(i.to_string()),
                ValueRef::Real(v) => Some(v.to_string()),
                ValueRef::Text(t) => Some(String::from_utf8_lossy(t).into_owned()),
                ValueRef::Blob(b) => Some(String::from_utf8_lossy(b).into_owned()),
            };
            out.push(Feature {
                fid,
                shape,
                blob_srs_id,
                value,
            });
        }
        Ok(out)
    }
}

fn kind(v: ValueRef<'_>) -> &'static str {
    match v {
        ValueRef::Null => "NULL",
        ValueRef::Integer(_) => "an integer",
        ValueRef::Real(_) => "a number",
        ValueRef::Text(_) => "text",
        ValueRef::Blob(_) => "a blob",
    }
}

#[cfg(test)]
#[allow(clippy::unwrap_used)] // a failed unwrap is a failed test
mod tests {
    use super::*;

    /// A GeoPackage whose only feature layer `plots` is created by `sql`
    /// (a table or a view), with the catalogue rows of OGC 12-128 §1.1.
    fn gpkg_with(sql_text: &str) -> tempfile::NamedTempFile {
        let f = tempfile::Builder::new().suffix(".gpkg").tempfile().unwrap();
        let conn = Connection::open(f.path()).unwrap();
        conn.execute_batch(
            "CREATE TABLE gpkg_spatial_ref_sys (srs_name TEXT, srs_id INTEGER PRIMARY KEY, organization TEXT, organization_coordsys_id INTEGER, definition TEXT, description TEXT);
             CREATE TABLE gpkg_contents (table_name TEXT PRIMARY KEY, data_type TEXT, identifier TEXT, srs_id INTEGER);
             CREATE TABLE gpkg_geometry_columns (table_name TEXT, column_name TEXT, geometry_type_name TEXT, srs_id INTEGER, z TINYINT, m TINYINT);
             INSERT INTO gpkg_contents VALUES ('plots', 'features', 'plots', -1);
             INSERT INTO gpkg_geometry_columns VALUES ('plots', 'geom', 'POINT', -1, 0, 0);",
        )
        .unwrap();
        conn.execute_batch(sql_text).unwrap();
        f
    }

    /// A missing path, a folder and a text file each stop with their own
    /// kind before SQLite is asked, in the words the readers print.
    #[test]
    fn files_that_are_not_geopackages_name_their_kind() {
        let dir = tempfile::tempdir().unwrap();
        let e = GeoPackage::open(&dir.path().join("missing.gpkg")).unwrap_err();
        assert!(matches!(&e, GpkgError::NotFound(_)), "{e:?}");
        assert!(e.to_string().starts_with("cannot read the file ("), "{e}");
        let e = GeoPackage::open(dir.path()).unwrap_err();
        assert_eq!(e, GpkgError::Io("not a regular file".into()));
        assert_eq!(e.to_string(), "cannot read the file (not a regular file)");
        let text = dir.path().join("points.gpkg");
        std::fs::write(&text, "x,y\n1,2\n").unwrap();
        let e = GeoPackage::open(&text).unwrap_err();
        assert!(matches!(&e, GpkgError::NotSqlite(_)), "{e:?}");
    }

    /// Issue 20: a feature layer that is a view over an endless recursive
    /// query stops with `TooManySteps` naming the layer as a view, after a
    /// budget set by the file's size, instead of hanging the run.
    #[test]
    fn an_endless_view_uses_up_its_budget_and_stops() {
        let f = gpkg_with(
            "CREATE VIEW plots AS WITH RECURSIVE c(x) AS (SELECT 1 UNION ALL SELECT x + 1 FROM c) SELECT x AS fid, NULL AS geom FROM c;",
        );
        let g = GeoPackage::open(f.path()).unwrap();
        let bytes = std::fs::metadata(f.path()).unwrap().len();
        match g.layers().unwrap_err() {
            GpkgError::TooManySteps {
                layer,
                view,
                budget,
            } => {
                assert_eq!(layer.as_deref(), Some("plots"));
                assert!(view);
                assert_eq!(budget, step_budget(bytes));
            }
            other => panic!("{other}"),
        }
        // A view that ends is read like a table.
        let f = gpkg_with(
            "CREATE TABLE pts (fid INTEGER PRIMARY KEY, geom BLOB);
             INSERT INTO pts VALUES (1, NULL), (2, NULL);
             CREATE VIEW plots AS SELECT fid + 10 AS fid, geom FROM pts;",
        );
        let g = GeoPackage::open(f.path()).unwrap();
        let layers = g.layers().unwrap();
        assert_eq!((layers[0].count, layers[0].view), (2, true));
        let fids: Vec<i64> = g
            .features(&layers[0], None, None)
            .unwrap()
            .iter()
            .map(|f| f.fid)
            .collect();
        assert_eq!(fids, vec![11, 12]);
    }

    /// The budget grows with the file: 100 million steps, plus 100 a byte.
    #[test]
    fn the_budget_follows_the_file_size() {
        assert_eq!(step_budget(0), 100_000_000);
        assert_eq!(step_budget(1 << 20), 100_000_000 + 100 * (1 << 20));
        assert_eq!(step_budget(u64::MAX), u64::MAX);
    }
}
