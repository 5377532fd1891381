//! The verdict line: "consistent", "inconsistent: …" or "inconsistent as
//! printed; consistent only if …".
//!
//! `consistent` is about the plain reading alone (the uncorrected test,
//! every figure within its rounding, either tail):
//! * Nothing decided (every check `cannot tell`, or none possible):
//!   `consistent` is `null`.
//! * Every decided plain check ok: `true`, "consistent", or "consistent
//!   only if …" when the agreement needs a one-sided p or, with the points,
//!   an edge-corrected row.
//! * A plain check fails: `false`. When an edge-corrected reading fits
//!   (with the points, a matching row such as Donnelly on `bbox`; without
//!   them, Donnelly's correction for some window shape or a guard zone with
//!   some focal count) it goes to `consistent_if`, rated plausible or not,
//!   and the line reads "inconsistent as printed; consistent only if …".
//!   A free perimeter or focal count can "explain" almost any z that is too
//!   small, so such a reading never makes the figures consistent.
//! * Otherwise "inconsistent: …", with the slips that would fit.

use crate::Figures;
use crate::attribution::{Attribution, edge_words};
use crate::checks::Check;
use crate::explain::{Explanation, Kind};
use crate::plausible::Plausibility;
use serde::Serialize;

/// The verdict.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Verdict {
    /// `Some(true)` the plain reading fits (maybe only if `conditions`),
    /// `Some(false)` it does not, `None` nothing could be checked.
    pub consistent: Option<bool>,
    /// The line.
    pub line: String,
    /// What must hold, within the plain reading's agreement, for
    /// "consistent only if" (a one-sided p; with the points, the edge
    /// handling of the matching rows).
    pub conditions: Vec<String>,
    /// Edge-corrected readings under which figures that fail the plain
    /// reading would agree, each rated.
    pub consistent_if: Vec<Conditional>,
}

/// An edge-corrected reading that reproduces figures the plain reading
/// cannot.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Conditional {
    /// `donnelly`, `guard-zone`, or with the points the matching edge
    /// handling (`donnelly`, `border`, `toroidal`).
    pub reading: String,
    /// What the analysis must have done.
    pub condition: String,
    /// Whether a study could plausibly have done it, why, and what to ask.
    #[serde(flatten)]
    pub rating: Plausibility,
}

impl Conditional {
    fn phrase(&self) -> String {
        let word = if self.rating.plausible {
            "plausible"
        } else {
            "implausible"
        };
        format!("{} ({word})", self.condition)
    }
}

/// "inconsistent as printed; consistent only if A (plausible), or B
/// (implausible)", plausible readings first.
fn as_printed(mut readings: Vec<Conditional>) -> Verdict {
    readings.sort_by_key(|r| !r.rating.plausible);
    let line = format!(
        "inconsistent as printed; consistent only if {}",
        readings
            .iter()
            .map(Conditional::phrase)
            .collect::<Vec<_>>()
            .join(", or ")
    );
    Verdict {
        consistent: Some(false),
        line,
        conditions: Vec::new(),
        consistent_if: readings,
    }
}

/// With the points: the edge handlings whose rows reproduce the figures,
/// one reading each; the points make them concrete, so they are plausible.
fn match_readings(at: &Attribution) -> Vec<Conditional> {
    let mut by_edge: Vec<(String, Vec<String>)> = Vec::new();
    for m in &at.matches {
        match by_edge.iter_mut().find(|(e, _)| *e == m.edge) {
            Some((_, ws)) => ws.push(format!("`{}`", m.window)),
            None => by_edge.push((m.edge.clone(), vec![format!("`{}`", m.window)])),
        }
    }
    by_edge
        .into_iter()
        .map(|(e, ws)| Conditional {
            condition: format!("{} was used (it matches {})", edge_words(&e), ws.join(", ")),
            rating: Plausibility {
                plausible: true,
                why: format!(
                    "these points reproduce the figures with {} in {}",
                    edge_words(&e),
                    ws.join(", ")
                ),
                ask: format!(
                    "ask the authors to say that {} was used, and on which window",
                    edge_words(&e)
                ),
            },
            reading: e,
        })
        .collect()
}

const POINT_CHECKS: [&str; 2] = ["n from the points", "a window reproduces the figures"];

fn is_point_check(c: &Check) -> bool {
    POINT_CHECKS.contains(&c.name.as_str())
}

fn uniq(v: Vec<String>) -> Vec<String> {
    let mut out: Vec<String> = Vec::new();
    for s in v {
        if !out.contains(&s) {
            out.push(s);
        }
    }
    out
}

/// Conditions that a points match implies: an edge correction when no
/// uncorrected row matches.
fn match_conditions(at: &Attribution) -> Vec<String> {
    if at.matches.iter().any(|m| m.edge == "none") {
        return Vec::new();
    }
    let mut by_edge: Vec<(String, Vec<String>)> = Vec::new();
    for m in &at.matches {
        match by_edge.iter_mut().find(|(e, _)| *e == m.edge) {
            Some((_, ws)) => ws.push(format!("`{}`", m.window)),
            None => by_edge.push((m.edge.clone(), vec![format!("`{}`", m.window)])),
        }
    }
    let parts: Vec<String> = by_edge
        .into_iter()
        .map(|(e, ws)| format!("{} was used (it matches {})", edge_words(&e), ws.join(", ")))
        .collect();
    if parts.is_empty() {
        Vec::new()
    } else {
        vec![parts.join(", or ")]
    }
}

