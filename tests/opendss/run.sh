#!/usr/bin/env bash
# Runs the OpenDSS cross-check. Creates tests/opendss/.venv and installs requirements.txt only
# when the venv is missing or does not hold the pinned dss-python; otherwise it just runs.
# PYTHON chooses the interpreter for a new venv (default python3.11); TAPLINE the engine binary.
# With --setup-only it installs and stops (scripts/setup.sh calls it so).
set -euo pipefail
cd "$(dirname "$0")"
want=$(sed -n 's/^dss-python==//p' requirements.txt)
if ! .venv/bin/python -c "import sys, dss; sys.exit(dss.__version__ != '$want')" 2>/dev/null; then
    "${PYTHON:-$(command -v python3.11 || command -v python3)}" -m venv .venv
    .venv/bin/python -m pip install --quiet --disable-pip-version-check -r requirements.txt
fi
if [ "${1:-}" = "--setup-only" ]; then exit 0; fi
exec .venv/bin/python crosscheck.py "$@"
