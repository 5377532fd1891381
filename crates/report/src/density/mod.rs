//! The output folder: `density.json`, `isopleths.geojson`, the pictures,
//! the reference surface as a GeoTIFF and `index.html`.
//! `docs/density-schema.md` documents `density.json`.

pub mod geotiff;
pub mod plot;

use crate::OutputFolder;
use crate::html::escape;
use crate::numbers::sig;
use crate::run::{RenderError, RunContext};
use patternproof_density::{Analysis, Surface, cautions};
use serde_json::{Value, json};
use std::fmt::Write as _;

/// Schema identifier of `density.json`.
pub const SCHEMA: &str = "patternproof.density/1";

/// What the outputs say about the input (the run itself is in
/// [`RunContext`]).
#[derive(Debug, Clone, Default)]
pub struct RunInfo {
    /// The point file as given.
    pub points_file: String,
    /// Points read.
    pub n_read: usize,
    /// Coordinate system (`projected` / `lonlat`).
    pub coords: String,
    /// Projection applied to lon/lat input, in words.
    pub projection: Option<String>,
    /// Unit of the coordinates.
    pub unit: String,
    /// Where the window came from.
    pub window_source: String,
    /// Window area (unit²).
    pub window_area: f64,
    /// Warnings from loading.
    pub warnings: Vec<String>,
}

fn surface_json(s: &Surface, cell_area: f64) -> Value {
    json!({
        "kernel": s.kernel.name(),
        "bandwidth": s.bandwidth,
        "bandwidth_spec": s.spec.label(),
        "bandwidth_rule": s.rule,
        "bandwidth_meaning": s.kernel.bandwidth_meaning(),
        "gaussian_equivalent_bandwidth": s.gaussian_equivalent,
        "edge": s.edge.name(),
        "mass_inside": s.estimate.mass_inside,
        "mass_outside": s.estimate.mass_outside,
        "isopleths": s.levels.iter().map(|l| json!({
            "level": l.region.level * 100.0,
            "area": l.region.area,
            "patches": l.patches,
            "threshold": l.region.threshold,
        })).collect::<Vec<_>>(),
        "overlap_with_reference": s.levels.iter().map(|l| json!({
            "level": l.region.level * 100.0,
            "jaccard": l.overlap_with_reference,
        })).collect::<Vec<_>>(),
        "main_hotspot": {
            "peak": s.peak,
            "peak_density": s.estimate.values.iter().copied().fold(0.0, f64::max),
            "area": s.hotspot.iter().filter(|c| **c).count() as f64 * cell_area,
            "overlap_with_reference": s.hotspot_overlap,
        },
    })
}

/// The `density.json` document.
pub fn document(a: &Analysis, info: &RunInfo) -> Value {
    let cells_in = a.mask.iter().filter(|m| **m).count();
    let ca = a.grid.cell_area();
    let surfaces: Vec<Value> = a.surfaces.iter().map(|s| surface_json(s, ca)).collect();
    let reference = surface_json(&a.reference, ca);
    let mut warnings = info.warnings.clone();
    warnings.extend(a.warnings.iter().cloned());
    json!({
        "schema": SCHEMA,
        "tool_version": env!("CARGO_PKG_VERSION"),
        "input": {
            "points_file": info.points_file,
            "n_read": info.n_read,
            "n_used": a.points.len(),
            "outside_window": a.outside,
            "coords": info.coords,
            "projection": info.projection,
            "unit": info.unit,
        },
        "window": { "source": info.window_source, "area": info.window_area },
        "grid": {
            "x_west": a.grid.x0, "y_south": a.grid.y0, "cell": a.grid.cell,
            "columns": a.grid.nx, "rows": a.grid.ny, "cells_in_window": cells_in,
            "cell_rule": "a cell's centre inside the window puts it in",
        },
        "settings": {
            "kernels": a.config.kernels.iter().map(|k| k.name()).collect::<Vec<_>>(),
            "bandwidths": a.config.bandwidths.iter().map(|b| b.label()).collect::<Vec<_>>(),
            "edges": a.config.edges.iter().map(|e| e.name()).collect::<Vec<_>>(),
            "levels": a.config.levels.iter().map(|l| l * 100.0).collect::<Vec<_>>(),
            "reference": format!("{}:{}:{}", a.config.reference.0.name(), a.config.reference.1.label(), a.config.reference.2.name()),
            "patch_connectivity": 8,
            "hotspot_overlap_threshold": patternproof_density::HOTSPOT_OVERLAP,
        },
        "kernels": a.config.kernels.iter().map(|k| json!({
            "kernel": k.name(),
            "bandwidth_meaning": k.bandwidth_meaning(),
            "canonical_bandwidth": k.canonical(),
            "gaussian_equivalent_per_unit_bandwidth": k.gaussian_equivalent(1.0),
        })).collect::<Vec<_>>(),
        "bandwidth_selection": {
            "scott": {
                "definition": "h = sigma * n^(-1/6), sigma = sqrt((s_x^2 + s_y^2)/2), sample variances with denominator n - 1; a Gaussian standard deviation",
                "sd_x": a.scott.sd_x, "sd_y": a.scott.sd_y, "sigma": a.scott.sigma, "n": a.scott.n,
                "bandwidth": a.scott.bandwidth,
            },
            "lcv": a.lcv.iter().map(|l| json!({
                "kernel": l.kernel.name(),
                "method": l.method,
                "grid": "h_S * 2^(k/8 - 3), k = 0..40 (h_S = Scott's value for the kernel)",
                "bandwidths": l.grid,
                "scores": l.scores,
                "chosen": l.chosen,
                "at_grid_edge": l.at_grid_edge,
            })).collect::<Vec<_>>(),
        },
        "surfaces": surfaces,
        "reference": reference,
        "reference_index": a.reference_index,
        "verdict": a.verdict,
        "warnings": warnings,
        "cautions": cautions(),
    })
}

