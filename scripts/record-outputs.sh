#!/usr/bin/env bash
# Record the output folders of a fixed set of runs, to compare before and
# after a change that should not change results:
#
#   scripts/record-outputs.sh /tmp/before      # on the old commit
#   scripts/record-outputs.sh /tmp/after       # on the new one
#   diff -r /tmp/before /tmp/after             # nothing, or only what the CHANGELOG names
#
# The runs: the README's commands, the demo sites, scales and density, a
# lon/lat input and a GeoPackage input. Terminal output is kept too.
set -euo pipefail
out=${1:?usage: scripts/record-outputs.sh OUTDIR}
root=$(cd "$(dirname "$0")/.." && pwd)
cargo build --release -q -p patternproof-cli --manifest-path "$root/Cargo.toml"
bin="$root/target/release/patternproof"
# Runs write into one fixed folder, since output paths appear in the pages
# and terminal lines; the folder is moved to OUTDIR at the end.
final=$out
out=${TMPDIR:-/tmp}/patternproof-record
rm -rf "$out" "$final"
mkdir -p "$out"
cd "$root"
run() { # name, args…
  local name=$1
  shift
  "$bin" "$@" >"$out/$name.stdout" 2>"$out/$name.stderr" || echo "exit $?" >>"$out/$name.stderr"
}
run audit audit demo-data/meadow-burrows.csv --boundary demo-data/meadow-boundary.geojson --out "$out/audit"
run audit-scales audit demo-data/meadow-burrows.csv --boundary demo-data/meadow-boundary.geojson --scales --scales-sims 39 --sims 199 --out "$out/audit-scales"
run protocol protocol new --window boundary --edge simulation --sims 199 --adjust holm --out "$out/protocol.json"
run sites sites --protocol "$out/protocol.json" demo-data/plots/*.csv --boundaries demo-data/plots-boundaries.geojson --coords projected --sweep-sims 39 --out "$out/sites"
run recheck recheck --n 64 --ratio 0.71 --z -4.9 --p "<0.001" --json
run recheck-points recheck --n 143 --ratio 0.9 --points demo-data/meadow-burrows.csv --boundary demo-data/meadow-boundary.geojson --json
run scales scales demo-data/meadow-burrows.csv --boundary demo-data/meadow-boundary.geojson --sims 39 --out "$out/scales"
run density density demo-data/marsh-hare-track.csv --out "$out/density"
run lonlat audit reference/gpkg/plots_wgs84.csv --sims 99 --out "$out/lonlat"
run gpkg audit reference/gpkg/survey.gpkg --layer plots_utm --sims 99 --out "$out/gpkg"
# The absolute output path appears in terminal lines; make it relative.
sed -i "s|$out/||g" "$out"/*.stdout "$out"/*.stderr
mkdir -p "$(dirname "$final")"
mv "$out" "$final"
echo "recorded in $final"
