//! Pictures: small multiples of the surfaces (kernel × bandwidth) with the
//! isopleth outlines, and the isopleth areas against bandwidth per kernel.
//!
//! Cells are coloured by their mass rank ([`patternproof_density::isopleth::mass_rank`]:
//! the share of the mass in cells at least as dense), on a viridis-like
//! ramp that runs from dark (the densest cells) to light and stays ordered
//! in grey print; cells past 99 % are left pale grey and cells outside the
//! window white. No point is drawn: the maps show where the surface is high,
//! not where the locations are.

use crate::canvas::{self, Entry, Mark, Shape, Swatch};
use crate::html::escape;
use crate::numbers::sig;
use crate::palette::ink;
use patternproof_density::isopleth::{mass_rank, outline};
use patternproof_density::verdict::area_words;
use patternproof_density::{Analysis, Surface};
use plotters::prelude::*;
use rayon::prelude::*;
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

/// Largest side, in pixels, of a panel's embedded raster. Panels are drawn
/// 200 pixels wide, so this keeps two pixels per drawn pixel; a finer
/// raster is shown by blocks of cells (1 000 × 1 000 cells made the 16
/// PNGs of a default run the slowest step, and the SVG tens of MB).
const MAX_PANEL_PIXELS: usize = 400;

/// The raster of one surface as a PNG (north up), coloured by mass rank.
/// A raster wider than `MAX_PANEL_PIXELS` is shown by square blocks of
/// cells, each with the colour of its densest window cell, so no hotspot
/// disappears; the isopleth outlines drawn over it are traced on the full
/// raster.
pub fn surface_png(a: &Analysis, s: &Surface) -> Option<Vec<u8>> {
    let g = &a.grid;
    let rank = mass_rank(&s.estimate.values, &a.mask);
    let step = g.nx.max(g.ny).div_ceil(MAX_PANEL_PIXELS).max(1);
    let (w, h) = (g.nx.div_ceil(step), g.ny.div_ceil(step));
    let mut rgb = Vec::with_capacity(w * h * 3);
    for jb in (0..h).rev() {
        for ib in 0..w {
            // Densest window cell of the block (lowest rank), if any.
            let mut best: Option<f64> = None;
            for j in jb * step..((jb + 1) * step).min(g.ny) {
                for i in ib * step..((ib + 1) * step).min(g.nx) {
                    let k = j * g.nx + i;
                    if a.mask[k] {
                        best = Some(best.map_or(rank[k], |b: f64| b.min(rank[k])));
                    }
                }
            }
            let c = match best {
                None => (255, 255, 255),
                Some(r) if r > 0.99 => (236, 236, 236),
                Some(r) => ramp(r),
            };
            rgb.extend([c.0, c.1, c.2]);
        }
    }
    let mut out = Vec::new();
    {
        let mut enc = png::Encoder::new(&mut out, u32::try_from(w).ok()?, u32::try_from(h).ok()?);
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
        .unwrap_or(patternproof_density::edge::DensityEdge::None);
    let kernels = &a.config.kernels;
    let specs = &a.config.bandwidths;
    let g = &a.grid;
    let panel = 200.0;
    let scale = panel / g.nx.max(g.ny) as f64;
    let (pw, ph) = (g.nx as f64 * scale, g.ny as f64 * scale);
    let (left, top, gap) = (110.0, 70.0, 14.0);
    let width = (left + specs.len() as f64 * (pw + gap) + 10.0)
        .max(340.0 + 150.0 * a.config.levels.len() as f64);
    let height = top + kernels.len() as f64 * (ph + gap + 16.0) + 56.0;
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
    // Panels are drawn in parallel (each one's PNG and outlines are the
    // slow part) and written in the sequential order, so the bytes do not
    // depend on the thread count.
    let rows: Vec<(usize, &patternproof_density::kernels::Kernel)> =
        kernels.iter().enumerate().collect();
    let drawn: Vec<String> = rows
        .par_iter()
        .map(|&(r, kernel)| {
            let mut row = String::new();
            let y = top + r as f64 * (ph + gap + 16.0);
            let _ = write!(
                row,
                r#"<text x="10" y="{:.1}">{}</text>"#,
                y + ph / 2.0,
                kernel.name()
            );
            let panels: Vec<String> = specs
                .par_iter()
                .enumerate()
                .map(|(c, spec)| {
                    let Some(s) = a
                        .surfaces
                        .iter()
                        .find(|s| s.kernel == *kernel && s.spec == *spec && s.edge == edge)
                    else {
                        return String::new();
                    };
                    let x = left + c as f64 * (pw + gap);
                    panel_svg(a, s, unit, x, y, pw, ph, scale)
                })
                .collect();
            row.extend(panels);
            row
        })
        .collect();
    svg.extend(drawn);
    // The legend, framed, in the band under the panels: the ramp, then one
    // stroke per isopleth level as the panels draw it.
    let ly = height - 44.0;
    let levels = &a.config.levels;
    let _ = write!(
        svg,
        r##"<rect x="4" y="{:.1}" width="{:.1}" height="40" fill="none" stroke="#555555"/>"##,
        ly - 8.0,
        width - 8.0
    );
    for k in 0..=10 {
        let t = k as f64 / 10.0;
        let (r, g2, b) = ramp(t);
        let _ = write!(
            svg,
            r#"<rect x="{:.1}" y="{ly:.1}" width="20" height="12" fill="rgb({r},{g2},{b})"/>"#,
            90.0 + k as f64 * 20.0
        );
    }
    let _ = write!(
        svg,
        r#"<text x="12" y="{:.1}">mass rank</text><text x="90" y="{:.1}">0 (densest)</text><text x="300" y="{:.1}" text-anchor="end">1</text>"#,
        ly + 10.0,
        ly + 26.0,
        ly + 26.0,
    );
    for (li, l) in levels.iter().enumerate() {
        let x = 330.0 + li as f64 * 150.0;
        let dash = if li + 1 == levels.len() && li > 0 {
            r#" stroke-dasharray="5,3""#
        } else {
            ""
        };
        let _ = write!(
            svg,
            r#"<path d="M{x:.1},{:.1}L{:.1},{:.1}" fill="none" stroke="black" stroke-width="1.2"{dash}/><text x="{:.1}" y="{:.1}">{} % isopleth</text>"#,
            ly + 6.0,
            x + 30.0,
            ly + 6.0,
            x + 36.0,
            ly + 10.0,
            sig(l * 100.0, 3)
        );
    }
    let _ = write!(svg, "</svg>");
    svg.push('\n');
    svg
}

/// One panel of the small multiples: the surface's raster, its frame, its
/// isopleth outlines and its bandwidth caption, at (x, y).
#[allow(clippy::too_many_arguments)] // a panel's place, size and scale
fn panel_svg(
    a: &Analysis,
    s: &Surface,
    unit: &str,
    x: f64,
    y: f64,
    pw: f64,
    ph: f64,
    scale: f64,
) -> String {
    let unit = escape(unit);
    let mut out = String::new();
    if let Some(png) = surface_png(a, s) {
        let _ = write!(
            out,
            r#"<image x="{x:.1}" y="{y:.1}" width="{pw:.1}" height="{ph:.1}" preserveAspectRatio="none" style="image-rendering:pixelated" href="data:image/png;base64,{}"/>"#,
            base64(&png)
        );
    }
    let _ = write!(
        out,
        r##"<rect x="{x:.1}" y="{y:.1}" width="{pw:.1}" height="{ph:.1}" fill="none" stroke="#999999"/>"##
    );
    for li in 0..s.levels.len() {
        let d = outline_path(a, s, li, x, y, scale);
        let dash = if li + 1 == s.levels.len() && li > 0 {
            r#" stroke-dasharray="5,3""#
        } else {
            ""
        };
        let _ = write!(
            out,
            r#"<path d="{d}" fill="none" stroke="black" stroke-width="1.2"{dash}/>"#
        );
    }
    let _ = write!(
        out,
        r#"<text x="{x:.1}" y="{:.1}" font-size="10">h = {} {unit} (σ-equiv. {} {unit})</text>"#,
        y + ph + 12.0,
        sig(s.bandwidth, 3),
        sig(s.gaussian_equivalent, 3)
    );
    out
}

/// The unit of a level's areas in `areas.svg` and the factor from unit²:
/// km² where the summary sentence says km² for that level (the rule of
/// [`area_words`], over every surface as the summary counts them).
fn area_unit(a: &Analysis, level: usize, unit: &str) -> (String, f64) {
    let areas = a.surfaces.iter().map(|s| s.levels[level].region.area);
    let (lo, hi) = areas.fold((f64::INFINITY, 0.0f64), |(l, h), x| (l.min(x), h.max(x)));
    let (_, _, words) = area_words(lo, hi, unit);
    if words == "km²" {
        (words, 1e-6)
    } else {
        (words, 1.0)
    }
}

/// Isopleth area against the Gaussian-equivalent bandwidth, one line per
/// kernel (first edge handling), one panel per level stacked, the legend
/// in a band under the panels.
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
    let dot = |k: usize| Mark {
        shape: Shape::Circle,
        colour: ink(k).colour,
        filled: true,
        size: 3,
    };
    let entries: Vec<Entry> = a
        .config
        .kernels
        .iter()
        .enumerate()
        .map(|(k, kernel)| Entry::new(Swatch::LineMark(ink(k), dot(k)), kernel.name()))
        .collect();
    let legend_h = canvas::legend_height(entries.len(), 3, canvas::LEGEND_FONT) + 10;
    let panels_h = 300 * levels.len() as u32;
    let height = 40 + panels_h + legend_h;
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
        let (body, legend) = root.split_vertically(panels_h);
        let panels = body.split_evenly((levels.len().max(1), 1));
        for (li, area) in panels.iter().enumerate().take(levels.len()) {
            let (area_unit, factor) = area_unit(a, li, unit);
            let ys: Vec<f64> = pts
                .iter()
                .map(|s| s.levels[li].region.area * factor)
                .collect();
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
                    "Gaussian-equivalent bandwidth ({unit}, canonical scaling; log scale)"
                ))
                .y_desc(format!("area ({area_unit})"))
                .x_label_formatter(&|v| sig(*v, 3))
                .y_label_formatter(&|v| sig(*v, 3))
                .draw()
                .ok()?;
            canvas::frame(&chart)?;
            for (k, kernel) in a.config.kernels.iter().enumerate() {
                let mut line: Vec<(f64, f64)> = pts
                    .iter()
                    .filter(|s| s.kernel == *kernel)
                    .map(|s| (s.gaussian_equivalent, s.levels[li].region.area * factor))
                    .collect();
                line.sort_by(|p, q| p.0.total_cmp(&q.0));
                canvas::line(&mut chart, line.clone(), ink(k))?;
                canvas::marks(chart.plotting_area(), dot(k), line)?;
            }
        }
        let legend = legend.margin(4, 6, 12, 12);
        canvas::legend_band(&legend, &entries, 3, canvas::LEGEND_FONT)
    })
}

