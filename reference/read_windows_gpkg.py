#!/usr/bin/env python3
"""Read a windows.gpkg written by `patternproof audit` with general-purpose
libraries only (Python's sqlite3, shapely from WKB, pyproj for the
coordinate-system definitions) and print what it
holds as JSON on stdout. Run by crates/cli/tests/cli/gpkg.rs when
reference/.venv exists; the Rust test compares the output with
report.json.

The blob header is unpacked here with `struct` after OGC GeoPackage 1.3
§2.1.3.1.1 (magic 'GP', version, flags, srs_id, envelope), independently
of the Rust reader. Usage: read_windows_gpkg.py PATH
"""

import json
import platform
import sqlite3
import struct
import sys
import warnings

import pyproj
import shapely

ENVELOPE_DOUBLES = {0: 0, 1: 4, 2: 6, 3: 6, 4: 8}


def unpack(blob):
    if blob[:2] != b"GP":
        raise ValueError("no GP magic")
    version, flags = blob[2], blob[3]
    order = "<" if flags & 1 else ">"
    code = (flags >> 1) & 7
    empty = bool(flags & 0x10)
    (srs_id,) = struct.unpack(order + "i", blob[4:8])
    n = ENVELOPE_DOUBLES[code]
    envelope = list(struct.unpack(order + f"{n}d", blob[8 : 8 + 8 * n]))
    geom = shapely.from_wkb(bytes(blob[8 + 8 * n :]))
    return version, srs_id, empty, envelope, geom


def main():
    # pyproj warns that a PROJ string loses detail; the string is only a summary here.
    warnings.filterwarnings("ignore", category=UserWarning)
    path = sys.argv[1]
    db = sqlite3.connect(f"file:{path}?mode=ro", uri=True)
    one = lambda q: db.execute(q).fetchone()[0]
    out = {
        "versions": {
            "python": platform.python_version(),
            "sqlite": sqlite3.sqlite_version,
            "shapely": shapely.__version__,
            "pyproj": pyproj.__version__,
        },
        "application_id": one("PRAGMA application_id"),
        "user_version": one("PRAGMA user_version"),
        "integrity_check": one("PRAGMA integrity_check"),
        "foreign_key_problems": len(db.execute("PRAGMA foreign_key_check").fetchall()),
        "srs": [
            {"srs_id": r[0], "organization": r[1], "organization_coordsys_id": r[2], "definition": r[3]}
            for r in db.execute(
                "SELECT srs_id, organization, organization_coordsys_id, definition FROM gpkg_spatial_ref_sys ORDER BY srs_id"
            )
        ],
        "contents": [
            {"table_name": r[0], "data_type": r[1], "srs_id": r[2], "last_change": r[3], "bounds": list(r[4:8])}
            for r in db.execute(
                "SELECT table_name, data_type, srs_id, last_change, min_x, min_y, max_x, max_y FROM gpkg_contents"
            )
        ],
        "geometry_columns": [
            {"table_name": r[0], "column_name": r[1], "geometry_type_name": r[2], "srs_id": r[3]}
            for r in db.execute("SELECT table_name, column_name, geometry_type_name, srs_id FROM gpkg_geometry_columns")
        ],
        "features": [],
        "crs": {},
    }
    # Every defined system must parse as WKT with PROJ (pyproj), and say
    # what kind of system it is and in which unit.
    for row in out["srs"]:
        if row["definition"].strip().lower() == "undefined":
            continue
        crs = pyproj.CRS.from_wkt(row["definition"])
        out["crs"][str(row["srs_id"])] = {
            "projected": crs.is_projected,
            "geographic": crs.is_geographic,
            "unit": crs.axis_info[0].unit_name,
            "proj4": crs.to_proj4(),
        }
    for fid, g, wid, kind, area, perimeter in db.execute(
        "SELECT fid, geom, id, kind, area, perimeter FROM windows ORDER BY fid"
    ):
        version, srs_id, empty, envelope, geom = unpack(g)
        minx, miny, maxx, maxy = geom.bounds
        out["features"].append(
            {
                "fid": fid,
                "id": wid,
                "kind": kind,
                "area_column": area,
                "perimeter_column": perimeter,
                "blob_version": version,
                "blob_srs_id": srs_id,
                "empty": empty,
                "envelope": envelope,
                "bounds": [minx, maxx, miny, maxy],
                "geom_type": geom.geom_type,
                "valid": bool(shapely.is_valid(geom)),
                "shapely_area": geom.area,
                "shapely_length": geom.length,
            }
        )
    json.dump(out, sys.stdout, indent=1)
    sys.stdout.write("\n")


if __name__ == "__main__":
    main()
