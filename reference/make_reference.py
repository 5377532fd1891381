#!/usr/bin/env python3
"""Write reference/values.json: independent reference values computed with
general-purpose libraries (numpy, scipy, shapely, pyproj), read back by the
Rust integration test crates/cli/tests/cli/reference.rs.

The point sets are generated here with numpy's seeded generator and stored
in the JSON, so the Rust side uses exactly the same coordinates.
"""

import json
import math
import importlib.metadata
import platform
import sys
from pathlib import Path

import numpy as np
import pyproj
import scipy
import shapely
from scipy.spatial import cKDTree
from scipy.stats import norm
from shapely.geometry import MultiPoint

SEED = 20240611
BUFFERS = [1.0, 5.0]
Z_VALUES = [-4.28525, -1.959964, 0.3, 2.5]
LAEA = "+proj=laea +lat_0=50 +lon_0=10 +x_0=0 +y_0=0 +ellps=WGS84 +units=m +no_defs"
LONLAT_POINTS = [(10.0, 50.0), (11.5, 49.2), (8.3, 51.7), (12.0, 50.0)]
CELL = {"lon_min": 10.0, "lon_max": 11.0, "lat_min": 50.0, "lat_max": 51.0}
PER_SIDE = 100


def point_sets(rng):
    uniform = np.column_stack([rng.uniform(0, 100, 50), rng.uniform(0, 60, 50)])
    centres = np.column_stack([rng.uniform(10, 90, 5), rng.uniform(10, 50, 5)])
    labels = rng.integers(0, 5, 200)
    clustered = centres[labels] + rng.normal(0.0, 3.0, (200, 2))
    small = np.column_stack([rng.uniform(0, 40, 30), rng.uniform(0, 25, 30)])
    return [("uniform50", uniform), ("clustered200", clustered), ("small30", small)]


def describe_set(name, pts):
    tree = cKDTree(pts)
    dist, _ = tree.query(pts, k=2)
    mean_nn = float(dist[:, 1].mean())
    hull = MultiPoint([tuple(p) for p in pts]).convex_hull
    area, perim = float(hull.area), float(hull.length)
    buffers = []
    for d in BUFFERS:
        buffers.append(
            {
                "distance": d,
                "shapely_area": float(hull.buffer(d, quad_segs=64).area),
                "steiner_area": area + perim * d + math.pi * d * d,
            }
        )
    return {
        "name": name,
        "points": [[float(x), float(y)] for x, y in pts],
        "mean_nn": mean_nn,
        "hull_area": area,
        "hull_perimeter": perim,
        "buffers": buffers,
    }


def cell_ring():
    """Closed lon/lat ring around the cell, PER_SIDE points per side,
    counter-clockwise: south parallel east, east meridian north,
    north parallel west, west meridian south."""
    lo0, lo1 = CELL["lon_min"], CELL["lon_max"]
    la0, la1 = CELL["lat_min"], CELL["lat_max"]
    t = [i / PER_SIDE for i in range(PER_SIDE)]
    ring = []
    ring += [(lo0 + (lo1 - lo0) * s, la0) for s in t]
    ring += [(lo1, la0 + (la1 - la0) * s) for s in t]
    ring += [(lo1 - (lo1 - lo0) * s, la1) for s in t]
    ring += [(lo0, la1 - (la1 - la0) * s) for s in t]
    ring.append(ring[0])
    return ring


SIM_N = 40
SIM_PATTERNS = 20000
SIM_SHELL = [(0, 0), (100, 0), (100, 30), (60, 30), (60, 60), (0, 60), (0, 0)]
SIM_HOLE = [(20, 20), (20, 40), (40, 40), (40, 20), (20, 20)]


def csr_simulation(rng):
    """Mean nearest-neighbour distance of CSR patterns in an L-shaped window
    with a square hole, sampled by rejection from the bounding box (an
    independent method from the triangle sampling under test)."""
    from shapely.geometry import Polygon
    window = Polygon(SIM_SHELL, [SIM_HOLE])
    means = np.empty(SIM_PATTERNS)
    for k in range(SIM_PATTERNS):
        pts = np.empty((0, 2))
        while len(pts) < SIM_N:
            cand = rng.uniform([0, 0], [100, 60], size=(2 * SIM_N, 2))
            keep = shapely.contains_xy(window, cand[:, 0], cand[:, 1])
            pts = np.vstack([pts, cand[keep]])
        pts = pts[:SIM_N]
        d, _ = cKDTree(pts).query(pts, k=2)
        means[k] = d[:, 1].mean()
    return {
        "n": SIM_N,
        "patterns": SIM_PATTERNS,
        "shell": [list(map(float, c)) for c in SIM_SHELL],
        "hole": [list(map(float, c)) for c in SIM_HOLE],
        "area": float(window.area),
        "mean_of_means": float(means.mean()),
        "sd_of_means": float(means.std(ddof=1)),
        "q025": float(np.quantile(means, 0.025)),
        "q975": float(np.quantile(means, 0.975)),
    }


