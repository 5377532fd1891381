//! What a K run holds in memory, estimated before it starts, so that a
//! request beyond the machine is refused with a number instead of an
//! allocation failure hours later.
//!
//! Two parts grow with the input:
//! - **per point**: the window membership lists, the centred copy of the
//!   points, the range-search index and outline distances of the observed
//!   pattern, and on each thread one simulated pattern with its index. The
//!   K sums themselves are per distance bin ([`crate::k_function`]), so
//!   nothing grows with the number of pairs.
//! - **per simulation**: both global tests (MAD and the rank envelope)
//!   need every simulated L̂ − r curve across all distances at once: MAD
//!   takes the pointwise mean over the simulations before it can measure
//!   any curve's deviation, and the ranks compare each distance across all
//!   curves. So a window's test holds `sims × steps` values for each tested
//!   correction. Windows are tested one after the other, so only one
//!   window's curves are held at a time.
//!
//! The figures are counts of what the code allocates (checked against a
//! counting allocator in `tests/memory.rs`), plus a margin per allocation
//! for the allocator's own bookkeeping.

/// Allocator bookkeeping assumed per allocation.
const PER_ALLOCATION: u64 = 16;

/// Bytes held per simulated pattern while one window's envelope tests
/// run, with `steps` grid distances and `tested` tested corrections.
pub fn bytes_per_simulation(steps: usize, tested: usize) -> u64 {
    let (steps, tested) = (steps as u64, tested as u64);
    // Each kept L̂ − r curve: 16 bytes a value (`Option<f64>`) in its own
    // allocation with a 24-byte header, listed once by simulation and once
    // by correction while they are regrouped (`envelope::simulate`).
    let curves = tested * (16 * steps + 24 + PER_ALLOCATION + 24) + 24 + 24 + PER_ALLOCATION;
    // The rank test of one correction: a u32 rank per distance in each
    // curve's own list, and nine words of bookkeeping per curve (sorted
    // column, order, extreme ranks, MAD statistics, pointwise quantiles).
    let ranks = 4 * steps + 24 + PER_ALLOCATION + 72;
    curves + ranks
}

/// Bytes held per point of the data set beyond the points themselves, for
/// `windows` windows and `threads` worker threads.
pub fn bytes_per_point(windows: usize, threads: usize) -> u64 {
    let (windows, threads) = (windows as u64, threads as u64);
    // Membership lists (8 bytes a point per window), the centred copy and
    // the window's own copy (16 + 16), the observed pattern's range-search
    // index (about 40) and outline distances (12).
    let observed = 8 * windows + 16 + 16 + 40 + 12;
    // Per thread, a simulated pattern (16), its index (40) and outline
    // distances (12).
    let per_thread = 16 + 40 + 12;
    observed + threads * per_thread
}

/// Fixed allowance: the weighed pairs between two merges of the parallel
/// K sums (8 MiB), translation overlap tables, the distance grid and the
/// report in memory.
pub const FIXED_BYTES: u64 = 64 << 20;

/// The estimate for a whole run: `n` points, `windows` windows, `threads`
/// threads, `sims` simulations per window with `steps` distances and
/// `tested` tested corrections (0 when no test runs).
pub fn run_bytes(
    n: usize,
    windows: usize,
    threads: usize,
    sims: usize,
    steps: usize,
    tested: usize,
) -> u64 {
    let per_sim = if tested == 0 {
        0
    } else {
        bytes_per_simulation(steps, tested)
    };
    FIXED_BYTES
        .saturating_add((n as u64).saturating_mul(bytes_per_point(windows, threads)))
        .saturating_add((sims as u64).saturating_mul(per_sim))
}

#[cfg(test)]
mod tests {
    use super::*;

    /// By hand: 50 distances, one tested correction: curves
    /// 800 + 24 + 16 + 24 + 24 + 24 + 16 = 928, ranks 200 + 24 + 16 + 72 =
    /// 312, so 1 240 bytes per simulation; a billion simulations need
    /// 1.24 TB, which is why the command refuses them.
    #[test]
    fn figures_by_hand() {
        assert_eq!(bytes_per_simulation(50, 1), 1_240);
        assert_eq!(bytes_per_simulation(50, 2), 1_240 + 864);
        assert_eq!(
            run_bytes(0, 7, 2, 1_000_000_000, 50, 1),
            FIXED_BYTES + 1_240_000_000_000
        );
        assert_eq!(
            run_bytes(10, 1, 1, 5, 50, 0),
            FIXED_BYTES + 10 * (8 + 84 + 68)
        );
        // Saturates instead of wrapping.
        assert_eq!(run_bytes(usize::MAX, 9, 9, usize::MAX, 50, 3), u64::MAX);
    }
}
