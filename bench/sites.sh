#!/usr/bin/env bash
# Times a multi-site run: 200 synthetic sites of 500 points each (every
# third clustered), protocol hull+1nn with the simulation test, 999
# simulations, each site's sweep with the default --sweep-sims. Figures go
# to docs/performance.md with the machine and date.
set -euo pipefail
cd "$(dirname "$0")/.."
target="${CARGO_TARGET_DIR:-target}"
cargo build --release -q -p patternproof-cli -p patternproof-demo
work=$(mktemp -d)
"$target/release/patternproof-demo" --bench-sites "$work/sites" "${SITES:-200}" "${POINTS:-500}" >/dev/null
"$target/release/patternproof" protocol new --window hull+1nn --edge simulation --sims 999 --out "$work/protocol.json" >/dev/null
for threads in ${THREADS:-2}; do
  start=$(date +%s.%N)
  RAYON_NUM_THREADS=$threads "$target/release/patternproof" sites --protocol "$work/protocol.json" \
    "$work"/sites/*.csv --coords projected --out "$work/out" ${EXTRA:-} >/dev/null
  end=$(date +%s.%N)
  echo "threads=$threads seconds=$(echo "$end - $start" | bc) output=$(du -sh "$work/out" | cut -f1)"
  rm -rf "$work/out"
done
rm -rf "$work"
