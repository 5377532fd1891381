//! GeoPackage input, checked two ways:
//!
//! - against `reference/gpkg/survey.gpkg`, written by
//!   `reference/make_gpkg_reference.py` with Python's sqlite3 and shapely
//!   (versions in `reference/gpkg_values.json`), and the same data as CSV
//!   and WKT beside it;
//! - against small files this test builds itself with raw SQL and
//!   hand-packed blobs (header after OGC GeoPackage 1.3 §2.1.3.1.1, WKB
//!   after OGC 06-103r4 §8.2), so neither side uses our writer.

#![allow(clippy::unwrap_used, missing_docs)]

use approx::assert_relative_eq;
use geo::Area;
use patternproof_io::boundary::read_boundary;
use patternproof_io::geopackage::{self, GpkgChoice, parse_filter};
use patternproof_io::{CoordChoice, CoordSystem, Dataset, LoadOptions};
use rusqlite::Connection;
use serde_json::Value;
use std::path::{Path, PathBuf};

fn reference(name: &str) -> PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR"))
        .join("../../reference")
        .join(name)
}

fn values() -> Value {
    serde_json::from_str(&std::fs::read_to_string(reference("gpkg_values.json")).unwrap()).unwrap()
}

fn survey() -> PathBuf {
    reference("gpkg/survey.gpkg")
}

fn options(layer: Option<&str>, boundary_layer: Option<&str>) -> LoadOptions {
    LoadOptions {
        gpkg: GpkgChoice {
            layer: layer.map(str::to_string),
            boundary_layer: boundary_layer.map(str::to_string),
            filter: None,
        },
        ..LoadOptions::default()
    }
}

/// `points` (and values carried with them) in the order the data set
/// keeps them: canonical, by x then y (`patternproof_core::order`).
fn canonical<T: Clone>(points: &[[f64; 2]], carried: &[T]) -> (Vec<[f64; 2]>, Vec<T>) {
    use patternproof_core::order::{canonical_permutation, permute};
    match canonical_permutation(points) {
        None => (points.to_vec(), carried.to_vec()),
        Some(order) => (permute(points, &order), permute(carried, &order)),
    }
}

fn json_points(v: &Value) -> Vec<[f64; 2]> {
    v.as_array()
        .unwrap()
        .iter()
        .map(|p| [p[0].as_f64().unwrap(), p[1].as_f64().unwrap()])
        .collect()
}

#[test]
fn projected_layer_matches_the_reference_points() {
    let v = values();
    let want = json_points(&v["layers"]["plots_utm"]["points"]);
    let mut o = options(Some("plots_utm"), None);
    o.field = Some("site".into());
    let d = Dataset::load(&survey(), &[], &o).unwrap();
    let sites: Vec<String> = v["layers"]["plots_utm"]["sites"]
        .as_array()
        .unwrap()
        .iter()
        .map(|s| s.as_str().unwrap().to_string())
        .collect();
    let (want, sites) = canonical(&want, &sites);
    // Coordinates as shapely wrote them into the WKB (reference script), bit for bit.
    assert_eq!(d.points, want);
    assert_eq!(d.system, CoordSystem::Projected);
    // EPSG:32633's WKT definition says UNIT["metre",1] (the script's srs row).
    assert_eq!(d.unit, "m");
    assert!(
        d.warnings
            .iter()
            .any(|w| w.contains("2 feature(s) without geometry")),
        "the empty point and the NULL geometry: {:?}",
        d.warnings
    );
    assert_eq!(d.field_values.unwrap(), sites);
    assert_eq!(d.srs.unwrap().organization_id, 32633);
}

#[test]
fn projected_layer_equals_the_same_points_from_csv() {
    let g = Dataset::load(&survey(), &[], &options(Some("plots_utm"), None)).unwrap();
    let c = Dataset::load(
        &reference("gpkg/plots_utm.csv"),
        &[],
        &LoadOptions::default(),
    )
    .unwrap();
    assert_eq!(g.points, c.points);
    assert_eq!(g.unit, c.unit);
}

