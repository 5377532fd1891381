//! Recheck of a published nearest-neighbour result.
//!
//! A reader sees "clustered (R = 0.71, z = −4.9, p < 0.001, n = 64)" and
//! asks: do these figures agree with each other, what study area do they
//! imply, and, when the points are at hand, which window and edge handling
//! reproduce them? Every printed figure is taken as the interval its
//! decimals allow, and a check passes when some values inside all the
//! intervals satisfy it.
//!
//! | module | job |
//! |---|---|
//! | [`reported`] | a printed number (or bound) as an interval, keeping the text |
//! | [`interval`] | closed intervals and their monotone arithmetic |
//! | [`model`] | the relations under one reading: plain, Donnelly, guard zone; normal tails |
//! | [`propagate`](mod@propagate) | the tightest interval of every figure under one reading |
//! | [`checks`] | the named checks of the plain reading (z from R, p from z, area, …) |
//! | [`explain`] | other readings and likely slips, tried when a plain check fails |
//! | [`plausible`] | whether a fitting edge-corrected reading is one a study could have used |
//! | [`attribution`] | which window × edge handling of the audit reproduces the figures |
//! | [`verdict`] | "consistent", "inconsistent: …" or "consistent only if …" |
//!
//! `patternproof-report` renders a recheck (the terminal table).
//!
//! What a recheck shows: whether the printed figures can have come from
//! one nearest-neighbour test of the kinds listed in [`model`]. What it
//! does not show: that the analysis was right, that the study area was
//! well chosen, or (without the points) that the figures belong to the
//! data they are said to describe.

pub mod attribution;
pub mod checks;
pub mod explain;
pub mod interval;
pub mod model;
pub mod plausible;
pub mod propagate;
pub mod reported;
#[cfg(test)]
mod test_figures;
pub mod verdict;

use crate::attribution::{Attribution, Match};
use crate::checks::{Check, PTail};
use crate::explain::Explanation;
use crate::interval::Interval;
use crate::model::{Model, Tail};
use crate::propagate::{Domains, propagate};
use crate::reported::{Quantity, Reported};
use patternproof_audit::Audit;
use serde::Serialize;

/// The JSON schema name of [`Recheck`] (documented in `docs/recheck-schema.md`).
pub const SCHEMA: &str = "patternproof.recheck/2";

/// The reported figures of one result.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Figures {
    /// Number of points (exact).
    pub n: usize,
    /// Whether the p-value is declared one-sided (`--one-sided`).
    pub one_sided: bool,
    /// The printed figures, at most one per quantity, in table order.
    pub figures: Vec<Reported>,
}

impl Figures {
    /// n points, no figures yet.
    pub fn new(n: usize, one_sided: bool) -> Self {
        Self {
            n,
            one_sided,
            figures: Vec::new(),
        }
    }

    /// Add (or replace) a figure.
    pub fn with(mut self, r: Reported) -> Self {
        self.figures.retain(|f| f.quantity != r.quantity);
        self.figures.push(r);
        self.figures.sort_by_key(|f| f.quantity);
        self
    }

    /// The figure of one quantity, if reported.
    pub fn get(&self, q: Quantity) -> Option<&Reported> {
        self.figures.iter().find(|f| f.quantity == q)
    }

    /// Whether a quantity was reported.
    pub fn has(&self, q: Quantity) -> bool {
        self.get(q).is_some()
    }

    /// The reported quantities, in table order.
    pub fn given(&self) -> Vec<Quantity> {
        self.figures.iter().map(|f| f.quantity).collect()
    }

    /// The tails the p-value may be read as.
    pub fn tails(&self) -> Vec<Tail> {
        if self.one_sided {
            vec![Tail::OneSided]
        } else {
            vec![Tail::TwoSided, Tail::OneSided]
        }
    }

    /// Start domains holding only the figures in `only`.
    pub fn domains(&self, only: &[Quantity]) -> Option<Domains> {
        self.figures
            .iter()
            .filter(|f| only.contains(&f.quantity))
            .try_fold(Domains::default(), |d, f| {
                d.restrict(f.quantity, &f.interval)
            })
    }
}

/// The figures in `only` propagated under one reading, over every tail the
/// p-value may be read as.
#[derive(Debug, Clone, PartialEq)]
pub struct Joint {
    /// The hull over the tails that fit.
    pub domains: Domains,
    /// The tails that fit, in the order of [`Figures::tails`].
    pub tails: Vec<Tail>,
}

