#!/usr/bin/env bash
# kindred serve: 16 clients mixing checks and adds, bounded rounds.
# Usage: serve_load.sh KINDRED_BINARY SOURCE_DIR
exec /usr/bin/python3 "$2/tests/e2e/serve_load.py" "$1" "$2"
