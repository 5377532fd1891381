//! Live cross-checks against independent reference libraries.
//!
//! `reference/values.json` is written by `reference/make_reference.py`
//! (numpy, scipy, shapely, pyproj; exact versions are stored in the JSON
//! under `versions` and pinned in `reference/requirements.txt`). The point
//! sets themselves are stored there too, so both sides see the same
//! coordinates. Rebuild with `reference/regenerate.sh`.

use crate::util::{assert_rel, read, repo, tmp};
use approx::abs_diff_eq;
use std::f64::consts::PI;

use patternproof_audit::window::{WindowOptions, build_windows};
use patternproof_audit::{BufferRule, WindowKind};
use patternproof_core::Xy;
use serde_json::Value;

fn values() -> Value {
    serde_json::from_str(&read(&repo().join("reference/values.json"))).unwrap()
}

fn f(v: &Value) -> f64 {
    v.as_f64().unwrap_or_else(|| panic!("not a number: {v}"))
}

fn points(set: &Value) -> Vec<Xy> {
    set["points"]
        .as_array()
        .unwrap()
        .iter()
        .map(|p| [f(&p[0]), f(&p[1])])
        .collect()
}

fn mean_nn(pts: &[Xy]) -> f64 {
    let d = patternproof_core::nearest::nearest_distances(pts).unwrap();
    patternproof_core::nearest::mean(&d).unwrap()
}

#[test]
fn versions_are_recorded() {
    let v = values();
    for lib in ["numpy", "scipy", "shapely", "pyproj"] {
        assert!(v["versions"][lib].is_string(), "missing version of {lib}");
    }
}

#[test]
fn mean_nearest_neighbour_matches_scipy() {
    let v = values();
    for set in v["point_sets"].as_array().unwrap() {
        let name = set["name"].as_str().unwrap();
        let pts = points(set);
        // Reference: scipy.spatial.cKDTree.query(k=2) (reference library, version in values.json).
        assert_rel(
            &format!("{name} mean NN"),
            mean_nn(&pts),
            f(&set["mean_nn"]),
            1e-9,
        );
    }
}

#[test]
fn convex_hull_matches_shapely() {
    let v = values();
    for set in v["point_sets"].as_array().unwrap() {
        let name = set["name"].as_str().unwrap();
        let pts = points(set);
        let (windows, _) = build_windows(&pts, mean_nn(&pts), &[], &WindowOptions::default());
        let hull = windows.iter().find(|w| w.id == "hull").unwrap();
        // Reference: shapely MultiPoint(...).convex_hull .area / .length
        // (reference library, version in values.json).
        assert_rel(
            &format!("{name} hull area"),
            hull.area,
            f(&set["hull_area"]),
            1e-9,
        );
        assert_rel(
            &format!("{name} hull perimeter"),
            hull.perimeter.unwrap(),
            f(&set["hull_perimeter"]),
            1e-9,
        );
    }
}

