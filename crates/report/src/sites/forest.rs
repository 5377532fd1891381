//! `sites.svg`: every site's R with its 95 % interval on one common axis,
//! window-sensitive sites marked, and a legend under the plot that shows
//! each marker.

use crate::canvas::{self, Entry, Mark, Shape, Swatch};
use crate::palette::{INKS, Ink};
use patternproof_core::Call;
use patternproof_sites::SiteRun;
use plotters::prelude::*;

/// Render the picture; `None` when no site was tested.
pub fn forest_svg(runs: &[SiteRun]) -> Option<String> {
    let tested: Vec<&patternproof_sites::SiteRow> = runs
        .iter()
        .map(|r| &r.row)
        .filter(|r| r.ratio.is_some())
        .collect();
    if tested.is_empty() {
        return None;
    }
    let (mut lo, mut hi) = (1.0f64, 1.0f64);
    for r in &tested {
        for v in [r.ratio, r.ratio_low, r.ratio_high].into_iter().flatten() {
            lo = lo.min(v);
            hi = hi.max(v);
        }
    }
    let pad = 0.08 * (hi - lo).max(0.05);
    let (lo, hi) = (lo - pad, hi + pad);
    let rows = tested.len();
    let plain = INKS[0].colour;
    let flagged = INKS[2].colour;
    let mark = |shape, colour, filled| Mark {
        shape,
        colour,
        filled,
        size: if shape == Shape::Triangle { 6 } else { 5 },
    };
    let dashed = Ink {
        colour: BLACK,
        width: 1,
        dash: Some((5, 4)),
    };
    let entries = [
        Entry::new(
            Swatch::Mark(mark(Shape::Circle, plain, true)),
            "significant after adjustment",
        ),
        Entry::new(
            Swatch::Mark(mark(Shape::Circle, plain, false)),
            "not significant",
        ),
        Entry::new(
            Swatch::Mark(mark(Shape::Triangle, flagged, false)),
            "window-sensitive (filled if significant)",
        ),
        Entry::new(
            Swatch::Line(Ink {
                colour: plain,
                width: 2,
                dash: None,
            }),
            "95 % interval of R",
        ),
        Entry::new(Swatch::Line(dashed), "R = 1, the CSR value"),
    ];
    let legend_h = canvas::legend_height(entries.len(), 3, canvas::LEGEND_FONT) + 8;
    let plot_h = (80 + 24 * rows as u32).min(20_000);
    canvas::svg((900, plot_h + legend_h), |whole| {
        let (root, legend) = whole.split_vertically(plot_h);
        let mut chart = ChartBuilder::on(&root)
            .caption(
                "R by site under the protocol (95 % interval)",
                ("sans-serif", 17),
            )
            .margin(12)
            .x_label_area_size(36)
            .y_label_area_size(200)
            .build_cartesian_2d(lo..hi, 0.0..rows as f64)
            .ok()?;
        let names: Vec<String> = tested.iter().map(|r| r.site.clone()).collect();
        chart
            .configure_mesh()
            .disable_mesh()
            .x_desc("R (1 = CSR)")
            .y_labels(0)
            .x_label_formatter(&|v| format!("{v:.2}"))
            .draw()
            .ok()?;
        canvas::frame(&chart)?;
        canvas::line(&mut chart, vec![(1.0, 0.0), (1.0, rows as f64)], dashed)?;
        for (k, r) in tested.iter().enumerate() {
            let y = rows as f64 - k as f64 - 0.5;
            let sensitive = r.window_sensitive == Some(true);
            let colour = if sensitive { flagged } else { plain };
            let style = ShapeStyle::from(&colour).stroke_width(2);
            if let (Some(a), Some(b)) = (r.ratio_low, r.ratio_high) {
                chart
                    .draw_series(std::iter::once(PathElement::new(
                        vec![(a, y), (b, y)],
                        style,
                    )))
                    .ok()?;
            }
            let x = r.ratio.unwrap_or(1.0);
            let filled = matches!(r.call, Some(Call::Clustered) | Some(Call::Dispersed));
            let shape = if sensitive {
                Shape::Triangle
            } else {
                Shape::Circle
            };
            canvas::marks(chart.plotting_area(), mark(shape, colour, filled), [(x, y)])?;
            let label = format!(
                "{}{}",
                names[k],
                if sensitive { " (window-sensitive)" } else { "" }
            );
            root.draw(&Text::new(
                label,
                (14, chart.backend_coord(&(lo, y)).1 - 7),
                ("sans-serif", 13).into_font().color(&colour),
            ))
            .ok()?;
        }
        let legend = legend.margin(0, 6, 12, 12);
        canvas::legend_band(&legend, &entries, 3, canvas::LEGEND_FONT)
    })
}
