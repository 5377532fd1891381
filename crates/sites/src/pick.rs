//! Which of a site's windows the protocol means.

use patternproof_audit::{Audit, Window, WindowKind};
use patternproof_protocol::WindowRule;

/// The window of `audit` that the rule names. Buffered hulls are matched
/// by their buffer distance (k × the site's mean nearest-neighbour
/// distance for `hull+kNN`, computed as the window builder does).
pub fn protocol_window<'a>(audit: &'a Audit, rule: &WindowRule) -> Option<&'a Window> {
    let of_kind = |k: WindowKind| audit.windows.iter().find(|w| w.kind == k);
    let buffered = |d: f64| {
        audit
            .windows
            .iter()
            .filter(|w| w.kind == WindowKind::BufferedHull)
            .filter_map(|w| w.buffer.map(|b| (w, (b - d).abs())))
            .filter(|(_, gap)| *gap <= 1e-9 * d.abs().max(1.0))
            .min_by(|a, b| a.1.total_cmp(&b.1))
            .map(|(w, _)| w)
    };
    match *rule {
        WindowRule::Hull => of_kind(WindowKind::Hull),
        WindowRule::Bbox => of_kind(WindowKind::Bbox),
        WindowRule::Concave => of_kind(WindowKind::Concave),
        WindowRule::Boundary => of_kind(WindowKind::Boundary),
        WindowRule::HullPlus { distance } => buffered(distance),
        WindowRule::HullPlusKnn { k } => buffered(k * audit.mean_nn),
    }
}
