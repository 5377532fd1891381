//! `recheck`: are published figures consistent with each other, what
//! study area do they imply, and (given the points) which window
//! reproduces them.

use crate::error::{Error, Refusal, sweep_refused};
use crate::input::Input;
use patternproof_audit::run_audit;
use patternproof_core::clark_evans::MIN_N_ANALYTIC;
use patternproof_recheck::attribution::sweep_options;
use patternproof_recheck::reported::{Bound, Quantity};
use patternproof_recheck::{Figures, Recheck};

/// Check `figures`; with `points`, also sweep the windows (no
/// simulations) to find the ones that reproduce them.
pub fn recheck(figures: &Figures, points: Option<&Input>) -> Result<Recheck, Error> {
    let Some(input) = points else {
        return Ok(patternproof_recheck::recheck(figures, None));
    };
    let area = figures
        .get(Quantity::Area)
        .filter(|r| r.bound == Bound::Rounded)
        .map(|r| r.value);
    let audit = run_audit(
        &input.points,
        &input.boundaries,
        &sweep_options(area),
        &|| {},
    )
    .map_err(|e| sweep_refused(&input.subject, e))?;
    let n = input.points.len();
    let tested = audit.results.iter().any(|r| r.p.is_some());
    if n < MIN_N_ANALYTIC && !tested {
        // A boundary would not help here (and recheck runs no simulation
        // row): say what does.
        return Err(Error::refused(
            Refusal::TooFewPoints,
            input.subject.clone(),
            format!(
                "only {n} point(s): the sweep gives no closed-form row below {MIN_N_ANALYTIC} points (the normal approximation is not trusted there), so the points cannot show which window reproduces the figures"
            ),
            "leave out --points to check the figures alone",
        ));
    }
    if !tested {
        return Err(Error::refused(
            Refusal::NoTestableWindow,
            input.subject.clone(),
            format!("no window could be tested ({})", audit.why_untested()),
            "give the surveyed outline with --boundary, or leave out --points to check the figures alone",
        ));
    }
    Ok(patternproof_recheck::recheck(
        figures,
        Some((&audit, &input.summary.unit)),
    ))
}
