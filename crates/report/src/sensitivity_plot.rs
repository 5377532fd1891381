//! `sensitivity.svg`: R and z against the study area, so a reader sees at
//! once where the call changes and where each named window lies.
//!
//! Upper panel R (with R = 1), lower panel z (with ±z_crit for α); the
//! x axis is the window area on a log scale. Lines: each analytic edge
//! handling over the scaled-hull family ([`patternproof_audit::curves`]).
//! Markers: the verdict-table rows at the named windows, one shape per
//! edge handling; the simulation rows as the 95 % range of R under CSR in
//! that exact window (a point of the `none` marker outside the bar is a
//! significant simulation test). Vertical lines: the named windows (thin
//! grey, labelled at the top) and the flip thresholds (labelled with their
//! areas, listed in full below the panels).

use crate::canvas::{self, line};
use crate::document::AuditReport;
use crate::numbers::sig;
use crate::palette::edge_ink;
use patternproof_audit::Edge;
use patternproof_audit::curves::Sensitivity;
use plotters::coord::Shift;
use plotters::prelude::*;

const WIDTH: u32 = 980;
const HEIGHT: u32 = 960;
const GUIDE: RGBColor = RGBColor(170, 170, 170);

/// One flip threshold to draw.
struct Threshold {
    edge: Edge,
    area: f64,
    side: &'static str,
}

