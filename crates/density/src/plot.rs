//! Pictures: small multiples of the surfaces (kernel × bandwidth) with the
//! isopleth outlines, and the isopleth areas against bandwidth per kernel.
//!
//! Cells are coloured by their mass rank ([`crate::isopleth::mass_rank`]:
//! the share of the mass in cells at least as dense), on a viridis-like
//! ramp that runs from dark (the densest cells) to light and stays ordered
//! in grey print; cells past 99 % are left pale grey and cells outside the
//! window white. No point is drawn: the maps show where the surface is high,
//! not where the locations are.

use crate::isopleth::{mass_rank, outline};
use crate::{Analysis, Surface};
use patternproof_report::canvas;
use patternproof_report::html::escape;
use patternproof_report::numbers::sig;
use patternproof_report::palette::ink;
use plotters::prelude::*;
use std::fmt::Write as _;

/// Viridis anchors (van der Walt & Smith), dark to light.
const RAMP: [(u8, u8, u8); 9] = [
    (68, 1, 84),
    (71, 44, 122),
    (59, 81, 139),
    (44, 113, 142),
    (33, 144, 141),
    (39, 173, 129),
    (92, 200, 99),
    (170, 220, 50),
    (253, 231, 37),
];

/// Colour for `t` in [0, 1] (0 dark).
pub fn ramp(t: f64) -> (u8, u8, u8) {
    let t = t.clamp(0.0, 1.0) * (RAMP.len() - 1) as f64;
    let k = (t.floor() as usize).min(RAMP.len() - 2);
    let f = t - k as f64;
    let mix = |a: u8, b: u8| (a as f64 + (b as f64 - a as f64) * f).round() as u8;
    let (a, b) = (RAMP[k], RAMP[k + 1]);
    (mix(a.0, b.0), mix(a.1, b.1), mix(a.2, b.2))
}

fn base64(data: &[u8]) -> String {
    const T: &[u8; 64] = b"ABCDEFGHIJKLMNOPQRSTUVWXYZabcdefghijklmnopqrstuvwxyz0123456789+/";
    let mut s = String::with_capacity(data.len().div_ceil(3) * 4);
    for c in data.chunks(3) {
        let b = [c[0], *c.get(1).unwrap_or(&0), *c.get(2).unwrap_or(&0)];
        let n = (u32::from(b[0]) << 16) | (u32::from(b[1]) << 8) | u32::from(b[2]);
        for k in 0..4 {
            if k <= c.len() {
                s.push(T[((n >> (18 - 6 * k)) & 63) as usize] as char);
            } else {
                s.push('=');
            }
        }
    }
    s
}

/// The raster of one surface as a PNG (north up), coloured by mass rank.
pub fn surface_png(a: &Analysis, s: &Surface) -> Option<Vec<u8>> {
    let g = &a.grid;
    let rank = mass_rank(&s.estimate.values, &a.mask);
    let mut rgb = Vec::with_capacity(g.len() * 3);
    for j in (0..g.ny).rev() {
        for i in 0..g.nx {
            let k = j * g.nx + i;
            let c = if !a.mask[k] {
                (255, 255, 255)
            } else if rank[k] > 0.99 {
                (236, 236, 236)
            } else {
                ramp(rank[k])
            };
            rgb.extend([c.0, c.1, c.2]);
        }
    }
    let mut out = Vec::new();
    {
        let mut enc = png::Encoder::new(
            &mut out,
            u32::try_from(g.nx).ok()?,
            u32::try_from(g.ny).ok()?,
        );
        enc.set_color(png::ColorType::Rgb);
        enc.set_depth(png::BitDepth::Eight);
        let mut w = enc.write_header().ok()?;
        w.write_image_data(&rgb).ok()?;
    }
    Some(out)
}

/// SVG path data of a surface's outline at one level, in panel pixels.
fn outline_path(a: &Analysis, s: &Surface, level: usize, ox: f64, oy: f64, scale: f64) -> String {
    let g = &a.grid;
    let top = g.y0 + g.ny as f64 * g.cell;
    let mp = outline(g, &s.estimate.values, s.levels[level].region.threshold);
    let mut d = String::new();
    for poly in &mp.0 {
        for ring in std::iter::once(poly.exterior()).chain(poly.interiors()) {
            for (k, c) in ring.coords().enumerate() {
                let x = ox + (c.x - g.x0) / g.cell * scale;
                let y = oy + (top - c.y) / g.cell * scale;
                let _ = write!(d, "{}{:.1},{:.1}", if k == 0 { "M" } else { "L" }, x, y);
            }
            d.push('Z');
        }
    }
    d
}

