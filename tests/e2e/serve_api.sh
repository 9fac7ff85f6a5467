#!/usr/bin/env bash
# kindred serve: answers equal to kindred check/add, restart, lock, signals.
# Usage: serve_api.sh KINDRED_BINARY SOURCE_DIR
exec /usr/bin/python3 "$2/tests/e2e/serve_api.py" "$1" "$2"
