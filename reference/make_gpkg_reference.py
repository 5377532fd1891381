#!/usr/bin/env python3
"""Write the GeoPackage fixtures and reference/gpkg_values.json, read by
crates/cli/tests/cli/gpkg.rs and crates/io/tests/geopackage.rs.

Everything is built with general-purpose libraries only: Python's sqlite3
for the database and shapely (GEOS) for the WKB and the reference areas.
The GeoPackage layout follows OGC GeoPackage 1.3 (OGC 12-128r17):
application_id 'GPKG' and user_version 10300 (§1.1.1.1.1), the three
required gpkg_spatial_ref_sys rows (§1.1.2.1.2), gpkg_contents (§1.1.3),
gpkg_geometry_columns (§2.1.5), and geometry blobs = the GeoPackage binary
header + ISO WKB (§2.1.3.1.1). The header is packed here with `struct`,
independently of the Rust code under test.

The data are invented: seeded uniform points on a made-up survey grid.

reference/gpkg/survey.gpkg
  plots_utm    POINT, EPSG:32633 (WKT definition with a metre UNIT),
               40 points with `year` (2023/2024) and `site` (north/south),
               plus one empty point (Y flag set, NaN WKB) and one NULL
               geometry. Little-endian headers, no envelope.
  plots_wgs84  MULTIPOINT, EPSG:4326, 15 two-point features plus one
               MULTIPOINT EMPTY written as plain WKB (no Y flag).
               Big-endian headers with an xy envelope, big-endian WKB.
  area_utm     MULTIPOLYGON, EPSG:32633: a shell with a hole, and a second
               part; one feature.
  area_wgs84   POLYGON, EPSG:4326: a shell with a hole.
reference/gpkg/*.csv, *.wkt  the same data as CSV and WKT.
tests/bad-inputs/*.gpkg      damaged or ambiguous GeoPackages for the
                             bad-input corpus (endless-view.gpkg: a point
                             layer that is a view over an endless query).

The JSON holds, per layer, the points in fid order and, per polygon
layer, shapely's area and boundary length, so the Rust side can compare
the GeoPackage reader with the CSV/WKT readers and with GEOS.
"""

import json
import math
import platform
import sqlite3
import struct
from pathlib import Path

import numpy as np
import shapely
from shapely.geometry import MultiPoint, MultiPolygon, Point, Polygon

HERE = Path(__file__).resolve().parent
OUT = HERE / "gpkg"
BAD = HERE.parent / "tests" / "bad-inputs"
SEED = 20260611

WGS84 = (
    'GEOGCS["WGS 84",DATUM["WGS_1984",SPHEROID["WGS 84",6378137,298.257223563,'
    'AUTHORITY["EPSG","7030"]],AUTHORITY["EPSG","6326"]],PRIMEM["Greenwich",0,'
    'AUTHORITY["EPSG","8901"]],UNIT["degree",0.0174532925199433,AUTHORITY["EPSG","9122"]],'
    'AUTHORITY["EPSG","4326"]]'
)
UTM33 = (
    'PROJCS["WGS 84 / UTM zone 33N",' + WGS84 + ',PROJECTION["Transverse_Mercator"],'
    'PARAMETER["latitude_of_origin",0],PARAMETER["central_meridian",15],'
    'PARAMETER["scale_factor",0.9996],PARAMETER["false_easting",500000],'
    'PARAMETER["false_northing",0],UNIT["metre",1,AUTHORITY["EPSG","9001"]],'
    'AXIS["Easting",EAST],AXIS["Northing",NORTH],AUTHORITY["EPSG","32633"]]'
)

REQUIRED_SRS = [
    ("WGS 84 geodetic", 4326, "EPSG", 4326, WGS84, "longitude/latitude coordinates in decimal degrees on the WGS 84 spheroid"),
    ("Undefined cartesian SRS", -1, "NONE", -1, "undefined", "undefined cartesian coordinate reference system"),
    ("Undefined geographic SRS", 0, "NONE", 0, "undefined", "undefined geographic coordinate reference system"),
]


def blob(geom, srs_id, little=True, envelope=False, empty_flag=False):
    """GeoPackage binary header (§2.1.3.1.1) + ISO WKB from shapely."""
    order = "<" if little else ">"
    code = 1 if envelope else 0
    flags = (1 if little else 0) | (code << 1) | (0x10 if empty_flag else 0)
    head = b"GP" + bytes([0, flags]) + struct.pack(order + "i", srs_id)
    if envelope:
        minx, miny, maxx, maxy = geom.bounds
        head += struct.pack(order + "4d", minx, maxx, miny, maxy)
    return head + shapely.to_wkb(geom, byte_order=1 if little else 0, flavor="iso")


