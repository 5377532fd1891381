//! The SVG pictures.
//!
//! * `scales.svg` — one panel per window: the observed L̂ − r of the tested
//!   correction, the global envelope band of the MAD test (shaded: this is
//!   the test), the pointwise envelope (thin dashes, labelled "pointwise,
//!   not a test") and the CSR line L − r = 0.
//! * `corrections.svg` — small multiples, one panel per correction, with
//!   every window's L̂ − r: how far the choice of window moves the curve.
//!
//! Colours and dashes come from [`crate::palette`] (Okabe–Ito,
//! each colour with its own dash pattern); no hot/cold colour convention.

use crate::canvas::{self, Canvas};
use crate::numbers::{p_value, trimmed};
use crate::palette::{Ink, ink};
use patternproof_scales::k_function::Correction;
use patternproof_scales::scales::{ScalesRun, WindowScales};
use plotters::coord::types::RangedCoordf64;
use plotters::prelude::*;

/// The ink of a correction, the same in every picture.
pub fn correction_ink(c: Correction) -> Ink {
    match c {
        Correction::Isotropic => ink(0),
        Correction::Translation => ink(1),
        Correction::Border => ink(2),
    }
}

/// An L(r) − r panel: distance against L(r) − r, both in the data's unit.
type Chart<'a, 'b> = ChartContext<'a, SVGBackend<'b>, Cartesian2d<RangedCoordf64, RangedCoordf64>>;

fn points(r: &[f64], v: &[Option<f64>]) -> Vec<Vec<(f64, f64)>> {
    // Split at undefined values so that no line bridges a gap.
    let mut out: Vec<Vec<(f64, f64)>> = vec![Vec::new()];
    for (x, y) in r.iter().zip(v) {
        match y {
            Some(y) if y.is_finite() => {
                if let Some(last) = out.last_mut() {
                    last.push((*x, *y));
                }
            }
            _ => out.push(Vec::new()),
        }
    }
    out.retain(|s| !s.is_empty());
    out
}

fn y_range<'a>(series: impl Iterator<Item = &'a [Option<f64>]>) -> (f64, f64) {
    let (mut lo, mut hi) = (0.0f64, 0.0f64);
    for s in series {
        for y in s.iter().flatten() {
            if y.is_finite() {
                lo = lo.min(*y);
                hi = hi.max(*y);
            }
        }
    }
    let pad = 0.08 * (hi - lo).max(1e-9);
    (lo - pad, hi + pad)
}

/// A curve split at its gaps ([`points`]), labelled once.
fn draw_line(
    chart: &mut Chart<'_, '_>,
    segs: Vec<Vec<(f64, f64)>>,
    style: Ink,
    mut label: Option<String>,
) -> Option<()> {
    for s in segs {
        canvas::line(chart, s, style, label.take())?;
    }
    Some(())
}

/// The axes of an L(r) − r panel over [0, rmax] × [lo, hi].
fn l_chart<'a, 'b>(
    area: &'a Canvas<'b>,
    run: &ScalesRun,
    caption: String,
    lo: f64,
    hi: f64,
) -> Option<Chart<'a, 'b>> {
    let mut chart = ChartBuilder::on(area)
        .caption(caption, ("sans-serif", 15))
        .margin(8)
        .x_label_area_size(34)
        .y_label_area_size(50)
        .build_cartesian_2d(0.0..run.rmax, lo..hi)
        .ok()?;
    chart
        .configure_mesh()
        .disable_mesh()
        .x_desc(format!("distance r ({})", run.unit))
        .y_desc(format!("L(r) − r ({})", run.unit))
        .x_label_formatter(&|v| trimmed(*v, 3))
        .y_label_formatter(&|v| trimmed(*v, 3))
        .draw()
        .ok()?;
    Some(chart)
}

/// The legend, in the upper left corner of a panel.
fn legend<'a, 'b: 'a>(chart: &mut Chart<'a, 'b>) -> Option<()> {
    canvas::legend(chart)
        .label_font(("sans-serif", 11))
        .position(SeriesLabelPosition::UpperLeft)
        .draw()
        .ok()
}

