#!/usr/bin/env bash
# Regenerates the README picture from the demo data (seeded: same bytes
# every time unless the code changes).
set -euo pipefail
cd "$(dirname "$0")/../.."
out=$(mktemp -d)
cargo run --release -q -p patternproof-cli -- audit demo-data/meadow-burrows.csv \
  --boundary demo-data/meadow-boundary.geojson --quiet --out "$out/report" >/dev/null
cp "$out/report/sensitivity.svg" docs/img/sensitivity.svg
rm -rf "$out"
echo "wrote docs/img/sensitivity.svg"
