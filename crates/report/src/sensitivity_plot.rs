//! `sensitivity.svg`: R and z against the study area, so a reader sees at
//! once where the call changes and where each named window lies.
//!
//! Upper panel R (with R = 1), lower panel z (with ±z_crit for α); the
//! x axis is the window area on a log scale. Both panels are shaded by
//! the call of the plain test (edge handling `none`) at each area, and a
//! strip above them names the shaded bands, so the flip points read
//! without the legend. Lines: each analytic edge handling over the
//! scaled-hull family ([`patternproof_audit::curves`]). Markers: the
//! verdict-table rows at the named windows, one shape per edge handling;
//! the simulation rows as the 95 % range of R under CSR in that exact
//! window (a point of the `none` marker outside the bar is a significant
//! simulation test). Vertical lines: the named windows (thin grey,
//! labelled at the top) and the flip thresholds (labelled with their
//! areas, listed in full below the panels). The legend has a band of its
//! own under the panels and explains every line, marker and shade.

use crate::canvas::{self, Entry, Mark, Shape, Swatch, line};
use crate::document::AuditReport;
use crate::numbers::sig;
use crate::palette::{Ink, edge_ink};
use patternproof_audit::Edge;
use patternproof_audit::curves::Sensitivity;
use patternproof_core::Call;
use plotters::coord::Shift;
use plotters::prelude::*;
use plotters::style::text_anchor::{HPos, Pos, VPos};

const WIDTH: u32 = 980;
const TITLE: u32 = 34;
const STRIP: u32 = 30;
const UPPER: u32 = 330;
const LOWER: u32 = 350;
const FOOTER_LINE: i32 = 17;
const GUIDE: RGBColor = RGBColor(170, 170, 170);
/// The named windows' verticals.
const GUIDE_INK: Ink = Ink {
    colour: GUIDE,
    width: 1,
    dash: Some((2, 3)),
};
/// The ±z_crit lines.
const CRIT_INK: Ink = Ink {
    colour: RGBColor(0, 0, 0),
    width: 1,
    dash: Some((6, 4)),
};
/// Light tints of the plain test's calls: orange and bluish green of the
/// palette (a colour-blind-safe pair) and a pale grey, named in the strip.
pub const CALL_TINTS: [(Call, RGBColor); 3] = [
    (Call::Clustered, RGBColor(250, 236, 204)),
    (Call::NotSignificant, RGBColor(243, 243, 243)),
    (Call::Dispersed, RGBColor(204, 236, 227)),
];

fn tint(call: Call) -> RGBColor {
    CALL_TINTS
        .iter()
        .find(|(c, _)| *c == call)
        .map_or(WHITE, |(_, t)| *t)
}

/// One flip threshold to draw.
struct Threshold {
    edge: Edge,
    area: f64,
    side: &'static str,
}