RECHECK_Z = [-0.5, 1.0, -1.64, 1.96, -2.33, 2.58, -3.0, 3.29, -4.0, 4.9, -6.0]
RECHECK_P = [0.5, 0.2, 0.05, 0.01, 1e-3, 1e-6, 1e-12]


def recheck_tails():
    """Normal tails for the one-sided/two-sided detection of
    `patternproof recheck`: one-sided norm.sf(|z|), two-sided 2*norm.sf(|z|),
    and the inverses norm.isf(p) and norm.isf(p/2)."""
    return {
        "z": RECHECK_Z,
        "one_sided_p": [float(norm.sf(abs(z))) for z in RECHECK_Z],
        "two_sided_p": [float(2.0 * norm.sf(abs(z))) for z in RECHECK_Z],
        "p": RECHECK_P,
        "one_sided_z": [float(norm.isf(p)) for p in RECHECK_P],
        "two_sided_z": [float(norm.isf(p / 2.0)) for p in RECHECK_P],
    }


# An invented vector of per-site p-values (ties and a value above 1/m included).
MULTITEST_P = [0.001, 0.008, 0.039, 0.041, 0.042, 0.06, 0.074, 0.205, 0.212, 0.216, 0.5, 0.008]


def multitest():
    """Holm and Benjamini-Hochberg adjusted p-values from
    statsmodels.stats.multitest.multipletests, for the multi-site run."""
    from statsmodels.stats.multitest import multipletests

    holm = multipletests(MULTITEST_P, alpha=0.05, method="holm")[1]
    bh = multipletests(MULTITEST_P, alpha=0.05, method="fdr_bh")[1]
    return {
        "p": MULTITEST_P,
        "holm": [float(v) for v in holm],
        "bh": [float(v) for v in bh],
    }


GEO_N = 40
GEO_PER_SIDE = 100


def wrap_lon(lon):
    """Longitude into [-180, 180)."""
    return ((np.asarray(lon) + 180.0) % 360.0) - 180.0


def lonlat_box(lon0, lon1, lat0, lat1):
    """Closed counter-clockwise lon/lat ring around a box, GEO_PER_SIDE
    points a side, longitudes wrapped (so a box across 180 has vertices at
    both ends of the range)."""
    t = [i / GEO_PER_SIDE for i in range(GEO_PER_SIDE)]
    ring = [(lon0 + (lon1 - lon0) * s, lat0) for s in t]
    ring += [(lon1, lat0 + (lat1 - lat0) * s) for s in t]
    ring += [(lon1 - (lon1 - lon0) * s, lat1) for s in t]
    ring += [(lon0, lat1 - (lat1 - lat0) * s) for s in t]
    ring.append(ring[0])
    return [(float(wrap_lon(lon)), float(lat)) for lon, lat in ring]