#[test]
fn buffered_hull_matches_steiner_and_shapely() {
    let v = values();
    let options = WindowOptions {
        buffers: vec![BufferRule::Distance(1.0), BufferRule::Distance(5.0)],
        ..Default::default()
    };
    for set in v["point_sets"].as_array().unwrap() {
        let name = set["name"].as_str().unwrap();
        let pts = points(set);
        let (windows, _) = build_windows(&pts, mean_nn(&pts), &[], &options);
        let buffered: Vec<_> = windows
            .iter()
            .filter(|w| w.kind == WindowKind::BufferedHull)
            .collect();
        assert_eq!(buffered.len(), 2, "{name}: expected two buffered hulls");
        for b in set["buffers"].as_array().unwrap() {
            let d = f(&b["distance"]);
            let w = buffered
                .iter()
                .find(|w| w.buffer == Some(d))
                .unwrap_or_else(|| panic!("{name}: no hull+{d}"));
            // Steiner formula A + P·D + π·D² (exact for a convex hull's
            // round buffer; computed from the shapely hull in values.json).
            let steiner = f(&b["steiner_area"]);
            // geo's buffer (default join angle 0.2 rad) runs on i_overlay
            // 4.5, whose round join uses n = floor(θ/0.2) chords for a corner
            // of turn θ (a single chord below 0.2 rad). A chord therefore
            // spans less than 0.4 rad, not at most 0.2 rad: a hull corner of
            // turn just under 0.4 rad gets one chord. The turns of all corners
            // add to 2π, so the polygonal arcs lose at most
            // π·D²·(1 − sin(0.4)/0.4) against the true disc area. (With the
            // 0.2 rad bound the uniform50 hull+1 case fails: measured deficit
            // 0.0241 against a 0.2 rad bound of 0.0209.)
            const MAX_CHORD: f64 = 0.4;
            let slack = PI * d * d * (1.0 - MAX_CHORD.sin() / MAX_CHORD);
            eprintln!(
                "{name} hull+{d}: geo {:.6}, Steiner deficit {:.6}, shapely deviation {:.6}, slack {:.6}",
                w.area,
                steiner - w.area,
                w.area - f(&b["shapely_area"]),
                slack
            );
            assert!(
                w.area <= steiner + 1e-9 && w.area >= steiner - slack - 1e-9,
                "{name} hull+{d}: area {} outside [{}, {}]",
                w.area,
                steiner - slack,
                steiner
            );
            // Reference: shapely hull.buffer(D, quad_segs=64).area
            // (reference library, version in values.json).
            let shapely_area = f(&b["shapely_area"]);
            assert!(
                abs_diff_eq!(w.area, shapely_area, epsilon = slack + 1e-9),
                "{name} hull+{d}: area {} vs shapely {shapely_area}, slack {slack}",
                w.area
            );
        }
    }
}

#[test]
fn normal_p_values_match_scipy() {
    let v = values();
    let n = &v["normal"];
    let zs = n["z"].as_array().unwrap();
    let ps = n["two_sided_p"].as_array().unwrap();
    for (z, p) in zs.iter().zip(ps) {
        let (z, want) = (f(z), f(p));
        let got = patternproof_core::normal::two_sided_p(z);
        // Reference: 2·scipy.stats.norm.sf(|z|) (reference library, version in values.json).
        let abs = (got - want).abs();
        assert!(
            abs <= 1e-12 || abs <= 1e-9 * want.abs(),
            "two-sided p at z={z}: got {got}, scipy {want}"
        );
    }
    // Reference: scipy.stats.norm.isf(0.025) (reference library, version in values.json).
    let crit = patternproof_core::normal::two_sided_critical(f(&n["critical_alpha"])).unwrap();
    assert!(
        abs_diff_eq!(crit, f(&n["critical"]), epsilon = 1e-9),
        "critical value: got {crit}, scipy {}",
        f(&n["critical"])
    );
}

#[test]
fn laea_forward_matches_pyproj() {
    let v = values();
    let pr = &v["projection"];
    let proj = patternproof_io::Projection::centred_at(f(&pr["lon0"]), f(&pr["lat0"])).unwrap();
    for p in pr["forward"].as_array().unwrap() {
        let (lon, lat) = (f(&p["lon"]), f(&p["lat"]));
        let [x, y] = proj.forward(lon, lat).unwrap();
        // Reference: pyproj Transformer EPSG:4326 -> LAEA (PROJ; versions in values.json).
        let dist = (x - f(&p["x"])).hypot(y - f(&p["y"]));
        eprintln!("forward({lon}, {lat}): {dist:e} m from pyproj");
        assert!(
            dist <= 1e-3,
            "forward({lon}, {lat}) = ({x}, {y}), pyproj ({}, {}): {dist} m apart",
            p["x"],
            p["y"]
        );
    }
}