/// The areas [a, b) where the plain test (`none`) gives one call, from its
/// curve, with borders at its flip thresholds where one lies between two
/// curve points of different calls (else halfway on the log axis).
pub fn call_bands(report: &AuditReport) -> Vec<(f64, f64, Call)> {
    let Some(s) = report.sensitivity.as_ref() else {
        return Vec::new();
    };
    let Some(curve) = s.curves.iter().find(|c| c.edge == Edge::None) else {
        return Vec::new();
    };
    let crit = report.settings.z_crit;
    let call = |z: f64| {
        if z < -crit {
            Call::Clustered
        } else if z > crit {
            Call::Dispersed
        } else {
            Call::NotSignificant
        }
    };
    let flips: Vec<f64> = report
        .flip
        .iter()
        .filter(|f| f.edge == Edge::None)
        .flat_map(|f| [f.clustered_above_area, f.dispersed_below_area])
        .flatten()
        .collect();
    let [lo, hi] = s.area_range;
    let pts: Vec<_> = curve.points.iter().filter(|p| p.z.is_finite()).collect();
    let mut out: Vec<(f64, f64, Call)> = Vec::new();
    let mut start = lo;
    for pair in pts.windows(2) {
        let (a, b) = (pair[0], pair[1]);
        let (ca, cb) = (call(a.z), call(b.z));
        if ca != cb {
            let border = flips
                .iter()
                .copied()
                .find(|f| *f >= a.area && *f <= b.area)
                .unwrap_or_else(|| (a.area * b.area).sqrt());
            out.push((start, border, ca));
            start = border;
        }
    }
    if let Some(last) = pts.last() {
        out.push((start, hi, call(last.z)));
    }
    out
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
    let bands = call_bands(report);
    let entries = legend_entries(report, s, !inside.is_empty(), &bands);
    let legend_h = canvas::legend_height(entries.len(), 2, canvas::LEGEND_FONT) + 8;
    let notes = footer_lines(report, s, &inside, &outside);
    let footer_h = (12 + FOOTER_LINE * notes.len() as i32) as u32;
    let height = TITLE + STRIP + UPPER + LOWER + legend_h + footer_h;
    let x_desc = format!("window area, {unit}² (log scale)");

    canvas::svg((WIDTH, height), |root| {
        let (head, root) = root.split_vertically(TITLE);
        head.draw(&Text::new(
            format!(
                "How the verdict depends on the study area: {} ({} points)",
                canvas::plain(&report.input.points_file),
                report.input.n
            ),
            (WIDTH as i32 / 2, TITLE as i32 / 2),
            ("sans-serif", 18)
                .into_font()
                .color(&BLACK)
                .pos(Pos::new(HPos::Center, VPos::Center)),
        ))
        .ok()?;
        let (strip, rest) = root.split_vertically(STRIP);
        let (upper, rest) = rest.split_vertically(UPPER);
        let (lower, rest) = rest.split_vertically(LOWER);
        let (legend, footer) = rest.split_vertically(legend_h);

        call_strip(&strip, &bands, lo, hi)?;

        let (r_lo, r_hi) = y_range(
            s.curves
                .iter()
                .flat_map(|c| c.points.iter().map(|p| p.ratio))
                .chain(report.results.iter().filter_map(|r| r.ratio))
                .chain(sim_bands(report).flat_map(|b| [b.1, b.3]))
                .chain([1.0]),
            0.32,
        );
        let mut upper_chart = ChartBuilder::on(&upper)
            .margin_left(12)
            .margin_right(24)
            .margin_top(4)
            .x_label_area_size(36)
            .y_label_area_size(60)
            .build_cartesian_2d((lo..hi).log_scale(), r_lo..r_hi)
            .ok()?;
        shade(&mut upper_chart, &bands, r_lo, r_hi)?;
        upper_chart
            .configure_mesh()
            .disable_mesh()
            .x_desc(x_desc.clone())
            .y_desc("R = mean / expected")
            .x_label_formatter(&|v| sig(*v, 3))
            .y_label_formatter(&|v| format!("{v:.2}"))
            .draw()
            .ok()?;
        canvas::frame(&upper_chart)?;
        horizontal(&mut upper_chart, lo, hi, 1.0, BLACK.into())?;
        window_guides(&mut upper_chart, report, r_lo, r_hi, true)?;
        threshold_lines(&mut upper_chart, &inside, r_lo, r_hi, None, unit)?;
        for c in &s.curves {
            line(
                &mut upper_chart,
                c.points.iter().map(|p| (p.area, p.ratio)).collect(),
                edge_ink(c.edge),
            )?;
        }
        row_markers(&upper_chart, report, |r| r.ratio)?;
        let ranges: Vec<_> = sim_bands(report).collect();
        if !ranges.is_empty() {
            let ink = edge_ink(Edge::Simulation);
            let style = ShapeStyle::from(&ink.colour).stroke_width(2);
            upper_chart
                .draw_series(
                    ranges
                        .iter()
                        .map(|b| ErrorBar::new_vertical(b.0, b.1, b.2, b.3, style, 10)),
                )
                .ok()?;
        }

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
        shade(&mut lower_chart, &bands, z_lo, z_hi)?;
        lower_chart
            .configure_mesh()
            .disable_mesh()
            .x_desc(x_desc.clone())
            .y_desc("z")
            .x_label_formatter(&|v| sig(*v, 3))
            .y_label_formatter(&|v| format!("{v:.1}"))
            .draw()
            .ok()?;
        canvas::frame(&lower_chart)?;
        for v in [crit, -crit] {
            line(&mut lower_chart, vec![(lo, v), (hi, v)], CRIT_INK)?;
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
            )?;
        }
        row_markers(&lower_chart, report, |r| r.z)?;

        let legend = legend.margin(4, 4, 14, 26);
        canvas::legend_band(&legend, &entries, 2, canvas::LEGEND_FONT)?;
        for (k, l) in notes.iter().enumerate() {
            footer
                .draw(&Text::new(
                    l.clone(),
                    (16, 6 + FOOTER_LINE * k as i32),
                    ("sans-serif", 13).into_font().color(&BLACK),
                ))
                .ok()?;
        }
        Some(())
    })
}

