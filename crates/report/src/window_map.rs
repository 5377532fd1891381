//! `windows.svg`: the points and every window outline on one map, with a
//! scale bar in the data's unit and a legend naming the windows by id in
//! a band beside the map.

use crate::canvas::{self, Entry, Mark, Shape, Swatch};
use crate::document::AuditReport;
use crate::palette::ink;
use geo::{BoundingRect, LineString};
use patternproof_core::Xy;
use plotters::prelude::*;
use plotters::style::text_anchor::{HPos, Pos, VPos};

/// Point count up to which every point gets its own dot on the map.
pub const MAP_ALL_POINTS: usize = 20_000;

/// Render the map as an SVG string. `None` when nothing has an outline.
pub fn window_map_svg(report: &AuditReport, points: &[Xy]) -> Option<String> {
    let shapes: Vec<_> = report
        .windows
        .iter()
        .filter_map(|w| w.shape.as_ref().map(|s| (w.id.as_str(), s)))
        .collect();
    let mut lo = [f64::INFINITY; 2];
    let mut hi = [f64::NEG_INFINITY; 2];
    for (_, s) in &shapes {
        if let Some(r) = s.bounding_rect() {
            lo = [lo[0].min(r.min().x), lo[1].min(r.min().y)];
            hi = [hi[0].max(r.max().x), hi[1].max(r.max().y)];
        }
    }
    for p in points {
        lo = [lo[0].min(p[0]), lo[1].min(p[1])];
        hi = [hi[0].max(p[0]), hi[1].max(p[1])];
    }
    if !(hi[0] > lo[0] && hi[1] > lo[1]) {
        return None;
    }
    // Equal scale on both axes: pad the shorter extent.
    let (w, h) = (hi[0] - lo[0], hi[1] - lo[1]);
    let (px_w, px_h) = (900u32, 680u32);
    let span = (w / (px_w as f64 - 60.0)).max(h / (px_h as f64 - 120.0));
    let cx = (lo[0] + hi[0]) / 2.0;
    let cy = (lo[1] + hi[1]) / 2.0;
    let half_x = span * (px_w as f64 - 60.0) / 2.0 * 1.04;
    let half_y = span * (px_h as f64 - 120.0) / 2.0 * 1.04;
    let unit = &report.input.unit;
    // The legend gets a band of its own on the right, beside the map.
    let legend_px = 190u32;
    let dot = Mark {
        shape: Shape::Circle,
        colour: BLACK,
        filled: true,
        size: 2,
    };
    let mut entries = vec![Entry::new(Swatch::Mark(dot), "points")];
    entries.extend(
        shapes
            .iter()
            .enumerate()
            .map(|(k, (id, _))| Entry::new(Swatch::Line(ink(k)), id.to_string())),
    );
    canvas::svg((px_w + legend_px, px_h), |whole| {
        let (root, legend) = whole.split_horizontally(px_w);
        let mut chart = ChartBuilder::on(&root)
            .caption(
                format!(
                    "Windows of {} ({} points)",
                    canvas::plain(&report.input.points_file),
                    points.len()
                ),
                ("sans-serif", 18),
            )
            .margin(20)
            .build_cartesian_2d((cx - half_x)..(cx + half_x), (cy - half_y)..(cy + half_y))
            .ok()?;
        canvas::frame(&chart)?;
        // Above MAP_ALL_POINTS, one dot per 2 × 2 pixel block (the first
        // point in it, in file order): the dots are 4 pixels across, so the
        // map looks the same, and a million points no longer make a file of
        // about 90 MB (and its copy inside index.html).
        let mut taken = vec![false; (px_w as usize).div_ceil(2) * (px_h as usize).div_ceil(2)];
        let blocks_x = (px_w as usize).div_ceil(2);
        let thin = points.len() > MAP_ALL_POINTS;
        let shown = points.iter().filter(|p| {
            if !thin {
                return true;
            }
            let (x, y) = chart.backend_coord(&(p[0], p[1]));
            if x < 0 || y < 0 || x >= px_w as i32 || y >= px_h as i32 {
                return true;
            }
            let k = (y as usize / 2) * blocks_x + x as usize / 2;
            !std::mem::replace(&mut taken[k], true)
        });
        let dots: Vec<Circle<(f64, f64), i32>> = shown
            .map(|p| Circle::new((p[0], p[1]), 2, BLACK.filled()))
            .collect();
        chart.draw_series(dots).ok()?;
        for (k, (_, shape)) in shapes.iter().enumerate() {
            let rings: Vec<&LineString<f64>> = shape
                .iter()
                .flat_map(|p| std::iter::once(p.exterior()).chain(p.interiors()))
                .collect();
            for ring in rings {
                let coords: Vec<(f64, f64)> = ring.coords().map(|c| (c.x, c.y)).collect();
                canvas::line(&mut chart, coords, ink(k))?;
            }
        }
        // Label each outline at the vertex farthest in its own direction,
        // directions spread round the compass so labels rarely collide.
        let count = shapes.len().max(1) as f64;
        for (k, (id, shape)) in shapes.iter().enumerate() {
            let angle = std::f64::consts::FRAC_PI_2 + std::f64::consts::TAU * k as f64 / count;
            let (ux, uy) = (angle.cos(), angle.sin());
            let best = shape
                .iter()
                .flat_map(|p| p.exterior().coords())
                .max_by(|a, b| (a.x * ux + a.y * uy).total_cmp(&(b.x * ux + b.y * uy)));
            if let Some(v) = best {
                let offset = span * 6.0;
                let h = if ux < -0.3 {
                    HPos::Right
                } else if ux > 0.3 {
                    HPos::Left
                } else {
                    HPos::Center
                };
                let vpos = if uy > 0.3 {
                    VPos::Bottom
                } else if uy < -0.3 {
                    VPos::Top
                } else {
                    VPos::Center
                };
                let style = ("sans-serif", 13)
                    .into_font()
                    .color(&ink(k).colour)
                    .pos(Pos::new(h, vpos));
                chart
                    .draw_series(std::iter::once(Text::new(
                        id.to_string(),
                        (v.x + ux * offset, v.y + uy * offset),
                        style,
                    )))
                    .ok()?;
            }
        }
        // Scale bar: a round length near a fifth of the map width.
        let target = 2.0 * half_x / 5.0;
        let mag = 10f64.powf(target.log10().floor());
        let bar = [1.0, 2.0, 5.0]
            .iter()
            .map(|m| m * mag)
            .rfind(|b| *b <= target)
            .unwrap_or(mag);
        let x0 = cx - half_x * 0.95;
        let y0 = cy - half_y * 0.93;
        chart
            .draw_series(std::iter::once(PathElement::new(
                vec![(x0, y0), (x0 + bar, y0)],
                BLACK.stroke_width(3),
            )))
            .ok()?;
        chart
            .draw_series(std::iter::once(Text::new(
                format!("{} {unit}", crate::numbers::sig(bar, 3)),
                (x0, y0 - half_y * 0.015),
                ("sans-serif", 14),
            )))
            .ok()?;
        let legend = legend.margin(50, 10, 0, 10);
        canvas::legend_band(&legend, &entries, 1, canvas::LEGEND_FONT)
    })
}