/// One window's panel. The legend is the same in every panel, so only the
/// first draws it, above the curves in headroom of its own (a legend drawn
/// over the data hid the observed curve where it rises highest).
fn window_panel(
    area: &Canvas<'_>,
    run: &ScalesRun,
    w: &WindowScales,
    with_legend: bool,
) -> Option<()> {
    let r = &run.r;
    let test = w.tests.first();
    let tested = test.map(|t| t.correction).unwrap_or(Correction::Isotropic);
    let curve = w.curves.iter().find(|c| c.correction == tested)?;
    let mut all: Vec<&[Option<f64>]> = vec![curve.l_minus_r.as_slice()];
    if let Some(t) = test {
        all.extend([
            t.lo.as_slice(),
            t.hi.as_slice(),
            t.pointwise_lo.as_slice(),
            t.pointwise_hi.as_slice(),
        ]);
    }
    let (lo, mut hi) = y_range(all.into_iter());
    if with_legend {
        hi += 0.6 * (hi - lo);
    }
    let title = match test {
        Some(t) => format!("{} (n = {}): MAD p = {}", w.id, w.n, p_value(t.p)),
        None => format!("{} (n = {}): no test", w.id, w.n),
    };
    let mut chart = l_chart(area, run, title, lo, hi)?;
    if let Some(t) = test {
        let band: Vec<(f64, f64)> = r
            .iter()
            .zip(&t.hi)
            .filter_map(|(x, y)| y.map(|y| (*x, y)))
            .chain(
                r.iter()
                    .zip(&t.lo)
                    .rev()
                    .filter_map(|(x, y)| y.map(|y| (*x, y))),
            )
            .collect();
        if !band.is_empty() {
            let fill = RGBColor(215, 215, 215).filled();
            chart
                .draw_series(std::iter::once(Polygon::new(band, fill)))
                .ok()?
                .label(format!(
                    "global envelope band (MAD test, α = {}, {} simulations)",
                    t.alpha, t.sims
                ))
                .legend(move |(x, y)| Rectangle::new([(x, y - 5), (x + 20, y + 5)], fill));
        }
        let thin = Ink {
            colour: RGBColor(120, 120, 120),
            width: 1,
            dash: Some((3, 3)),
        };
        draw_line(
            &mut chart,
            points(r, &t.pointwise_lo),
            thin,
            Some("pointwise envelope (not a test)".into()),
        )?;
        draw_line(&mut chart, points(r, &t.pointwise_hi), thin, None)?;
    }
    let zero = Ink {
        colour: RGBColor(120, 120, 120),
        width: 1,
        dash: None,
    };
    draw_line(
        &mut chart,
        vec![vec![(0.0, 0.0), (run.rmax, 0.0)]],
        zero,
        Some("CSR: L(r) − r = 0".into()),
    )?;
    draw_line(
        &mut chart,
        points(r, &curve.l_minus_r),
        correction_ink(tested),
        Some(format!("observed, {} correction", tested.as_str())),
    )?;
    if with_legend {
        legend(&mut chart)?;
    }
    Some(())
}

/// One correction's panel: every window's L̂ − r, one ink per window.
fn correction_panel(area: &Canvas<'_>, run: &ScalesRun, c: Correction) -> Option<()> {
    let series: Vec<&[Option<f64>]> = run
        .windows
        .iter()
        .filter_map(|w| w.curves.iter().find(|k| k.correction == c))
        .map(|k| k.l_minus_r.as_slice())
        .collect();
    let (lo, hi) = y_range(series.iter().copied());
    let mut chart = l_chart(area, run, format!("{} correction", c.as_str()), lo, hi)?;
    for (k, w) in run.windows.iter().enumerate() {
        if let Some(curve) = w.curves.iter().find(|x| x.correction == c) {
            draw_line(
                &mut chart,
                points(&run.r, &curve.l_minus_r),
                ink(k),
                Some(w.id.clone()),
            )?;
        }
    }
    legend(&mut chart)
}

fn grid_shape(k: usize) -> (usize, usize) {
    let cols = if k <= 1 {
        1
    } else if k <= 4 {
        2
    } else {
        3
    };
    (cols, k.div_ceil(cols).max(1))
}

/// A grid of `panels` panels under a one-line `title`, panel k drawn by
/// `panel(k, area)`: the one frame of both pictures.
fn panel_grid(
    panels: usize,
    title: &str,
    mut panel: impl FnMut(usize, &Canvas<'_>) -> Option<()>,
) -> Option<String> {
    let (cols, rows) = grid_shape(panels);
    canvas::svg((460 * cols as u32, 340 * rows as u32 + 40), |root| {
        let (head, body) = root.split_vertically(40);
        head.draw(&Text::new(
            title,
            (14, 12),
            ("sans-serif", 15).into_font().color(&BLACK),
        ))
        .ok()?;
        for (k, area) in body
            .split_evenly((rows, cols))
            .iter()
            .take(panels)
            .enumerate()
        {
            panel(k, area)?;
        }
        Some(())
    })
}

/// `scales.svg`: one panel per window with its global band. `None` when
/// there is no window or the drawing fails.
pub fn scales_svg(run: &ScalesRun) -> Option<String> {
    if run.windows.is_empty() {
        return None;
    }
    panel_grid(
        run.windows.len(),
        "L(r) − r in every window: above the shaded global band = clustering at r, below = regularity",
        |k, area| window_panel(area, run, &run.windows[k], k == 0),
    )
}

/// `corrections.svg`: one panel per correction, every window's L̂ − r.
pub fn corrections_svg(run: &ScalesRun) -> Option<String> {
    if run.windows.is_empty() || run.corrections.is_empty() {
        return None;
    }
    panel_grid(
        run.corrections.len(),
        "L(r) − r by edge correction: one line per window (no test drawn here)",
        |k, area| correction_panel(area, run, run.corrections[k]),
    )
}
