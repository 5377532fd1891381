#!/usr/bin/env bash
# Times the K function at scale (crates/scales/examples/k_bench.rs):
# n = 100 000 CSR points, 50 distances to ~30 neighbours, each correction;
# and the envelope test of n = 2 000 with 999 simulations. Release build,
# at 1 and 2 threads. Figures go to docs/performance.md with the date and
# the machine. `--quick` leaves out the slow default-r_max envelope run.
set -euo pipefail
cd "$(dirname "$0")/.."
target="${CARGO_TARGET_DIR:-target}"
cargo build --release -q -p patternproof-scales --example k_bench
date -u; nproc; uptime
for threads in ${THREADS:-2 1}; do
  RAYON_NUM_THREADS=$threads "$target/release/examples/k_bench" "$@"
done