/// Isopleth polygons of every surface (and the reference), one feature per
/// surface and level. The coordinates are planar (the input's grid, or the
/// equal-area plane of lon/lat input), so a legacy `crs` member names that
/// plane: without one, RFC 7946 tells a GIS to read them as lon/lat.
pub fn isopleths_geojson(a: &Analysis, info: &RunInfo) -> Value {
    let decimals = coordinate_decimals(a.grid.cell);
    let round = |x: f64| match decimals {
        Some(k) => {
            let scale = 10f64.powi(k);
            (x * scale).round() / scale
        }
        None => x,
    };
    let mut features = Vec::new();
    let all = a
        .surfaces
        .iter()
        .map(|s| (s, false))
        .chain(std::iter::once((&a.reference, true)));
    for (s, is_ref) in all {
        for l in &s.levels {
            let mp = patternproof_density::isopleth::outline(
                &a.grid,
                &s.estimate.values,
                l.region.threshold,
            );
            let polys: Vec<Value> =
                mp.0.iter()
                    .map(|p| {
                        let rings: Vec<Value> = std::iter::once(p.exterior())
                            .chain(p.interiors())
                            .map(|r| {
                                Value::Array(
                                    r.coords()
                                        .map(|c| json!([round(c.x), round(c.y)]))
                                        .collect(),
                                )
                            })
                            .collect();
                        Value::Array(rings)
                    })
                    .collect();
            features.push(json!({
                "type": "Feature",
                "properties": {
                    "kernel": s.kernel.name(),
                    "bandwidth": s.bandwidth,
                    "bandwidth_spec": s.spec.label(),
                    "edge": s.edge.name(),
                    "level": l.region.level * 100.0,
                    "area_cells": l.region.area,
                    "patches": l.patches,
                    "reference": is_ref,
                },
                "geometry": { "type": "MultiPolygon", "coordinates": polys },
            }));
        }
    }
    let plane = match &info.projection {
        Some(p) => format!("{p}, unit {}", info.unit),
        None => format!(
            "planar coordinates of {}, unit {}",
            info.points_file, info.unit
        ),
    };
    json!({
        "type": "FeatureCollection",
        "crs": { "type": "name", "properties": { "name": plane } },
        "features": features,
    })
}

/// Decimals kept in isopleth coordinates: a thousandth of the unit (as
/// always), or a thousandth of a cell when cells are smaller than one unit
/// (data in km, a microscope field in m), so that outlines never collapse
/// onto a coarse rounding grid. `None`: cells too small for a fixed count
/// of decimals; keep every digit.
fn coordinate_decimals(cell: f64) -> Option<i32> {
    let k = (3 - cell.log10().floor() as i32).max(3);
    (k <= 15).then_some(k)
}

fn strip_prolog(svg: &str) -> &str {
    match svg.find("<svg") {
        Some(k) => &svg[k..],
        None => svg,
    }
}

