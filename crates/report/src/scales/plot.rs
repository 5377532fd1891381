//! The SVG pictures.
//!
//! * `scales.svg` — one panel per window: the observed L̂ − r of the tested
//!   correction (vermillion), the global envelope band of the MAD test (a
//!   sky-blue band with blue edges: this is the test), the pointwise
//!   envelope (sky-blue dots, "pointwise envelope, not a test"), the centre
//!   of the simulated curves (grey dashes) and the CSR line L − r = 0. Where
//!   the observed curve leaves the band, each point carries the verdict's
//!   symbol (◆ above: clustered, ◇ below: regular) and a bar along the top
//!   or bottom of the panel names the stretch ("clustered, r 2–6 m"), so a
//!   panel states its verdict without the legend.
//! * `corrections.svg` — small multiples, one panel per correction, with
//!   every window's L̂ − r: how far the choice of window moves the curve.
//!
//! The panels of a picture share one y-scale, since they are read against
//! each other, and one legend in a band under the panels. Both pictures are
//! [`WIDTH`] pixels wide, under the width the page shows a figure at
//! (1 040 pixels), so their text stays at the size written: every label
//! is at least 11 pixels.
//!
//! Colours and dashes come from [`crate::palette`] (Okabe–Ito,
//! each colour with its own dash pattern); no hot/cold colour convention.

use crate::canvas::{self, Canvas, Entry, Mark, Shape, Swatch};
use crate::numbers::{p_value, trimmed};
use crate::palette::{Ink, ink};
use patternproof_scales::k_function::Correction;
use patternproof_scales::scales::{ScalesRun, WindowScales};
use patternproof_scales::verdict::{Band, Direction};
use plotters::coord::types::RangedCoordf64;
use plotters::prelude::*;

/// Width of both pictures in pixels.
pub const WIDTH: u32 = 1000;
/// Font size (plotters units, 1.24 per SVG pixel) of tick labels, axis
/// names and legends: 14 is 11.3 pixels.
const TEXT: u32 = 14;
/// The global envelope band, the MAD test itself: a light sky-blue fill
/// with its edges drawn in blue, so it reads in grey as a framed band.
const BAND: RGBColor = RGBColor(212, 236, 250);
/// The edges of the global band.
const BAND_EDGE: Ink = Ink {
    colour: RGBColor(0, 114, 178),
    width: 1,
    dash: None,
};
/// The pointwise envelope: sky-blue dots (not a test).
const THIN: Ink = Ink {
    colour: RGBColor(86, 180, 233),
    width: 2,
    dash: Some((2, 4)),
};
/// The centre of the simulated curves.
const CENTRE: Ink = Ink {
    colour: RGBColor(120, 120, 120),
    width: 1,
    dash: Some((8, 4)),
};
/// The CSR line.
const ZERO: Ink = Ink {
    colour: RGBColor(160, 160, 160),
    width: 1,
    dash: None,
};
/// The observed curve of the tested correction.
const OBSERVED: Ink = Ink {
    colour: RGBColor(213, 94, 0),
    width: 3,
    dash: None,
};
/// Distances where the observed curve lies above the global band: the
/// verdict's symbol and colour for clustered (◆, orange).
const ABOVE: Mark = Mark {
    shape: Shape::Diamond,
    colour: RGBColor(230, 159, 0),
    filled: true,
    size: 3,
};
/// Distances where it lies below: the verdict's ◇ in bluish green.
const BELOW: Mark = Mark {
    shape: Shape::Diamond,
    colour: RGBColor(0, 158, 115),
    filled: false,
    size: 3,
};

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

