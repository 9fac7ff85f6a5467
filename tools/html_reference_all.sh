#!/bin/bash
# Compares kindred's text of HTML pages with the independent html5lib
# implementation (tests/reference/html_text_reference.py) as word tokens, on
# every HTML file under /usr/share and on 1,000 generated hostile pages.
# Prints the comparison summaries and, for hostile pages that differ, how
# many hold a <template> or <form> element (the known parser differences,
# see tests/e2e/html_reference.sh).
# Usage: tools/html_reference_all.sh [BUILD_DIR]   (default: build)
set -euo pipefail
ROOT=$(cd "$(dirname "$0")/.." && pwd)
BUILD=${1:-$ROOT/build}
TEXTS=$BUILD/tools/kindred_texts
WORK=$(mktemp -d)
trap 'rm -rf "$WORK"' EXIT

find /usr/share -type f \( -name '*.html' -o -name '*.htm' -o -name '*.xhtml' \) 2>/dev/null |
  sort >"$WORK/system"
mapfile -t system <"$WORK/system"
echo "HTML files under /usr/share: ${#system[@]}, $(cat "${system[@]}" | wc -c) bytes"
"$TEXTS" --html "${system[@]}" >"$WORK/system.jsonl"
/usr/bin/python3 "$ROOT/tests/reference/html_text_reference.py" "$WORK/system.jsonl" \
  "${system[@]}" | tail -20 || true

/usr/bin/python3 "$ROOT/tests/reference/hostile_pages.py" "$WORK/hostile" 1000
mapfile -t hostile < <(ls "$WORK"/hostile/*.html)
"$TEXTS" --html "${hostile[@]}" >"$WORK/hostile.jsonl"
/usr/bin/python3 "$ROOT/tests/reference/html_text_reference.py" "$WORK/hostile.jsonl" \
  "${hostile[@]}" >"$WORK/hostile.out" || true
tail -1 "$WORK/hostile.out"
differing=$(grep -c '^DIFF' "$WORK/hostile.out" || true)
known=0
for page in $(grep '^DIFF' "$WORK/hostile.out" | sed 's/^DIFF \(.*\.html\):.*/\1/'); do
  if grep -aqi -e '<template' -e '<form' "$page"; then known=$((known + 1)); fi
done
echo "hostile pages that differ: $differing, of which $known hold <template> or <form>"
