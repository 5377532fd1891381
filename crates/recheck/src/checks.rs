//! The named checks of the plain reading (no edge correction).
//!
//! Each check takes the figures on one side of a relation, propagates
//! them ([`crate::propagate`](mod@crate::propagate)) and compares what comes out with the figure
//! on the other side. A check is `ok` when the two intervals share a
//! value, `not ok` when they do not, and `cannot tell` when the figures
//! needed are missing.
//!
//! | check | relation | source |
//! |---|---|---|
//! | R from D and E | R = D/E | definition (Clark & Evans 1954) |
//! | E from A and n | E = 0.5·sqrt(A/n) | Clark & Evans (1954) |
//! | A from D and R | A = n·(2D/R)² | the two above combined |
//! | z from R and n | z = (R − 1)·sqrt(n)·0.5/0.26136 | Clark & Evans (1954) |
//! | p from z | p = 2·P(Z ≥ \|z\|) or P(Z ≥ \|z\|) | the normal tail |
//! | all figures together | every relation at once | — |

use crate::interval::Interval;
use crate::model::{Model, Tail};
use crate::reported::Quantity;
use crate::{Figures, joint};
use serde::{Serialize, Serializer};

/// The outcome of one check.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Check {
    /// What is checked, e.g. `z from R and n`.
    pub name: String,
    /// `true` ok, `false` not ok, `null` cannot tell.
    pub ok: Option<bool>,
    /// The reported figure being checked, as quoted (`z = -4.9`).
    pub reported: Option<String>,
    /// The interval the other figures give for it (for p: the tail the
    /// check is decided on, two-sided unless `--one-sided`).
    pub recomputed: Option<Interval>,
    /// The recomputed value(s) in words.
    pub recomputed_text: String,
    /// What was compared and what it shows.
    pub detail: String,
    /// A reading the check needs to pass (e.g. `the p-value is one-sided`).
    pub condition: Option<String>,
    /// The finding in a few words, for the verdict line.
    #[serde(skip)]
    pub short: String,
}

impl Check {
    /// The result column: `ok`, `not ok` or `cannot tell`.
    pub fn status(&self) -> &'static str {
        match self.ok {
            Some(true) => "ok",
            Some(false) => "not ok",
            None => "cannot tell",
        }
    }
}

/// Which tail the reported p-value matches.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum PTail {
    /// Only the two-sided tail.
    TwoSided,
    /// Only the one-sided tail.
    OneSided,
    /// Both (a loose bound such as p < 0.001 usually cannot tell).
    Either,
    /// Neither.
    Neither,
}

impl PTail {
    /// `two-sided`, `one-sided`, `either` or `neither`.
    pub fn as_str(self) -> &'static str {
        match self {
            PTail::TwoSided => "two-sided",
            PTail::OneSided => "one-sided",
            PTail::Either => "either",
            PTail::Neither => "neither",
        }
    }
}

impl Serialize for PTail {
    fn serialize<S: Serializer>(&self, s: S) -> Result<S::Ok, S::Error> {
        s.serialize_str(self.as_str())
    }
}

fn quoted(f: &Figures, q: Quantity) -> String {
    f.get(q)
        .map_or_else(|| q.symbol().to_string(), |r| r.quoted())
}

/// The reported figures among `qs`, quoted and joined: "R = 0.71 and n = 64".
fn quote_list(f: &Figures, qs: &[Quantity], with_n: bool) -> String {
    let mut parts: Vec<String> = qs
        .iter()
        .filter(|q| f.has(**q))
        .map(|q| quoted(f, *q))
        .collect();
    if with_n {
        parts.push(format!("n = {}", f.n));
    }
    match parts.len() {
        0 => String::new(),
        1 => parts.remove(0),
        _ => {
            let last = parts.pop().unwrap_or_default();
            format!("{} and {last}", parts.join(", "))
        }
    }
}

/// A check that compares reported `target` with the interval `rec` that
/// the figures `from` give.
fn compare(
    f: &Figures,
    name: &str,
    target: Quantity,
    rec: Interval,
    from: &[Quantity],
    with_n: bool,
    relation: &str,
) -> Check {
    let r = f.get(target);
    let reported = r.map(|r| r.quoted());
    let allowed = r.map(|r| r.interval).unwrap_or(target.domain());
    let ok = rec.overlaps(&allowed);
    let src = quote_list(f, from, with_n);
    let rq = reported.clone().unwrap_or_default();
    let detail = if ok {
        format!(
            "{relation} with {src} gives {} in {rec}, which the rounding range of {rq} ({allowed}) meets",
            target.symbol()
        )
    } else {
        format!(
            "{relation} with {src} gives {} in {rec}; {rq} allows only {allowed}",
            target.symbol()
        )
    };
    Check {
        name: name.to_string(),
        ok: Some(ok),
        reported,
        recomputed: Some(rec),
        recomputed_text: rec.describe(),
        detail,
        condition: None,
        short: format!(
            "{rq} does not follow from {src}, which give {} in {rec}",
            target.symbol()
        ),
    }
}