#[cfg(test)]
#[allow(clippy::unwrap_used)] // a failed unwrap is a failed test
mod tests {
    use super::*;
    use approx::abs_diff_eq;
    use patternproof_density::bandwidth::BandwidthSpec;
    use patternproof_density::edge::DensityEdge;
    use patternproof_density::kernels::Kernel;
    use patternproof_density::{Config, analyse};

    /// A tight cluster in one corner of a 100 × 100 square and a sparse
    /// background, at cell side `cell`.
    fn analysis(cell: f64) -> Analysis {
        let mut pts = Vec::new();
        for k in 0..200 {
            let t = k as f64 * 0.618_034;
            pts.push([10.0 + (t * 7.3).sin() * 2.0, 12.0 + (t * 5.1).cos() * 2.0]);
            pts.push([(t * 97.0) % 100.0, (t * 61.0) % 100.0]);
        }
        let square = geo::MultiPolygon::new(vec![geo::Polygon::new(
            geo::LineString::from(vec![
                (0.0, 0.0),
                (100.0, 0.0),
                (100.0, 100.0),
                (0.0, 100.0),
                (0.0, 0.0),
            ]),
            vec![],
        )]);
        let config = Config {
            kernels: vec![Kernel::Gaussian],
            bandwidths: vec![BandwidthSpec::Fixed(3.0)],
            edges: vec![DensityEdge::None],
            levels: vec![0.5, 0.95],
            cell: Some(cell),
            reference: (
                Kernel::Gaussian,
                BandwidthSpec::Fixed(3.0),
                DensityEdge::None,
            ),
            unit: "m".into(),
        };
        analyse(&pts, &square, &config).unwrap()
    }

