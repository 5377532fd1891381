#!/usr/bin/env bash
# Times `patternproof density` on n = 100 000 synthetic points (two
# Gaussian clusters and a uniform background, generated here with a fixed
# awk seed) in a 10 km × 10 km square at 10 m cells (a 1 002 × 1 002
# raster), release build. Figures go to docs/performance.md with the
# machine and date.
set -euo pipefail
cd "$(dirname "$0")/.."
target="${CARGO_TARGET_DIR:-target}"
cargo build --release -q -p patternproof-cli
work=$(mktemp -d)
n="${POINTS:-100000}"
awk -v n="$n" 'BEGIN {
  srand(20261203); print "x,y"
  for (k = 0; k < n; k++) {
    u = rand(); a = sqrt(-2 * log(1 - rand())); t = 6.283185307 * rand()
    if (u < 0.4) { x = 3000 + 600 * a * cos(t); y = 4000 + 600 * a * sin(t) }
    else if (u < 0.7) { x = 7000 + 900 * a * cos(t); y = 6500 + 900 * a * sin(t) }
    else { x = 10000 * rand(); y = 10000 * rand() }
    if (x > 0 && x < 10000 && y > 0 && y < 10000) printf "%.2f,%.2f\n", x, y; else k--
  }
}' > "$work/points.csv"
printf '{"type":"Polygon","coordinates":[[[0,0],[10000,0],[10000,10000],[0,10000],[0,0]]]}\n' > "$work/square.geojson"
run() {
  local label="$1"; shift
  for threads in ${THREADS:-1 2}; do
    start=$(date +%s.%N)
    RAYON_NUM_THREADS=$threads "$target/release/patternproof" density "$work/points.csv" \
      --coords projected --boundary "$work/square.geojson" --cell 10 --quiet --out "$work/out" "$@" >/dev/null
    end=$(date +%s.%N)
    echo "$label threads=$threads seconds=$(echo "$end - $start" | bc)"
    rm -rf "$work/out"
  done
}
run "gaussian:scott, edge none" --kernels gaussian --bandwidths scott --edges none
run "gaussian:scott, edges none+uniform" --kernels gaussian --bandwidths scott --edges none,uniform
run "5 kernels x scott,0.5x,2x, edge none" --bandwidths scott,0.5x,2x --edges none
run "gaussian:lcv (binned, 41 bandwidths)" --kernels gaussian --bandwidths lcv --edges none
rm -rf "$work"
