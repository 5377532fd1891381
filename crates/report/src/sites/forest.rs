//! `sites.svg`: every site's R with its 95 % interval on one common axis,
//! window-sensitive sites marked, sites without a test listed.

use crate::canvas;
use crate::palette::INKS;
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
    let height = (90 + 24 * rows as u32).min(20_000);
    canvas::svg((900, height), |root| {
        let mut chart = ChartBuilder::on(root)
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
        chart
            .draw_series(DashedLineSeries::new(
                vec![(1.0, 0.0), (1.0, rows as f64)],
                5,
                4,
                BLACK.stroke_width(1),
            ))
            .ok()?;
        for (k, r) in tested.iter().enumerate() {
            let y = rows as f64 - k as f64 - 0.5;
            let sensitive = r.window_sensitive == Some(true);
            let ink = if sensitive { INKS[2] } else { INKS[0] };
            let style = ShapeStyle::from(&ink.colour).stroke_width(2);
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
            let marker = if filled { style.filled() } else { style };
            if sensitive {
                chart
                    .draw_series(std::iter::once(TriangleMarker::new((x, y), 7, marker)))
                    .ok()?;
            } else {
                chart
                    .draw_series(std::iter::once(Circle::new((x, y), 5, marker)))
                    .ok()?;
            }
            let label = format!(
                "{}{}",
                names[k],
                if sensitive { " (window-sensitive)" } else { "" }
            );
            root.draw(&Text::new(
                label,
                (14, chart.backend_coord(&(lo, y)).1 - 7),
                ("sans-serif", 13).into_font().color(&ink.colour),
            ))
            .ok()?;
        }
        root.draw(&Text::new(
        "filled: significant after adjustment; open: not significant; triangle: window-sensitive",
        (14, height as i32 - 16),
        ("sans-serif", 12).into_font().color(&BLACK),
    ))
    .ok()?;
        Some(())
    })
}
