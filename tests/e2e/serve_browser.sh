#!/usr/bin/env bash
# The page of kindred serve in headless Chromium (Selenium).
# Usage: serve_browser.sh KINDRED_BINARY SOURCE_DIR
exec /usr/bin/python3 "$2/tests/e2e/serve_browser.py" "$1" "$2"
