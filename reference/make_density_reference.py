"""Reference values for the density tests (crates/density/tests/reference.rs).

scipy.stats.gaussian_kde with a given bandwidth matrix H = sigma^2 * I,
evaluated at chosen cell centres of a raster, on a small seeded pattern.
gaussian_kde takes a bandwidth *factor* times the data covariance, so the
subclass below sets the kernel covariance to H directly (the pinned scipy's
own attributes); the values are checked against the closed-form sum with
numpy before they are written.
"""

import json
import pathlib

import numpy as np
from scipy import linalg
from scipy.stats import gaussian_kde


class FixedKde(gaussian_kde):
    """gaussian_kde with a fixed kernel covariance matrix."""

    def __init__(self, dataset, h):
        self._h = np.asarray(h, dtype=float)
        super().__init__(dataset)

    def _compute_covariance(self):
        self.factor = 1.0
        self.covariance = self._h
        self.cho_cov = linalg.cholesky(self._h, lower=True)
        self.log_det = 2 * np.log(np.diag(self.cho_cov * np.sqrt(2 * np.pi))).sum()


def main():
    rng = np.random.default_rng(20261203)
    n = 30
    pts = np.column_stack([rng.uniform(10, 90, n), rng.uniform(10, 90, n)])
    pts = np.round(pts, 3)
    sigma = 8.0
    grid = {"x0": -20.0, "y0": -20.0, "cell": 0.5, "nx": 280, "ny": 280}
    kde = FixedKde(pts.T, sigma**2 * np.eye(2))
    ij = rng.integers(20, 260, size=(12, 2))
    locs = []
    for i, j in ij:
        x = grid["x0"] + (i + 0.5) * grid["cell"]
        y = grid["y0"] + (j + 0.5) * grid["cell"]
        d = float(kde.evaluate(np.array([[x], [y]]))[0])
        r2 = ((pts - [x, y]) ** 2).sum(axis=1)
        direct = float(np.mean(np.exp(-r2 / (2 * sigma**2)) / (2 * np.pi * sigma**2)))
        assert abs(d - direct) <= 1e-12 * max(direct, 1e-300) + 1e-18, (d, direct)
        locs.append({"i": int(i), "j": int(j), "x": x, "y": y, "density": d})
    out = {
        "source": "scipy.stats.gaussian_kde (scipy pinned in requirements.txt), covariance sigma^2 I",
        "points": pts.tolist(),
        "sigma": sigma,
        "grid": grid,
        "locations": locs,
    }
    path = pathlib.Path(__file__).with_name("density_values.json")
    path.write_text(json.dumps(out, indent=1) + "\n")


if __name__ == "__main__":
    main()
