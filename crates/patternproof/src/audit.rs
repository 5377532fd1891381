//! `audit`: one data set over every window × edge handling, with the
//! sensitivity curves and the report document.

use crate::document::AuditReport;
use crate::error::{Error, Refusal, sweep_refused};
use crate::input::Input;
use crate::progress::{Progress, stoppable, ticker};
use patternproof_audit::AuditOptions;
use patternproof_audit::sweep::{Frame, frame as build_frame, run_in};
use patternproof_audit::window::WindowOptions;
use patternproof_core::clark_evans::MIN_N_ANALYTIC;

/// Windows with an outline that a sweep builds, and so simulates in: the
/// bounding box, the hull, the concave hull, one buffered hull per buffer
/// and the boundaries. An upper bound: a window that cannot be drawn is
/// left out later.
pub fn outlined_windows(buffers: usize, boundaries: usize) -> usize {
    3 + buffers + boundaries
}

/// Build the windows of `options` around `input` once, for [`audit_in`]
/// and [`crate::ScalesJob::from_frame`] to share (`audit --scales`).
pub fn frame(input: &Input, options: &WindowOptions) -> Result<Frame, Error> {
    build_frame(&input.points, &input.boundaries, options)
        .map_err(|e| sweep_refused(&input.subject, e))
}

/// Sweep `input` over the windows and edge handlings of `options` and
/// assemble the report document (`report.json`, schema
/// `patternproof.audit/3`).
///
/// Refuses ([`Refusal::NoTestableWindow`]) when no row has a p-value,
/// and ([`Refusal::TooFewPoints`]) below two points.
pub fn audit(
    input: &Input,
    options: &AuditOptions,
    progress: &dyn Progress,
) -> Result<AuditReport, Error> {
    let alpha = options.alpha;
    if !(alpha > 0.0 && alpha < 1.0) {
        return Err(sweep_refused(
            &input.subject,
            patternproof_audit::AuditError::Alpha { alpha },
        ));
    }
    audit_in(input, &frame(input, &options.windows)?, options, progress)
}

/// [`audit`] in windows built beforehand with [`frame`] (from
/// `options.windows`).
pub fn audit_in(
    input: &Input,
    frame: &Frame,
    options: &AuditOptions,
    progress: &dyn Progress,
) -> Result<AuditReport, Error> {
    let windows = outlined_windows(options.windows.buffers.len(), input.boundaries.len());
    progress.start(
        options.sims.saturating_mul(windows) as u64,
        "simulating CSR",
    );
    let audit = stoppable(&input.subject, || run_in(frame, options, &ticker(progress)));
    progress.finish();
    let audit = audit?.map_err(|e| sweep_refused(&input.subject, e))?;
    if !audit.results.iter().any(|r| r.p.is_some()) {
        let hint = if !audit.windows.is_empty() && audit.n < MIN_N_ANALYTIC {
            "with so few points only the simulation test applies, and it needs an outline: give the surveyed outline with --boundary (and --sims above 0)"
        } else {
            "the points are identical or collinear, so no study area can be drawn from them; give the surveyed outline with --boundary or the study area with --area"
        };
        return Err(Error::refused(
            Refusal::NoTestableWindow,
            input.subject.clone(),
            format!("no window could be tested ({})", audit.why_untested()),
            hint,
        ));
    }
    let sensitivity = patternproof_audit::curves::sensitivity(&input.points, &audit);
    let buffers = options
        .windows
        .buffers
        .iter()
        .map(|b| b.describe())
        .collect::<Vec<_>>()
        .join(",");
    let mut report = AuditReport::new(
        audit,
        sensitivity,
        input.summary.clone(),
        buffers,
        options.windows.concavity,
    );
    report.provenance.inputs = input.digests.clone();
    Ok(report)
}