def empty_point_blob(srs_id):
    """POINT EMPTY: Y flag set, WKB point with NaN coordinates (§2.1.3.1.1)."""
    head = b"GP" + bytes([0, 0x11]) + struct.pack("<i", srs_id)
    return head + struct.pack("<BIdd", 1, 1, math.nan, math.nan)


def new_gpkg(path, extra_srs=()):
    path.unlink(missing_ok=True)
    db = sqlite3.connect(path)
    db.executescript(
        """
        PRAGMA page_size = 1024;
        PRAGMA application_id = 1196444487;
        PRAGMA user_version = 10300;
        CREATE TABLE gpkg_spatial_ref_sys (srs_name TEXT NOT NULL, srs_id INTEGER PRIMARY KEY,
          organization TEXT NOT NULL, organization_coordsys_id INTEGER NOT NULL,
          definition TEXT NOT NULL, description TEXT);
        CREATE TABLE gpkg_contents (table_name TEXT NOT NULL PRIMARY KEY, data_type TEXT NOT NULL,
          identifier TEXT UNIQUE, description TEXT DEFAULT '',
          last_change DATETIME NOT NULL DEFAULT (strftime('%Y-%m-%dT%H:%M:%fZ','now')),
          min_x DOUBLE, min_y DOUBLE, max_x DOUBLE, max_y DOUBLE, srs_id INTEGER);
        CREATE TABLE gpkg_geometry_columns (table_name TEXT NOT NULL, column_name TEXT NOT NULL,
          geometry_type_name TEXT NOT NULL, srs_id INTEGER NOT NULL, z TINYINT NOT NULL,
          m TINYINT NOT NULL, CONSTRAINT pk_geom_cols PRIMARY KEY (table_name, column_name));
        """
    )
    db.executemany("INSERT INTO gpkg_spatial_ref_sys VALUES (?, ?, ?, ?, ?, ?)", REQUIRED_SRS + list(extra_srs))
    return db


def add_layer(db, name, gtype, srs_id, columns, rows):
    """rows: (blob or None, *attribute values); fid is 1, 2, ... in order."""
    cols = "".join(f', "{c}" {t}' for c, t in columns)
    db.execute(f'CREATE TABLE "{name}" (fid INTEGER PRIMARY KEY AUTOINCREMENT NOT NULL, geom {gtype}{cols})')
    db.execute(
        "INSERT INTO gpkg_contents (table_name, data_type, identifier, last_change, srs_id) VALUES (?, 'features', ?, '2026-01-01T00:00:00.000Z', ?)",
        (name, name, srs_id),
    )
    db.execute("INSERT INTO gpkg_geometry_columns VALUES (?, 'geom', ?, ?, 0, 0)", (name, gtype, srs_id))
    names = ", ".join(["geom"] + [f'"{c}"' for c, _ in columns])
    marks = ", ".join("?" * (1 + len(columns)))
    db.executemany(f'INSERT INTO "{name}" ({names}) VALUES ({marks})', rows)


def rect(x0, y0, x1, y1):
    return [(x0, y0), (x1, y0), (x1, y1), (x0, y1), (x0, y0)]


def write_bad_multipoint():
    """tests/bad-inputs/bad-multipoint.gpkg: a MULTIPOINT layer whose fid 3
    has a second member with the EWKB SRID flag (0x20000000) in its type
    word, the shape of a crash `cargo fuzz` found (target gpkg_geometry).
    Packed by hand: shapely writes no such member."""
    p = BAD / "bad-multipoint.gpkg"
    db = new_gpkg(p, [("WGS 84 / UTM zone 33N", 32633, "EPSG", 32633, UTM33, None)])
    pairs = [[(500010.5, 5600020.25), (500110.5, 5600070.75)], [(500210.0, 5600120.5), (500305.25, 5600180.0)]]
    rows = [(blob(MultiPoint(pair), 32633),) for pair in pairs]
    bad = b"GP" + bytes([0, 1]) + struct.pack("<i", 32633) + struct.pack("<BII", 1, 4, 2)
    bad += struct.pack("<BIdd", 1, 1, 500400.5, 5600230.25) + struct.pack("<BIdd", 1, 0x20000001, 500500.5, 5600290.75)
    rows.append((bad,))
    add_layer(db, "plots", "MULTIPOINT", 32633, [], rows)
    db.commit()
    db.close()