/// The checks of the plain reading, and which tail p matches.
pub fn plain_checks(f: &Figures) -> (Vec<Check>, Option<PTail>) {
    use Quantity::*;
    let plain = Model::plain(f.n);
    let mut out = Vec::new();
    let has = |q| f.has(q);

    if has(Ratio)
        && has(MeanNn)
        && has(ExpectedNn)
        && let Some(j) = joint(f, &plain, &[MeanNn, ExpectedNn])
    {
        out.push(compare(
            f,
            "R from D and E",
            Ratio,
            j.domains.ratio,
            &[MeanNn, ExpectedNn],
            false,
            "R = D/E",
        ));
    }
    if has(ExpectedNn)
        && has(Area)
        && let Some(j) = joint(f, &plain, &[Area])
    {
        out.push(compare(
            f,
            "E from A and n",
            ExpectedNn,
            j.domains.expected_nn,
            &[Area],
            true,
            "E = 0.5·sqrt(A/n)",
        ));
    }
    if has(Area)
        && has(MeanNn)
        && has(Ratio)
        && !has(ExpectedNn)
        && let Some(j) = joint(f, &plain, &[MeanNn, Ratio])
    {
        out.push(compare(
            f,
            "A from D and R",
            Area,
            j.domains.area,
            &[MeanNn, Ratio],
            true,
            "A = n·(2D/R)²",
        ));
    }
    if has(Z) {
        out.push(z_check(f, &plain));
    }
    let mut p_tail = None;
    if has(P) {
        let (c, t) = p_check(f, &plain);
        out.push(c);
        p_tail = t;
    }
    let decided = out.iter().filter(|c| c.ok.is_some()).count();
    if decided >= 2 && out.iter().all(|c| c.ok != Some(false)) {
        out.push(joint_check(f, &plain));
    }
    (out, p_tail)
}

/// Whether a z interval says anything about |z| (and so about p).
fn informative(z: &Interval) -> bool {
    let m = z.abs();
    m.low > 0.0 || m.high.is_finite()
}

/// Where R comes from, besides the reported R: D with E or with A.
const R_SOURCES: [Quantity; 4] = [
    Quantity::Ratio,
    Quantity::MeanNn,
    Quantity::ExpectedNn,
    Quantity::Area,
];

fn r_source(f: &Figures, plain: &Model) -> Option<(Interval, Vec<Quantity>)> {
    let src: Vec<Quantity> = R_SOURCES.into_iter().filter(|q| f.has(*q)).collect();
    let from = |qs: &[Quantity]| {
        joint(f, plain, qs)
            .map(|j| j.domains.ratio)
            .filter(|r| *r != Quantity::Ratio.domain())
    };
    if let Some(r) = from(&src) {
        return Some((r, src));
    }
    if f.has(Quantity::Ratio) {
        return from(&[Quantity::Ratio]).map(|r| (r, vec![Quantity::Ratio]));
    }
    None
}

fn z_check(f: &Figures, plain: &Model) -> Check {
    let name = "z from R and n";
    let Some((r, src)) = r_source(f, plain) else {
        return Check {
            name: name.into(),
            ok: None,
            reported: f.get(Quantity::Z).map(|r| r.quoted()),
            recomputed: None,
            recomputed_text: "—".into(),
            detail: "cannot tell: nothing fixes R; give R (or D with E or the area) to recompute z"
                .into(),
            condition: None,
            short: String::new(),
        };
    };
    let z = r.map_increasing(|x| plain.z_per_ratio * (x - 1.0));
    let rel = if src == [Quantity::Ratio] {
        "z = (R − 1)·sqrt(n)·0.5/0.26136".to_string()
    } else {
        format!("z = (R − 1)·sqrt(n)·0.5/0.26136 (R in {r} from them together)")
    };
    compare(f, name, Quantity::Z, z, &src, true, &rel)
}