/// Small multiples: one row per kernel, one column per bandwidth, for the
/// first edge handling, each panel with its isopleth outlines.
pub fn small_multiples_svg(a: &Analysis, unit: &str) -> String {
    let edge = a
        .config
        .edges
        .first()
        .copied()
        .unwrap_or(crate::edge::Edge::None);
    let kernels = &a.config.kernels;
    let specs = &a.config.bandwidths;
    let g = &a.grid;
    let panel = 200.0;
    let scale = panel / g.nx.max(g.ny) as f64;
    let (pw, ph) = (g.nx as f64 * scale, g.ny as f64 * scale);
    let (left, top, gap) = (110.0, 70.0, 14.0);
    let width = left + specs.len() as f64 * (pw + gap) + 10.0;
    let height = top + kernels.len() as f64 * (ph + gap + 16.0) + 60.0;
    let mut svg = String::new();
    let _ = write!(
        svg,
        r#"<svg xmlns="http://www.w3.org/2000/svg" width="{width:.0}" height="{height:.0}" viewBox="0 0 {width:.0} {height:.0}" font-family="sans-serif" font-size="12">"#
    );
    let _ = write!(
        svg,
        r#"<rect width="100%" height="100%" fill="white"/><text x="10" y="20" font-size="15">Density surfaces: kernel (rows) × bandwidth (columns), edge handling {}</text><text x="10" y="38">Colour: share of the mass in denser cells (dark = densest); outlines: isopleths {}; bandwidth in {}</text>"#,
        edge.name(),
        a.config
            .levels
            .iter()
            .map(|l| format!("{} %", sig(l * 100.0, 3)))
            .collect::<Vec<_>>()
            .join(", "),
        escape(unit)
    );
    for (c, spec) in specs.iter().enumerate() {
        let x = left + c as f64 * (pw + gap);
        let _ = write!(
            svg,
            r#"<text x="{x:.1}" y="60">{}</text>"#,
            escape(&spec.label())
        );
    }
    for (r, kernel) in kernels.iter().enumerate() {
        let y = top + r as f64 * (ph + gap + 16.0);
        let _ = write!(
            svg,
            r#"<text x="10" y="{:.1}">{}</text>"#,
            y + ph / 2.0,
            kernel.name()
        );
        for (c, spec) in specs.iter().enumerate() {
            let Some(s) = a
                .surfaces
                .iter()
                .find(|s| s.kernel == *kernel && s.spec == *spec && s.edge == edge)
            else {
                continue;
            };
            let x = left + c as f64 * (pw + gap);
            if let Some(png) = surface_png(a, s) {
                let _ = write!(
                    svg,
                    r#"<image x="{x:.1}" y="{y:.1}" width="{pw:.1}" height="{ph:.1}" preserveAspectRatio="none" style="image-rendering:pixelated" href="data:image/png;base64,{}"/>"#,
                    base64(&png)
                );
            }
            let _ = write!(
                svg,
                r##"<rect x="{x:.1}" y="{y:.1}" width="{pw:.1}" height="{ph:.1}" fill="none" stroke="#999"/>"##
            );
            for li in 0..s.levels.len() {
                let d = outline_path(a, s, li, x, y, scale);
                let dash = if li + 1 == s.levels.len() {
                    r#" stroke-dasharray="5,3""#
                } else {
                    ""
                };
                let _ = write!(
                    svg,
                    r#"<path d="{d}" fill="none" stroke="black" stroke-width="1.2"{dash}/>"#
                );
            }
            let _ = write!(
                svg,
                r#"<text x="{x:.1}" y="{:.1}" font-size="10">h = {} (σ-equiv. {})</text>"#,
                y + ph + 12.0,
                sig(s.bandwidth, 3),
                sig(s.gaussian_equivalent, 3)
            );
        }
    }
    let ly = height - 30.0;
    for k in 0..=10 {
        let t = k as f64 / 10.0;
        let (r, g2, b) = ramp(t);
        let _ = write!(
            svg,
            r#"<rect x="{:.1}" y="{ly:.1}" width="24" height="12" fill="rgb({r},{g2},{b})"/>"#,
            110.0 + k as f64 * 24.0
        );
    }
    let _ = write!(
        svg,
        r#"<text x="10" y="{:.1}">mass rank</text><text x="110" y="{:.1}">0 (densest)</text><text x="330" y="{:.1}">1</text><text x="380" y="{:.1}">solid: lowest level; dashed: highest level</text></svg>"#,
        ly + 10.0,
        ly + 26.0,
        ly + 26.0,
        ly + 10.0
    );
    svg.push('\n');
    svg
}