/// The strip above the panels: the plain test's call at each area, its
/// bands named where they are wide enough for the words (the legend
/// names them too).
fn call_strip(
    area: &DrawingArea<SVGBackend<'_>, Shift>,
    bands: &[(f64, f64, Call)],
    lo: f64,
    hi: f64,
) -> Option<()> {
    let mut chart = ChartBuilder::on(area)
        .margin_left(12)
        .margin_right(24)
        .margin_top(4)
        .margin_bottom(4)
        .y_label_area_size(60)
        .build_cartesian_2d((lo..hi).log_scale(), 0.0..1.0)
        .ok()?;
    shade(&mut chart, bands, 0.0, 1.0)?;
    canvas::frame(&chart)?;
    let style = ("sans-serif", 13)
        .into_font()
        .color(&BLACK)
        .pos(Pos::new(HPos::Center, VPos::Center));
    for &(a, b, call) in bands {
        let words = format!("{} (none)", patternproof_core::call::call_word(Some(call)));
        let (xa, _) = chart.backend_coord(&(a, 0.5));
        let (xb, _) = chart.backend_coord(&(b, 0.5));
        // About 6 pixels a character at this size.
        if xb - xa < 6 * words.chars().count() as i32 + 8 {
            continue;
        }
        chart
            .draw_series(std::iter::once(Text::new(
                words,
                ((a * b).sqrt(), 0.5),
                style.clone(),
            )))
            .ok()?;
    }
    let (x0, y0) = chart.backend_coord(&(lo, 0.5));
    area.draw(&Text::new(
        "plain test",
        (
            x0 - 8 - area.get_base_pixel().0,
            y0 - area.get_base_pixel().1,
        ),
        ("sans-serif", 12)
            .into_font()
            .color(&BLACK)
            .pos(Pos::new(HPos::Right, VPos::Center)),
    ))
    .ok()?;
    Some(())
}

/// The call bands as light full-height rectangles behind everything.
fn shade(
    chart: &mut LogChart<'_, '_>,
    bands: &[(f64, f64, Call)],
    y_lo: f64,
    y_hi: f64,
) -> Option<()> {
    chart
        .draw_series(
            bands
                .iter()
                .map(|&(a, b, call)| Rectangle::new([(a, y_lo), (b, y_hi)], tint(call).filled())),
        )
        .ok()?;
    Some(())
}

