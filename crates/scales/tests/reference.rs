//! Cross-checks against brute-force reference values from general-purpose
//! libraries.
//!
//! `reference/scales_values.json` is written by
//! `reference/make_scales_reference.py` (numpy for pair distances, shapely
//! for circle/polygon intersection lengths, translated-polygon
//! intersection areas and outline distances; versions stored in the JSON
//! under `versions`, pinned in `reference/requirements.txt`). The window
//! is an L-shaped polygon with a square hole; the seeded points are stored
//! in the JSON so both sides see the same coordinates. Rebuild with
//! `reference/regenerate.sh`.

#![allow(clippy::unwrap_used, missing_docs)]

use approx::{assert_abs_diff_eq, relative_eq};
use geo::{LineString, MultiPolygon, Polygon};
use patternproof_scales::k_function::k_curves;
use patternproof_scales::{Correction, KWindow, isotropic, translation};
use serde_json::Value;

fn values() -> Value {
    let path = concat!(
        env!("CARGO_MANIFEST_DIR"),
        "/../../reference/scales_values.json"
    );
    let text = std::fs::read_to_string(path).unwrap_or_else(|e| panic!("read {path}: {e}"));
    serde_json::from_str(&text).unwrap()
}

fn f(v: &Value) -> f64 {
    v.as_f64().unwrap_or_else(|| panic!("not a number: {v}"))
}

fn ring(v: &Value) -> LineString<f64> {
    LineString::from(
        v.as_array()
            .unwrap()
            .iter()
            .map(|c| (f(&c[0]), f(&c[1])))
            .collect::<Vec<_>>(),
    )
}

fn setup() -> (Value, KWindow, Vec<[f64; 2]>) {
    let v = values();
    let shape = MultiPolygon::new(vec![Polygon::new(
        ring(&v["outer"]),
        vec![ring(&v["hole"])],
    )]);
    let region = KWindow::new(&shape, None).unwrap();
    let pts = v["points"]
        .as_array()
        .unwrap()
        .iter()
        .map(|p| [f(&p[0]), f(&p[1])])
        .collect();
    (v, region, pts)
}

fn assert_rel(what: &str, got: f64, want: f64, rel: f64) {
    let err = (got - want).abs() / want.abs().max(f64::MIN_POSITIVE);
    assert!(
        relative_eq!(got, want, epsilon = 0.0, max_relative = rel),
        "{what}: got {got}, reference {want}, relative error {err:e} > {rel:e}"
    );
}

#[test]
fn area_and_outline_distances() {
    let (v, region, pts) = setup();
    // Reference: shapely Polygon.area (exact polygon area).
    assert_rel("area", region.geometry.area(), f(&v["area"]), 1e-12);
    // Reference: shapely boundary.distance(Point) (exterior and hole).
    for (p, want) in pts.iter().zip(v["outline_distance"].as_array().unwrap()) {
        assert_abs_diff_eq!(
            region.geometry.distance_to_outline(*p),
            f(want),
            epsilon = 1e-9
        );
    }
}

#[test]
fn per_pair_weights() {
    let (v, region, pts) = setup();
    let pairs = v["pairs"].as_array().unwrap();
    assert!(pairs.len() >= 20, "the reference holds cut circles");
    for pair in pairs {
        let i = pair["i"].as_u64().unwrap() as usize;
        let j = pair["j"].as_u64().unwrap() as usize;
        let d = f(&pair["d"]);
        assert_abs_diff_eq!(
            (pts[i][0] - pts[j][0]).hypot(pts[i][1] - pts[j][1]),
            d,
            epsilon = 1e-9
        );
        // Reference: shapely length of a 2^14-chord circle ∩ polygon over
        // the chord circle's length (tolerance 1e-6 stated in the script;
        // checked here at 1e-5).
        let share = isotropic::inside_share(&region, pts[i], d);
        assert_rel("isotropic share", share, f(&pair["share"]), 1e-5);
        // Reference: shapely area of W ∩ translate(W, x_i − x_j); geo's
        // overlay snaps to a fine grid, so 1e-7 relative.
        let vshift = [pts[i][0] - pts[j][0], pts[i][1] - pts[j][1]];
        let w = translation::weight(&region, vshift).unwrap();
        assert_rel(
            "translation weight",
            w,
            f(&pair["translation_weight"]),
            1e-7,
        );
    }
}

#[test]
fn k_with_each_correction() {
    let (v, region, pts) = setup();
    let grid: Vec<f64> = v["r"].as_array().unwrap().iter().map(f).collect();
    let (curves, notes) = k_curves(&pts, &region, &grid, &Correction::ALL, true);
    assert_eq!(notes.isotropic_capped, 0);
    for c in &curves {
        let name = c.correction.as_str();
        let want = v["k"][name].as_array().unwrap();
        for (k, r) in grid.iter().enumerate() {
            match (&want[k], c.k[k]) {
                (Value::Null, None) => {}
                (w, Some(got)) => {
                    // Reference: numpy/shapely brute force O(n²) over
                    // ordered pairs (make_scales_reference.py). Border is
                    // exact counting; isotropic inherits the chord-circle
                    // tolerance; translation the overlay snapping.
                    let tol = match c.correction {
                        Correction::Border => 1e-12,
                        Correction::Isotropic => 1e-5,
                        Correction::Translation => 1e-7,
                    };
                    assert_rel(&format!("K {name} at r = {r}"), got, f(w), tol);
                }
                (w, None) => panic!("K {name} at r = {r}: undefined, reference {w}"),
            }
        }
    }
}
