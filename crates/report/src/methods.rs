//! A methods paragraph ready to paste into a manuscript, written from the
//! same report as every table, so it cannot disagree with them.

use crate::document::AuditReport;
use crate::numbers::sig;

/// The paragraph, in plain prose.
pub fn methods_paragraph(r: &AuditReport) -> String {
    let u = &r.input.unit;
    let windows: Vec<String> = r
        .windows
        .iter()
        .map(|w| format!("`{}` ({} {u}²)", w.id, sig(w.area, 4)))
        .collect();
    let edges = r
        .settings
        .edges
        .iter()
        .map(|e| edge_coverage(r, e))
        .collect::<Vec<_>>()
        .join(", ");
    let mut s = format!(
        "We tested the {n} mapped points for departure from complete spatial randomness with the nearest-neighbour test of Clark & Evans (1954), two-sided at α = {alpha}.",
        n = r.input.n,
        alpha = r.alpha
    );
    if let Some(p) = &r.input.projection {
        s.push_str(&format!(
            " Lon/lat coordinates were projected to a {p} before any distance or area was computed."
        ));
    }
    if r.input.duplicates > 0 {
        s.push_str(&format!(
            " {} point(s) repeated an earlier location exactly and were {}.",
            r.input.duplicates,
            if r.input.duplicates_dropped {
                "removed"
            } else {
                "kept"
            }
        ));
    }
    s.push_str(&format!(
        " Because the expected nearest-neighbour distance depends on the study area, we repeated the test for every window we considered defensible: {}.",
        windows.join(", ")
    ));
    s.push_str(&format!(" Edge effects were handled as follows: {edges}."));
    if r.settings.edges.iter().any(|e| e == "donnelly") {
        s.push_str(" `donnelly` uses the perimeter-corrected moments of Donnelly (1978).");
    }
    if r.settings.edges.iter().any(|e| e == "border") {
        s.push_str(&format!(
            " `border` uses a guard zone of {} {u} (Diggle 2003).",
            sig(r.settings.guard, 4)
        ));
    }
    if r.settings.edges.iter().any(|e| e == "simulation") {
        s.push_str(&format!(
            " `simulation` is a Monte Carlo test with {} patterns of the same number of points placed uniformly in the exact window (seed {}), with a two-sided rank p-value (Besag & Diggle 1977).",
            r.settings.sims, r.settings.seed
        ));
    }
    s.push_str(&format!(
        " Across the {} choices the result was: {}.",
        r.summary.choices_examined, r.summary.verdict
    ));
    s.push_str(" Analyses were run with patternproof ");
    s.push_str(r.tool_version);
    s.push('.');
    s
}

/// An edge handling as the paragraph names it: alone when every window
/// has its row, otherwise with the windows it ran in and why not the
/// others (the torus needs a rectangle, so it runs in `bbox` only).
fn edge_coverage(r: &AuditReport, edge: &str) -> String {
    let mut ran: Vec<&str> = Vec::new();
    for row in r.results.iter().filter(|row| row.edge.as_str() == edge) {
        if !ran.contains(&row.window.as_str()) {
            ran.push(&row.window);
        }
    }
    let why = r
        .skipped
        .iter()
        .find(|k| k.edge.as_str() == edge)
        .map(|k| k.reason.as_str());
    match why {
        None => format!("`{edge}`"),
        Some(why) if ran.is_empty() => format!("`{edge}` (in no window: {why})"),
        Some(why) => format!(
            "`{edge}` (in {} only: {why})",
            ran.iter()
                .map(|w| format!("`{w}`"))
                .collect::<Vec<_>>()
                .join(", ")
        ),
    }
}
