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
///
/// ```
/// use patternproof::options::{Figures, Quantity, parse_figure};
/// use patternproof::recheck;
///
/// // Clark & Evans (1954): z = (R − 1)·sqrt(n)/(2·0.26136), so n = 64 and
/// // R = 0.71 (0.705 to 0.715 as printed) allow z from −4.51 to −4.36.
/// let printed = |z: &str| -> Result<Figures, Box<dyn std::error::Error>> {
///     Ok(Figures::new(64, false)
///         .with(parse_figure("0.71", Quantity::Ratio)?)
///         .with(parse_figure(z, Quantity::Z)?))
/// };
/// assert_eq!(recheck(&printed("-4.4")?, None)?.consistent, Some(true));
/// assert_eq!(recheck(&printed("-4.9")?, None)?.consistent, Some(false));
/// # Ok::<(), Box<dyn std::error::Error>>(())
/// ```
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