fn p_check(f: &Figures, plain: &Model) -> (Check, Option<PTail>) {
    use Quantity::*;
    let p = f.get(P);
    let reported = p.map(|r| r.quoted());
    let p_iv = p.map_or(P.domain(), |r| r.interval);
    let pq = reported.clone().unwrap_or_default();
    let others: Vec<Quantity> = f.given().into_iter().filter(|q| *q != P).collect();
    // Where z comes from: all other figures together; when they disagree,
    // the reported z alone and R alone, each on its own.
    let mut sources: Vec<(String, Interval)> = Vec::new();
    if let Some(j) = joint(f, plain, &others)
        && informative(&j.domains.z)
    {
        let label = if f.has(Z) && others.len() == 1 {
            format!("the reported {}", quoted(f, Z))
        } else {
            format!("z in {} from the other figures together", j.domains.z)
        };
        sources.push((label, j.domains.z));
    } else {
        if f.has(Z)
            && let Some(j) = joint(f, plain, &[Z])
            && informative(&j.domains.z)
        {
            sources.push((format!("the reported {}", quoted(f, Z)), j.domains.z));
        }
        if let Some((r, _)) = r_source(f, plain) {
            let z = r.map_increasing(|x| plain.z_per_ratio * (x - 1.0));
            if informative(&z) {
                sources.push((format!("R in {r} (z in {z})"), z));
            }
        }
    }
    if sources.is_empty() {
        let c = Check {
            name: "p from z".into(),
            ok: None,
            reported,
            recomputed: None,
            recomputed_text: "—".into(),
            detail: "cannot tell: nothing fixes z; give z or R".into(),
            condition: None,
            short: String::new(),
        };
        return (c, None);
    }
    let mut texts = Vec::new();
    let mut rec_parts = Vec::new();
    let mut fits_two = false;
    let mut fits_one = false;
    let mut primary: Option<Interval> = None;
    for (label, z) in &sources {
        let m = z.abs();
        let two = m.map_decreasing(|x| Tail::TwoSided.p_of_magnitude(x));
        let one = m.map_decreasing(|x| Tail::OneSided.p_of_magnitude(x));
        let f2 = two.overlaps(&p_iv);
        let f1 = one.overlaps(&p_iv);
        fits_two |= f2;
        fits_one |= f1;
        if primary.is_none() {
            primary = Some(if f.one_sided { one } else { two });
        }
        let fit = match (f2, f1) {
            (true, true) => "both tails fit",
            (true, false) => "only the two-sided tail fits",
            (false, true) => "only the one-sided tail fits",
            (false, false) => "neither tail fits",
        };
        texts.push(format!("from {label}, {fit}"));
        let short_label = if label.starts_with("the reported") {
            "from z: "
        } else {
            "from R: "
        };
        let prefix = if sources.len() > 1 { short_label } else { "" };
        rec_parts.push(format!("{prefix}two-sided {two}, one-sided {one}"));
    }
    let (ok, condition, tail) = if f.one_sided {
        (
            fits_one,
            None,
            if fits_one {
                PTail::OneSided
            } else {
                PTail::Neither
            },
        )
    } else {
        let tail = match (fits_two, fits_one) {
            (true, true) => PTail::Either,
            (true, false) => PTail::TwoSided,
            (false, true) => PTail::OneSided,
            (false, false) => PTail::Neither,
        };
        let cond = (tail == PTail::OneSided).then(|| "the p-value is one-sided".to_string());
        (fits_two || fits_one, cond, tail)
    };
    let summary = match (tail, f.one_sided) {
        (PTail::Either, _) => format!(
            "{pq} matches both tails: it cannot tell whether the test was one- or two-sided"
        ),
        (PTail::TwoSided, _) => format!("{pq} matches the two-sided tail"),
        (PTail::OneSided, true) => format!("{pq} matches the one-sided tail, as declared"),
        (PTail::OneSided, false) => format!(
            "{pq} matches only the one-sided tail (half the two-sided value): the test must have been one-sided"
        ),
        (PTail::Neither, true) => format!("{pq} does not match the one-sided tail"),
        (PTail::Neither, false) => {
            format!("{pq} matches neither the two-sided nor the one-sided tail")
        }
    };
    let rec_text = rec_parts.join("; ");
    let c = Check {
        name: "p from z".into(),
        ok: Some(ok),
        reported,
        recomputed: primary,
        recomputed_text: rec_text,
        detail: format!("{summary}; {}", texts.join("; ")),
        condition,
        short: format!(
            "{pq} matches neither tail of the normal distribution for the z the other figures give"
        ),
    };
    (c, Some(tail))
}