/// Propagate the figures in `only` (with `overrides` replacing reported
/// intervals) under `model`. `None` when no tail makes them agree.
pub fn joint_with(
    f: &Figures,
    model: &Model,
    only: &[Quantity],
    overrides: &[(Quantity, Interval)],
) -> Option<Joint> {
    let mut start = f.domains(
        &only
            .iter()
            .copied()
            .filter(|q| !overrides.iter().any(|o| o.0 == *q))
            .collect::<Vec<_>>(),
    )?;
    for (q, iv) in overrides {
        start = start.restrict(*q, iv)?;
    }
    let uses_p = only.contains(&Quantity::P);
    // Without p the tail narrows nothing but the implied p itself: take
    // the declared one (two-sided unless --one-sided).
    let tails: Vec<Tail> = if uses_p {
        f.tails()
    } else {
        f.tails().into_iter().take(1).collect()
    };
    let mut out: Option<Joint> = None;
    for t in tails {
        if let Some(d) = propagate(&start, model, t) {
            out = Some(match out {
                None => Joint {
                    domains: d,
                    tails: vec![t],
                },
                Some(mut j) => {
                    j.domains = j.domains.hull(&d);
                    j.tails.push(t);
                    j
                }
            });
        }
    }
    if !uses_p && let Some(j) = out.as_mut() {
        j.tails = f.tails();
    }
    out
}

/// [`joint_with`] without overrides.
pub fn joint(f: &Figures, model: &Model, only: &[Quantity]) -> Option<Joint> {
    joint_with(f, model, only, &[])
}

/// Everything a recheck found.
#[derive(Debug, Clone, Serialize)]
pub struct Recheck {
    /// [`SCHEMA`].
    pub schema: &'static str,
    /// Version of patternproof.
    pub tool_version: &'static str,
    /// `true`: the plain reading (the uncorrected test, every figure within
    /// its rounding, either tail) reproduces every figure, maybe only under
    /// `conditions`; `false`: it does not (see `consistent_if` for
    /// edge-corrected readings that would); `null`: nothing could be
    /// checked.
    pub consistent: Option<bool>,
    /// The verdict line.
    pub verdict: String,
    /// What must be true for the figures to agree under the plain reading
    /// (empty: nothing beyond the plain test).
    pub conditions: Vec<String>,
    /// Edge-corrected readings that would reproduce figures the plain
    /// reading cannot, each rated plausible or implausible.
    pub consistent_if: Vec<verdict::Conditional>,
    /// The figures as given.
    pub reported: Figures,
    /// The checks, in table order.
    pub checks: Vec<Check>,
    /// The tightest interval of every figure under the plain reading, all
    /// figures together; `null` when they contradict each other.
    pub implied: Option<Domains>,
    /// The study area the figures imply (plain reading), or `null` when
    /// they do not fix it (R, z and p alone never do: the area cancels).
    pub implied_area: Option<Interval>,
    /// Which tail the reported p matches.
    pub p_tail: Option<PTail>,
    /// Other readings and slips, tried when a plain check fails.
    pub explanations: Vec<Explanation>,
    /// The comparison with the audit of the points, when given.
    pub points: Option<Attribution>,
    /// The (window, edge) pairs that reproduce the figures (empty without points).
    pub matches: Vec<Match>,
}

/// Recheck `figures`; with `sweep` (an audit of the points, see
/// [`attribution::sweep_options`]) also attribute them to windows.
pub fn recheck(figures: &Figures, sweep: Option<(&Audit, &str)>) -> Recheck {
    let (mut checks, p_tail) = checks::plain_checks(figures);
    let all = figures.given();
    let plain = joint(figures, &Model::plain(figures.n), &all);
    let implied = plain.as_ref().map(|j| j.domains);
    let implied_area = implied_area(figures, implied.as_ref());
    let any_failed = checks.iter().any(|c| c.ok == Some(false));
    let explanations = if any_failed || plain.is_none() {
        explain::explain(figures)
    } else {
        Vec::new()
    };
    let target_ratio = implied
        .map(|d| d.ratio)
        .filter(Interval::is_bounded)
        .or_else(|| figures.get(Quantity::Ratio).map(|r| r.interval));
    let points =
        sweep.map(|(audit, unit)| attribution::attribute(figures, audit, target_ratio, unit));
    if let Some(at) = &points {
        checks.extend(attribution::checks(figures, at));
    }
    let v = verdict::verdict(figures, &checks, &explanations, points.as_ref());
    Recheck {
        schema: SCHEMA,
        tool_version: env!("CARGO_PKG_VERSION"),
        consistent: v.consistent,
        verdict: v.line,
        conditions: v.conditions,
        consistent_if: v.consistent_if,
        reported: figures.clone(),
        checks,
        implied,
        implied_area,
        p_tail,
        explanations,
        matches: points
            .as_ref()
            .map(|p| p.matches.clone())
            .unwrap_or_default(),
        points,
    }
}

fn implied_area(f: &Figures, implied: Option<&Domains>) -> Option<Interval> {
    let usable = |a: Interval| (a.is_bounded() && a.low > 0.0).then_some(a);
    if let Some(d) = implied {
        return usable(d.area);
    }
    // The figures disagree somewhere; the area still follows from D with
    // R or E when those agree among themselves.
    let only = [Quantity::MeanNn, Quantity::Ratio, Quantity::ExpectedNn];
    joint(f, &Model::plain(f.n), &only).and_then(|j| usable(j.domains.area))
}