/// The `index.html` page.
pub fn index_html(
    a: &Analysis,
    info: &RunInfo,
    run: &RunContext,
    pictures: &[(&str, &str, &str)],
) -> String {
    let unit = escape(&info.unit);
    let mut h = String::new();
    h.push_str("<!DOCTYPE html>\n<html lang=\"en\"><head><meta charset=\"utf-8\"/><title>patternproof density</title><style>");
    h.push_str("body{font-family:sans-serif;max-width:1100px;margin:2em auto;padding:0 1em;color:#111;line-height:1.45}h2{border-bottom:1px solid #999;margin-top:2em}.verdict{font-size:1.1em;font-weight:bold;padding:.6em;border-left:6px solid #0072b2;background:#f2f2f2}table{border-collapse:collapse;font-size:.85em}th,td{border:1px solid #bbb;padding:.2em .45em}td.num{text-align:right;font-variant-numeric:tabular-nums}th{background:#e8e8e8}figure svg{max-width:100%;height:auto;border:1px solid #ddd}.caution{color:#5a3a00}code,pre{font-family:monospace}pre{white-space:pre-wrap;word-break:break-all;background:#f2f2f2;padding:.5em}");
    h.push_str("</style></head><body>\n");
    let _ = writeln!(h, "<h1>Density audit: {}</h1>", escape(&info.points_file));
    let _ = writeln!(
        h,
        "<p>{} points used of {} read; window: {} ({} {unit}²); raster {} × {} cells of {} {unit}.</p>",
        a.points.len(),
        info.n_read,
        escape(&info.window_source),
        sig(info.window_area, 4),
        a.grid.nx,
        a.grid.ny,
        sig(a.grid.cell, 4)
    );
    h.push_str("<section id=\"density\"><h2>Density</h2>\n");
    let _ = writeln!(
        h,
        "<p class=\"verdict\">{}</p>",
        escape(&a.verdict.sentence)
    );
    h.push_str("<h3>What a density surface shows, and what it does not</h3><ul>");
    for c in cautions() {
        let _ = write!(h, "<li class=\"caution\">{}</li>", escape(&c));
    }
    h.push_str("</ul>\n");
    let mut warnings = info.warnings.clone();
    warnings.extend(a.warnings.iter().cloned());
    if !warnings.is_empty() {
        h.push_str("<h3>Warnings</h3><ul>");
        for w in &warnings {
            let _ = write!(h, "<li>{}</li>", escape(w));
        }
        h.push_str("</ul>\n");
    }
    h.push_str("<h3>Bandwidths</h3>\n");
    let _ = writeln!(
        h,
        "<p>Scott's rule: σ = sqrt((s<sub>x</sub>² + s<sub>y</sub>²)/2) = {} {unit}, n = {}, h = σ·n<sup>−1/6</sup> = {} {unit} (a Gaussian standard deviation; compact kernels get the radius with the same canonical smoothing, Marron &amp; Nolan 1988).</p>",
        sig(a.scott.sigma, 4),
        a.scott.n,
        sig(a.scott.bandwidth, 4)
    );
    if !a.lcv.is_empty() {
        h.push_str("<p>Likelihood cross-validation over 41 bandwidths h<sub>S</sub>·2<sup>k/8−3</sup>, k = 0…40:</p><table><tr><th>kernel</th><th>chosen</th><th>method</th><th>at grid edge</th></tr>");
        for l in &a.lcv {
            let _ = write!(
                h,
                "<tr><td>{}</td><td class=\"num\">{}</td><td>{}</td><td>{}</td></tr>",
                l.kernel.name(),
                sig(l.chosen, 4),
                l.method,
                if l.at_grid_edge { "yes" } else { "no" }
            );
        }
        h.push_str("</table>\n");
    }
    h.push_str("<h3>Surfaces</h3><table><tr><th>kernel</th><th>bandwidth</th><th>h</th><th>σ-equivalent</th><th>edge</th><th>mass outside</th>");
    for l in &a.config.levels {
        let p = sig(l * 100.0, 3);
        let _ = write!(
            h,
            "<th>{p} % area ({unit}²)</th><th>{p} % patches</th><th>{p} % overlap</th>"
        );
    }
    h.push_str("<th>hotspot overlap</th></tr>\n");
    for s in a.surfaces.iter() {
        let _ = write!(
            h,
            "<tr><td>{}</td><td>{}</td><td class=\"num\">{}</td><td class=\"num\">{}</td><td>{}</td><td class=\"num\">{}</td>",
            s.kernel.name(),
            escape(&s.spec.label()),
            sig(s.bandwidth, 4),
            sig(s.gaussian_equivalent, 4),
            s.edge.name(),
            s.estimate
                .mass_outside
                .map_or("—".to_string(), |m| sig(m, 3))
        );
        for l in &s.levels {
            let _ = write!(
                h,
                "<td class=\"num\">{}</td><td class=\"num\">{}</td><td class=\"num\">{}</td>",
                sig(l.region.area, 4),
                l.patches,
                sig(l.overlap_with_reference, 3)
            );
        }
        let _ = writeln!(
            h,
            "<td class=\"num\">{}</td></tr>",
            sig(s.hotspot_overlap, 3)
        );
    }
    h.push_str("</table>\n");
    let _ = writeln!(
        h,
        "<p>Reference surface: {} (overlaps are Jaccard indices of the regions' cells with its regions; the main hotspot is the patch of the lowest level that holds the peak, and it stays in place when its overlap with the reference's is at least {}).</p>",
        escape(&a.reference.label()),
        patternproof_density::HOTSPOT_OVERLAP
    );
    for (title, svg, caption) in pictures {
        let _ = writeln!(
            h,
            "<figure><figcaption><strong>{}</strong>: {}</figcaption>{}</figure>",
            escape(title),
            escape(caption),
            strip_prolog(svg)
        );
    }
    h.push_str("<h3>Files</h3><ul><li><code>density.json</code>: every number on this page (docs/density-schema.md)</li><li><code>isopleths.geojson</code>: isopleth polygons of every surface</li><li><code>reference.tif</code>: the reference surface, GeoTIFF, density per unit²</li><li><code>surfaces.svg</code>, <code>areas.svg</code>: the pictures</li></ul>\n");
    let _ = writeln!(
        h,
        "<h3>Command</h3><pre>{}</pre>",
        escape(&run.command_line)
    );
    h.push_str("</section></body></html>\n");
    h
}