#[test]
fn laea_is_equal_area_against_pyproj_geodesic() {
    let v = values();
    let pr = &v["projection"];
    let cell = &pr["cell"];
    let proj = patternproof_io::Projection::centred_at(f(&pr["lon0"]), f(&pr["lat0"])).unwrap();
    let ring: Vec<Xy> = cell["ring"]
        .as_array()
        .unwrap()
        .iter()
        .map(|p| proj.forward(f(&p[0]), f(&p[1])).unwrap())
        .collect();
    // Shoelace on the projected (closed) ring.
    let twice: f64 = ring
        .windows(2)
        .map(|w| w[0][0] * w[1][1] - w[1][0] * w[0][1])
        .sum();
    let planar = twice.abs() / 2.0;
    let geodesic = f(&cell["geodesic_area_m2"]);
    eprintln!(
        "cell area: projected {planar} m², geodesic {geodesic} m², relative {:e}",
        (planar - geodesic) / geodesic
    );
    // Reference: pyproj.Geod(ellps="WGS84").polygon_area_perimeter on the
    // same densified ring (reference library, version in values.json).
    assert_rel(
        "projected cell area vs geodesic",
        planar,
        f(&cell["geodesic_area_m2"]),
        1e-6,
    );
}

/// The simulation row's null distribution against numpy/scipy
/// (reference libraries, versions in values.json): CSR patterns of n = 40
/// in an L-shaped window with a square hole. The reference samples by
/// rejection from the bounding box and measures with scipy's cKDTree; we
/// sample by area-weighted triangles. Both run 20 000 patterns, so the
/// means must agree within 4 combined Monte Carlo standard errors, and the
/// share of our simulated means below the reference 2.5 % quantile must be
/// 0.025 within 4 binomial standard errors (doubled for the reference's
/// own sampling error).
#[test]
fn simulated_null_matches_numpy_in_a_holed_window() {
    use geo::{LineString, MultiPolygon, Polygon};
    use patternproof_audit::sampling::Sampler;
    use patternproof_audit::simulation::{Measure, simulate};
    let v = values();
    let s = &v["csr_simulation"];
    let ring = |key: &str| -> LineString<f64> {
        s[key]
            .as_array()
            .unwrap()
            .iter()
            .map(|c| (f(&c[0]), f(&c[1])))
            .collect::<Vec<_>>()
            .into()
    };
    let window = MultiPolygon::new(vec![Polygon::new(ring("shell"), vec![ring("hole")])]);
    let sampler = Sampler::new(&window).unwrap();
    assert_rel("window area", sampler.area(), f(&s["area"]), 1e-12);
    let n = s["n"].as_u64().unwrap() as usize;
    let k = s["patterns"].as_u64().unwrap() as usize;
    let m = Measure {
        outline: None,
        guard: None,
        rectangle: None,
    };
    let means: Vec<f64> = simulate(&sampler, n, k, 77, "reference-check", m, &|| {})
        .iter()
        .map(|p| p.mean_nn)
        .collect();
    let ours = means.iter().sum::<f64>() / k as f64;
    let sd = f(&s["sd_of_means"]);
    let tol = 4.0 * sd * (2.0 / k as f64).sqrt();
    let want = f(&s["mean_of_means"]);
    eprintln!("mean of simulated means: ours {ours}, numpy {want}, tolerance {tol}");
    assert!(
        abs_diff_eq!(ours, want, epsilon = tol),
        "ours {ours}, numpy {want}, tolerance {tol}"
    );
    let below = means.iter().filter(|&&x| x <= f(&s["q025"])).count() as f64 / k as f64;
    let above = means.iter().filter(|&&x| x >= f(&s["q975"])).count() as f64 / k as f64;
    let btol = 4.0 * (2.0 * 0.025 * 0.975 / k as f64).sqrt();
    assert!(
        abs_diff_eq!(below, 0.025, epsilon = btol),
        "share below numpy's 2.5 % quantile: {below}"
    );
    assert!(
        abs_diff_eq!(above, 0.025, epsilon = btol),
        "share above numpy's 97.5 % quantile: {above}"
    );
}

