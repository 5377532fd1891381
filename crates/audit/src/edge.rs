//! How edge effects are handled: the second axis of the sweep.

use serde::{Deserialize, Serialize};
use std::fmt;

/// One edge-handling choice.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, PartialOrd, Ord, Serialize, Deserialize)]
#[serde(rename_all = "kebab-case")]
pub enum Edge {
    /// The plain Clark–Evans test.
    None,
    /// Donnelly's (1978) perimeter-corrected moments.
    Donnelly,
    /// Guard zone: only points at least w from the boundary are focal.
    Border,
    /// Distances wrap around a rectangular window.
    Toroidal,
    /// Monte Carlo test with CSR patterns in the exact window.
    Simulation,
}

impl Edge {
    /// Every choice, in table order.
    pub const ALL: [Edge; 5] = [
        Edge::None,
        Edge::Donnelly,
        Edge::Border,
        Edge::Toroidal,
        Edge::Simulation,
    ];

    /// The word used on the command line, in tables and in JSON.
    pub fn as_str(self) -> &'static str {
        match self {
            Edge::None => "none",
            Edge::Donnelly => "donnelly",
            Edge::Border => "border",
            Edge::Toroidal => "toroidal",
            Edge::Simulation => "simulation",
        }
    }

    /// Parse a command-line word.
    pub fn parse(word: &str) -> Option<Edge> {
        Edge::ALL.into_iter().find(|e| e.as_str() == word.trim())
    }

    /// Analytic choices have a closed-form null and a false-alarm rate to
    /// calibrate; the simulation test is the reference they are judged by.
    pub fn is_analytic(self) -> bool {
        self != Edge::Simulation
    }
}

impl fmt::Display for Edge {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(self.as_str())
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn words_round_trip() {
        for e in Edge::ALL {
            assert_eq!(Edge::parse(e.as_str()), Some(e));
        }
        assert_eq!(Edge::parse("isotropic"), None);
    }
}