/// Render the picture. `None` when the audit has no curves (no hull).
pub fn sensitivity_svg(report: &AuditReport) -> Option<String> {
    let s = report.sensitivity.as_ref()?;
    if s.curves.is_empty() {
        return None;
    }
    let [lo, hi] = s.area_range;
    // A log axis over an infinite or empty range never finishes its ticks.
    if !(lo > 0.0 && hi.is_finite() && hi > lo) {
        return None;
    }
    let unit = &report.input.unit;
    let thresholds = thresholds(report);
    let (inside, outside): (Vec<&Threshold>, Vec<&Threshold>) = thresholds
        .iter()
        .partition(|t| t.area >= lo && t.area <= hi);

    canvas::svg((WIDTH, HEIGHT), |root| {
        let root = root
            .titled(
                &format!(
                    "How the verdict depends on the study area: {} ({} points)",
                    report.input.points_file, report.input.n
                ),
                ("sans-serif", 18),
            )
            .ok()?;
        let (upper, rest) = root.split_vertically(360);
        let (lower, footer) = rest.split_vertically(360);

        let (r_lo, r_hi) = y_range(
            s.curves
                .iter()
                .flat_map(|c| c.points.iter().map(|p| p.ratio))
                .chain(report.results.iter().filter_map(|r| r.ratio))
                .chain(sim_bands(report).flat_map(|b| [b.1, b.3]))
                .chain([1.0]),
            0.40,
        );
        let mut upper_chart = ChartBuilder::on(&upper)
            .margin_left(12)
            .margin_right(24)
            .margin_top(8)
            .x_label_area_size(30)
            .y_label_area_size(60)
            .build_cartesian_2d((lo..hi).log_scale(), r_lo..r_hi)
            .ok()?;
        upper_chart
            .configure_mesh()
            .disable_mesh()
            .x_desc(format!("window area ({unit}²)"))
            .y_desc("R = mean / expected")
            .x_label_formatter(&|v| sig(*v, 3))
            .y_label_formatter(&|v| format!("{v:.2}"))
            .draw()
            .ok()?;
        horizontal(&mut upper_chart, lo, hi, 1.0, BLACK.into())?;
        window_guides(&mut upper_chart, report, r_lo, r_hi, true)?;
        threshold_lines(&mut upper_chart, &inside, r_lo, r_hi, None, unit)?;
        for c in &s.curves {
            let ink = edge_ink(c.edge);
            line(
                &mut upper_chart,
                c.points.iter().map(|p| (p.area, p.ratio)).collect(),
                ink,
                Some(curve_label(report, c.edge)),
            )?;
        }
        row_markers(&mut upper_chart, report, |r| r.ratio)?;
        let bands: Vec<_> = sim_bands(report).collect();
        if !bands.is_empty() {
            let ink = edge_ink(Edge::Simulation);
            let style = ShapeStyle::from(&ink.colour).stroke_width(2);
            upper_chart
                .draw_series(
                    bands
                        .iter()
                        .map(|b| ErrorBar::new_vertical(b.0, b.1, b.2, b.3, style, 10)),
                )
                .ok()?
                .label("simulation: 95 % range of R under CSR in the window")
                .legend(move |(x, y)| {
                    PathElement::new(vec![(x + 10, y - 6), (x + 10, y + 6)], style)
                });
        }
        canvas::legend(&mut upper_chart)
            .position(SeriesLabelPosition::LowerLeft)
            .draw()
            .ok()?;

        let crit = report.settings.z_crit;
        let (z_lo, z_hi) = y_range(
            s.curves
                .iter()
                .flat_map(|c| c.points.iter().map(|p| p.z))
                .chain(report.results.iter().filter_map(|r| r.z))
                .chain([crit * 1.2, -crit * 1.2]),
            0.12,
        );
        let mut lower_chart = ChartBuilder::on(&lower)
            .margin_left(12)
            .margin_right(24)
            .margin_top(8)
            .x_label_area_size(40)
            .y_label_area_size(60)
            .build_cartesian_2d((lo..hi).log_scale(), z_lo..z_hi)
            .ok()?;
        lower_chart
            .configure_mesh()
            .disable_mesh()
            .x_desc(format!("window area ({unit}²), log scale"))
            .y_desc("z")
            .x_label_formatter(&|v| sig(*v, 3))
            .y_label_formatter(&|v| format!("{v:.1}"))
            .draw()
            .ok()?;
        let crit_style = ShapeStyle::from(&BLACK).stroke_width(1);
        for v in [crit, -crit] {
            lower_chart
                .draw_series(DashedLineSeries::new(
                    vec![(lo, v), (hi, v)],
                    6,
                    4,
                    crit_style,
                ))
                .ok()?;
        }
        lower_chart
            .draw_series([
                Text::new(
                    format!("clustered below z = −{crit:.3} (α = {})", report.alpha),
                    (lo * 1.05, -crit - (z_hi - z_lo) * 0.015),
                    ("sans-serif", 12).into_font().color(&BLACK),
                ),
                Text::new(
                    format!("dispersed above z = {crit:.3}"),
                    (lo * 1.05, crit + (z_hi - z_lo) * 0.06),
                    ("sans-serif", 12).into_font().color(&BLACK),
                ),
            ])
            .ok()?;
        horizontal(&mut lower_chart, lo, hi, 0.0, GUIDE.into())?;
        window_guides(&mut lower_chart, report, z_lo, z_hi, false)?;
        threshold_lines(&mut lower_chart, &inside, z_lo, z_hi, Some(()), unit)?;
        for c in &s.curves {
            line(
                &mut lower_chart,
                c.points.iter().map(|p| (p.area, p.z)).collect(),
                edge_ink(c.edge),
                None,
            )?;
        }
        row_markers(&mut lower_chart, report, |r| r.z)?;

        footer_text(&footer, report, s, &inside, &outside)
    })
}

fn curve_label(report: &AuditReport, edge: Edge) -> String {
    match edge {
        Edge::None => "none: no edge correction (Clark & Evans 1954)".into(),
        Edge::Donnelly => "donnelly: Donnelly (1978), scaled perimeter".into(),
        Edge::Border => format!(
            "border: guard zone w = {} {}",
            sig(report.settings.guard, 3),
            report.input.unit
        ),
        other => other.to_string(),
    }
}

