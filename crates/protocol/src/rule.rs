//! Window rules: how each site's study area is drawn, the same way for all.

use patternproof_audit::BufferRule;
use serde::{Deserialize, Serialize};

/// Why a window rule was refused, with the text or number involved.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub enum RuleError {
    /// The word names no rule.
    #[error("`{word}` is not a window rule (hull, hull+D, hull+kNN, bbox, boundary, concave)")]
    Unknown {
        /// The word given.
        word: String,
    },
    /// `hull+…` without a number after the `+`.
    #[error("`{word}`: `{number}` is not a number, a number + `nn`, or a number + `x`")]
    NotANumber {
        /// The word given.
        word: String,
        /// The part after `hull+`.
        number: String,
    },
    /// A buffer that is zero, negative or not finite.
    #[error("the buffer {value} must be a positive number")]
    NotPositive {
        /// The buffer given.
        value: f64,
    },
    /// A buffer beyond any map or any pattern's own size.
    #[error("the buffer {value:e} is {problem}")]
    TooLarge {
        /// The buffer given.
        value: f64,
        /// How far beyond, in words (from [`BufferRule::problem`]).
        problem: String,
    },
}

/// One window rule.
#[derive(Debug, Clone, Copy, PartialEq, Serialize, Deserialize)]
#[serde(tag = "rule", deny_unknown_fields)]
pub enum WindowRule {
    /// The convex hull of the site's points.
    #[serde(rename = "hull")]
    Hull,
    /// The convex hull buffered by a fixed distance.
    #[serde(rename = "hull+D")]
    HullPlus {
        /// Buffer distance in the data's unit.
        distance: f64,
    },
    /// The convex hull buffered by k times the site's own mean
    /// nearest-neighbour distance.
    #[serde(rename = "hull+kNN")]
    HullPlusKnn {
        /// The multiple.
        k: f64,
    },
    /// The bounding rectangle.
    #[serde(rename = "bbox")]
    Bbox,
    /// The site's own surveyed boundary.
    #[serde(rename = "boundary")]
    Boundary,
    /// The concave hull.
    #[serde(rename = "concave")]
    Concave,
}

impl WindowRule {
    /// Parse the command-line form: `hull`, `hull+25` (a distance),
    /// `hull+1.5nn` or `hull+1.5x` (a multiple of the mean
    /// nearest-neighbour distance), `bbox`, `boundary`, `concave`.
    pub fn parse(word: &str) -> Result<Self, RuleError> {
        let w = word.trim();
        let rule = match w {
            "hull" => WindowRule::Hull,
            "bbox" => WindowRule::Bbox,
            "boundary" => WindowRule::Boundary,
            "concave" => WindowRule::Concave,
            _ => {
                let Some(rest) = w.strip_prefix("hull+") else {
                    return Err(RuleError::Unknown { word: w.into() });
                };
                let lower = rest.to_ascii_lowercase();
                let (num, multiple) =
                    match lower.strip_suffix("nn").or_else(|| lower.strip_suffix('x')) {
                        Some(n) => (n.to_string(), true),
                        None => (lower.clone(), false),
                    };
                let v: f64 = num.parse().map_err(|_| RuleError::NotANumber {
                    word: w.into(),
                    number: rest.into(),
                })?;
                if multiple {
                    WindowRule::HullPlusKnn { k: v }
                } else {
                    WindowRule::HullPlus { distance: v }
                }
            }
        };
        rule.validate()?;
        Ok(rule)
    }

    /// The numbers must be positive and finite.
    pub fn validate(&self) -> Result<(), RuleError> {
        let (v, rule) = match *self {
            WindowRule::HullPlus { distance } => (distance, BufferRule::Distance(distance)),
            WindowRule::HullPlusKnn { k } => (k, BufferRule::MeanNnMultiple(k)),
            _ => return Ok(()),
        };
        match rule.problem() {
            None => Ok(()),
            Some(_) if !(v > 0.0 && v.is_finite()) => Err(RuleError::NotPositive { value: v }),
            Some(problem) => Err(RuleError::TooLarge { value: v, problem }),
        }
    }

