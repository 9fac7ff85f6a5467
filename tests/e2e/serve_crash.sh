#!/usr/bin/env bash
# kindred serve killed during adds from 4 clients: 3 trials here
# (tools/serve_crash_trials.sh runs more).
# Usage: serve_crash.sh KINDRED_BINARY SOURCE_DIR
exec /usr/bin/python3 "$2/tests/e2e/serve_crash.py" "$1" "$2" 3