/// The flip thresholds of every analytic edge handling.
fn thresholds(report: &AuditReport) -> Vec<Threshold> {
    let mut out = Vec::new();
    for f in &report.flip {
        if let Some(a) = f.clustered_above_area {
            out.push(Threshold {
                edge: f.edge,
                area: a,
                side: "clustered above",
            });
        }
        if let Some(a) = f.dispersed_below_area {
            out.push(Threshold {
                edge: f.edge,
                area: a,
                side: "dispersed below",
            });
        }
    }
    out
}

/// Simulation rows as (area, low, centre, high) in R units: the simulated
/// quantiles divided by the CSR formula's expectation in that window.
fn sim_bands(report: &AuditReport) -> impl Iterator<Item = (f64, f64, f64, f64)> + '_ {
    report
        .results
        .iter()
        .filter(|r| r.edge == Edge::Simulation)
        .filter_map(|r| {
            let w = report.windows.iter().find(|w| w.id == r.window)?;
            if r.n_used < 2 || w.area <= 0.0 {
                return None;
            }
            let e = 0.5 * (w.area / r.n_used as f64).sqrt();
            Some((w.area, r.sim_q025? / e, r.sim_mean? / e, r.sim_q975? / e))
        })
}

fn y_range(values: impl Iterator<Item = f64>, headroom: f64) -> (f64, f64) {
    let (mut lo, mut hi) = (f64::INFINITY, f64::NEG_INFINITY);
    for v in values.filter(|v| v.is_finite()) {
        lo = lo.min(v);
        hi = hi.max(v);
    }
    if !(hi > lo) {
        return (lo - 1.0, hi + 1.0);
    }
    let span = hi - lo;
    (lo - 0.05 * span, hi + headroom * span)
}

type LogChart<'a, 'b> = ChartContext<
    'a,
    SVGBackend<'b>,
    Cartesian2d<LogCoord<f64>, plotters::coord::types::RangedCoordf64>,
>;

fn horizontal(
    chart: &mut LogChart<'_, '_>,
    lo: f64,
    hi: f64,
    y: f64,
    style: ShapeStyle,
) -> Option<()> {
    chart
        .draw_series(LineSeries::new(vec![(lo, y), (hi, y)], style))
        .ok()?;
    Some(())
}

/// Thin grey verticals at each named window; labels on the upper panel,
/// staggered over five rows so neighbouring windows stay readable.
fn window_guides(
    chart: &mut LogChart<'_, '_>,
    report: &AuditReport,
    y_lo: f64,
    y_hi: f64,
    labels: bool,
) -> Option<()> {
    let mut windows: Vec<_> = report.windows.iter().collect();
    windows.sort_by(|a, b| a.area.total_cmp(&b.area));
    let style = ShapeStyle::from(&GUIDE).stroke_width(1);
    for (k, w) in windows.iter().enumerate() {
        chart
            .draw_series(DashedLineSeries::new(
                vec![(w.area, y_lo), (w.area, y_hi)],
                2,
                3,
                style,
            ))
            .ok()?;
        if labels {
            let y = y_hi - (y_hi - y_lo) * (0.03 + 0.055 * (k % 5) as f64);
            chart
                .draw_series(std::iter::once(Text::new(
                    w.id.clone(),
                    (w.area * 1.01, y),
                    ("sans-serif", 12).into_font().color(&BLACK),
                )))
                .ok()?;
        }
    }
    Some(())
}

/// Flip thresholds as solid verticals in the edge's colour; the lower panel
/// labels each with its area.
fn threshold_lines(
    chart: &mut LogChart<'_, '_>,
    inside: &[&Threshold],
    y_lo: f64,
    y_hi: f64,
    labels: Option<()>,
    unit: &str,
) -> Option<()> {
    for (k, t) in inside.iter().enumerate() {
        let ink = edge_ink(t.edge);
        let style = ShapeStyle::from(&ink.colour).stroke_width(1);
        chart
            .draw_series(LineSeries::new(vec![(t.area, y_lo), (t.area, y_hi)], style))
            .ok()?;
        if labels.is_some() {
            let y = y_lo + (y_hi - y_lo) * (0.04 + 0.07 * (k % 4) as f64);
            chart
                .draw_series(std::iter::once(Text::new(
                    format!("{} flip: {} {unit}²", t.edge, sig(t.area, 4)),
                    (t.area * 1.01, y),
                    ("sans-serif", 12).into_font().color(&ink.colour),
                )))
                .ok()?;
        }
    }
    Some(())
}

