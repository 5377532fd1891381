//! What a run will cost, to weigh before starting it: the bytes it keeps
//! and the time one simulated pattern takes. A front end compares these
//! with the machine it runs on (the command line refuses a run that
//! cannot fit and forecasts a long one).

/// The nearest-neighbour sweep.
pub mod audit {
    pub use patternproof_audit::simulation::{
        BYTES_KEPT, BYTES_WHILE_SIMULATING, bytes_per_point, run_bytes, trial_seconds,
    };
}

/// The K audit; its per-window forecast is [`patternproof_scales::Plan`].
pub mod scales {
    pub use patternproof_scales::Plan;
    pub use patternproof_scales::memory::{bytes_per_point, bytes_per_simulation, run_bytes};
}

/// Many sites under one protocol.
pub mod sites {
    pub use patternproof_sites::{forecast_seconds, run_bytes, simulated_patterns};
}
