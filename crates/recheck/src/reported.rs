//! A printed number as the interval its printed decimals allow.
//!
//! "0.71" stands for any value that rounds to 0.71 at two decimals, so
//! [0.705, 0.715] (round half to even or half up: the ends are the same;
//! the interval is taken closed, which can only make a check more lenient
//! by a measure-zero set). "1.2e-5" stands for [1.15e-5, 1.25e-5]. A bound
//! such as "< 0.001" or "p ≤ 0.05" stands for everything on that side of
//! the printed value. The text itself is kept, because "0.710" and "0.71"
//! are the same value but not the same claim.

use crate::interval::Interval;
use serde::Serialize;

/// Which figure a text is, for its label and its valid range.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, PartialOrd, Ord, Serialize)]
#[serde(rename_all = "snake_case")]
pub enum Quantity {
    /// The ratio R of the mean nearest-neighbour distance to its CSR expectation.
    Ratio,
    /// The standardised difference z.
    Z,
    /// The p-value.
    P,
    /// The mean nearest-neighbour distance D.
    MeanNn,
    /// The expected distance under CSR, E.
    ExpectedNn,
    /// The study area A.
    Area,
}

impl Quantity {
    /// Every figure, in table order.
    pub const ALL: [Quantity; 6] = [
        Quantity::Ratio,
        Quantity::Z,
        Quantity::P,
        Quantity::MeanNn,
        Quantity::ExpectedNn,
        Quantity::Area,
    ];

    /// The symbol used in tables: `R`, `z`, `p`, `D`, `E`, `A`.
    pub fn symbol(self) -> &'static str {
        match self {
            Quantity::Ratio => "R",
            Quantity::Z => "z",
            Quantity::P => "p",
            Quantity::MeanNn => "D",
            Quantity::ExpectedNn => "E",
            Quantity::Area => "A",
        }
    }

    /// The words for the figure.
    pub fn words(self) -> &'static str {
        match self {
            Quantity::Ratio => "the ratio R",
            Quantity::Z => "z",
            Quantity::P => "the p-value",
            Quantity::MeanNn => "the mean nearest-neighbour distance",
            Quantity::ExpectedNn => "the expected distance under CSR",
            Quantity::Area => "the study area",
        }
    }

    /// The command-line flag that carries it.
    pub fn flag(self) -> &'static str {
        match self {
            Quantity::Ratio => "--ratio",
            Quantity::Z => "--z",
            Quantity::P => "--p",
            Quantity::MeanNn => "--mean-nn",
            Quantity::ExpectedNn => "--expected-nn",
            Quantity::Area => "--area",
        }
    }

    /// The values the figure can take at all.
    pub fn domain(self) -> Interval {
        match self {
            Quantity::Z => Interval::everything(),
            Quantity::P => Interval::new(0.0, 1.0),
            _ => Interval::non_negative(),
        }
    }

    fn example(self) -> &'static str {
        match self {
            Quantity::Ratio => "--ratio 0.71",
            Quantity::Z => "--z -4.9",
            Quantity::P => "--p \"<0.001\" or --p 0.013",
            Quantity::MeanNn => "--mean-nn 4.45",
            Quantity::ExpectedNn => "--expected-nn 6.27",
            Quantity::Area => "--area 10000",
        }
    }
}

/// How the printed value relates to the true one.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum Bound {
    /// "0.71": the value rounds to this.
    Rounded,
    /// "< 0.001" or "≤ 0.001".
    Below,
    /// "> 0.05" or "≥ 0.05".
    Above,
}

/// One reported figure.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Reported {
    /// Which figure.
    pub quantity: Quantity,
    /// The text as given (trimmed).
    pub text: String,
    /// The printed value.
    pub value: f64,
    /// Rounded value or bound.
    pub bound: Bound,
    /// Decimals printed in the significand (for a rounded value).
    pub decimals: usize,
    /// Every value the text allows, within the figure's domain.
    pub interval: Interval,
}

impl Reported {
    /// `R = 0.71`, `p < 0.001`: the figure as a reader would quote it.
    pub fn quoted(&self) -> String {
        let sym = self.quantity.symbol();
        match self.bound {
            Bound::Rounded => format!("{sym} = {}", self.shown()),
            _ => format!("{sym} {}", self.shown()),
        }
    }

    /// The text without a label, e.g. `< 0.001` or `-4.9`.
    pub fn shown(&self) -> String {
        let t = strip_label(&normalise(&self.text), self.quantity);
        let t = t.trim().trim_start_matches('=').trim();
        let mut out = String::new();
        let mut chars = t.chars().peekable();
        // Put one space after a leading relation sign: "<0.001" → "< 0.001".
        while let Some(&c) = chars.peek() {
            if "<>=≤≥".contains(c) {
                out.push(c);
                chars.next();
            } else {
                break;
            }
        }
        let rest: String = chars.collect();
        if out.is_empty() {
            rest.trim().to_string()
        } else {
            format!("{out} {}", rest.trim())
        }
    }
}

