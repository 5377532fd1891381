//! The SVG pictures.
//!
//! * `scales.svg` — one panel per window: the observed L̂ − r of the tested
//!   correction, the global envelope band of the MAD test (shaded: this is
//!   the test), the pointwise envelope (thin dashes, labelled "pointwise,
//!   not a test") and the CSR line L − r = 0.
//! * `corrections.svg` — small multiples, one panel per correction, with
//!   every window's L̂ − r: how far the choice of window moves the curve.
//!
//! Colours and dashes come from `patternproof_report::palette` (Okabe–Ito,
//! each colour with its own dash pattern); no hot/cold colour convention.

use crate::k_function::Correction;
use crate::scales::{ScalesRun, WindowScales};
use crate::verdict::distance;
use patternproof_report::numbers::p_value;
use patternproof_report::palette::{Ink, ink};
use plotters::coord::Shift;
use plotters::prelude::*;

/// The ink of a correction, the same in every picture.
pub fn correction_ink(c: Correction) -> Ink {
    match c {
        Correction::Isotropic => ink(0),
        Correction::Translation => ink(1),
        Correction::Border => ink(2),
    }
}

type Area<'a> = DrawingArea<SVGBackend<'a>, Shift>;

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

fn draw_line<DB: DrawingBackend>(
    chart: &mut ChartContext<
        '_,
        DB,
        Cartesian2d<plotters::coord::types::RangedCoordf64, plotters::coord::types::RangedCoordf64>,
    >,
    segs: Vec<Vec<(f64, f64)>>,
    style: Ink,
    label: Option<String>,
) -> Option<()> {
    let stroke = ShapeStyle::from(&style.colour).stroke_width(style.width);
    let mut labelled = label;
    for s in segs {
        let anno = match style.dash {
            None => chart.draw_series(LineSeries::new(s, stroke)).ok()?,
            Some((on, off)) => chart
                .draw_series(DashedLineSeries::new(s, on, off, stroke))
                .ok()?,
        };
        if let Some(l) = labelled.take() {
            anno.label(l)
                .legend(move |(x, y)| PathElement::new(vec![(x, y), (x + 20, y)], stroke));
        }
    }
    Some(())
}

/// One window's panel. The legend is the same in every panel, so only the
/// first draws it, above the curves in headroom of its own (a legend drawn
/// over the data hid the observed curve where it rises highest).
fn window_panel(
    area: &Area<'_>,
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
        Some(t) => format!("`{}` (n = {}): MAD p = {}", w.id, w.n, p_value(t.p)),
        None => format!("`{}` (n = {}): no test", w.id, w.n),
    };
    let mut chart = ChartBuilder::on(area)
        .caption(title, ("sans-serif", 15))
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
        .x_label_formatter(&|v| distance(*v))
        .y_label_formatter(&|v| distance(*v))
        .draw()
        .ok()?;
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
        chart
            .configure_series_labels()
            .background_style(WHITE.mix(0.9))
            .border_style(BLACK)
            .label_font(("sans-serif", 11))
            .position(SeriesLabelPosition::UpperLeft)
            .draw()
            .ok()?;
    }
    Some(())
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

/// `scales.svg`: one panel per window with its global band. `None` when
/// there is no window or the drawing fails.
pub fn scales_svg(run: &ScalesRun) -> Option<String> {
    if run.windows.is_empty() {
        return None;
    }
    let (cols, rows) = grid_shape(run.windows.len());
    let mut svg = String::new();
    {
        let root = SVGBackend::with_string(&mut svg, (460 * cols as u32, 340 * rows as u32 + 40))
            .into_drawing_area();
        root.fill(&WHITE).ok()?;
        let (head, body) = root.split_vertically(40);
        head.draw(&Text::new(
            "L(r) − r in every window: above the shaded global band = clustering at r, below = regularity",
            (14, 12),
            ("sans-serif", 15).into_font().color(&BLACK),
        ))
        .ok()?;
        let panels = body.split_evenly((rows, cols));
        for (k, (w, area)) in run.windows.iter().zip(panels.iter()).enumerate() {
            window_panel(area, run, w, k == 0)?;
        }
        root.present().ok()?;
    }
    Some(svg)
}

/// `corrections.svg`: one panel per correction, every window's L̂ − r.
pub fn corrections_svg(run: &ScalesRun) -> Option<String> {
    if run.windows.is_empty() || run.corrections.is_empty() {
        return None;
    }
    let (cols, rows) = grid_shape(run.corrections.len());
    let mut svg = String::new();
    {
        let root = SVGBackend::with_string(&mut svg, (460 * cols as u32, 340 * rows as u32 + 40))
            .into_drawing_area();
        root.fill(&WHITE).ok()?;
        let (head, body) = root.split_vertically(40);
        head.draw(&Text::new(
            "L(r) − r by edge correction: one line per window (no test drawn here)",
            (14, 12),
            ("sans-serif", 15).into_font().color(&BLACK),
        ))
        .ok()?;
        let panels = body.split_evenly((rows, cols));
        for (c, area) in run.corrections.iter().zip(panels.iter()) {
            let series: Vec<&[Option<f64>]> = run
                .windows
                .iter()
                .filter_map(|w| w.curves.iter().find(|k| k.correction == *c))
                .map(|k| k.l_minus_r.as_slice())
                .collect();
            let (lo, hi) = y_range(series.iter().copied());
            let mut chart = ChartBuilder::on(area)
                .caption(format!("{} correction", c.as_str()), ("sans-serif", 15))
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
                .x_label_formatter(&|v| distance(*v))
                .y_label_formatter(&|v| distance(*v))
                .draw()
                .ok()?;
            for (k, w) in run.windows.iter().enumerate() {
                if let Some(curve) = w.curves.iter().find(|x| x.correction == *c) {
                    draw_line(
                        &mut chart,
                        points(&run.r, &curve.l_minus_r),
                        ink(k),
                        Some(format!("`{}`", w.id)),
                    )?;
                }
            }
            chart
                .configure_series_labels()
                .background_style(WHITE.mix(0.9))
                .border_style(BLACK)
                .label_font(("sans-serif", 11))
                .position(SeriesLabelPosition::UpperLeft)
                .draw()
                .ok()?;
        }
        root.present().ok()?;
    }
    Some(svg)
}