/// Decide.
pub fn verdict(
    f: &Figures,
    checks: &[Check],
    explanations: &[Explanation],
    points: Option<&Attribution>,
) -> Verdict {
    let decided = checks.iter().filter(|c| c.ok.is_some()).count();
    if decided == 0 {
        return Verdict {
            consistent: None,
            line: format!(
                "cannot tell: the figures given (n = {}{}) do not constrain one another; give at least two of R, z and p, or D with R, E or the area",
                f.n,
                f.figures
                    .iter()
                    .map(|r| format!(", {}", r.quoted()))
                    .collect::<String>()
            ),
            conditions: Vec::new(),
            consistent_if: Vec::new(),
        };
    }
    let failed_plain: Vec<&Check> = checks
        .iter()
        .filter(|c| c.ok == Some(false) && !is_point_check(c))
        .collect();
    let failed_points: Vec<&Check> = checks
        .iter()
        .filter(|c| c.ok == Some(false) && is_point_check(c))
        .collect();
    let check_conditions: Vec<String> = checks.iter().filter_map(|c| c.condition.clone()).collect();

    if let Some(at) = points {
        if !failed_points.is_empty() {
            let mut reasons: Vec<String> = failed_plain.iter().map(|c| c.short.clone()).collect();
            reasons.extend(failed_points.iter().map(|c| c.short.clone()));
            let lead = if failed_plain.is_empty() {
                "inconsistent with these points: the figures agree with each other, but"
            } else {
                "inconsistent:"
            };
            return Verdict {
                consistent: Some(false),
                line: format!("{lead} {}", uniq(reasons).join("; ")),
                conditions: Vec::new(),
                consistent_if: Vec::new(),
            };
        }
        // Some row matches: the figures are reproducible from the points.
        if !failed_plain.is_empty() && !at.matches.iter().any(|m| m.edge == "none") {
            return as_printed(match_readings(at));
        }
        let mut conditions = match_conditions(at);
        if failed_plain.is_empty() {
            conditions.extend(check_conditions);
        } else {
            // Cannot happen (a plain row obeys every plain relation), but
            // say so rather than hide it.
            conditions.push(
                "the rounding of the printed figures is looser than their decimals suggest".into(),
            );
        }
        if at.matches.iter().all(|m| {
            at.rows
                .iter()
                .find(|r| r.window == m.window && r.edge == m.edge)
                .is_some_and(|r| r.tail == Some(crate::model::Tail::OneSided))
        }) && f.has(crate::reported::Quantity::P)
            && !f.one_sided
        {
            conditions.push("the p-value is one-sided".into());
        }
        return conditional(uniq(conditions));
    }

    if failed_plain.is_empty() {
        return conditional(uniq(check_conditions));
    }
    let readings: Vec<Conditional> = explanations
        .iter()
        .filter(|e| e.kind == Kind::Reading && e.fits)
        .filter_map(|e| {
            Some(Conditional {
                reading: e.name.clone(),
                condition: e.condition.clone()?,
                rating: e.plausibility.clone()?,
            })
        })
        .collect();
    if !readings.is_empty() {
        return as_printed(readings);
    }
    let first = failed_plain
        .first()
        .map(|c| c.short.clone())
        .unwrap_or_default();
    let mut line = format!("inconsistent: {first}");
    let tried: Vec<&str> = explanations
        .iter()
        .filter(|e| e.kind == Kind::Reading)
        .map(|e| match e.name.as_str() {
            "donnelly" => "Donnelly's correction",
            "guard-zone" => "a guard zone",
            _ => "another reading",
        })
        .collect();
    match tried.as_slice() {
        [] => {}
        [one] => line.push_str(&format!("; {one} does not explain it")),
        many => line.push_str(&format!("; neither {} explains it", many.join(" nor "))),
    }
    let slips: Vec<String> = explanations
        .iter()
        .filter(|e| e.kind == Kind::Slip && e.fits)
        .map(slip_phrase)
        .collect();
    if !slips.is_empty() {
        line.push_str(&format!(
            "; the figures would agree {}",
            slips.join(", or ")
        ));
    }
    Verdict {
        consistent: Some(false),
        line,
        conditions: Vec::new(),
        consistent_if: Vec::new(),
    }
}

fn slip_phrase(e: &Explanation) -> String {
    let r = e.range.map(|r| r.describe()).unwrap_or_default();
    match e.name.as_str() {
        "other-n" => match e.range {
            Some(iv) if iv.low == iv.high => format!("with n = {}", iv.low),
            Some(iv) if e.detail.contains(" or more ") => {
                format!("with n of at least {}", iv.low)
            }
            Some(iv) => format!("with n between {} and {}", iv.low, iv.high),
            None => "with another n".into(),
        },
        "z-sign" => "with the sign of z flipped".into(),
        name => {
            let sym = name.trim_start_matches("without-");
            format!("with {sym} in {r}")
        }
    }
}

fn conditional(conditions: Vec<String>) -> Verdict {
    if conditions.is_empty() {
        Verdict {
            consistent: Some(true),
            line: "consistent".into(),
            conditions,
            consistent_if: Vec::new(),
        }
    } else {
        Verdict {
            consistent: Some(true),
            line: format!("consistent only if {}", conditions.join(" and ")),
            conditions,
            consistent_if: Vec::new(),
        }
    }
}
