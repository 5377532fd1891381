#!/usr/bin/env bash
# Times the full demo sweep (all windows × all edge handlings, 999
# simulations per window) with the release build, RUNS times per thread
# count (default 5), and prints each run and the minimum. The machine is
# often busy with other work, so the minimum is the figure to quote.
# Figures go to docs/performance.md with the machine and date.
set -euo pipefail
cd "$(dirname "$0")/.."
target="${CARGO_TARGET_DIR:-target}"
cargo build --release -q -p patternproof-cli
out=$(mktemp -d)
for threads in ${THREADS:-1 2}; do
  best=""
  for run in $(seq "${RUNS:-5}"); do
    rm -rf "$out/r"
    start=$(date +%s.%N)
    RAYON_NUM_THREADS=$threads "$target/release/patternproof" audit demo-data/meadow-burrows.csv \
      --boundary demo-data/meadow-boundary.geojson --quiet --out "$out/r" >/dev/null
    end=$(date +%s.%N)
    seconds=$(echo "$end - $start" | bc)
    echo "threads=$threads run=$run seconds=$seconds"
    if [ -z "$best" ] || [ "$(echo "$seconds < $best" | bc)" = 1 ]; then
      best=$seconds
    fi
  done
  echo "threads=$threads min=$best"
done
rm -rf "$out"