    fn decode(png_bytes: &[u8]) -> (u32, u32, Vec<u8>) {
        let mut reader = png::Decoder::new(std::io::Cursor::new(png_bytes))
            .read_info()
            .unwrap();
        let mut buf = vec![0; reader.output_buffer_size().unwrap()];
        let info = reader.next_frame(&mut buf).unwrap();
        buf.truncate(info.buffer_size());
        (info.width, info.height, buf)
    }

    /// Up to `MAX_PANEL_PIXELS` cells a side, one pixel per cell, north up,
    /// coloured by the cell's mass rank; a finer raster (500 cells) is
    /// shown by 2 × 2 blocks, and the block holding the densest cell keeps
    /// that cell's colour. Checked by decoding the PNG (the `png` crate).
    #[test]
    fn panels_keep_one_pixel_per_cell_or_the_densest_cell_of_each_block() {
        // 102 and 502 cells a side (the grid adds a cell around the square).
        for (cell, step) in [(1.0, 1usize), (0.2, 2)] {
            let a = analysis(cell);
            let s = &a.surfaces[0];
            let (w, h, rgb) = decode(&surface_png(&a, s).unwrap());
            let g = &a.grid;
            assert!(g.nx > 100 * step && g.nx <= 400 * step, "{}", g.nx);
            let side = g.nx.div_ceil(step);
            assert_eq!(
                (w as usize, h as usize),
                (side, g.ny.div_ceil(step)),
                "cell {cell}"
            );
            let rank = mass_rank(&s.estimate.values, &a.mask);
            let values = &s.estimate.values;
            let top = (0..values.len())
                .max_by(|x, y| values[*x].total_cmp(&values[*y]).then(y.cmp(x)))
                .unwrap();
            let (i, j) = (top % g.nx, top / g.nx);
            let (px, py) = (i / step, h as usize - 1 - j / step);
            let at = 3 * (py * side + px);
            let want = ramp(rank[top]);
            assert_eq!((rgb[at], rgb[at + 1], rgb[at + 2]), want, "cell {cell}");
            let c = g.centre(i, j);
            assert!(
                abs_diff_eq!(c[0], 10.0, epsilon = 3.0) && abs_diff_eq!(c[1], 12.0, epsilon = 3.0),
                "the peak lies in the cluster: {c:?}"
            );
        }
    }

    #[test]
    fn base64_known_values() {
        assert_eq!(super::base64(b"Man"), "TWFu");
        assert_eq!(super::base64(b"Ma"), "TWE=");
        assert_eq!(super::base64(b"M"), "TQ==");
    }
}
