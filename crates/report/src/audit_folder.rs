//! The whole folder of one audit (`audit`, and each site of `sites`),
//! rendered in memory first so that nothing is written unless
//! everything rendered.

use crate::document::AuditReport;
use crate::html::{self, Picture, Section};
use crate::outlines::Unproject;
use crate::run::{RenderError, RunContext, bytes};
use crate::{
    OutputFolder, markdown, outlines, sensitivity_plot, simulation_plot, table, window_map,
};
use patternproof_core::Xy;
use patternproof_gpkg::SpatialRef;
use patternproof_scales::ScalesRun;

/// The rendering switches shared by `audit` and the per-site folders of
/// `sites`.
#[derive(Debug, Clone, Default)]
pub struct RenderChoices {
    /// The window of the simulation picture (`--picture-window`); by
    /// default [`simulation_plot::default_window`].
    pub picture_window: Option<String>,
    /// Leave the map of points and windows out (`--no-map`).
    pub no_map: bool,
    /// The K audit of the same windows (`audit --scales`): its files join
    /// the folder and its section the page.
    pub scales: Option<ScalesRun>,
}

/// Where the audited points lie: the points in the measured plane, the
/// way back to lon/lat (for `windows.geojson`) when the input was
/// projected, and the plane's spatial reference (for `windows.gpkg`).
#[derive(Clone, Copy)]
pub struct Plane<'a> {
    /// The points, planar.
    pub points: &'a [Xy],
    /// Plane to lon/lat, for lon/lat input.
    pub unproject: Option<&'a (dyn Fn(f64, f64) -> Option<[f64; 2]> + Sync)>,
    /// The plane's spatial reference.
    pub srs: &'a SpatialRef,
}

/// Every file of an audit's folder: `report.json`, `verdict.csv`,
/// `verdict.md`, `windows.geojson`, the pictures, the K files when
/// `choices.scales` holds a run, `index.html` and `windows.gpkg`.
pub fn audit_folder(
    report: &AuditReport,
    plane: Plane<'_>,
    choices: &RenderChoices,
    run: &RunContext,
) -> Result<OutputFolder, RenderError> {
    let mut folder = OutputFolder::default();
    folder.add(
        "report.json",
        bytes("report.json", |b| report.write_json(b))?,
    );
    folder.add(
        "verdict.csv",
        bytes("verdict.csv", |b| table::write_csv(report, b))?,
    );
    folder.add(
        "verdict.md",
        bytes("verdict.md", |b| markdown::write_markdown(report, b))?,
    );
    let unproject: Option<Unproject<'_>> = plane.unproject.map(|f| f as Unproject<'_>);
    folder.add(
        "windows.geojson",
        bytes("windows.geojson", |b| {
            outlines::write_outlines(report, unproject, b)
        })?,
    );

    let mut pictures = Vec::new();
    if let Some(svg) = sensitivity_plot::sensitivity_svg(report) {
        pictures.push(Picture {
            title: "How R and z change with the study area".into(),
            caption: "Does the call survive every defensible window, and where does it flip? Lines: each analytic edge handling over windows of the hull's shape scaled up and down; markers: the verdict-table rows at the named windows; bars: the 95 % range of R under CSR in each exact window; solid verticals: the flip thresholds; shading: the call of the plain test (edge handling none) at each area.".into(),
            svg: svg.clone(),
        });
        folder.add("sensitivity.svg", svg.into_bytes());
    }
    let sim_window = match &choices.picture_window {
        Some(id) => {
            if !report.windows.iter().any(|w| &w.id == id) {
                return Err(RenderError::UnknownWindow {
                    id: id.clone(),
                    known: report.windows.iter().map(|w| w.id.clone()).collect(),
                });
            }
            Some(id.as_str())
        }
        None => simulation_plot::default_window(report),
    };
    if let Some(svg) = sim_window.and_then(|id| simulation_plot::simulation_svg(report, id)) {
        pictures.push(Picture {
            title: format!("The simulation test in `{}`", sim_window.unwrap_or_default()),
            caption: "Where does the observed mean nearest-neighbour distance fall among patterns of complete spatial randomness in this exact window? The rank p-value counts the simulated patterns at least as far out.".into(),
            svg: svg.clone(),
        });
        folder.add("simulation.svg", svg.into_bytes());
    } else if let Some(id) = &choices.picture_window {
        return Err(RenderError::NoSimulations { id: id.clone() });
    }
    if !choices.no_map
        && let Some(svg) = window_map::window_map_svg(report, plane.points)
    {
        pictures.push(Picture {
            title: "The windows".into(),
            caption: "Which study areas were compared? Every window outline over the points, labelled by id, with a scale bar.".into(),
            svg: svg.clone(),
        });
        folder.add("windows.svg", svg.into_bytes());
    }
    let mut sections = Vec::new();
    if let Some(k) = &choices.scales {
        crate::scales::add_files(&mut folder, k)?;
        let svg = crate::scales::plot::scales_svg(k);
        sections.push(Section {
            id: "scales".into(),
            title: "Ripley's K and L across the same windows".into(),
            html: crate::scales::text::html_section(k, svg.as_deref()),
        });
    }
    folder.add(
        "index.html",
        html::index_html(report, &pictures, &sections, &run.provenance()).into_bytes(),
    );
    // The outlines as a GeoPackage layer, so that the windows can be laid
    // over the map in a GIS.
    folder.add("windows.gpkg", windows_gpkg(report, plane.srs, run)?);
    Ok(folder)
}

/// `windows.gpkg`: the outlines in the plane the report measured them in.
/// `last_change` is fixed unless the run carries a stamp.
pub fn windows_gpkg(
    report: &AuditReport,
    srs: &SpatialRef,
    run: &RunContext,
) -> Result<Vec<u8>, RenderError> {
    Ok(crate::windows_gpkg::windows_gpkg(
        report,
        srs,
        &run.last_change(),
    )?)
}