#[test]
fn lonlat_layer_is_projected_exactly_like_lonlat_csv() {
    let v = values();
    let g = Dataset::load(
        &survey(),
        &[reference("gpkg/survey.gpkg")],
        &options(Some("plots_wgs84"), Some("area_wgs84")),
    )
    .unwrap();
    let c = Dataset::load(
        &reference("gpkg/plots_wgs84.csv"),
        &[reference("gpkg/area_wgs84.wkt")],
        &LoadOptions::default(),
    )
    .unwrap();
    assert_eq!(g.system, CoordSystem::LonLat);
    assert_eq!(
        g.n_read,
        json_points(&v["layers"]["plots_wgs84"]["points"]).len()
    );
    let (pg, pc) = (
        g.projection.as_ref().unwrap(),
        c.projection.as_ref().unwrap(),
    );
    assert_eq!((pg.lon0, pg.lat0), (pc.lon0, pc.lat0));
    assert_eq!(g.points, c.points);
    assert_eq!(g.boundaries[0].shape, c.boundaries[0].shape);
    assert_eq!(
        g.boundaries[0].name, "upper meadow",
        "the single feature's name column"
    );
    assert_eq!(g.plane_srs().srs_id, geopackage::EQUAL_AREA_SRS_ID);
}

#[test]
fn polygon_layer_with_a_hole_matches_wkt_and_shapely() {
    let v = values();
    let g = geopackage::read_boundary(&survey(), Some("area_utm"), CoordChoice::Auto).unwrap();
    let w = read_boundary(&reference("gpkg/area_utm.wkt")).unwrap();
    assert_eq!(g.raw.shape, w.shape);
    assert_eq!(g.raw.shape.0[0].interiors().len(), 1);
    assert_eq!(g.raw.declared, Some(CoordSystem::Projected));
    // Area from shapely (GEOS) in the reference script; exact arithmetic on these integer corners.
    let want = v["layers"]["area_utm"]["area"].as_f64().unwrap();
    assert_relative_eq!(g.raw.shape.unsigned_area(), want, max_relative = 1e-12);
}

#[test]
fn where_keeps_one_year() {
    let v = values();
    let mut o = options(Some("plots_utm"), None);
    o.gpkg.filter = Some(parse_filter("year=2024").unwrap());
    let d = Dataset::load(&survey(), &[], &o).unwrap();
    let all = json_points(&v["layers"]["plots_utm"]["points"]);
    let years = v["layers"]["plots_utm"]["years"].as_array().unwrap();
    let want: Vec<[f64; 2]> = all
        .iter()
        .zip(years)
        .filter(|(_, y)| y.as_i64() == Some(2024))
        .map(|(p, _)| *p)
        .collect();
    let (want, _) = canonical(&want, &want);
    assert_eq!(
        d.points, want,
        "the year column is INTEGER; the text 2024 matches by SQLite affinity"
    );
}

#[test]
fn more_than_one_layer_needs_a_name() {
    let e = Dataset::load(&survey(), &[], &LoadOptions::default()).unwrap_err();
    assert_eq!(e.kind, patternproof_io::InputErrorKind::Layer, "{e}");
    assert!(e.what.contains("4 feature layers"), "{e}");
    assert!(e.what.contains("`plots_utm` (POINT, 42 features)"), "{e}");
    assert!(e.hint.contains("--layer"), "{e}");
    let e = Dataset::load(&survey(), &[], &options(Some("area_utm"), None)).unwrap_err();
    assert_eq!(e.kind, patternproof_io::InputErrorKind::BadGeometry, "{e}");
    assert!(e.what.contains("MultiPolygon, not a point"), "{e}");
}

// ---- files built by the test ------------------------------------------

