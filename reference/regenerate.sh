#!/usr/bin/env bash
# Rebuild reference/values.json (and the other reference JSON files and
# GeoPackage fixtures) with the pinned reference libraries.
# Exits non-zero on any failure; callers fall back to the committed values.json.
set -euo pipefail
here="$(cd "$(dirname "${BASH_SOURCE[0]}")" && pwd)"
venv="$here/.venv"
if [ ! -x "$venv/bin/python" ]; then
    python3 -m venv "$venv"
fi
"$venv/bin/python" -m pip install --quiet --disable-pip-version-check -r "$here/requirements.txt"
"$venv/bin/python" "$here/make_reference.py"
"$venv/bin/python" "$here/make_scales_reference.py"
"$venv/bin/python" "$here/make_density_reference.py"
"$venv/bin/python" "$here/make_gpkg_reference.py"
