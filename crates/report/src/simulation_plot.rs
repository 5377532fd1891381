//! `simulation.svg`: the distribution of the simulated mean
//! nearest-neighbour distances in one window, with the observed value.
//!
//! This is what the simulation row's rank p-value counts: the share of CSR
//! patterns in the exact window whose mean lies at least as far out as the
//! observed one. The closed-form CSR expectation without edge correction
//! is drawn too, so the reader sees how far the edge effect moves it.

use crate::canvas::{self, Entry, Swatch};
use crate::document::AuditReport;
use crate::numbers::{p_value, sig};
use crate::palette::{Ink, edge_ink};
use patternproof_audit::{Edge, WindowKind};
use plotters::prelude::*;

/// Histogram bins.
pub const BINS: usize = 40;

/// The window pictured by default: the first user boundary that was
/// simulated, else the convex hull.
pub fn default_window(report: &AuditReport) -> Option<&str> {
    let simulated = |id: &str| {
        report
            .simulated_means
            .iter()
            .any(|(w, m)| w == id && !m.is_empty())
    };
    report
        .windows
        .iter()
        .find(|w| w.kind == WindowKind::Boundary && simulated(&w.id))
        .or_else(|| {
            report
                .windows
                .iter()
                .find(|w| w.kind == WindowKind::Hull && simulated(&w.id))
        })
        .map(|w| w.id.as_str())
}

/// Bin counts of `values` over `[lo, hi)` (the last bin closed).
pub fn histogram(values: &[f64], lo: f64, hi: f64, bins: usize) -> Vec<usize> {
    let mut counts = vec![0; bins];
    let width = (hi - lo) / bins as f64;
    for &v in values {
        if v.is_finite() && width > 0.0 {
            let k = (((v - lo) / width).floor().max(0.0) as usize).min(bins - 1);
            counts[k] += 1;
        }
    }
    counts
}

/// Render the picture for window `id`. `None` when it has no simulations.
pub fn simulation_svg(report: &AuditReport, id: &str) -> Option<String> {
    let means = report
        .simulated_means
        .iter()
        .find(|(w, _)| w == id)
        .map(|(_, m)| m)
        .filter(|m| !m.is_empty())?;
    let row = report
        .results
        .iter()
        .find(|r| r.window == id && r.edge == Edge::Simulation)?;
    let window = report.windows.iter().find(|w| w.id == id)?;
    let observed = row.mean_nn?;
    let formula = 0.5 * (window.area / row.n_used.max(1) as f64).sqrt();
    let unit = &report.input.unit;

    let (mut lo, mut hi) = (observed.min(formula), observed.max(formula));
    for &m in means {
        lo = lo.min(m);
        hi = hi.max(m);
    }
    let pad = 0.03 * (hi - lo).max(f64::EPSILON);
    let (lo, hi) = (lo - pad, hi + pad);
    let counts = histogram(means, lo, hi, BINS);
    let top = counts.iter().copied().max().unwrap_or(1) as f64 * 1.25;
    let width = (hi - lo) / BINS as f64;

    let fill = RGBColor(200, 200, 200);
    let thicker = |ink: Ink| Ink {
        width: ink.width + 1,
        ..ink
    };
    let mut lines: Vec<(f64, Ink, String)> = vec![(
        observed,
        thicker(edge_ink(Edge::None)),
        format!("observed: {} {unit}", sig(observed, 4)),
    )];
    if let (Some(q1), Some(q2)) = (row.sim_q025, row.sim_q975) {
        let ink = thicker(edge_ink(Edge::Simulation));
        lines.push((
            q1,
            ink,
            format!("2.5 % of simulations: {} {unit}", sig(q1, 4)),
        ));
        lines.push((
            q2,
            ink,
            format!("97.5 % of simulations: {} {unit}", sig(q2, 4)),
        ));
    }
    lines.push((
        formula,
        thicker(edge_ink(Edge::Donnelly)),
        format!(
            "CSR formula without edge correction: {} {unit}",
            sig(formula, 4)
        ),
    ));
    let mut entries = vec![Entry::new(
        Swatch::FramedFill(fill, RGBColor(90, 90, 90)),
        "simulated means (histogram)",
    )];
    entries.extend(
        lines
            .iter()
            .map(|(_, ink, label)| Entry::new(Swatch::Line(*ink), label.clone())),
    );
    let legend_h = canvas::legend_height(entries.len(), 2, canvas::LEGEND_FONT) + 8;
    let plot_h = 470;
    let footer_h = 56;

    canvas::svg((900, plot_h + legend_h + footer_h), |root| {
        let (plot, rest) = root.split_vertically(plot_h);
        let (legend, footer) = rest.split_vertically(legend_h);
        let mut chart = ChartBuilder::on(&plot)
            .caption(
                format!(
                    "Simulated mean nearest-neighbour distance in {id}: {} CSR patterns of {} points",
                    means.len(),
                    row.n_used
                ),
                ("sans-serif", 17),
            )
            .margin(14)
            .x_label_area_size(40)
            .y_label_area_size(55)
            .build_cartesian_2d(lo..hi, 0.0..top)
            .ok()?;
        chart
            .configure_mesh()
            .disable_mesh()
            .x_desc(format!("mean nearest-neighbour distance ({unit})"))
            .y_desc("simulated patterns")
            .x_label_formatter(&|v| sig(*v, 3))
            .y_label_formatter(&|v| format!("{v:.0}"))
            .draw()
            .ok()?;
        canvas::frame(&chart)?;
        let edge = ShapeStyle::from(&RGBColor(90, 90, 90)).stroke_width(1);
        chart
            .draw_series(counts.iter().enumerate().map(|(k, &c)| {
                let x0 = lo + k as f64 * width;
                Rectangle::new([(x0, 0.0), (x0 + width, c as f64)], fill.filled())
            }))
            .ok()?;
        chart
            .draw_series(
                counts
                    .iter()
                    .enumerate()
                    .filter(|(_, c)| **c > 0)
                    .map(|(k, &c)| {
                        let x0 = lo + k as f64 * width;
                        Rectangle::new([(x0, 0.0), (x0 + width, c as f64)], edge)
                    }),
            )
            .ok()?;
        for (x, ink, _) in &lines {
            canvas::line(&mut chart, vec![(*x, 0.0), (*x, top * 0.92)], *ink)?;
        }
        let legend = legend.margin(2, 4, 14, 14);
        canvas::legend_band(&legend, &entries, 2, canvas::LEGEND_FONT)?;
        let call = crate::table::call_word(row.call);
        let lines = [
            format!(
                "Two-sided rank p = {} with {} simulations (seed {}): {call}.",
                row.p.map_or("—".into(), p_value),
                means.len(),
                report.settings.seed
            ),
            "The p-value counts the simulated patterns whose mean lies at least as far out as the observed one; it tests CSR in this exact window only.".to_string(),
        ];
        for (k, l) in lines.iter().enumerate() {
            footer
                .draw(&Text::new(
                    l.clone(),
                    (20, 8 + 20 * k as i32),
                    ("sans-serif", 13).into_font().color(&BLACK),
                ))
                .ok()?;
        }
        Some(())
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Counts sum to the number of finite values and land in the right
    /// bins (worked by hand).
    #[test]
    fn histogram_counts() {
        let c = histogram(&[0.0, 0.1, 0.5, 0.99, 1.0, f64::NAN], 0.0, 1.0, 4);
        assert_eq!(c, vec![2, 0, 1, 2]);
    }
}
