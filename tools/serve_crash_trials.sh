#!/usr/bin/env bash
# Kills kindred serve during adds from 4 clients, TRIALS times (default 20),
# and checks each time that every acknowledged add survived and the audit
# passes. The test suite runs 3 trials; this runs more.
# Usage: tools/serve_crash_trials.sh [BUILD_DIR] [TRIALS]
set -eu
here=$(cd "$(dirname "$0")/.." && pwd)
build=${1:-$here/build}
exec /usr/bin/python3 "$here/tests/e2e/serve_crash.py" "$build/kindred" "$here" "${2:-20}"
