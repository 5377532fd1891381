#!/usr/bin/env bash
# Times the full demo sweep (all windows × all edge handlings, 999
# simulations per window) with the release build. Figures go to
# docs/performance.md with the machine and date.
set -euo pipefail
cd "$(dirname "$0")/.."
cargo build --release -q -p patternproof
out=$(mktemp -d)
for threads in 1 2; do
  for run in 1 2 3; do
    start=$(date +%s.%N)
    RAYON_NUM_THREADS=$threads ./target/release/patternproof audit demo-data/meadow-burrows.csv \
      --boundary demo-data/meadow-boundary.geojson --quiet --out "$out/r" >/dev/null
    end=$(date +%s.%N)
    echo "threads=$threads run=$run seconds=$(echo "$end - $start" | bc)"
  done
done
rm -rf "$out"