/// A GeoPackage skeleton: the three catalogue tables and the required
/// srs rows (OGC GeoPackage 1.3 §1.1.2.1.2), plus `extra` srs rows.
fn skeleton(path: &Path, extra: &[(i64, &str, i64, &str)]) -> Connection {
    let c = Connection::open(path).unwrap();
    c.execute_batch(
        "PRAGMA application_id = 1196444487; PRAGMA user_version = 10300;
         CREATE TABLE gpkg_spatial_ref_sys (srs_name TEXT NOT NULL, srs_id INTEGER PRIMARY KEY, organization TEXT NOT NULL, organization_coordsys_id INTEGER NOT NULL, definition TEXT NOT NULL, description TEXT);
         CREATE TABLE gpkg_contents (table_name TEXT NOT NULL PRIMARY KEY, data_type TEXT NOT NULL, identifier TEXT UNIQUE, description TEXT DEFAULT '', last_change DATETIME NOT NULL DEFAULT '2026-01-01T00:00:00.000Z', min_x DOUBLE, min_y DOUBLE, max_x DOUBLE, max_y DOUBLE, srs_id INTEGER);
         CREATE TABLE gpkg_geometry_columns (table_name TEXT NOT NULL, column_name TEXT NOT NULL, geometry_type_name TEXT NOT NULL, srs_id INTEGER NOT NULL, z TINYINT NOT NULL, m TINYINT NOT NULL);
         INSERT INTO gpkg_spatial_ref_sys VALUES ('WGS 84 geodetic', 4326, 'EPSG', 4326, 'GEOGCS[\"WGS 84\",DATUM[\"WGS_1984\",SPHEROID[\"WGS 84\",6378137,298.257223563]],PRIMEM[\"Greenwich\",0],UNIT[\"degree\",0.0174532925199433]]', NULL);
         INSERT INTO gpkg_spatial_ref_sys VALUES ('Undefined cartesian SRS', -1, 'NONE', -1, 'undefined', NULL);
         INSERT INTO gpkg_spatial_ref_sys VALUES ('Undefined geographic SRS', 0, 'NONE', 0, 'undefined', NULL);",
    )
    .unwrap();
    for (id, org, code, def) in extra {
        c.execute(
            "INSERT INTO gpkg_spatial_ref_sys VALUES (?1, ?2, ?3, ?4, ?5, NULL)",
            rusqlite::params![format!("srs {id}"), id, org, code, def],
        )
        .unwrap();
    }
    c
}

/// A point layer named `name` (any text: it is quoted here by hand with
/// doubled quotes, the SQL standard's identifier quoting).
fn point_layer(c: &Connection, name: &str, srs_id: i64, rows: &[(Vec<u8>, i64)]) {
    let q = format!("\"{}\"", name.replace('"', "\"\""));
    c.execute_batch(&format!(
        "CREATE TABLE {q} (fid INTEGER PRIMARY KEY, geom POINT, year INTEGER)"
    ))
    .unwrap();
    c.execute(
        "INSERT INTO gpkg_contents (table_name, data_type, srs_id) VALUES (?1, 'features', ?2)",
        rusqlite::params![name, srs_id],
    )
    .unwrap();
    c.execute(
        "INSERT INTO gpkg_geometry_columns VALUES (?1, 'geom', 'POINT', ?2, 0, 0)",
        rusqlite::params![name, srs_id],
    )
    .unwrap();
    for (blob, year) in rows {
        c.execute(
            &format!("INSERT INTO {q} (geom, year) VALUES (?1, ?2)"),
            rusqlite::params![blob, year],
        )
        .unwrap();
    }
}