/// Every output file.
pub fn folder(a: &Analysis, info: &RunInfo, run: &RunContext) -> Result<OutputFolder, RenderError> {
    let mut f = OutputFolder::default();
    let mut doc =
        serde_json::to_string_pretty(&document(a, info)).map_err(|source| RenderError::Json {
            file: "density.json",
            source,
        })?;
    doc.push('\n');
    f.add("density.json", doc.into_bytes());
    let mut gj =
        serde_json::to_string(&isopleths_geojson(a, info)).map_err(|source| RenderError::Json {
            file: "isopleths.geojson",
            source,
        })?;
    gj.push('\n');
    f.add("isopleths.geojson", gj.into_bytes());
    let citation = format!(
        "patternproof density: {} {} (kernel {}, bandwidth {} {}, edge {}); coordinates: {}",
        if info.coords == "lonlat" {
            "projected lon/lat"
        } else {
            "local planar grid"
        },
        escape(&info.unit),
        a.reference.kernel.name(),
        a.reference.bandwidth,
        info.unit,
        a.reference.edge.name(),
        info.projection
            .clone()
            .unwrap_or_else(|| format!("planar, unit {}", info.unit))
    );
    let tif = geotiff::encode(
        &a.grid,
        &a.reference.estimate.values,
        &a.mask,
        &info.unit,
        &citation,
    )?;
    f.add("reference.tif", tif);
    let multiples = plot::small_multiples_svg(a, &info.unit);
    let chart = plot::area_chart_svg(a, &info.unit);
    let mut pictures: Vec<(&str, &str, &str)> = vec![(
        "Surfaces",
        multiples.as_str(),
        "every kernel (rows) and bandwidth (columns) for the first edge handling, coloured by mass rank, with the isopleth outlines",
    )];
    if let Some(c) = &chart {
        pictures.push(("Isopleth area against bandwidth", c.as_str(), "area of each isopleth level against the Gaussian-equivalent bandwidth, one line per kernel"));
    }
    let html = index_html(a, info, run, &pictures);
    f.add("surfaces.svg", multiples.clone().into_bytes());
    if let Some(c) = chart {
        f.add("areas.svg", c.into_bytes());
    }
    f.add("index.html", html.into_bytes());
    Ok(f)
}

#[cfg(test)]
mod tests {
    use super::coordinate_decimals;

    /// Cells of a metre or more keep three decimals (the outputs of metre
    /// grids do not change); a 0.004 km cell keeps six, so an outline
    /// drawn in km is not rounded onto 1 m steps; 10⁻¹⁴ cells keep all.
    #[test]
    fn isopleth_coordinates_keep_a_thousandth_of_a_cell() {
        assert_eq!(coordinate_decimals(5.0), Some(3));
        assert_eq!(coordinate_decimals(250.0), Some(3));
        assert_eq!(coordinate_decimals(1.0), Some(3));
        assert_eq!(coordinate_decimals(0.004), Some(6));
        assert_eq!(coordinate_decimals(0.01), Some(5));
        assert_eq!(coordinate_decimals(1e-14), None);
    }
}
