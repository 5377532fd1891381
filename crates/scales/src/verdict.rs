//! Distance bands of departure and the verdict sentence across windows.
//!
//! A band is a run of consecutive grid distances at which the observed
//! L̂ − r lies outside the *global* envelope band (above: clustering;
//! below: regularity). The sentence groups distances by the set of windows
//! that depart there, e.g. "clustered at 4–40 m in every window; at
//! 44–80 m only in `bbox`". Distances are grid points: "4–40 m" means every
//! grid distance from 4 to 40 m.

use patternproof_core::numbers::trimmed;
use serde::Serialize;

/// The direction of a departure.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum Direction {
    /// L̂ − r above the global band.
    Clustered,
    /// L̂ − r below the global band.
    Regular,
}

impl Direction {
    fn sign(self) -> i8 {
        match self {
            Direction::Clustered => 1,
            Direction::Regular => -1,
        }
    }

    /// The word in the sentence.
    pub fn word(self) -> &'static str {
        match self {
            Direction::Clustered => "clustered",
            Direction::Regular => "regular",
        }
    }
}

/// One run of grid distances with the same departure in one window.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Band {
    /// Clustered or regular.
    pub direction: Direction,
    /// First grid distance of the run.
    pub from: f64,
    /// Last grid distance of the run.
    pub to: f64,
}

/// The bands of one departure vector (see `EnvelopeTest::departure`).
pub fn bands(departure: &[i8], grid: &[f64]) -> Vec<Band> {
    let mut out: Vec<Band> = Vec::new();
    let mut prev = 0i8;
    for (k, &d) in departure.iter().enumerate() {
        if d != 0 {
            let direction = if d > 0 {
                Direction::Clustered
            } else {
                Direction::Regular
            };
            match out.last_mut() {
                Some(b) if prev == d => b.to = grid[k],
                _ => out.push(Band {
                    direction,
                    from: grid[k],
                    to: grid[k],
                }),
            }
        }
        prev = d;
    }
    out
}

fn range(a: f64, b: f64, unit: &str) -> String {
    if a == b {
        format!("{} {unit}", trimmed(a, 3))
    } else {
        format!("{}–{} {unit}", trimmed(a, 3), trimmed(b, 3))
    }
}

fn quoted(ids: &[&str]) -> String {
    ids.iter()
        .map(|i| format!("`{i}`"))
        .collect::<Vec<_>>()
        .join(", ")
}

/// The sentence for one correction over the tested windows: `tested` is
/// (window id, departure per grid distance).
pub fn sentence(tested: &[(&str, &[i8])], grid: &[f64], unit: &str) -> String {
    if tested.is_empty() {
        return "no window could be tested".into();
    }
    let all: Vec<&str> = tested.iter().map(|(id, _)| *id).collect();
    let mut phrases: Vec<String> = Vec::new();
    for dir in [Direction::Clustered, Direction::Regular] {
        let mut first = true;
        let mut k = 0;
        while k < grid.len() {
            let set: Vec<&str> = tested
                .iter()
                .filter(|(_, d)| d.get(k) == Some(&dir.sign()))
                .map(|(id, _)| *id)
                .collect();
            if set.is_empty() {
                k += 1;
                continue;
            }
            let start = k;
            while k + 1 < grid.len() {
                let next: Vec<&str> = tested
                    .iter()
                    .filter(|(_, d)| d.get(k + 1) == Some(&dir.sign()))
                    .map(|(id, _)| *id)
                    .collect();
                if next != set {
                    break;
                }
                k += 1;
            }
            let place = if set.len() == all.len() {
                if all.len() == 1 {
                    format!("in `{}`", all[0])
                } else {
                    "in every window".to_string()
                }
            } else if 2 * set.len() <= all.len() {
                format!("only in {}", quoted(&set))
            } else {
                let except: Vec<&str> = all.iter().copied().filter(|i| !set.contains(i)).collect();
                format!("in every window except {}", quoted(&except))
            };
            let lead = if first { dir.word() } else { "" };
            let text = format!("{lead} at {} {place}", range(grid[start], grid[k], unit));
            phrases.push(text.trim_start().to_string());
            first = false;
            k += 1;
        }
    }
    if phrases.is_empty() {
        let rmax = grid.last().copied().unwrap_or(0.0);
        format!(
            "no departure from complete spatial randomness beyond the global envelope at any distance up to {} {unit} in any window",
            trimmed(rmax, 3)
        )
    } else {
        phrases.join("; ")
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn bands_and_sentence_by_hand() {
        let grid: Vec<f64> = (1..=8).map(|k| 10.0 * f64::from(k)).collect();
        let a: [i8; 8] = [1, 1, 1, 1, 1, 1, 0, 0];
        let b: [i8; 8] = [1, 1, 1, 0, 0, 0, 0, -1];
        let c: [i8; 8] = [1, 1, 1, 0, 0, 0, 0, 0];
        assert_eq!(
            bands(&b, &grid),
            vec![
                Band {
                    direction: Direction::Clustered,
                    from: 10.0,
                    to: 30.0
                },
                Band {
                    direction: Direction::Regular,
                    from: 80.0,
                    to: 80.0
                }
            ]
        );
        let s = sentence(&[("bbox", &a), ("hull", &b), ("concave", &c)], &grid, "m");
        assert_eq!(
            s,
            "clustered at 10–30 m in every window; at 40–60 m only in `bbox`; regular at 80 m only in `hull`"
        );
        let none = [0i8; 8];
        let s = sentence(&[("bbox", &none)], &grid, "m");
        assert!(s.starts_with("no departure"), "{s}");
    }
}
