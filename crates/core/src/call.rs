//! The verdict ("call") of one row at a chosen significance level.

use serde::Serialize;
use std::fmt;

/// What a row lets its reader claim at level α, two-sided.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, Serialize, PartialOrd, Ord)]
#[serde(rename_all = "kebab-case")]
pub enum Call {
    /// Mean distance significantly shorter than under CSR.
    Clustered,
    /// Mean distance significantly longer than under CSR.
    Dispersed,
    /// No significant departure from CSR at this α.
    NotSignificant,
}

impl Call {
    /// Call from a two-sided p-value and the sign of the departure.
    /// `departure` is z for analytic rows, observed minus simulated mean for
    /// Monte Carlo rows; only its sign is used.
    pub fn from_p(p: f64, departure: f64, alpha: f64) -> Self {
        if p <= alpha && departure < 0.0 {
            Call::Clustered
        } else if p <= alpha && departure > 0.0 {
            Call::Dispersed
        } else {
            Call::NotSignificant
        }
    }

    /// The word used in tables and JSON.
    pub fn as_str(self) -> &'static str {
        match self {
            Call::Clustered => "clustered",
            Call::Dispersed => "dispersed",
            Call::NotSignificant => "not-significant",
        }
    }

    /// All calls, in table order.
    pub const ALL: [Call; 3] = [Call::Clustered, Call::Dispersed, Call::NotSignificant];
}

/// The word of a call in tables and sentences, "no test" for a row
/// without one (the JSON keeps [`Call::as_str`]).
pub fn call_word(c: Option<Call>) -> &'static str {
    match c {
        Some(Call::Clustered) => "clustered",
        Some(Call::Dispersed) => "dispersed",
        Some(Call::NotSignificant) => "not significant",
        None => "no test",
    }
}

impl fmt::Display for Call {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(self.as_str())
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::normal::two_sided_p;

    /// At α = 0.05 the two-sided boundary is |z| = 1.959964 (normal table).
    #[test]
    fn boundary_sits_at_the_critical_value() {
        assert_eq!(
            Call::from_p(two_sided_p(-1.97), -1.97, 0.05),
            Call::Clustered
        );
        assert_eq!(
            Call::from_p(two_sided_p(-1.95), -1.95, 0.05),
            Call::NotSignificant
        );
        assert_eq!(Call::from_p(two_sided_p(1.97), 1.97, 0.05), Call::Dispersed);
        assert_eq!(
            Call::from_p(two_sided_p(1.95), 1.95, 0.05),
            Call::NotSignificant
        );
    }
}
