//! A study protocol written down once, applied to every site, and provable
//! afterwards.
//!
//! Ratios from different sites are comparable only when every site used
//! the same window rule and edge handling, chosen before the results were
//! seen. A [`Protocol`] holds those choices; its SHA-256 is taken over a
//! canonical form (see [`Protocol::canonical`]) so that any change of a
//! choice changes the hash, while re-indenting the file does not.
//!
//! | module | job |
//! |---|---|
//! | [`rule`] | the window rules (`hull`, `hull+D`, `hull+kNN`, `bbox`, `boundary`, `concave`) |
//! | [`adjust`] | the multiple-testing adjustment named by the protocol |
//! | this file | the protocol, its canonical form, hash, file format and description in words |

pub mod adjust;
pub mod rule;

pub use adjust::Adjust;
pub use rule::{RuleError, WindowRule};

use patternproof_audit::Edge;
use serde::{Deserialize, Serialize};
use sha2::Digest;
use std::fmt::Write;

/// Schema identifier of protocol files.
pub const SCHEMA: &str = "patternproof.protocol/1";

/// The choices a study fixes in advance.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct Protocol {
    /// Schema identifier.
    pub schema: String,
    /// How each site's study area is drawn.
    pub window: WindowRule,
    /// The one edge handling whose row is each site's result.
    pub edge: Edge,
    /// Two-sided significance level.
    pub alpha: f64,
    /// CSR simulations per site (simulation test and false-alarm rates).
    pub sims: usize,
    /// Seed; each site's streams derive from it and the site's name.
    pub seed: u64,
    /// Multiple-testing adjustment across sites.
    pub adjust: Adjust,
    /// Sites with fewer points are listed, not tested.
    pub min_n: usize,
    /// Guard width for `border` (`null`: each site's mean nearest-neighbour distance).
    pub guard: Option<f64>,
    /// Concavity of the concave hull (for the `concave` rule and the sweep).
    pub concavity: f64,
    /// Free text: who fixed the protocol, when, why.
    pub note: Option<String>,
}

/// What reading a protocol file found.
#[derive(Debug, Clone, PartialEq)]
pub enum Check {
    /// The stored hash matches the choices.
    Intact,
    /// The choices no longer match the stored hash: the file was edited.
    Changed {
        /// Hash in the file.
        stored: String,
        /// Hash of the choices as they now read.
        actual: String,
    },
}

/// Which choice of a protocol is refused, with its value.
#[derive(Debug, Clone, PartialEq)]
pub enum ProtocolErrorKind {
    /// The text is not a protocol file: not JSON, no `sha256`, an
    /// unknown or missing field.
    NotProtocol,
    /// The schema identifier is not [`SCHEMA`].
    Schema(String),
    /// α is not strictly between 0 and 1.
    Alpha(f64),
    /// The smallest site size is below 2.
    MinN(usize),
    /// The simulation edge handling with no simulations.
    NoSimulations,
    /// The guard width is negative or not finite.
    Guard(f64),
    /// The concavity is not positive and finite.
    Concavity(f64),
    /// The window rule is refused.
    Window(RuleError),
}

/// Why a protocol file could not be used: the kind, and the words the
/// user reads (what is wrong, what to do).
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
#[error("{what}\n  what to do: {hint}")]
pub struct ProtocolError {
    /// Which choice is refused, with its value.
    pub kind: ProtocolErrorKind,
    /// What is wrong.
    pub what: String,
    /// What to do.
    pub hint: String,
}

impl Protocol {
    /// Check the choices; `Err` names the first one out of range.
    pub fn validate(&self) -> Result<(), ProtocolError> {
        let bad = |kind: ProtocolErrorKind, what: String, hint: &str| {
            Err(ProtocolError {
                kind,
                what,
                hint: hint.to_string(),
            })
        };
        if self.schema != SCHEMA {
            return bad(
                ProtocolErrorKind::Schema(self.schema.clone()),
                format!("schema `{}` is not {SCHEMA}", self.schema),
                "write the protocol again with `patternproof protocol new`",
            );
        }
        if !(self.alpha > 0.0 && self.alpha < 1.0) {
            return bad(
                ProtocolErrorKind::Alpha(self.alpha),
                format!("alpha {} is not strictly between 0 and 1", self.alpha),
                "use e.g. 0.05",
            );
        }
        if self.min_n < 2 {
            return bad(
                ProtocolErrorKind::MinN(self.min_n),
                format!("min-n {} is below 2", self.min_n),
                "the test needs at least two points per site",
            );
        }
        if self.edge == Edge::Simulation && self.sims == 0 {
            return bad(
                ProtocolErrorKind::NoSimulations,
                "the simulation edge handling needs sims above 0".into(),
                "give --sims, e.g. 999",
            );
        }
        if let Some(g) = self.guard
            && !(g >= 0.0 && g.is_finite())
        {
            return bad(
                ProtocolErrorKind::Guard(g),
                format!("guard {g} is not a non-negative distance"),
                "give a width in the data's unit, or leave it out",
            );
        }
        if !(self.concavity > 0.0 && self.concavity.is_finite()) {
            return bad(
                ProtocolErrorKind::Concavity(self.concavity),
                format!("concavity {} is not positive", self.concavity),
                "leave it at 2.0 unless there is a reason",
            );
        }
        self.window.validate().map_err(|e| ProtocolError {
            what: e.to_string(),
            kind: ProtocolErrorKind::Window(e),
            hint: "see `patternproof protocol new --help` for the window rules".into(),
        })
    }