/// Holm (1979) and Benjamini–Hochberg (1995) adjusted p-values against
/// statsmodels.stats.multitest.multipletests (reference library;
/// methods "holm" and "fdr_bh") on a fixed invented vector with ties.
#[test]
fn multitest_adjustment_matches_statsmodels() {
    use patternproof_protocol::Adjust;
    let v = values();
    let m = &v["multitest"];
    let p: Vec<f64> = m["p"].as_array().unwrap().iter().map(f).collect();
    for (adjust, key) in [(Adjust::Holm, "holm"), (Adjust::Bh, "bh")] {
        let want: Vec<f64> = m[key].as_array().unwrap().iter().map(f).collect();
        let got = adjust.apply(&p);
        assert_eq!(got.len(), want.len());
        for (g, w) in got.iter().zip(&want) {
            assert!(
                abs_diff_eq!(g, w, epsilon = 1e-12),
                "{key}: {got:?} vs {want:?}"
            );
        }
    }
}

/// Issue 20 (antimeridian): lon/lat patterns straddling ±180° near 16° S,
/// filling the cap around the North Pole above 89° N, and across the prime
/// meridian (a control), read through the whole input path (CSV, centre of
/// the equal-area plane, projection, a WKT study area across ±180° or
/// around the pole). The plane must be centred on the points' mean unit
/// vector, planar nearest-neighbour distances must match the geodesic ones
/// on the WGS84 ellipsoid, and areas the geodesic areas.
///
/// Reference: pyproj.Geod(ellps="WGS84").inv over all pairs for the
/// distances, .polygon_area_perimeter for the areas, numpy for the mean
/// direction and its reach c (the largest angle from it to a point), and
/// PROJ's Tissot factors (pyproj Proj.get_factors) of the plane centred
/// there (reference libraries, versions in values.json).
///
/// Tolerances come from the reference, never from the tool's own centre (a
/// misplaced centre would only widen them). A short distance measured on
/// the plane is off by no more than the scale's largest departure from 1
/// along it, which for these convex patterns is largest at a point: PROJ's
/// Tissot axes give it (1.4e-6 near the antimeridian, 4.0e-5 on the pole
/// cap; on the sphere it would be 1/cos(c/2) − 1 ≈ c²/8, Snyder 1987,
/// ch. 24, and the ellipsoid adds to that). The straight chord and the
/// geodesic of a 20 km neighbour pair differ by about (L/R)²/24 < 1e-9, so
/// 1e-7 is added for rounding. A hull edge of length L is straight in the
/// plane but a geodesic on the ellipsoid; the image of the geodesic bends
/// with the gradient of the scale's anisotropy, ln(k/h) ≈ c²/4 on the
/// sphere, that is with curvature up to c/(2R), so the two part by a
/// sagitta of up to c·L²/(16R) and enclose (2/3)·L·sagitta between them:
/// the area may differ by c·ΣL³/(24R), allowed twice plus 1e-7 of the area
/// (about 5e-5 of the pole cap's hull, whose edges are up to 100 km long;
/// 7e-7 near the antimeridian). The study-area rings are densified (edges
/// ≤ 1 km), so their areas agree within 1e-6.
#[test]
fn lonlat_patterns_match_geodesic_distances_and_areas() {
    use geo::{Area, ConvexHull, MultiPoint, Point};
    const R: f64 = 6_371_008.8;
    let v = values();
    let dir = tmp();
    for pattern in v["geodesic_patterns"].as_array().unwrap() {
        let name = pattern["name"].as_str().unwrap();
        let pts = points(pattern);
        let mut csv = String::from("lon,lat\n");
        for p in &pts {
            csv.push_str(&format!("{},{}\n", p[0], p[1]));
        }
        let file = dir.path().join(format!("{name}.csv"));
        std::fs::write(&file, csv).unwrap();
        let ring: Vec<String> = pattern["ring"]
            .as_array()
            .unwrap()
            .iter()
            .map(|p| format!("{} {}", f(&p[0]), f(&p[1])))
            .collect();
        let boundary = dir.path().join(format!("{name}.wkt"));
        std::fs::write(&boundary, format!("POLYGON (({}))", ring.join(", "))).unwrap();
        let data = patternproof_io::Dataset::load(
            &file,
            std::slice::from_ref(&boundary),
            &patternproof_io::LoadOptions::default(),
        )
        .unwrap_or_else(|e| panic!("{name}: {e}"));

        let md = &pattern["mean_direction"];
        let c = f(&md["reach_deg"]).to_radians();
        let nn_tol = f(&pattern["max_scale_error"]) + 1e-7;
        let got = patternproof_core::nearest::nearest_distances(&data.points).unwrap();
        let in_file_order: Vec<f64> = pattern["nn_geodesic_m"]
            .as_array()
            .unwrap()
            .iter()
            .map(f)
            .collect();
        // The points are analysed in canonical order; each one's place
        // (its CSV line, the header being line 1) finds its reference.
        let want: Vec<f64> = data
            .places
            .iter()
            .map(|place| match place {
                patternproof_io::points::Place::Line(line) => in_file_order[*line as usize - 2],
                other => panic!("{name}: a CSV point placed at {other}"),
            })
            .collect();
        let worst = got
            .iter()
            .zip(&want)
            .map(|(g, w)| ((g - w) / w).abs())
            .fold(0.0, f64::max);
        eprintln!("{name}: worst relative nearest-neighbour error {worst:e} (allowed {nn_tol:e})");
        for (i, (g, w)) in got.iter().zip(&want).enumerate() {
            assert_rel(
                &format!("{name}: point {i} nearest neighbour"),
                *g,
                *w,
                nn_tol,
            );
        }

        let hull =
            MultiPoint(data.points.iter().map(|p| Point::new(p[0], p[1])).collect()).convex_hull();
        let edges: f64 = hull
            .exterior()
            .lines()
            .map(|l| {
                let len = (l.end.x - l.start.x).hypot(l.end.y - l.start.y);
                len * len * len
            })
            .sum();
        let hull_area = hull.unsigned_area();
        let hull_want = f(&pattern["hull_area_geodesic_m2"]);
        let hull_tol = 2.0 * c * edges / (24.0 * R) / hull_want + 1e-7;
        eprintln!(
            "{name}: hull {hull_area} m², geodesic {hull_want} m², relative {:e} (allowed {hull_tol:e})",
            (hull_area - hull_want) / hull_want
        );
        assert_rel(
            &format!("{name}: hull area"),
            hull_area,
            hull_want,
            hull_tol,
        );

        let area = data.boundaries[0].shape.unsigned_area();
        let area_want = f(&pattern["ring_area_geodesic_m2"]);
        eprintln!(
            "{name}: study area {area} m², geodesic {area_want} m², relative {:e}",
            (area - area_want) / area_want
        );
        assert_rel(&format!("{name}: study area"), area, area_want, 1e-6);

        let proj = data.projection.as_ref().unwrap();
        let dlon = (proj.lon0 - f(&md["lon"]) + 540.0) % 360.0 - 180.0;
        let dlat = proj.lat0 - f(&md["lat"]);
        // The tool rounds its centre to 1e-6°; at 89.9° N a longitude
        // step is 500 times shorter, so compare on the ground.
        let apart = dlat.hypot(dlon * f(&md["lat"]).to_radians().cos());
        assert!(
            apart <= 1e-6,
            "{name}: centre ({}, {}) vs numpy's mean direction ({}, {})",
            proj.lon0,
            proj.lat0,
            md["lon"],
            md["lat"]
        );
    }
}
