#!/usr/bin/env bash
# Build the Python wheel into a fresh virtual environment and run the
# pytest suite against the command line.
#
#   PATTERNPROOF_CLI=target/debug/patternproof python/run-tests.sh
#
# PATTERNPROOF_CLI: the `patternproof` binary the documents are compared
# with (default: target/release/patternproof, else target/debug/patternproof).
# PYTHON: the interpreter that makes the environment (default python3).
# The environment is python/.venv, made anew on every run; the wheel goes
# to python/target/wheels.
set -euo pipefail
here="$(cd "$(dirname "$0")" && pwd)"
repo="$(dirname "$here")"
python="${PYTHON:-python3}"

if [[ -z "${PATTERNPROOF_CLI:-}" ]]; then
    for c in "$repo/target/release/patternproof" "$repo/target/debug/patternproof"; do
        if [[ -x "$c" ]]; then PATTERNPROOF_CLI="$c"; break; fi
    done
fi
if [[ -z "${PATTERNPROOF_CLI:-}" || ! -x "$PATTERNPROOF_CLI" ]]; then
    echo "run-tests.sh: no patternproof binary; build it with cargo build, or set PATTERNPROOF_CLI" >&2
    exit 2
fi
export PATTERNPROOF_CLI

venv="$here/.venv"
rm -rf "$venv"
"$python" -m venv "$venv"
"$venv/bin/python" -m pip install --quiet --disable-pip-version-check -r "$here/requirements-test.txt"

# A release build: the tests run the default 999 simulations.
rm -rf "$here/target/wheels"
(cd "$here" && "$venv/bin/maturin" build --release --locked --quiet --interpreter "$venv/bin/python" --out "$here/target/wheels")
wheels=("$here"/target/wheels/patternproof-*.whl)
"$venv/bin/python" -m pip install --quiet --disable-pip-version-check --no-index "${wheels[0]}"

cd "$repo"
"$venv/bin/python" -m pytest "$here/tests" -q -p no:cacheprovider
