//! The output folder: `density.json`, `isopleths.geojson`, the pictures,
//! the reference surface as a GeoTIFF and `index.html`.
//! `docs/density-schema.md` documents `density.json`.

pub mod geotiff;
pub mod plot;

use crate::OutputFolder;
use crate::document::FileDigest;
use crate::html::{escape, provenance_block};
use crate::numbers::sig;
use crate::page::page;
use crate::run::{RenderError, RunContext};
use maud::{PreEscaped, html};
use patternproof_density::{Analysis, HOTSPOT_OVERLAP, Surface, cautions};
use serde_json::{Value, json};

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
    /// SHA-256 of every input file, for the page's provenance (as the
    /// audit's page gives them); empty when the points were in memory.
    pub inputs: Vec<FileDigest>,
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
    let unit = info.unit.as_str();
    let mut warnings = info.warnings.clone();
    warnings.extend(a.warnings.iter().cloned());
    let body = html! {
        h1 { "Density audit: " (info.points_file) }
        p {
            (a.points.len()) " points used of " (info.n_read) " read; window: "
            (info.window_source) " (" (sig(info.window_area, 4)) " " (unit) "²); raster "
            (a.grid.nx) " × " (a.grid.ny) " cells of " (sig(a.grid.cell, 4)) " " (unit) "."
        }
        section id="density" {
            h2 { "Density" }
            p.verdict { (crate::page::prose(&a.verdict.sentence)) }
            h3 { "What a density surface shows, and what it does not" }
            ul {
                @for c in cautions() {
                    li.caution { (crate::page::prose(&c)) }
                }
            }
            @if !warnings.is_empty() {
                h3 { "Warnings" }
                ul {
                    @for w in &warnings {
                        li { (w) }
                    }
                }
            }
            h3 { "Bandwidths" }
            p {
                "Scott's rule: σ = sqrt((s" sub { "x" } "² + s" sub { "y" } "²)/2) = "
                (sig(a.scott.sigma, 4)) " " (unit) ", n = " (a.scott.n) ", h = σ·n" sup { "−1/6" }
                " = " (sig(a.scott.bandwidth, 4)) " " (unit)
                " (a Gaussian standard deviation; compact kernels get the radius with the same canonical smoothing, Marron & Nolan 1988)."
            }
            @if !a.lcv.is_empty() {
                p {
                    "Likelihood cross-validation over 41 bandwidths h" sub { "S" } "·2" sup { "k/8−3" }
                    ", k = 0…40:"
                }
                table {
                    tr { th { "kernel" } th { "chosen" } th { "method" } th { "at grid edge" } }
                    @for l in &a.lcv {
                        tr {
                            td { (l.kernel.name()) }
                            td.num { (sig(l.chosen, 4)) }
                            td { (l.method) }
                            td { (if l.at_grid_edge { "yes" } else { "no" }) }
                        }
                    }
                }
            }
            h3 { "Surfaces" }
            table {
                tr {
                    th { "kernel" } th { "bandwidth" } th { "h" } th { "σ-equivalent" } th { "edge" }
                    th { "mass outside" }
                    @for l in &a.config.levels {
                        @let p = sig(l * 100.0, 3);
                        th { (p) " % area (" (unit) "²)" }
                        th { (p) " % patches" }
                        th { (p) " % overlap" }
                    }
                    th { "hotspot overlap" }
                }
                @for s in &a.surfaces {
                    tr {
                        td { (s.kernel.name()) }
                        td { (s.spec.label()) }
                        td.num { (sig(s.bandwidth, 4)) }
                        td.num { (sig(s.gaussian_equivalent, 4)) }
                        td { (s.edge.name()) }
                        td.num { (s.estimate.mass_outside.map_or("—".to_string(), |m| sig(m, 3))) }
                        @for l in &s.levels {
                            td.num { (sig(l.region.area, 4)) }
                            td.num { (l.patches) }
                            td.num { (sig(l.overlap_with_reference, 3)) }
                        }
                        td.num { (sig(s.hotspot_overlap, 3)) }
                    }
                }
            }
            p {
                "Reference surface: " (a.reference.label())
                " (overlaps are Jaccard indices of the regions' cells with its regions; the main hotspot is the patch of the lowest level that holds the peak, and it stays in place when its overlap with the reference's is at least "
                (HOTSPOT_OVERLAP.to_string()) ")."
            }
            @for (title, svg, caption) in pictures {
                figure {
                    figcaption { strong { (title) } ": " (caption) }
                    (PreEscaped(strip_prolog(svg)))
                }
            }
            h3 { "Files" }
            ul {
                li { code { "density.json" } ": every number on this page (docs/density-schema.md)" }
                li { code { "isopleths.geojson" } ": isopleth polygons of every surface" }
                li { code { "reference.tif" } ": the reference surface, GeoTIFF, density per unit²" }
                li { code { "surfaces.svg" } ", " code { "areas.svg" } ": the pictures" }
            }
        }
        (provenance_block(&info.inputs, &run.command_line))
        p { "patternproof " (env!("CARGO_PKG_VERSION")) " · density schema " (SCHEMA) }
    };
    page("patternproof density", body)
}

/// What `density` prints: the verdict sentence, wrapped between words
/// to `width` columns (`None`: piped, 100 columns), with a newline. The
/// figures behind it are in `density.json` and `index.html`.
pub fn terminal_text(a: &Analysis, width: Option<u16>) -> String {
    let mut s = crate::terminal_layout::wrap(&a.verdict.sentence, width, "", "  ");
    s.push('\n');
    s
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