/// The verdict-table rows at their windows: one marker shape per analytic
/// edge handling (circle, triangle, cross, square), in the edge's colour.
fn row_markers(
    chart: &mut LogChart<'_, '_>,
    report: &AuditReport,
    value: impl Fn(&patternproof_audit::ResultRow) -> Option<f64>,
) -> Option<()> {
    for edge in [
        Edge::None,
        Edge::Donnelly,
        Edge::Border,
        Edge::Toroidal,
        Edge::Simulation,
    ] {
        let coords: Vec<(f64, f64)> = report
            .results
            .iter()
            .filter(|r| r.edge == edge)
            .filter_map(|r| {
                let w = report.windows.iter().find(|w| w.id == r.window)?;
                Some((w.area, value(r)?))
            })
            .filter(|c| c.1.is_finite())
            .collect();
        if coords.is_empty() {
            continue;
        }
        let colour = edge_ink(edge).colour;
        let style = ShapeStyle::from(&colour).stroke_width(2);
        match edge {
            Edge::None => chart
                .draw_series(coords.iter().map(|&c| Circle::new(c, 5, style)))
                .map(|_| ()),
            Edge::Donnelly => chart
                .draw_series(coords.iter().map(|&c| TriangleMarker::new(c, 6, style)))
                .map(|_| ()),
            Edge::Border => chart
                .draw_series(coords.iter().map(|&c| Cross::new(c, 5, style)))
                .map(|_| ()),
            Edge::Toroidal => chart
                .draw_series(
                    coords
                        .iter()
                        .map(|&c| EmptyElement::at(c) + Rectangle::new([(-5, -5), (5, 5)], style)),
                )
                .map(|_| ()),
            Edge::Simulation => chart
                .draw_series(coords.iter().map(|&c| {
                    EmptyElement::at(c)
                        + PathElement::new(vec![(0, -6), (6, 0), (0, 6), (-6, 0), (0, -6)], style)
                }))
                .map(|_| ()),
        }
        .ok()?;
    }
    Some(())
}

fn footer_text(
    area: &DrawingArea<SVGBackend<'_>, Shift>,
    report: &AuditReport,
    s: &Sensitivity,
    inside: &[&Threshold],
    outside: &[&Threshold],
) -> Option<()> {
    let unit = &report.input.unit;
    let mut lines = vec![
        format!(
            "Lines: the hull's shape scaled about its centroid (hull area {} {unit}²), the {} points held fixed. Markers: the verdict-table rows at the named windows,",
            sig(s.hull_area, 4),
            report.input.n
        ),
        "  ○ none, △ donnelly, × border, □ toroidal, ◇ simulation (z of the simulated means); grey dashed verticals: the named windows.".to_string(),
    ];
    for t in inside.iter().chain(outside.iter()) {
        let hull_multiple = t.area / s.hull_area;
        let place = if inside.iter().any(|i| std::ptr::eq(*i, *t)) {
            ""
        } else {
            " (outside the plotted range)"
        };
        lines.push(format!(
            "Flip, {}: {} {} {unit}² ({}× the hull){place}.",
            t.edge,
            t.side,
            sig(t.area, 4),
            sig(hull_multiple, 3)
        ));
    }
    for (edge, why) in &s.omitted {
        lines.push(format!("{edge}: {why}."));
    }
    for (k, l) in lines.iter().enumerate() {
        area.draw(&Text::new(
            l.clone(),
            (16, 8 + 17 * k as i32),
            ("sans-serif", 13).into_font().color(&BLACK),
        ))
        .ok()?;
    }
    Some(())
}
