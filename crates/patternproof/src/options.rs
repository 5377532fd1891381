//! The vocabulary of the options: the types and parsers a front end
//! turns its flags, arguments or keyword arguments into. Each is defined
//! by the crate that owns the method and gathered here, so a front end
//! depends on this crate alone.
//!
//! Default simulation counts follow one rule, [`default_sims`]: 999 where
//! the simulation test's p-value is the result (`AuditOptions`, a
//! protocol), 99 where simulations screen many windows or distances at α
//! (`ScalesOptions`, `SitesOptions`).

pub use patternproof_audit::window::WindowOptions;
pub use patternproof_audit::{AuditOptions, BufferRule, Edge};
pub use patternproof_core::default_sims::{self, SCREEN_SIMS, TEST_SIMS};
pub use patternproof_density::Config as DensityConfig;
pub use patternproof_density::bandwidth::{BandwidthSpec, FIXED_RANGE, MULTIPLE_RANGE};
pub use patternproof_density::edge::DensityEdge;
pub use patternproof_density::kernels::{ALL as ALL_KERNELS, Kernel};
pub use patternproof_io::geopackage::parse_filter;
pub use patternproof_io::magnitude::{MAX_AREA, MIN_AREA};
pub use patternproof_io::{CoordChoice, GpkgChoice, LoadOptions};
pub use patternproof_protocol::{Adjust, Check, Protocol, SCHEMA as PROTOCOL_SCHEMA, WindowRule};
pub use patternproof_recheck::Figures;
pub use patternproof_recheck::reported::{Problem, Quantity, parse as parse_figure, parse_count};
pub use patternproof_scales::{Correction, ScalesOptions};
pub use patternproof_sites::RunOptions as SitesOptions;