/// A curve split at its gaps ([`points`]).
fn draw_line(chart: &mut Chart<'_, '_>, segs: Vec<Vec<(f64, f64)>>, style: Ink) -> Option<()> {
    for s in segs {
        canvas::line(chart, s, style)?;
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
        .caption(caption, ("sans-serif", TEXT + 1))
        .margin(8)
        .margin_right(14)
        .x_label_area_size(40)
        .y_label_area_size(58)
        .build_cartesian_2d(0.0..run.rmax, lo..hi)
        .ok()?;
    chart
        .configure_mesh()
        .disable_mesh()
        .label_style(("sans-serif", TEXT))
        .axis_desc_style(("sans-serif", TEXT))
        .x_labels(6)
        .y_labels(6)
        .x_desc(format!("distance r ({})", run.unit))
        .y_desc(format!("L(r) − r ({})", run.unit))
        .x_label_formatter(&|v| trimmed(*v, 3))
        .y_label_formatter(&|v| trimmed(*v, 3))
        .draw()
        .ok()?;
    canvas::frame(&chart)?;
    Some(chart)
}

/// The tested curve and its test of a window: what `scales.svg` draws.
fn tested(w: &WindowScales) -> Option<(Correction, &[Option<f64>])> {
    let test = w.tests.first();
    let c = test.map(|t| t.correction).unwrap_or(Correction::Isotropic);
    let curve = w.curves.iter().find(|k| k.correction == c)?;
    Some((c, curve.l_minus_r.as_slice()))
}

/// One window's panel, on the picture's common y-range.
fn window_panel(
    area: &Canvas<'_>,
    run: &ScalesRun,
    w: &WindowScales,
    lo: f64,
    hi: f64,
) -> Option<()> {
    let r = &run.r;
    let test = w.tests.first();
    let (correction, observed) = tested(w)?;
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
            chart
                .draw_series(std::iter::once(Polygon::new(band, BAND.filled())))
                .ok()?;
        }
        draw_line(&mut chart, points(r, &t.lo), BAND_EDGE)?;
        draw_line(&mut chart, points(r, &t.hi), BAND_EDGE)?;
        draw_line(&mut chart, points(r, &t.pointwise_lo), THIN)?;
        draw_line(&mut chart, points(r, &t.pointwise_hi), THIN)?;
        draw_line(&mut chart, points(r, &t.centre), CENTRE)?;
    }
    draw_line(&mut chart, vec![vec![(0.0, 0.0), (run.rmax, 0.0)]], ZERO)?;
    draw_line(&mut chart, points(r, observed), OBSERVED)?;
    let _ = correction;
    if let Some(t) = test {
        let bands = w.bands.first().map_or(&[][..], Vec::as_slice);
        departures(&mut chart, run, observed, &t.departure, bands, (lo, hi))?;
    }
    Some(())
}

/// Mark the distances where the observed curve leaves the global band:
/// the verdict's symbol on each such point of the curve, and a bar along
/// the top (clustered) or bottom (regular) of the panel over each stretch,
/// named ("clustered, r 2–6 m"), so the panel states its verdict without
/// the legend.
fn departures(
    chart: &mut Chart<'_, '_>,
    run: &ScalesRun,
    observed: &[Option<f64>],
    departure: &[i8],
    bands: &[Band],
    (lo, hi): (f64, f64),
) -> Option<()> {
    let inset = 0.04 * (hi - lo);
    for (sign, mark) in [(1, ABOVE), (-1, BELOW)] {
        let at: Vec<(f64, f64)> = run
            .r
            .iter()
            .zip(observed)
            .zip(departure)
            .filter_map(|((x, y), d)| (*d == sign).then_some((*x, (*y)?)))
            .collect();
        canvas::marks(chart.plotting_area(), mark, at)?;
    }
    for band in bands {
        let (mark, word, y, dy) = match band.direction {
            Direction::Clustered => (ABOVE, "clustered", hi - inset, 6),
            Direction::Regular => (BELOW, "regular", lo + inset, -22),
        };
        let bar = Ink {
            colour: mark.colour,
            width: 4,
            dash: None,
        };
        draw_line(chart, vec![vec![(band.from, y), (band.to, y)]], bar)?;
        let label = if band.from == band.to {
            format!("{word}, r {} {}", trimmed(band.from, 3), run.unit)
        } else {
            format!(
                "{word}, r {}–{} {}",
                trimmed(band.from, 3),
                trimmed(band.to, 3),
                run.unit
            )
        };
        let style = ("sans-serif", TEXT).into_font().color(&BLACK);
        // Under the top bar, over the bottom one.
        chart
            .draw_series(std::iter::once(
                EmptyElement::at((band.from, y)) + Text::new(label, (4, dy), style),
            ))
            .ok()?;
    }
    Some(())
}

