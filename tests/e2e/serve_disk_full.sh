#!/usr/bin/env bash
# kindred serve on a full disk: an add answers 500 write_failed and leaves
# the index unchanged; the next add, once there is room, succeeds.
# Usage: serve_disk_full.sh KINDRED_BINARY SOURCE_DIR
exec /usr/bin/python3 "$2/tests/e2e/serve_disk_full.py" "$1" "$2"