/// Isopleth area against the Gaussian-equivalent bandwidth, one line per
/// kernel (first edge handling), one panel per level stacked.
pub fn area_chart_svg(a: &Analysis, unit: &str) -> Option<String> {
    let edge = a.config.edges.first().copied()?;
    let levels = &a.config.levels;
    let pts: Vec<&Surface> = a.surfaces.iter().filter(|s| s.edge == edge).collect();
    let xs = pts.iter().map(|s| s.gaussian_equivalent);
    let (x_lo, x_hi) = xs.fold((f64::INFINITY, 0.0f64), |(l, h), x| (l.min(x), h.max(x)));
    if !(x_lo.is_finite() && x_lo > 0.0) {
        return None;
    }
    let (x_lo, x_hi) = (x_lo / 1.15, x_hi * 1.15);
    let height = 80 + 300 * levels.len() as u32;
    canvas::svg((820, height), |root| {
        let root = root
            .titled(
                &format!(
                    "Isopleth area against bandwidth, edge handling {}",
                    edge.name()
                ),
                ("sans-serif", 18),
            )
            .ok()?;
        let panels = root.split_evenly((levels.len().max(1), 1));
        for (li, area) in panels.iter().enumerate().take(levels.len()) {
            let ys: Vec<f64> = pts.iter().map(|s| s.levels[li].region.area).collect();
            let y_hi = ys.iter().copied().fold(0.0, f64::max) * 1.1;
            let mut chart = ChartBuilder::on(area)
                .margin(10)
                .margin_right(30)
                .x_label_area_size(40)
                .y_label_area_size(80)
                .caption(
                    format!("{} % isopleth", sig(levels[li] * 100.0, 3)),
                    ("sans-serif", 14),
                )
                .build_cartesian_2d((x_lo..x_hi).log_scale(), 0.0..y_hi.max(f64::MIN_POSITIVE))
                .ok()?;
            chart
                .configure_mesh()
                .disable_mesh()
                .x_desc(format!(
                    "Gaussian-equivalent bandwidth ({unit}, canonical scaling)"
                ))
                .y_desc(format!("area ({unit}²)"))
                .x_label_formatter(&|v| sig(*v, 3))
                .y_label_formatter(&|v| sig(*v, 3))
                .draw()
                .ok()?;
            for (k, kernel) in a.config.kernels.iter().enumerate() {
                let mut line: Vec<(f64, f64)> = pts
                    .iter()
                    .filter(|s| s.kernel == *kernel)
                    .map(|s| (s.gaussian_equivalent, s.levels[li].region.area))
                    .collect();
                line.sort_by(|p, q| p.0.total_cmp(&q.0));
                let i = ink(k);
                canvas::line(&mut chart, line.clone(), i, Some(kernel.name().into()))?;
                chart
                    .draw_series(
                        line.iter()
                            .map(|p| Circle::new(*p, 3, ShapeStyle::from(&i.colour).filled())),
                    )
                    .ok()?;
            }
            canvas::legend(&mut chart)
                .position(SeriesLabelPosition::UpperLeft)
                .draw()
                .ok()?;
        }
        Some(())
    })
}

#[cfg(test)]
mod tests {
    #[test]
    fn base64_known_values() {
        assert_eq!(super::base64(b"Man"), "TWFu");
        assert_eq!(super::base64(b"Ma"), "TWE=");
        assert_eq!(super::base64(b"M"), "TQ==");
    }
}