/// One correction's panel: every window's L̂ − r, one ink per window.
fn correction_panel(
    area: &Canvas<'_>,
    run: &ScalesRun,
    c: Correction,
    lo: f64,
    hi: f64,
) -> Option<()> {
    let mut chart = l_chart(area, run, format!("{} correction", c.as_str()), lo, hi)?;
    for (k, w) in run.windows.iter().enumerate() {
        if let Some(curve) = w.curves.iter().find(|x| x.correction == c) {
            draw_line(&mut chart, points(&run.r, &curve.l_minus_r), ink(k))?;
        }
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

/// A grid of `panels` panels under a one-line `title`, panel k drawn by
/// `panel(k, area)`, with `legend` in a band under the panels: the one
/// frame of both pictures.
fn panel_grid(
    panels: usize,
    title: &str,
    legend: &[Entry],
    mut panel: impl FnMut(usize, &Canvas<'_>) -> Option<()>,
) -> Option<String> {
    let (cols, rows) = grid_shape(panels);
    let panel_h: u32 = if cols == 3 { 300 } else { 330 };
    let legend_cols = if legend.len() > 4 { 4 } else { 2 };
    let legend_h = canvas::legend_height(legend.len(), legend_cols, TEXT) + 10;
    let head = 36;
    canvas::svg((WIDTH, head + panel_h * rows as u32 + legend_h), |root| {
        let (top, rest) = root.split_vertically(head);
        let (body, bottom) = rest.split_vertically(panel_h * rows as u32);
        top.draw(&Text::new(
            title,
            (14, 12),
            ("sans-serif", TEXT + 2).into_font().color(&BLACK),
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
        let bottom = bottom.margin(4, 6, 10, 10);
        canvas::legend_band(&bottom, legend, legend_cols, TEXT)
    })
}

/// `scales.svg`: one panel per window with its global band. `None` when
/// there is no window or the drawing fails.
pub fn scales_svg(run: &ScalesRun) -> Option<String> {
    if run.windows.is_empty() {
        return None;
    }
    let mut all: Vec<&[Option<f64>]> = Vec::new();
    for w in &run.windows {
        if let Some((_, observed)) = tested(w) {
            all.push(observed);
        }
        if let Some(t) = w.tests.first() {
            all.extend([
                t.lo.as_slice(),
                t.hi.as_slice(),
                t.pointwise_lo.as_slice(),
                t.pointwise_hi.as_slice(),
            ]);
        }
    }
    let (lo, hi) = y_range(all.into_iter());
    let departs = |sign: i8| {
        run.windows
            .iter()
            .filter_map(|w| w.tests.first())
            .any(|t| t.departure.contains(&sign))
    };
    // Room for the bars that name the departures, off the curves.
    let room = 0.15 * (hi - lo);
    let hi = if departs(1) { hi + room } else { hi };
    let lo = if departs(-1) { lo - room } else { lo };
    let mut legend = Vec::new();
    if let Some(t) = run.windows.iter().find_map(|w| w.tests.first()) {
        legend.push(Entry::new(
            Swatch::Fill(BAND),
            format!("global band: the MAD test, α = {}", t.alpha),
        ));
        legend.push(Entry::new(
            Swatch::Line(THIN),
            "pointwise envelope, not a test",
        ));
        legend.push(Entry::new(
            Swatch::Line(CENTRE),
            format!("centre of {} simulated curves", t.sims),
        ));
    }
    legend.push(Entry::new(Swatch::Line(ZERO), "CSR: L(r) − r = 0"));
    let mut shown: Vec<Correction> = Vec::new();
    for w in &run.windows {
        if let Some((c, _)) = tested(w)
            && !shown.contains(&c)
        {
            shown.push(c);
            legend.push(Entry::new(
                Swatch::Line(OBSERVED),
                format!("observed L(r) − r, {} correction", c.as_str()),
            ));
        }
    }
    if departs(1) {
        legend.push(Entry::new(
            Swatch::Mark(ABOVE),
            "◆ above the global band: clustered at r",
        ));
    }
    if departs(-1) {
        legend.push(Entry::new(
            Swatch::Mark(BELOW),
            "◇ below the global band: regular at r",
        ));
    }
    panel_grid(
        run.windows.len(),
        "L(r) − r in every window: above the shaded global band = clustering at r, below = regularity",
        &legend,
        |k, area| window_panel(area, run, &run.windows[k], lo, hi),
    )
}

/// `corrections.svg`: one panel per correction, every window's L̂ − r.
pub fn corrections_svg(run: &ScalesRun) -> Option<String> {
    if run.windows.is_empty() || run.corrections.is_empty() {
        return None;
    }
    let series: Vec<&[Option<f64>]> = run
        .windows
        .iter()
        .flat_map(|w| w.curves.iter())
        .filter(|k| run.corrections.contains(&k.correction))
        .map(|k| k.l_minus_r.as_slice())
        .collect();
    let (lo, hi) = y_range(series.into_iter());
    let legend: Vec<Entry> = run
        .windows
        .iter()
        .enumerate()
        .map(|(k, w)| Entry::new(Swatch::Line(ink(k)), w.id.clone()))
        .collect();
    panel_grid(
        run.corrections.len(),
        "L(r) − r by edge correction: one line per window (no test drawn here)",
        &legend,
        |k, area| correction_panel(area, run, run.corrections[k], lo, hi),
    )
}