fn joint_check(f: &Figures, plain: &Model) -> Check {
    let all = f.given();
    let j = joint(f, plain, &all);
    let list = quote_list(f, &all, true);
    match j {
        Some(j) => {
            let one_only = !f.one_sided && j.tails == [Tail::OneSided];
            Check {
                name: "all figures together".into(),
                ok: Some(true),
                reported: None,
                recomputed: None,
                recomputed_text: "—".into(),
                detail: format!("one set of values satisfies every relation at once for {list}"),
                condition: one_only.then(|| "the p-value is one-sided".to_string()),
                short: String::new(),
            }
        }
        None => Check {
            name: "all figures together".into(),
            ok: Some(false),
            reported: None,
            recomputed: None,
            recomputed_text: "—".into(),
            detail: format!(
                "each check above passes on its own, but no single set of values satisfies every relation at once for {list}"
            ),
            condition: None,
            short: "the figures agree pairwise but not all at once".into(),
        },
    }
}

#[cfg(test)]
mod tests {
    #![allow(clippy::unwrap_used)]
    use super::*;
    use crate::test_figures::figs;
    use approx::abs_diff_eq;

    /// z = (R − 1)·sqrt(n)·0.5/0.26136 (Clark & Evans 1954): R = 0.71,
    /// n = 64 gives z in [−4.515, −4.362], so z = −4.9 is not ok.
    #[test]
    fn issue_example_fails_z_and_passes_p() {
        let f = figs(
            64,
            &[
                (Quantity::Ratio, "0.71"),
                (Quantity::Z, "−4.9"),
                (Quantity::P, "<0.001"),
            ],
        );
        let (c, tail) = plain_checks(&f);
        let z = c.iter().find(|c| c.name == "z from R and n").unwrap();
        assert_eq!(z.ok, Some(false));
        let rec = z.recomputed.unwrap();
        assert!(
            abs_diff_eq!(rec.low, -4.5148, epsilon = 1e-3)
                && abs_diff_eq!(rec.high, -4.3618, epsilon = 1e-3),
            "{rec}"
        );
        let p = c.iter().find(|c| c.name == "p from z").unwrap();
        assert_eq!(p.ok, Some(true));
        assert_eq!(tail, Some(PTail::Either));
        assert!(!c.iter().any(|c| c.name == "all figures together"));
    }

    /// Normal tail (two-sided p at z = 1.96 is 0.049996; one-sided 0.024998,
    /// printed normal tables): p = 0.025 with z = -1.96 is one-sided only.
    #[test]
    fn one_sided_p_is_detected() {
        let f = figs(100, &[(Quantity::Z, "-1.96"), (Quantity::P, "0.025")]);
        let (c, tail) = plain_checks(&f);
        assert_eq!(tail, Some(PTail::OneSided));
        let p = c.iter().find(|c| c.name == "p from z").unwrap();
        assert_eq!(p.ok, Some(true));
        assert_eq!(p.condition.as_deref(), Some("the p-value is one-sided"));
        let f = figs(100, &[(Quantity::Z, "-1.96"), (Quantity::P, "0.050")]);
        assert_eq!(plain_checks(&f).1, Some(PTail::TwoSided));
        let f = figs(100, &[(Quantity::Z, "-1.96"), (Quantity::P, "0.10")]);
        assert_eq!(plain_checks(&f).1, Some(PTail::Neither));
    }

    /// A = n·(2D/R)² (Clark & Evans 1954 rearranged): n = 64, D = 4.5,
    /// R = 0.72 give A = 10 000.
    #[test]
    fn area_from_d_and_r() {
        let f = figs(
            64,
            &[
                (Quantity::MeanNn, "4.50"),
                (Quantity::Ratio, "0.720"),
                (Quantity::Area, "10000"),
            ],
        );
        let (c, _) = plain_checks(&f);
        let a = c.iter().find(|c| c.name == "A from D and R").unwrap();
        assert_eq!(a.ok, Some(true));
        let rec = a.recomputed.unwrap();
        assert!(
            rec.contains(10_000.0) && rec.low > 9_950.0 && rec.high < 10_050.0,
            "{rec}"
        );
        let f = figs(
            64,
            &[
                (Quantity::MeanNn, "4.50"),
                (Quantity::Ratio, "0.720"),
                (Quantity::Area, "12000"),
            ],
        );
        assert_eq!(plain_checks(&f).0[0].ok, Some(false));
    }
}
