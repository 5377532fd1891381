#!/usr/bin/env bash
# Regenerates the README pictures from the demo data (seeded: same bytes
# every time unless the code changes).
set -euo pipefail
cd "$(dirname "$0")/../.."
out=$(mktemp -d)
cargo run --release -q -p patternproof-cli -- audit demo-data/meadow-burrows.csv \
  --boundary demo-data/meadow-boundary.geojson --quiet --out "$out/report" >/dev/null
cp "$out/report/sensitivity.svg" docs/img/sensitivity.svg
cargo run --release -q -p patternproof-cli -- density demo-data/marsh-hare-track.csv \
  --quiet --out "$out/density" >/dev/null
cp "$out/density/areas.svg" docs/img/density-areas.svg
rm -rf "$out"
echo "wrote docs/img/sensitivity.svg and docs/img/density-areas.svg"
