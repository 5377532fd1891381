#!/usr/bin/env python3
"""Write reference/scales_values.json: brute-force K functions with three
edge corrections, computed with general-purpose libraries (numpy, shapely),
read back by crates/scales/tests/reference.rs.

Window: an L-shaped polygon (100 x 80 with the 50 x 40 top-right block cut
away) with a square hole. Points: a seeded uniform pattern in it (numpy
generator, rejection from the bounding box), stored in the JSON so both
sides use exactly the same coordinates.

Every estimator is an O(n^2) double loop over ordered pairs (numpy for
the pair distances), written straight from the formulas:

  K(r) = A / (n (n-1)) * sum_{i != j} w_ij 1(d_ij <= r)

* isotropic: w_ij = 1 / share, share = length of the circle of radius
  d_ij about x_i inside the window / (2 pi d_ij). The circle is a shapely
  LineString of CIRCLE_SEGMENTS chords; its inside length is the length of
  its intersection with the polygon. Tolerance: the chord polygon is
  shorter than the circle by a relative 1 - sin(h)/h ~ h^2/6 with
  h = pi/CIRCLE_SEGMENTS (~6e-9 for 2^14 chords), which cancels in the
  share; the crossing points with the polygon edges move by at most the
  sagitta r(1 - cos h) ~ 2e-8 r, so shares are good to about 1e-6 relative
  (the Rust test uses 1e-5).
* translation: w_ij = A / area(W intersect (W + x_i - x_j)), shapely
  affinity.translate and intersection (exact up to floating point).
* border: centres with distance to the boundary (exterior and hole) >= r,
  K(r) = A * sum_{i: b_i >= r} #{j != i: d_ij <= r} / ((n - 1) * n_r).
"""

import json
import math
import platform
from pathlib import Path

import numpy as np
import shapely
from shapely import affinity
from shapely.geometry import LineString, Point, Polygon

SEED = 20250307
N = 60
CIRCLE_SEGMENTS = 2 ** 14
R_GRID = [2.0, 5.0, 8.0, 12.0, 16.0, 20.0]

OUTER = [(0, 0), (100, 0), (100, 40), (50, 40), (50, 80), (0, 80), (0, 0)]
HOLE = [(20, 20), (35, 20), (35, 35), (20, 35), (20, 20)]


def circle(c, r):
    t = np.linspace(0.0, 2.0 * math.pi, CIRCLE_SEGMENTS + 1)
    return LineString(np.column_stack([c[0] + r * np.cos(t), c[1] + r * np.sin(t)]))


def main():
    window = Polygon(OUTER, [HOLE])
    area = window.area
    rng = np.random.default_rng(SEED)
    pts = []
    while len(pts) < N:
        x, y = rng.uniform(0, 100), rng.uniform(0, 80)
        if window.contains(Point(x, y)):
            pts.append((float(x), float(y)))
    p = np.array(pts)
    d = np.sqrt(((p[:, None, :] - p[None, :, :]) ** 2).sum(axis=2))
    rmax = max(R_GRID)
    boundary = window.boundary
    b = np.array([boundary.distance(Point(q)) for q in pts])

    iso_w = np.zeros((N, N))
    tr_w = np.zeros((N, N))
    sample_pairs = []
    for i in range(N):
        for j in range(N):
            if i == j or d[i, j] > rmax:
                continue
            ring = circle(p[i], d[i, j])
            share = ring.intersection(window).length / ring.length
            iso_w[i, j] = 1.0 / share
            v = p[i] - p[j]
            shifted = affinity.translate(window, xoff=v[0], yoff=v[1])
            tr_w[i, j] = area / window.intersection(shifted).area
            if len(sample_pairs) < 40 and share < 0.999:
                sample_pairs.append(
                    {"i": i, "j": j, "d": float(d[i, j]), "share": float(share),
                     "translation_weight": float(tr_w[i, j])}
                )

    k = {"border": [], "isotropic": [], "translation": []}
    off = ~np.eye(N, dtype=bool)
    for r in R_GRID:
        close = (d <= r) & off
        k["isotropic"].append(float(area / (N * (N - 1)) * (iso_w * close).sum()))
        k["translation"].append(float(area / (N * (N - 1)) * (tr_w * close).sum()))
        centres = b >= r
        n_r = int(centres.sum())
        counts = close[centres].sum()
        k["border"].append(float(area * counts / ((N - 1) * n_r)) if n_r > 0 else None)

    out = {
        "about": "brute-force K with border, isotropic and translation correction; see make_scales_reference.py",
        "versions": {
            "python": platform.python_version(),
            "numpy": np.__version__,
            "shapely": shapely.__version__,
        },
        "seed": SEED,
        "circle_segments": CIRCLE_SEGMENTS,
        "outer": [list(map(float, c)) for c in OUTER],
        "hole": [list(map(float, c)) for c in HOLE],
        "area": float(area),
        "points": [list(q) for q in pts],
        "outline_distance": [float(x) for x in b],
        "r": R_GRID,
        "k": k,
        "pairs": sample_pairs,
    }
    path = Path(__file__).with_name("scales_values.json")
    path.write_text(json.dumps(out, indent=1) + "\n")
    print(f"wrote {path}")


if __name__ == "__main__":
    main()