/// Which sort of problem a [`Problem`] is.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash)]
pub enum ProblemKind {
    /// The text is not a number (nor a bound such as `< 0.001`).
    NotANumber,
    /// A value the quantity cannot take: R or a distance not positive, p
    /// outside 0..1, a bound below 0 or above 1.
    Impossible,
    /// A value beyond every study's figures, where floating point cannot
    /// recompute from it.
    OutOfRange,
    /// The point count is not a whole number.
    NotACount,
    /// The point count is below 2.
    TooFewPoints,
}

/// Why a text is not a usable figure, and what to do about it.
#[derive(Debug, Clone, PartialEq, Eq, thiserror::Error)]
#[error("{what}\n  what to do: {advice}")]
pub struct Problem {
    /// Which sort of problem this is.
    pub kind: ProblemKind,
    /// What is wrong.
    pub what: String,
    /// What to do.
    pub advice: String,
}

impl Problem {
    fn new(kind: ProblemKind, what: impl Into<String>, advice: impl Into<String>) -> Self {
        Self {
            kind,
            what: what.into(),
            advice: advice.into(),
        }
    }
}

fn normalise(text: &str) -> String {
    text.trim()
        .replace(['\u{2212}', '\u{2013}', '\u{2012}', '\u{2010}'], "-")
        .replace("<=", "≤")
        .replace(">=", "≥")
}

fn strip_label(text: &str, q: Quantity) -> String {
    let t = text.trim();
    let labels: &[&str] = match q {
        Quantity::Ratio => &["R", "r"],
        Quantity::Z => &["z", "Z"],
        Quantity::P => &["p", "P"],
        Quantity::MeanNn => &["D", "d"],
        Quantity::ExpectedNn => &["E", "e"],
        Quantity::Area => &["A", "a"],
    };
    for l in labels {
        if let Some(rest) = t.strip_prefix(l) {
            let r = rest.trim_start();
            if r.starts_with(['=', '<', '>', '≤', '≥']) {
                return r.to_string();
            }
        }
    }
    t.to_string()
}

/// Parse a printed figure.
///
/// ```
/// use patternproof_recheck::reported::{parse, Quantity, Bound};
/// let r = parse("0.71", Quantity::Ratio).unwrap();
/// assert!((r.interval.low - 0.705).abs() < 1e-12 && (r.interval.high - 0.715).abs() < 1e-12);
/// let p = parse("p < 0.001", Quantity::P).unwrap();
/// assert_eq!(p.bound, Bound::Below);
/// assert_eq!((p.interval.low, p.interval.high), (0.0, 0.001));
/// let z = parse("\u{2212}4.9", Quantity::Z).unwrap();
/// assert!((z.interval.low + 4.95).abs() < 1e-12);
/// ```
pub fn parse(text: &str, q: Quantity) -> Result<Reported, Problem> {
    let advice_format = format!(
        "give the number as printed, with all its decimals, e.g. {}",
        q.example()
    );
    let norm = normalise(text);
    let body = strip_label(&norm, q);
    let mut s = body.trim();
    let mut bound = Bound::Rounded;
    if let Some(rest) = s.strip_prefix('=') {
        s = rest.trim_start();
    } else if let Some(rest) = s.strip_prefix('<').or_else(|| s.strip_prefix('≤')) {
        bound = Bound::Below;
        s = rest.trim_start();
    } else if let Some(rest) = s.strip_prefix('>').or_else(|| s.strip_prefix('≥')) {
        bound = Bound::Above;
        s = rest.trim_start();
    }
    let Some((value, decimals, exponent)) = parse_decimal(s) else {
        return Err(Problem::new(
            ProblemKind::NotANumber,
            format!("`{}` is not a number", text.trim()),
            advice_format,
        ));
    };
    let half =
        0.5 * 10f64.powi(exponent.saturating_sub(i32::try_from(decimals).unwrap_or(i32::MAX)));
    let raw = match bound {
        Bound::Rounded => Interval::new(value - half, value + half),
        Bound::Below => Interval::new(f64::NEG_INFINITY, value),
        Bound::Above => Interval::new(value, f64::INFINITY),
    };
    validate(q, value, bound, text.trim())?;
    let interval = raw.intersect(&q.domain()).ok_or_else(|| {
        Problem::new(
            ProblemKind::Impossible,
            format!("{} cannot take this value", q.words()),
            advice_format.clone(),
        )
    })?;
    Ok(Reported {
        quantity: q,
        text: text.trim().to_string(),
        value,
        bound,
        decimals,
        interval,
    })
}

