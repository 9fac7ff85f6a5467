#!/usr/bin/env bash
# kindred serve: hostile requests, limits, slow clients, a full service.
# Usage: serve_hostile.sh KINDRED_BINARY SOURCE_DIR
exec /usr/bin/python3 "$2/tests/e2e/serve_hostile.py" "$1" "$2"