def write_endless_view():
    """tests/bad-inputs/endless-view.gpkg: the point layer `plots` is a view
    over a recursive query that never ends (every row the same point), as
    a GeoPackage may register a view as a feature layer. Reading it must
    stop with a message, not hang."""
    p = BAD / "endless-view.gpkg"
    db = new_gpkg(p, [("WGS 84 / UTM zone 33N", 32633, "EPSG", 32633, UTM33, None)])
    point = blob(Point(500010.5, 5600020.25), 32633).hex()
    db.execute(
        "CREATE VIEW plots AS WITH RECURSIVE c(x) AS (SELECT 1 UNION ALL SELECT x + 1 FROM c) "
        f"SELECT x AS fid, X'{point}' AS geom FROM c"
    )
    db.execute(
        "INSERT INTO gpkg_contents (table_name, data_type, identifier, last_change, srs_id) "
        "VALUES ('plots', 'features', 'plots', '2026-01-01T00:00:00.000Z', 32633)"
    )
    db.execute("INSERT INTO gpkg_geometry_columns VALUES ('plots', 'geom', 'POINT', 32633, 0, 0)")
    db.commit()
    db.close()


def main():
    OUT.mkdir(exist_ok=True)
    rng = np.random.default_rng(SEED)

    utm = np.round(np.column_stack([500000 + rng.uniform(0, 800, 40), 5600000 + rng.uniform(0, 600, 40)]), 3)
    years = [2023 + (i % 2) for i in range(40)]
    sites = ["north" if i < 20 else "south" for i in range(40)]
    lonlat = np.round(np.column_stack([11.40 + rng.uniform(0, 0.02, 30), 47.26 + rng.uniform(0, 0.015, 30)]), 7)

    area_utm = MultiPolygon([
        Polygon(rect(499900.0, 5599900.0, 500900.0, 5600700.0), [rect(500300.0, 5600200.0, 500400.0, 5600300.0)[::-1]]),
        Polygon(rect(501000.0, 5599900.0, 501100.0, 5600000.0)),
    ])
    area_wgs84 = Polygon(rect(11.395, 47.255, 11.425, 47.28), [rect(11.41, 47.265, 11.412, 47.267)[::-1]])

    path = OUT / "survey.gpkg"
    db = new_gpkg(path, [("WGS 84 / UTM zone 33N", 32633, "EPSG", 32633, UTM33, None)])
    rows = [(blob(Point(x, y), 32633), yr, s) for (x, y), yr, s in zip(utm.tolist(), years, sites)]
    rows.append((empty_point_blob(32633), 2024, "north"))
    rows.append((None, 2023, "south"))
    add_layer(db, "plots_utm", "POINT", 32633, [("year", "INTEGER"), ("site", "TEXT")], rows)
    pairs = [MultiPoint([tuple(lonlat[2 * k]), tuple(lonlat[2 * k + 1])]) for k in range(15)]
    rows = [(blob(mp, 4326, little=False, envelope=True), f"pair {k + 1}") for k, mp in enumerate(pairs)]
    rows.insert(7, (blob(MultiPoint(), 4326), "nothing here"))
    add_layer(db, "plots_wgs84", "MULTIPOINT", 4326, [("label", "TEXT")], rows)
    add_layer(db, "area_utm", "MULTIPOLYGON", 32633, [("name", "TEXT")], [(blob(area_utm, 32633, envelope=True), "meadow")])
    add_layer(db, "area_wgs84", "POLYGON", 4326, [("name", "TEXT")], [(blob(area_wgs84, 4326, envelope=True), "upper meadow")])
    db.commit()
    db.execute("VACUUM")
    db.close()

    (OUT / "plots_utm.csv").write_text(
        "x,y,year,site\n" + "".join(f"{x!r},{y!r},{yr},{s}\n" for (x, y), yr, s in zip(utm.tolist(), years, sites))
    )
    (OUT / "plots_wgs84.csv").write_text("lon,lat\n" + "".join(f"{x!r},{y!r}\n" for x, y in lonlat.tolist()))
    (OUT / "area_utm.wkt").write_text(shapely.to_wkt(area_utm, rounding_precision=-1) + "\n")
    (OUT / "area_wgs84.wkt").write_text(shapely.to_wkt(area_wgs84, rounding_precision=-1) + "\n")

    # One boundary per site for `sites --boundaries`: site "north" in two
    # features (parts of one site: the survey box and a detached plot), and
    # "south" in one (a larger box); every site's points lie inside its own
    # boundary. A third name matches no site. The same shapes as GeoJSON
    # with the UTM crs.
    north_parts = [Polygon(rect(499950.0, 5599950.0, 500850.0, 5600650.0)),
                   Polygon(rect(501000.0, 5600000.0, 501100.0, 5600100.0))]
    south = Polygon(rect(499900.0, 5599900.0, 500900.0, 5600700.0))
    elsewhere = Polygon(rect(510000.0, 5610000.0, 510100.0, 5610100.0))
    named = [("north", north_parts[0]), ("south", south), ("north", north_parts[1]), ("pond", elsewhere)]
    p = OUT / "site_areas.gpkg"
    db = new_gpkg(p, [("WGS 84 / UTM zone 33N", 32633, "EPSG", 32633, UTM33, None)])
    add_layer(db, "site_areas", "POLYGON", 32633, [("site", "TEXT")],
              [(blob(g, 32633, envelope=True), n) for n, g in named])
    db.commit()
    db.execute("VACUUM")
    db.close()
    features = [{"type": "Feature", "properties": {"site": n}, "geometry": shapely.geometry.mapping(g)} for n, g in named]
    fc = {"type": "FeatureCollection", "crs": {"type": "name", "properties": {"name": "urn:ogc:def:crs:EPSG::32633"}},
          "features": features}
    (OUT / "site_areas.geojson").write_text(json.dumps(fc, indent=1) + "\n")

    # Bad inputs. corrupt.gpkg: a valid SQLite header page followed by noise.
    good = path.read_bytes()
    noise = np.random.default_rng(SEED + 1).integers(0, 256, 3 * 1024, dtype=np.uint8).tobytes()
    (BAD / "corrupt.gpkg").write_bytes(good[:100] + noise)
    p = BAD / "unknown-srs.gpkg"
    db = new_gpkg(p, [("site grid of the old survey", 77001, "LOCAL", 77001, "site grid, origin at the old well", None)])
    add_layer(db, "plots", "POINT", 77001, [], [(blob(Point(float(x), float(y)), 77001),) for x, y in utm[:10].tolist()])
    db.commit()
    db.close()
    p = BAD / "two-layers.gpkg"
    db = new_gpkg(p, [("WGS 84 / UTM zone 33N", 32633, "EPSG", 32633, UTM33, None)])
    add_layer(db, "plots_2023", "POINT", 32633, [], [(blob(Point(x, y), 32633),) for x, y in utm[0::2].tolist()])
    add_layer(db, "plots_2024", "POINT", 32633, [], [(blob(Point(x, y), 32633),) for x, y in utm[1::2].tolist()])
    db.commit()
    db.close()
    p = BAD / "bad-blob.gpkg"
    db = new_gpkg(p, [("WGS 84 / UTM zone 33N", 32633, "EPSG", 32633, UTM33, None)])
    rows = [(blob(Point(x, y), 32633),) for x, y in utm[:8].tolist()]
    rows.insert(4, (b"GP\x00\x01\x33\x7f\x00\x00\x01\x01\x00\x00",))
    add_layer(db, "plots", "POINT", 32633, [], rows)
    db.commit()
    db.close()
    write_bad_multipoint()
    write_endless_view()

    out = {
        "versions": {
            "python": platform.python_version(),
            "sqlite": sqlite3.sqlite_version,
            "shapely": shapely.__version__,
            "geos": shapely.geos_version_string,
            "numpy": np.__version__,
        },
        "layers": {
            "plots_utm": {"type": "POINT", "features": 42, "srs": "EPSG:32633", "points": utm.tolist(),
                          "years": years, "sites": sites, "empty": 2},
            "plots_wgs84": {"type": "MULTIPOINT", "features": 16, "srs": "EPSG:4326", "points": lonlat.tolist(), "empty": 1},
            "area_utm": {"type": "MULTIPOLYGON", "features": 1, "srs": "EPSG:32633",
                         "area": area_utm.area, "length": area_utm.boundary.length, "holes": 1},
            "area_wgs84": {"type": "POLYGON", "features": 1, "srs": "EPSG:4326",
                           "area_degrees": area_wgs84.area, "holes": 1},
        },
    }
    (HERE / "gpkg_values.json").write_text(json.dumps(out, indent=1) + "\n")


if __name__ == "__main__":
    main()