/// Header (big- or little-endian, envelope code `env`) + little-endian
/// WKB point, packed by hand.
fn point_blob(x: f64, y: f64, srs_id: i32, big: bool, env: u8) -> Vec<u8> {
    let mut b = vec![b'G', b'P', 0, (env << 1) | u8::from(!big)];
    let doubles = [0usize, 4, 6, 6, 8][env as usize];
    if big {
        b.extend_from_slice(&srs_id.to_be_bytes());
        for _ in 0..doubles {
            b.extend_from_slice(&x.to_be_bytes());
        }
    } else {
        b.extend_from_slice(&srs_id.to_le_bytes());
        for _ in 0..doubles {
            b.extend_from_slice(&x.to_le_bytes());
        }
    }
    b.push(1);
    b.extend_from_slice(&1u32.to_le_bytes());
    b.extend_from_slice(&x.to_le_bytes());
    b.extend_from_slice(&y.to_le_bytes());
    b
}

fn grid(srs_id: i32) -> Vec<(Vec<u8>, i64)> {
    (0..12)
        .map(|k| {
            let (x, y) = (
                f64::from(k % 4) * 10.0 + 0.5 * f64::from(k),
                f64::from(k / 4) * 10.0,
            );
            (
                point_blob(x, y, srs_id, k % 2 == 0, (k % 5) as u8),
                2020 + i64::from(k % 3),
            )
        })
        .collect()
}

const HOSTILE: &str = "pts\"; DROP TABLE gpkg_contents; --";

#[test]
fn a_hostile_layer_name_is_read_and_changes_nothing() {
    let dir = tempfile::tempdir().unwrap();
    let path = dir.path().join("hostile.gpkg");
    let c = skeleton(&path, &[]);
    point_layer(&c, HOSTILE, -1, &grid(-1));
    drop(c);
    let before = std::fs::read(&path).unwrap();
    // srs_id −1 is the standard's undefined Cartesian system: planar, unit
    // from --unit. Under the default `m` these small numbers would read as
    // metres by default only, and they fit the lon/lat ranges: a stop.
    let e = Dataset::load(&path, &[], &options(Some(HOSTILE), None)).unwrap_err();
    assert_eq!(e.kind, patternproof_io::InputErrorKind::CoordSystem, "{e}");
    assert!(
        e.what.contains("undefined Cartesian system (srs_id -1)")
            && e.what.contains("as longitude and latitude do"),
        "{e}"
    );
    let mut in_feet = options(Some(HOSTILE), None);
    in_feet.unit = "ft".into();
    let d = Dataset::load(&path, &[], &in_feet).unwrap();
    assert_eq!(d.points.len(), 12);
    assert_eq!((d.system, d.unit.as_str()), (CoordSystem::Projected, "ft"));
    assert!(d.warnings.iter().any(|w| w.contains("undefined Cartesian")));
    // A name that merely contains SQL is not a layer.
    let e = Dataset::load(&path, &[], &options(Some("pts\" OR 1=1 --"), None)).unwrap_err();
    assert_eq!(e.kind, patternproof_io::InputErrorKind::Layer, "{e}");
    assert!(e.what.contains("no feature layer named"), "{e}");
    assert_eq!(
        std::fs::read(&path).unwrap(),
        before,
        "the file is untouched"
    );
    let c = Connection::open(&path).unwrap();
    let n: i64 = c
        .query_row("SELECT count(*) FROM gpkg_contents", [], |r| r.get(0))
        .unwrap();
    assert_eq!(n, 1);
}