    /// In words.
    pub fn describe(&self) -> String {
        match self {
            WindowRule::Hull => "the convex hull of each site's points".into(),
            WindowRule::HullPlus { distance } => {
                format!("the convex hull buffered by {distance} (data unit)")
            }
            WindowRule::HullPlusKnn { k } => format!(
                "the convex hull buffered by {k} × the site's mean nearest-neighbour distance"
            ),
            WindowRule::Bbox => "the bounding rectangle of each site's points".into(),
            WindowRule::Boundary => "each site's own surveyed boundary".into(),
            WindowRule::Concave => "the concave hull of each site's points".into(),
        }
    }

    /// Whether each site must bring a boundary.
    pub fn needs_boundary(&self) -> bool {
        matches!(self, WindowRule::Boundary)
    }
}

#[cfg(test)]
#[allow(clippy::unwrap_used)] // a failed unwrap is a failed test
mod tests {
    use super::*;

    #[test]
    fn parses_every_rule() {
        assert_eq!(WindowRule::parse("hull"), Ok(WindowRule::Hull));
        assert_eq!(
            WindowRule::parse("hull+25"),
            Ok(WindowRule::HullPlus { distance: 25.0 })
        );
        assert_eq!(
            WindowRule::parse("hull+1.5nn"),
            Ok(WindowRule::HullPlusKnn { k: 1.5 })
        );
        assert_eq!(
            WindowRule::parse("hull+2x"),
            Ok(WindowRule::HullPlusKnn { k: 2.0 })
        );
        assert_eq!(WindowRule::parse("bbox"), Ok(WindowRule::Bbox));
        assert_eq!(WindowRule::parse("boundary"), Ok(WindowRule::Boundary));
        assert_eq!(WindowRule::parse("concave"), Ok(WindowRule::Concave));
        assert_eq!(
            WindowRule::parse("hull+-3"),
            Err(RuleError::NotPositive { value: -3.0 })
        );
        assert_eq!(
            WindowRule::parse("hull+0nn"),
            Err(RuleError::NotPositive { value: 0.0 })
        );
        assert_eq!(
            WindowRule::parse(" hull+abc "),
            Err(RuleError::NotANumber {
                word: "hull+abc".into(),
                number: "abc".into()
            })
        );
        let e = WindowRule::parse("circle").unwrap_err();
        assert_eq!(
            e,
            RuleError::Unknown {
                word: "circle".into()
            }
        );
        assert_eq!(
            e.to_string(),
            "`circle` is not a window rule (hull, hull+D, hull+kNN, bbox, boundary, concave)"
        );
    }

    /// Issue 20: buffers beyond any map (10¹³ units) or beyond any
    /// pattern's own size (10⁶ mean nearest-neighbour distances) are
    /// refused when the protocol is written, not carried as 300-digit
    /// numbers into every site's row.
    #[test]
    fn absurd_buffers_are_refused() {
        let far = WindowRule::HullPlus { distance: 1e300 }
            .validate()
            .unwrap_err();
        assert!(
            matches!(far, RuleError::TooLarge { value, .. } if value == 1e300),
            "{far:?}"
        );
        assert!(
            far.to_string()
                .contains("the buffer 1e300 is more than 1e13 units"),
            "{far}"
        );
        let many = WindowRule::HullPlusKnn { k: 2e6 }.validate().unwrap_err();
        assert!(
            matches!(many, RuleError::TooLarge { value, .. } if value == 2e6),
            "{many:?}"
        );
        assert!(
            many.to_string()
                .contains("the buffer 2e6 is more than 1e6 times"),
            "{many}"
        );
        assert!(WindowRule::HullPlus { distance: 1e13 }.validate().is_ok());
        assert!(WindowRule::HullPlusKnn { k: 1e6 }.validate().is_ok());
    }
}