/// Every line, marker and shade of the picture, in the order drawn (a
/// shade only if some area has it).
fn legend_entries(
    report: &AuditReport,
    s: &Sensitivity,
    flips: bool,
    bands: &[(f64, f64, Call)],
) -> Vec<Entry> {
    let mut out: Vec<Entry> = s
        .curves
        .iter()
        .map(|c| Entry::new(Swatch::Line(edge_ink(c.edge)), curve_label(report, c.edge)))
        .collect();
    for edge in MARKED {
        if report.results.iter().any(|r| r.edge == edge) {
            let words = match edge {
                Edge::Simulation => {
                    "row at a named window, simulation (z from the simulated means)".to_string()
                }
                e => format!("row at a named window, {e}"),
            };
            out.push(Entry::new(Swatch::Mark(mark(edge)), words));
        }
    }
    if sim_bands(report).next().is_some() {
        out.push(Entry::new(
            Swatch::Range(edge_ink(Edge::Simulation).colour),
            "simulation: 95 % range of R under CSR in the window",
        ));
    }
    out.push(Entry::new(
        Swatch::Vertical(GUIDE_INK),
        "a named window (its id at the top)",
    ));
    if flips {
        out.push(Entry::new(
            Swatch::Vertical(Ink {
                width: 1,
                dash: None,
                ..edge_ink(Edge::None)
            }),
            "flip threshold (in its edge handling's colour)",
        ));
    }
    out.push(Entry::new(
        Swatch::Line(Ink {
            colour: BLACK,
            width: 1,
            dash: None,
        }),
        "R = 1, the CSR value",
    ));
    out.push(Entry::new(
        Swatch::Line(CRIT_INK),
        format!("±z for α = {}", report.alpha),
    ));
    for (call, t) in CALL_TINTS {
        if !bands.iter().any(|b| b.2 == call) {
            continue;
        }
        out.push(Entry::new(
            Swatch::FramedFill(t, RGBColor(150, 150, 150)),
            format!(
                "shaded: plain test (none) {}",
                patternproof_core::call::call_word(Some(call))
            ),
        ));
    }
    out
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
    for (k, w) in windows.iter().enumerate() {
        line(chart, vec![(w.area, y_lo), (w.area, y_hi)], GUIDE_INK)?;
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

/// Edge handlings whose rows get a marker, in legend order.
const MARKED: [Edge; 5] = [
    Edge::None,
    Edge::Donnelly,
    Edge::Border,
    Edge::Toroidal,
    Edge::Simulation,
];

/// The marker of an edge handling's rows: circle, triangle, cross,
/// square, diamond, in the edge's colour.
fn mark(edge: Edge) -> Mark {
    let shape = match edge {
        Edge::None => Shape::Circle,
        Edge::Donnelly => Shape::Triangle,
        Edge::Border => Shape::Cross,
        Edge::Toroidal => Shape::Square,
        Edge::Simulation => Shape::Diamond,
    };
    Mark::open(shape, edge_ink(edge).colour, 5)
}

/// The verdict-table rows at their windows, one marker per edge handling.
fn row_markers(
    chart: &LogChart<'_, '_>,
    report: &AuditReport,
    value: impl Fn(&patternproof_audit::ResultRow) -> Option<f64>,
) -> Option<()> {
    for edge in MARKED {
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
        canvas::marks(chart.plotting_area(), mark(edge), coords)?;
    }
    Some(())
}

/// The notes under the legend: what the lines are, every flip threshold
/// (also those outside the plotted range) and why an edge has no curve.
fn footer_lines(
    report: &AuditReport,
    s: &Sensitivity,
    inside: &[&Threshold],
    outside: &[&Threshold],
) -> Vec<String> {
    let unit = &report.input.unit;
    let mut lines = vec![format!(
        "Lines: the hull's shape scaled about its centroid (hull area {} {unit}²), the {} points held fixed; markers: the verdict-table rows at the named windows.",
        sig(s.hull_area, 4),
        report.input.n
    )];
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
        lines.push(canvas::plain(&format!("{edge}: {why}.")));
    }
    lines
}