#[test]
fn sql_in_a_where_value_is_only_a_value() {
    let dir = tempfile::tempdir().unwrap();
    let path = dir.path().join("where.gpkg");
    let c = skeleton(&path, &[]);
    point_layer(&c, "pts", -1, &grid(-1));
    drop(c);
    let before = std::fs::read(&path).unwrap();
    let run = |w: &str| {
        let mut o = options(Some("pts"), None);
        // Small planar numbers in an undefined system: say the unit.
        o.unit = "ft".into();
        o.gpkg.filter = Some(parse_filter(w).unwrap());
        Dataset::load(&path, &[], &o)
    };
    assert_eq!(run("year=2021").unwrap().points.len(), 4);
    for hostile in [
        "year=2021' OR '1'='1",
        "year=2021 OR 1=1",
        "year=0; DROP TABLE pts; --",
        "year=2021\" OR \"1\"=\"1",
        "year= 1 OR 1=1; --=2021",
    ] {
        let e = run(hostile).unwrap_err();
        assert_eq!(e.kind, patternproof_io::InputErrorKind::Filter, "{e}");
        assert!(e.what.contains("no feature"), "{hostile}: {e}");
    }
    let e = run("year OR 1=2021").unwrap_err();
    assert_eq!(e.kind, patternproof_io::InputErrorKind::Layer, "{e}");
    assert!(e.what.contains("has no column named"), "{e}");
    let e = run("\"year\"=2021").unwrap_err();
    assert_eq!(e.kind, patternproof_io::InputErrorKind::Layer, "{e}");
    assert!(e.what.contains("has no column named"), "{e}");
    assert_eq!(
        std::fs::read(&path).unwrap(),
        before,
        "the file is untouched"
    );
}

#[test]
fn every_header_variant_reads_the_same_points() {
    let dir = tempfile::tempdir().unwrap();
    let path = dir.path().join("variants.gpkg");
    let c = skeleton(&path, &[(32632, "EPSG", 32632, "no definition kept")]);
    point_layer(&c, "pts", 32632, &grid(32632));
    drop(c);
    // The definition is not WKT; EPSG:32632 is on the known list of metre-based projected codes.
    let d = Dataset::load(&path, &[], &LoadOptions::default()).unwrap();
    let want: Vec<[f64; 2]> = (0..12)
        .map(|k| {
            [
                f64::from(k % 4) * 10.0 + 0.5 * f64::from(k),
                f64::from(k / 4) * 10.0,
            ]
        })
        .collect();
    let (want, _) = canonical(&want, &want);
    assert_eq!(d.points, want);
    assert_eq!(d.unit, "m");
}

#[test]
fn unknown_or_unusable_systems_stop_unless_forced() {
    let dir = tempfile::tempdir().unwrap();
    let path = dir.path().join("unknown.gpkg");
    let c = skeleton(&path, &[(5001, "LOCAL", 1, "site grid")]);
    point_layer(&c, "pts", 5001, &grid(5001));
    drop(c);
    let e = Dataset::load(&path, &[], &LoadOptions::default()).unwrap_err();
    assert_eq!(e.kind, patternproof_io::InputErrorKind::CoordSystem, "{e}");
    assert!(e.what.contains("LOCAL:1"), "{e}");
    assert!(
        e.hint.contains("--coords projected") && e.hint.contains("--unit"),
        "{e}"
    );
    let forced = LoadOptions {
        coords: CoordChoice::Projected,
        unit: "ft".into(),
        ..LoadOptions::default()
    };
    let d = Dataset::load(&path, &[], &forced).unwrap();
    assert_eq!((d.unit.as_str(), d.points.len()), ("ft", 12));

    // Geographic in grads (WKT 1 UNIT factor π/200): not converted, refused.
    let path = dir.path().join("grads.gpkg");
    let grads = r#"GEOGCS["old grid",DATUM["d",SPHEROID["s",6378249.2,293.4660212936269]],PRIMEM["Paris",2.33722917],UNIT["grad",0.01570796326794897]]"#;
    let c = skeleton(&path, &[(7001, "LOCAL", 7001, grads)]);
    point_layer(&c, "pts", 7001, &grid(7001));
    drop(c);
    let e = Dataset::load(&path, &[], &LoadOptions::default()).unwrap_err();
    assert_eq!(e.kind, patternproof_io::InputErrorKind::CoordSystem, "{e}");
    assert!(e.what.contains("grad"), "{e}");
}

