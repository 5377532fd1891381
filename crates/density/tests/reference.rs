//! Checks of the density surfaces against a reference library, closed
//! forms and the GeoTIFF specification.

use approx::abs_diff_eq;
use geo::{MultiPolygon, polygon};
use patternproof_density::edge::{DensityEdge, estimate};
use patternproof_density::grid::Grid;
use patternproof_density::kernels::Kernel;
use patternproof_window::PreparedWindow;

fn reference() -> serde_json::Value {
    let path = concat!(
        env!("CARGO_MANIFEST_DIR"),
        "/../../reference/density_values.json"
    );
    serde_json::from_str(&std::fs::read_to_string(path).expect("reference file")).expect("json")
}

/// Source: scipy.stats.gaussian_kde (reference library) with covariance
/// σ²I at 12 cell centres; the binned FFT surface agrees to 0.5 %.
#[test]
fn gaussian_surface_matches_scipy_gaussian_kde() {
    let r = reference();
    let pts: Vec<[f64; 2]> = r["points"]
        .as_array()
        .expect("points")
        .iter()
        .map(|p| [p[0].as_f64().expect("x"), p[1].as_f64().expect("y")])
        .collect();
    let g = &r["grid"];
    let grid = Grid {
        x0: g["x0"].as_f64().expect("x0"),
        y0: g["y0"].as_f64().expect("y0"),
        cell: g["cell"].as_f64().expect("cell"),
        nx: g["nx"].as_u64().expect("nx") as usize,
        ny: g["ny"].as_u64().expect("ny") as usize,
    };
    let mask = vec![true; grid.len()];
    let sigma = r["sigma"].as_f64().expect("sigma");
    let e = estimate(
        &pts,
        &grid,
        &mask,
        Kernel::Gaussian,
        sigma,
        DensityEdge::None,
    );
    for l in r["locations"].as_array().expect("locations") {
        let (i, j) = (
            l["i"].as_u64().expect("i") as usize,
            l["j"].as_u64().expect("j") as usize,
        );
        let want = l["density"].as_f64().expect("density");
        let got = e.values[j * grid.nx + i];
        assert!(
            abs_diff_eq!(got, want, epsilon = 5e-3 * want + 1e-9),
            "at ({i},{j}): {got} vs scipy {want}"
        );
    }
}

fn square(side: f64) -> MultiPolygon<f64> {
    MultiPolygon(vec![
        polygon![(x: 0.0, y: 0.0), (x: side, y: 0.0), (x: side, y: side), (x: 0.0, y: side)],
    ])
}

/// Φ via the complementary error function (Abramowitz & Stegun 7.1.26,
/// absolute error below 1.5e-7).
fn phi(z: f64) -> f64 {
    let x = z.abs() / std::f64::consts::SQRT_2;
    let t = 1.0 / (1.0 + 0.3275911 * x);
    let poly = t
        * (0.254829592
            + t * (-0.284496736 + t * (1.421413741 + t * (-1.453152027 + t * 1.061405429))));
    let erfc = poly * (-x * x).exp();
    if z >= 0.0 {
        1.0 - 0.5 * erfc
    } else {
        0.5 * erfc
    }
}

fn points() -> Vec<[f64; 2]> {
    // Deterministic points, several near the edges of the 100 × 100 square.
    let mut s: u64 = 11;
    let mut u = || {
        s = s
            .wrapping_mul(6364136223846793005)
            .wrapping_add(1442695040888963407);
        ((s >> 11) as f64) / ((1u64 << 53) as f64)
    };
    (0..60)
        .map(|_| [2.0 + 96.0 * u(), 2.0 + 96.0 * u()])
        .collect()
}

/// Source: direct computation — for the Gaussian kernel the mass of point i
/// inside a rectangle is the product of two normal-CDF differences, so the
/// mass outside is (1/n) Σ (1 − Π (Φ(b−x)/σ − Φ(a−x)/σ)); `none` reports it
/// to 1e-3. Diggle's per-point weights keep the mass inside at 1 (1e-3).
#[test]
fn mass_outside_matches_direct_computation_and_diggle_keeps_unit_mass() {
    let w = PreparedWindow::new(square(100.0), None);
    let grid = Grid::over(&w, Some(1.0)).expect("grid");
    let mask = grid.mask(&w);
    let pts = points();
    let sigma = 9.0;
    let e = estimate(
        &pts,
        &grid,
        &mask,
        Kernel::Gaussian,
        sigma,
        DensityEdge::None,
    );
    let direct: f64 = pts
        .iter()
        .map(|p| {
            let inx = phi((100.0 - p[0]) / sigma) - phi(-p[0] / sigma);
            let iny = phi((100.0 - p[1]) / sigma) - phi(-p[1] / sigma);
            1.0 - inx * iny
        })
        .sum::<f64>()
        / pts.len() as f64;
    let got = e.mass_outside.expect("none reports the mass outside");
    assert!(direct > 0.05, "the test needs real edge loss: {direct}");
    assert!(
        abs_diff_eq!(got, direct, epsilon = 1e-3),
        "{got} vs {direct}"
    );
    for k in [Kernel::Gaussian, Kernel::Quartic] {
        let d = estimate(&pts, &grid, &mask, k, sigma * 2.0, DensityEdge::Diggle);
        assert!(
            abs_diff_eq!(d.mass_inside, 1.0, epsilon = 1e-3),
            "{}: {}",
            k.name(),
            d.mass_inside
        );
        assert!(d.mass_outside.is_none());
    }
}

/// Source: Diggle (1985) / Jones (1993) cell-wise correction — for points
/// spread evenly over the whole window the corrected surface is flat, so
/// the mass inside is 1 within 1e-3, while `none` loses several percent.
#[test]
fn uniform_correction_restores_unit_mass_for_an_even_pattern() {
    let w = PreparedWindow::new(square(100.0), None);
    let grid = Grid::over(&w, Some(1.0)).expect("grid");
    let mask = grid.mask(&w);
    let mut pts = Vec::new();
    for i in 0..50 {
        for j in 0..50 {
            pts.push([1.0 + 2.0 * i as f64, 1.0 + 2.0 * j as f64]);
        }
    }
    let none = estimate(&pts, &grid, &mask, Kernel::Gaussian, 6.0, DensityEdge::None);
    let uni = estimate(
        &pts,
        &grid,
        &mask,
        Kernel::Gaussian,
        6.0,
        DensityEdge::Uniform,
    );
    assert!(none.mass_inside < 0.95, "{}", none.mass_inside);
    assert!(
        abs_diff_eq!(uni.mass_inside, 1.0, epsilon = 1e-3),
        "{}",
        uni.mass_inside
    );
}