fn validate(q: Quantity, v: f64, bound: Bound, text: &str) -> Result<(), Problem> {
    let bad = |what: &str, advice: &str| Err(Problem::new(ProblemKind::Impossible, what, advice));
    match q {
        Quantity::Ratio if v <= 0.0 => bad(
            "the ratio must be positive (it is a mean distance divided by its expectation)",
            "give R as printed, e.g. --ratio 0.71; if the paper prints R ≤ 0 the figure is a misprint and cannot be checked",
        ),
        Quantity::P if !(0.0..=1.0).contains(&v) => bad(
            "a p-value lies between 0 and 1",
            "give p as printed, e.g. --p 0.013 or --p \"<0.001\"",
        ),
        Quantity::P if v == 0.0 && bound == Bound::Below => bad(
            "no p-value is below 0",
            "give the bound as printed, e.g. --p \"<0.001\"",
        ),
        Quantity::P if v == 1.0 && bound == Bound::Above => bad(
            "no p-value is above 1",
            "give the bound as printed, e.g. --p \">0.05\"",
        ),
        Quantity::MeanNn | Quantity::ExpectedNn if v <= 0.0 => bad(
            "a distance must be positive",
            "give the distance as printed, in the data's unit, e.g. --mean-nn 4.45",
        ),
        Quantity::Area if v <= 0.0 => bad(
            "the area must be positive (in the unit squared)",
            "give the study area as printed, e.g. --area 10000",
        ),
        _ if !(min_figure(q)..=max_figure(q)).contains(&v.abs()) && v != 0.0 => Err(Problem::new(
            ProblemKind::OutOfRange,
            format!(
                "{} of {text} is out of range: it must lie {}, where every study's figure lies (beyond, floating point cannot recompute from it)",
                q.words(),
                if min_figure(q) > 0.0 {
                    format!("between {:e} and {:e}", min_figure(q), max_figure(q))
                } else {
                    format!("within ±{:e}", max_figure(q))
                }
            ),
            format!(
                "check the number and its unit: it is a misprint or a slip of the exponent; give it as printed, e.g. {}",
                q.example()
            ),
        )),
        _ => Ok(()),
    }
}

/// The smallest |figure| other than 0 that can be rechecked: 10⁻¹² for
/// distances (the smallest spread the readers accept) and its square for
/// areas; below them areas and intensities leave floating point. R, z and
/// p have no lower limit (p < 10⁻³⁰ is printed by large studies).
fn min_figure(q: Quantity) -> f64 {
    match q {
        Quantity::MeanNn | Quantity::ExpectedNn => 1e-12,
        Quantity::Area => 1e-24,
        Quantity::Ratio | Quantity::Z | Quantity::P => 0.0,
    }
}

/// The largest |figure| that can be rechecked: 10¹³ for distances (the
/// largest coordinate the readers accept, farther than any map position
/// in any unit), its square for areas, and 10¹⁵ for R and z (beyond any
/// test of up to 10¹⁵ points). Beyond them squares and products overflow.
fn max_figure(q: Quantity) -> f64 {
    match q {
        Quantity::MeanNn | Quantity::ExpectedNn => 1e13,
        Quantity::Area => 1e26,
        Quantity::Ratio | Quantity::Z | Quantity::P => 1e15,
    }
}

/// `-4.90`, `1.2e-5`, `0,71` → (value, decimals in the significand, exponent).
fn parse_decimal(s: &str) -> Option<(f64, usize, i32)> {
    let s = s.trim().replace(',', ".");
    let (mantissa, exponent) = match s.find(['e', 'E']) {
        Some(i) => (&s[..i], s[i + 1..].parse::<i32>().ok()?),
        None => (s.as_str(), 0),
    };
    let digits = mantissa.trim_start_matches(['+', '-']);
    if digits.is_empty() || !digits.chars().all(|c| c.is_ascii_digit() || c == '.') {
        return None;
    }
    if digits.matches('.').count() > 1 || !digits.chars().any(|c| c.is_ascii_digit()) {
        return None;
    }
    let decimals = digits.find('.').map_or(0, |i| digits.len() - i - 1);
    let m: f64 = mantissa.parse().ok()?;
    let value = m * 10f64.powi(exponent);
    value.is_finite().then_some((value, decimals, exponent))
}

/// Parse the point count n: a whole number, at least 2.
pub fn parse_count(text: &str) -> Result<usize, Problem> {
    let t = text.trim();
    let t = t
        .strip_prefix('n')
        .or_else(|| t.strip_prefix('N'))
        .map_or(t, |r| r.trim_start().trim_start_matches('=').trim());
    match t.parse::<usize>() {
        Ok(n) if n >= 2 => Ok(n),
        Ok(_) => Err(Problem::new(
            ProblemKind::TooFewPoints,
            "n must be at least 2: a nearest-neighbour distance needs two points",
            "give the number of points the analysis used, e.g. --n 64",
        )),
        Err(_) => Err(Problem::new(
            ProblemKind::NotACount,
            format!("`{t}` is not a whole number of points"),
            "give the number of points the analysis used, e.g. --n 64",
        )),
    }
}