#[test]
fn boundary_in_another_projected_system_is_refused() {
    let dir = tempfile::tempdir().unwrap();
    let path = dir.path().join("other.gpkg");
    let c = skeleton(&path, &[(32632, "EPSG", 32632, "x")]);
    // One polygon layer in EPSG:32632, the survey's points are EPSG:32633.
    c.execute_batch("CREATE TABLE area (fid INTEGER PRIMARY KEY, geom POLYGON)")
        .unwrap();
    c.execute_batch(
        "INSERT INTO gpkg_contents (table_name, data_type, srs_id) VALUES ('area', 'features', 32632);
         INSERT INTO gpkg_geometry_columns VALUES ('area', 'geom', 'POLYGON', 32632, 0, 0);",
    )
    .unwrap();
    let mut wkb = vec![b'G', b'P', 0, 1];
    wkb.extend_from_slice(&32632i32.to_le_bytes());
    wkb.push(1);
    wkb.extend_from_slice(&3u32.to_le_bytes());
    wkb.extend_from_slice(&1u32.to_le_bytes());
    wkb.extend_from_slice(&5u32.to_le_bytes());
    for (x, y) in [
        (499000.0, 5599000.0),
        (502000.0, 5599000.0),
        (502000.0, 5601000.0),
        (499000.0, 5601000.0),
        (499000.0, 5599000.0),
    ] {
        wkb.extend_from_slice(&f64::to_le_bytes(x));
        wkb.extend_from_slice(&f64::to_le_bytes(y));
    }
    c.execute("INSERT INTO area (geom) VALUES (?1)", [wkb])
        .unwrap();
    drop(c);
    let e = Dataset::load(&survey(), &[path], &options(Some("plots_utm"), None)).unwrap_err();
    assert_eq!(e.kind, patternproof_io::InputErrorKind::CoordSystem, "{e}");
    assert!(
        e.what.contains("EPSG:32632") && e.what.contains("EPSG:32633"),
        "{e}"
    );
}

#[test]
fn layer_options_need_a_geopackage() {
    let e = Dataset::load(
        &reference("gpkg/plots_utm.csv"),
        &[],
        &options(Some("x"), None),
    )
    .unwrap_err();
    assert_eq!(e.kind, patternproof_io::InputErrorKind::Option, "{e}");
    assert!(e.what.contains("GeoPackage"), "{e}");
}

/// The `gpkg_geometry` fuzz crash in a file: a MultiPoint whose second
/// member carries the EWKB SRID flag panicked inside the WKB reader; it
/// must be an error naming the layer and the feature.
#[test]
fn multipoint_member_with_an_srid_flag_is_an_error_at_its_feature() {
    let dir = tempfile::tempdir().unwrap();
    let path = dir.path().join("member.gpkg");
    let c = skeleton(&path, &[]);
    let mut rows = grid(-1)[..3].to_vec();
    let mut bad = vec![b'G', b'P', 0, 1];
    bad.extend_from_slice(&(-1i32).to_le_bytes());
    bad.push(1);
    bad.extend_from_slice(&4u32.to_le_bytes());
    bad.extend_from_slice(&2u32.to_le_bytes());
    for (ty, x) in [(1u32, 3.0f64), (0x2000_0001, 4.0)] {
        bad.push(1);
        bad.extend_from_slice(&ty.to_le_bytes());
        bad.extend_from_slice(&x.to_le_bytes());
        bad.extend_from_slice(&x.to_le_bytes());
    }
    rows.push((bad, 2024));
    point_layer(&c, "pts", -1, &rows);
    drop(c);
    let e = geopackage::read_points(
        &path,
        CoordChoice::Auto,
        None,
        &GpkgChoice {
            layer: Some("pts".into()),
            ..GpkgChoice::default()
        },
    )
    .unwrap_err();
    assert_eq!(e.kind, patternproof_io::InputErrorKind::BadGeometry, "{e}");
    assert_eq!(
        e.location.as_deref(),
        Some("layer `pts`, feature fid 4"),
        "{e}"
    );
    assert!(e.what.contains("MultiPoint member 2 of 2"), "{e}");
    assert!(e.hint.contains("repair"), "{e}");
}
