//! The `sites.json` document: the run's summary counts, its notes and one
//! row per site, with the protocol and its hash. Data only; the
//! presentation crate writes it and the tables made from it.

use crate::{SiteRun, Status};
use patternproof_protocol::Protocol;
use serde::Serialize;

/// Schema identifier of `sites.json`.
pub const SCHEMA: &str = "patternproof.sites/1";

/// The `sites.json` document.
#[derive(Debug, Serialize)]
pub struct SitesDocument<'a> {
    /// Schema identifier.
    pub schema: &'static str,
    /// patternproof version.
    pub tool_version: &'static str,
    /// SHA-256 of the protocol's canonical form.
    pub protocol_sha256: String,
    /// The protocol itself.
    pub protocol: &'a Protocol,
    /// Simulations per window in each site's sensitivity sweep.
    pub sweep_sims: usize,
    /// Sites tested.
    pub tested: usize,
    /// Sites listed but not tested.
    pub not_tested: usize,
    /// Tested sites whose call some other window or edge handling flips.
    pub window_sensitive: usize,
    /// Warnings about the run as a whole (e.g. too few simulations for
    /// the adjustment to reach α).
    pub notes: Vec<String>,
    /// One entry per site, in input order.
    pub sites: Vec<&'a crate::SiteRow>,
}

/// Assemble the JSON document.
pub fn document<'a>(
    runs: &'a [SiteRun],
    protocol: &'a Protocol,
    sweep_sims: usize,
) -> SitesDocument<'a> {
    let tested = runs
        .iter()
        .filter(|r| r.row.status == Status::Tested)
        .count();
    let mut notes = Vec::new();
    if protocol.edge == patternproof_audit::Edge::Simulation && tested > 0 {
        let smallest = 2.0 / (protocol.sims as f64 + 1.0);
        let floor = match protocol.adjust {
            patternproof_protocol::Adjust::Holm => smallest * tested as f64,
            _ => smallest,
        };
        if floor > protocol.alpha {
            notes.push(format!(
                "with {} simulations the smallest two-sided rank p is {smallest:.4}{}, above α = {}: no site can be significant; the protocol needs more simulations",
                protocol.sims,
                if protocol.adjust == patternproof_protocol::Adjust::Holm {
                    format!(", and Holm over {tested} sites lifts it to {floor:.4}")
                } else {
                    String::new()
                },
                protocol.alpha
            ));
        }
    }
    SitesDocument {
        notes,
        schema: SCHEMA,
        tool_version: env!("CARGO_PKG_VERSION"),
        protocol_sha256: protocol.sha256(),
        protocol,
        sweep_sims,
        tested: runs
            .iter()
            .filter(|r| r.row.status == Status::Tested)
            .count(),
        not_tested: runs
            .iter()
            .filter(|r| r.row.status == Status::NotTested)
            .count(),
        window_sensitive: runs
            .iter()
            .filter(|r| r.row.window_sensitive == Some(true))
            .count(),
        sites: runs.iter().map(|r| &r.row).collect(),
    }
}