    /// The canonical form: compact JSON of the choices in schema order
    /// (struct field order), numbers in serde_json's shortest round-trip
    /// notation, strings as JSON escapes them. The same choices give the
    /// same bytes on every platform.
    pub fn canonical(&self) -> Vec<u8> {
        // Serialising a plain struct of numbers, strings and enums cannot
        // fail; an empty vector would still hash deterministically.
        serde_json::to_vec(self).unwrap_or_default()
    }

    /// SHA-256 of the canonical form, lower-case hex.
    pub fn sha256(&self) -> String {
        sha2::Sha256::digest(self.canonical())
            .iter()
            .fold(String::with_capacity(64), |mut s, b| {
                let _ = write!(s, "{b:02x}");
                s
            })
    }

    /// The file's text: the choices, pretty-printed in schema order, then
    /// `sha256`, the hash of their canonical form.
    pub fn to_file_text(&self) -> String {
        let pretty = serde_json::to_string_pretty(self).unwrap_or_default();
        let body = pretty.trim_end().trim_end_matches('}').trim_end();
        format!("{body},\n  \"sha256\": \"{}\"\n}}\n", self.sha256())
    }

    /// Read a protocol file's text; the check says whether it is intact.
    /// Unknown fields are refused, so nothing can be added unnoticed.
    pub fn from_file_text(text: &str) -> Result<(Protocol, Check), ProtocolError> {
        let not_protocol = |e: String| ProtocolError {
            kind: ProtocolErrorKind::NotProtocol,
            what: format!("not a protocol file ({e})"),
            hint: "write one with `patternproof protocol new --out protocol.json`".into(),
        };
        let mut value: serde_json::Value =
            serde_json::from_str(text).map_err(|e| not_protocol(e.to_string()))?;
        let stored = value
            .as_object_mut()
            .and_then(|m| m.remove("sha256"))
            .and_then(|h| h.as_str().map(str::to_string))
            .ok_or_else(|| not_protocol("no `sha256` string".into()))?;
        let protocol: Protocol =
            serde_json::from_value(value).map_err(|e| not_protocol(e.to_string()))?;
        protocol.validate()?;
        let actual = protocol.sha256();
        let check = if actual == stored {
            Check::Intact
        } else {
            Check::Changed { stored, actual }
        };
        Ok((protocol, check))
    }

    /// The protocol in words, for `protocol show` and reports.
    pub fn describe(&self) -> Vec<String> {
        let mut lines = vec![
            format!("window: {}", self.window.describe()),
            format!("edge handling: {}", edge_words(self.edge)),
            format!("significance level: α = {} (two-sided)", self.alpha),
            format!(
                "simulations: {} per site, seed {} (each site's streams derive from the seed and the site's name)",
                self.sims, self.seed
            ),
            format!("across sites: {}", self.adjust.describe()),
            format!(
                "sites with fewer than {} points are listed, not tested",
                self.min_n
            ),
        ];
        if self.edge == Edge::Border {
            lines.push(match self.guard {
                Some(g) => format!("guard width: {g}"),
                None => "guard width: each site's mean nearest-neighbour distance".into(),
            });
        }
        if let Some(n) = &self.note {
            lines.push(format!("note: {n}"));
        }
        lines
    }
}

