//! Multiple-testing adjustment across sites.
//!
//! * Holm (1979), "A simple sequentially rejective multiple test
//!   procedure": controls the family-wise error rate.
//! * Benjamini & Hochberg (1995), "Controlling the false discovery rate":
//!   controls the expected share of false discoveries.
//!
//! Both return adjusted p-values in input order, capped at 1, so that
//! "adjusted p ≤ α" is the procedure's rejection rule.

use serde::{Deserialize, Serialize};

/// The adjustment a protocol names.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize, Deserialize)]
#[serde(rename_all = "lowercase")]
pub enum Adjust {
    /// Holm's step-down procedure.
    Holm,
    /// Benjamini–Hochberg step-up procedure.
    Bh,
    /// No adjustment.
    None,
}

impl Adjust {
    /// Parse `holm`, `bh` or `none`.
    pub fn parse(word: &str) -> Option<Self> {
        match word.trim().to_ascii_lowercase().as_str() {
            "holm" => Some(Adjust::Holm),
            "bh" | "fdr" => Some(Adjust::Bh),
            "none" => Some(Adjust::None),
            _ => None,
        }
    }

    /// In words.
    pub fn describe(&self) -> &'static str {
        match self {
            Adjust::Holm => {
                "p-values adjusted by Holm's step-down procedure (family-wise error rate)"
            }
            Adjust::Bh => {
                "p-values adjusted by the Benjamini–Hochberg procedure (false discovery rate)"
            }
            Adjust::None => "no adjustment for testing many sites",
        }
    }

    /// Adjusted p-values, in input order.
    pub fn apply(&self, p: &[f64]) -> Vec<f64> {
        match self {
            Adjust::Holm => holm(p),
            Adjust::Bh => benjamini_hochberg(p),
            Adjust::None => p.to_vec(),
        }
    }
}

/// Indices sorted by p ascending; ties keep input order, so the result
/// does not depend on the sort algorithm.
fn order(p: &[f64]) -> Vec<usize> {
    let mut idx: Vec<usize> = (0..p.len()).collect();
    idx.sort_by(|&a, &b| p[a].total_cmp(&p[b]).then(a.cmp(&b)));
    idx
}

/// Holm: p_(i) · (m − i + 1), made monotone from the smallest up.
pub fn holm(p: &[f64]) -> Vec<f64> {
    let m = p.len();
    let mut out = vec![0.0; m];
    let mut running: f64 = 0.0;
    for (rank, &i) in order(p).iter().enumerate() {
        let v = (p[i] * (m - rank) as f64).min(1.0);
        running = running.max(v);
        out[i] = running;
    }
    out
}

/// Benjamini–Hochberg: p_(i) · m / i, made monotone from the largest down.
pub fn benjamini_hochberg(p: &[f64]) -> Vec<f64> {
    let m = p.len();
    let mut out = vec![0.0; m];
    let mut running: f64 = 1.0;
    let idx = order(p);
    for (rank, &i) in idx.iter().enumerate().rev() {
        let v = (p[i] * m as f64 / (rank + 1) as f64).min(1.0);
        running = running.min(v);
        out[i] = running;
    }
    out
}

#[cfg(test)]
mod tests {
    use super::*;
    use approx::abs_diff_eq;

    /// Worked by hand from the definitions (Holm 1979; Benjamini &
    /// Hochberg 1995). The statsmodels comparison lives in the reference
    /// test of the cli crate.
    #[test]
    fn hand_worked_example() {
        let p = [0.01, 0.04, 0.03, 0.005];
        // Sorted: 0.005, 0.01, 0.03, 0.04 → Holm ×4, ×3, ×2, ×1 =
        // 0.02, 0.03, 0.06, 0.04 → monotone: 0.02, 0.03, 0.06, 0.06.
        let h = holm(&p);
        let want = [0.03, 0.06, 0.06, 0.02];
        for (a, b) in h.iter().zip(want) {
            assert!(abs_diff_eq!(*a, b, epsilon = 1e-12), "{h:?}");
        }
        // BH ×4/1, ×4/2, ×4/3, ×4/4 = 0.02, 0.02, 0.04, 0.04 (already
        // monotone from the top).
        let b = benjamini_hochberg(&p);
        let want = [0.02, 0.04, 0.04, 0.02];
        for (a, w) in b.iter().zip(want) {
            assert!(abs_diff_eq!(*a, w, epsilon = 1e-12), "{b:?}");
        }
        assert_eq!(Adjust::None.apply(&p), p.to_vec());
        assert!(holm(&[]).is_empty());
    }
}