def geodesic_patterns(rng):
    """Three invented lon/lat patterns of GEO_N points where a planar reading
    goes wrong if the projection is centred carelessly: straddling the
    antimeridian near 16 S, a cap around the North Pole (89-90 N), and one
    across the prime meridian (a control). For each: every point's
    nearest-neighbour distance on the WGS84 ellipsoid (pyproj.Geod.inv over
    all pairs), the geodesic area of the convex hull (hull vertices found in
    a LAEA plane centred on the points' mean unit vector, area by
    Geod.polygon_area_perimeter with geodesic edges), and a densified study
    area ring with its geodesic area. Also the mean direction itself, the
    largest angle from it to a point (numpy) and the largest departure of
    that plane's scale from 1 at the points (PROJ's Tissot factors,
    Proj.get_factors), which set the tolerances."""
    geod = pyproj.Geod(ellps="WGS84")
    patterns = [
        ("antimeridian", wrap_lon(rng.uniform(179.9, 180.1, GEO_N)), rng.uniform(-16.1, -15.9, GEO_N),
         lonlat_box(179.85, 180.15, -16.15, -15.85)),
        ("north_pole", rng.uniform(-180.0, 180.0, GEO_N), 90.0 - np.sqrt(rng.uniform(0.0, 1.0, GEO_N)),
         [(float(wrap_lon(lon)), 88.9) for lon in range(-180, 181)]),
        ("prime_meridian", rng.uniform(-0.1, 0.1, GEO_N), rng.uniform(51.4, 51.6, GEO_N),
         lonlat_box(-0.15, 0.15, 51.35, 51.65)),
    ]
    out = []
    for name, lon, lat, ring in patterns:
        lon, lat = np.round(lon, 7), np.round(lat, 7)
        n = len(lon)
        nn = []
        for i in range(n):
            _, _, d = geod.inv(np.full(n - 1, lon[i]), np.full(n - 1, lat[i]), np.delete(lon, i), np.delete(lat, i))
            nn.append(float(np.min(d)))
        # The mean unit vector: where the hull is found, not what is tested.
        phi, lam = np.radians(lat), np.radians(lon)
        v = np.array([np.cos(phi) * np.cos(lam), np.cos(phi) * np.sin(lam), np.sin(phi)]).sum(axis=1)
        lat0 = math.degrees(math.atan2(v[2], math.hypot(v[0], v[1])))
        lon0 = math.degrees(math.atan2(v[1], v[0]))
        c = v / np.linalg.norm(v)
        u = np.array([np.cos(phi) * np.cos(lam), np.cos(phi) * np.sin(lam), np.sin(phi)])
        reach = float(np.degrees(np.max(np.arctan2(np.linalg.norm(np.cross(c, u.T), axis=1), c @ u))))
        laea = pyproj.Transformer.from_crs(
            "EPSG:4326", f"+proj=laea +lat_0={lat0} +lon_0={lon0} +ellps=WGS84 +units=m", always_xy=True
        )
        x, y = laea.transform(lon, lat)
        # PROJ's Tissot factors of that plane at every point: how far the
        # scale departs from 1 there, in any direction.
        factors = pyproj.Proj(f"+proj=laea +lat_0={lat0} +lon_0={lon0} +ellps=WGS84 +units=m").get_factors(lon, lat)
        scale_error = float(np.max(np.maximum(np.abs(np.asarray(factors.tissot_semimajor) - 1.0),
                                              np.abs(np.asarray(factors.tissot_semiminor) - 1.0))))
        hull = MultiPoint(list(zip(x, y))).convex_hull
        hull_xy = list(hull.exterior.coords)
        index = {(float(a), float(b)): k for k, (a, b) in enumerate(zip(x, y))}
        vertices = [index[(float(a), float(b))] for a, b in hull_xy]
        h_area, _ = geod.polygon_area_perimeter([lon[k] for k in vertices], [lat[k] for k in vertices])
        r_area, r_perim = geod.polygon_area_perimeter([p[0] for p in ring], [p[1] for p in ring])
        out.append({
            "name": name,
            "points": [[float(a), float(b)] for a, b in zip(lon, lat)],
            "mean_direction": {"lon": lon0, "lat": lat0, "reach_deg": reach},
            "max_scale_error": scale_error,
            "nn_geodesic_m": nn,
            "mean_nn_geodesic_m": float(np.mean(nn)),
            "hull_vertices": vertices,
            "hull_area_geodesic_m2": abs(float(h_area)),
            "ring": [[lon_, lat_] for lon_, lat_ in ring],
            "ring_area_geodesic_m2": abs(float(r_area)),
        })
    return out


def main():
    out_path = Path(__file__).resolve().parent / "values.json"
    rng = np.random.default_rng(SEED)
    sets = [describe_set(n, p) for n, p in point_sets(rng)]

    normal = {
        "z": Z_VALUES,
        "two_sided_p": [float(2.0 * norm.sf(abs(z))) for z in Z_VALUES],
        "critical_alpha": 0.05,
        "critical": float(norm.isf(0.025)),
    }

    transformer = pyproj.Transformer.from_crs("EPSG:4326", LAEA, always_xy=True)
    forward = []
    for lon, lat in LONLAT_POINTS:
        x, y = transformer.transform(lon, lat)
        forward.append({"lon": lon, "lat": lat, "x": float(x), "y": float(y)})

    ring = cell_ring()
    geod = pyproj.Geod(ellps="WGS84")
    g_area, g_perim = geod.polygon_area_perimeter([p[0] for p in ring], [p[1] for p in ring])

    values = {
        "generator": "reference/make_reference.py",
        "seed": SEED,
        "versions": {
            "python": platform.python_version(),
            "numpy": np.__version__,
            "scipy": scipy.__version__,
            "statsmodels": importlib.metadata.version("statsmodels"),
            "shapely": shapely.__version__,
            "pyproj": pyproj.__version__,
            "proj": pyproj.proj_version_str,
        },
        "point_sets": sets,
        "normal": normal,
        "csr_simulation": csr_simulation(np.random.default_rng(SEED + 1)),
        "multitest": multitest(),
        "projection": {
            "proj_string": LAEA,
            "lon0": 10.0,
            "lat0": 50.0,
            "forward": forward,
            "cell": {
                **CELL,
                "per_side": PER_SIDE,
                "ring": [[lon, lat] for lon, lat in ring],
                "geodesic_area_m2": abs(float(g_area)),
                "geodesic_perimeter_m": float(g_perim),
            },
        },
        "recheck_tails": recheck_tails(),
        "geodesic_patterns": geodesic_patterns(np.random.default_rng(SEED + 2)),
    }
    out_path.write_text(json.dumps(values, indent=1) + "\n")
    print(f"wrote {out_path}", file=sys.stderr)


if __name__ == "__main__":
    main()