fn edge_words(e: Edge) -> &'static str {
    match e {
        Edge::None => "none (the uncorrected test, Clark & Evans 1954)",
        Edge::Donnelly => "donnelly (perimeter-corrected moments, Donnelly 1978)",
        Edge::Border => "border (guard zone, Diggle 2003)",
        Edge::Toroidal => "toroidal (distances wrap around a rectangular window)",
        Edge::Simulation => "simulation (Monte Carlo test in the exact window)",
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn example() -> Protocol {
        Protocol {
            schema: SCHEMA.into(),
            window: WindowRule::HullPlusKnn { k: 1.0 },
            edge: Edge::Simulation,
            alpha: 0.05,
            sims: 999,
            seed: 7,
            adjust: Adjust::Holm,
            min_n: 20,
            guard: None,
            concavity: 2.0,
            note: Some("fixed before the 2026 survey".into()),
        }
    }

    /// Each refused choice comes back as its own kind with the value
    /// given, and the file reader refuses what is not a protocol.
    #[test]
    fn refused_choices_name_their_kind() {
        let kind = |edit: &dyn Fn(&mut Protocol)| {
            let mut p = example();
            edit(&mut p);
            p.validate().map_err(|e| e.kind)
        };
        assert_eq!(kind(&|_| {}), Ok(()));
        assert_eq!(
            kind(&|p| p.schema = "patternproof.protocol/0".into()),
            Err(ProtocolErrorKind::Schema("patternproof.protocol/0".into()))
        );
        assert_eq!(kind(&|p| p.alpha = 1.5), Err(ProtocolErrorKind::Alpha(1.5)));
        assert_eq!(kind(&|p| p.min_n = 1), Err(ProtocolErrorKind::MinN(1)));
        assert_eq!(kind(&|p| p.sims = 0), Err(ProtocolErrorKind::NoSimulations));
        assert_eq!(
            kind(&|p| p.guard = Some(-2.0)),
            Err(ProtocolErrorKind::Guard(-2.0))
        );
        assert_eq!(
            kind(&|p| p.concavity = 0.0),
            Err(ProtocolErrorKind::Concavity(0.0))
        );
        assert_eq!(
            kind(&|p| p.window = WindowRule::HullPlus { distance: -5.0 }),
            Err(ProtocolErrorKind::Window(RuleError::NotPositive {
                value: -5.0
            }))
        );
        let e = Protocol::from_file_text("{\"schema\": 1}").expect_err("no sha256");
        assert_eq!(e.kind, ProtocolErrorKind::NotProtocol);
        assert_eq!(
            e.to_string(),
            "not a protocol file (no `sha256` string)\n  what to do: write one with `patternproof protocol new --out protocol.json`"
        );
    }

    /// The canonical bytes are pinned: a change of serialisation (field
    /// order, number format) would silently change every protocol's hash,
    /// so this test fails first.
    #[test]
    fn canonical_form_is_pinned() {
        let text = String::from_utf8(example().canonical()).expect("utf-8");
        assert_eq!(
            text,
            r#"{"schema":"patternproof.protocol/1","window":{"rule":"hull+kNN","k":1.0},"edge":"simulation","alpha":0.05,"sims":999,"seed":7,"adjust":"holm","min_n":20,"guard":null,"concavity":2.0,"note":"fixed before the 2026 survey"}"#
        );
    }

    /// SHA-256 of the canonical bytes, recomputed with Python's hashlib
    /// (general-purpose reference library) on the string above:
    /// `hashlib.sha256(s.encode()).hexdigest()`.
    #[test]
    fn hash_matches_an_outside_sha256() {
        assert_eq!(
            example().sha256(),
            "37c6e22375dc73969038fc6bcef3ff249b21e02df9c7ce709403067084fa4e54"
        );
    }

    /// Every choice changes the hash.
    #[test]
    fn every_choice_changes_the_hash() {
        let base = example().sha256();
        let mut variants = Vec::new();
        let mut p = example();
        p.window = WindowRule::Hull;
        variants.push(p);
        let mut p = example();
        p.edge = Edge::None;
        variants.push(p);
        let mut p = example();
        p.alpha = 0.01;
        variants.push(p);
        let mut p = example();
        p.sims = 998;
        variants.push(p);
        let mut p = example();
        p.seed = 8;
        variants.push(p);
        let mut p = example();
        p.adjust = Adjust::Bh;
        variants.push(p);
        let mut p = example();
        p.min_n = 21;
        variants.push(p);
        let mut p = example();
        p.guard = Some(1.0);
        variants.push(p);
        let mut p = example();
        p.concavity = 3.0;
        variants.push(p);
        let mut p = example();
        p.note = None;
        variants.push(p);
        let mut seen = std::collections::HashSet::new();
        for v in &variants {
            let h = v.sha256();
            assert_ne!(h, base, "{v:?}");
            assert!(seen.insert(h), "two variants share a hash");
        }
    }

    /// A file round-trips intact; re-indenting keeps it intact; editing a
    /// value is reported as a change; an unknown field is refused.
    #[test]
    fn file_round_trip_and_edits() {
        let text = example().to_file_text();
        let (p, check) = Protocol::from_file_text(&text).expect("reads");
        assert_eq!(p, example());
        assert_eq!(check, Check::Intact);

        let compact: serde_json::Value = serde_json::from_str(&text).expect("json");
        let (_, check) = Protocol::from_file_text(&compact.to_string()).expect("reads");
        assert_eq!(check, Check::Intact, "layout is not a change");

        let edited = text.replace("\"alpha\": 0.05", "\"alpha\": 0.1");
        assert_ne!(edited, text);
        let (_, check) = Protocol::from_file_text(&edited).expect("reads");
        assert!(matches!(check, Check::Changed { .. }));

        let extra = text.replacen('{', "{\n  \"extra\": 1,", 1);
        let e = Protocol::from_file_text(&extra).expect_err("unknown field");
        assert_eq!(e.kind, ProtocolErrorKind::NotProtocol);
        assert!(e.what.contains("unknown field `extra`"), "{}", e.what);
    }
}