#[cfg(test)]
mod tests {
    #![allow(clippy::unwrap_used)]
    use super::*;

    fn close(a: f64, b: f64) -> bool {
        approx::relative_eq!(a, b, epsilon = 1e-12, max_relative = 1e-12)
    }

    /// Rounding to d decimals: the value lies within half a unit of the
    /// last printed digit (common practice).
    #[test]
    fn rounding_intervals() {
        let r = parse("0.71", Quantity::Ratio).unwrap();
        assert!(close(r.interval.low, 0.705) && close(r.interval.high, 0.715));
        let r = parse("0.710", Quantity::Ratio).unwrap();
        assert!(close(r.interval.low, 0.7095) && close(r.interval.high, 0.7105));
        let z = parse("-4.9", Quantity::Z).unwrap();
        assert!(close(z.interval.low, -4.95) && close(z.interval.high, -4.85));
        let p = parse("1.2e-5", Quantity::P).unwrap();
        assert!(close(p.interval.low, 1.15e-5) && close(p.interval.high, 1.25e-5));
        let a = parse("12500", Quantity::Area).unwrap();
        assert!(close(a.interval.low, 12_499.5) && close(a.interval.high, 12_500.5));
        let r = parse("R = 0,71", Quantity::Ratio).unwrap();
        assert!(close(r.value, 0.71));
    }

    #[test]
    fn bounds_and_labels() {
        for t in [
            "<0.001",
            "< 0.001",
            "p < 0.001",
            "p<0.001",
            "≤ 0.001",
            "p <= 0.001",
        ] {
            let p = parse(t, Quantity::P).unwrap();
            assert_eq!(p.bound, Bound::Below, "{t}");
            assert_eq!(p.interval, Interval::new(0.0, 0.001), "{t}");
            assert_eq!(p.shown().replace('≤', "<"), "< 0.001", "{t}");
        }
        let p = parse("> 0.05", Quantity::P).unwrap();
        assert_eq!(p.interval, Interval::new(0.05, 1.0));
        // A p printed as 1.00 cannot exceed 1.
        let p = parse("1.00", Quantity::P).unwrap();
        assert!(close(p.interval.low, 0.995) && p.interval.high == 1.0);
        assert_eq!(
            parse("\u{2212}4.9", Quantity::Z).unwrap().quoted(),
            "z = -4.9"
        );
    }

    #[test]
    fn impossible_values_are_refused() {
        let kind = |text: &str, q: Quantity| parse(text, q).map(|_| ()).map_err(|e| e.kind);
        for (text, q) in [
            ("-0.3", Quantity::Ratio),
            ("0", Quantity::Ratio),
            ("1.2", Quantity::P),
            ("-0.01", Quantity::P),
            ("< 0", Quantity::P),
            ("> 1", Quantity::P),
            ("0", Quantity::Area),
            ("-5", Quantity::MeanNn),
        ] {
            assert_eq!(kind(text, q), Err(ProblemKind::Impossible), "{text}");
        }
        for text in ["abc", "1.2.3", "inf", ""] {
            assert_eq!(
                kind(text, Quantity::Z),
                Err(ProblemKind::NotANumber),
                "{text}"
            );
        }
        // Issue 20: figures beyond any study overflow the recomputation.
        let e = parse("1e308", Quantity::Z).unwrap_err();
        assert!(
            e.what
                .contains("z of 1e308 is out of range: it must lie within ±1e15"),
            "{}",
            e.what
        );
        let e = parse("1e300", Quantity::MeanNn).unwrap_err();
        assert!(e.what.contains("between 1e-12 and 1e13"), "{}", e.what);
        for (text, q) in [
            ("1e308", Quantity::Z),
            ("1e300", Quantity::MeanNn),
            ("2e26", Quantity::Area),
            ("1e-300", Quantity::MeanNn),
        ] {
            assert_eq!(kind(text, q), Err(ProblemKind::OutOfRange), "{text}");
        }
        assert!(parse("1e26", Quantity::Area).is_ok());
        assert!(parse("0", Quantity::Z).is_ok());
        assert!(parse("< 1e-30", Quantity::P).is_ok());
        assert_eq!(parse_count("64").unwrap(), 64);
        assert_eq!(parse_count("n = 64").unwrap(), 64);
        let count = |text: &str| parse_count(text).map_err(|e| e.kind);
        assert_eq!(count("1"), Err(ProblemKind::TooFewPoints));
        assert_eq!(count("64.5"), Err(ProblemKind::NotACount));
        assert_eq!(count("-3"), Err(ProblemKind::NotACount));
    }
}
