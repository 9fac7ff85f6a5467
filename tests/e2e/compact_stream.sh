#!/usr/bin/env bash
# End to end: `kindred compact` streams the segments into one. The result is
# the same bytes as `build` writes for the same live documents in one
# segment, with and without --memory (whose band keys are then sorted in
# runs on disk), and replaced documents are left out.
source "$(dirname "$0")/common.bash"

$PY "$SOURCE_DIR/tools/gen_corpus.py" --docs 2400 --words-min 20 --words-max 40 \
  --out "$WORK/all.jsonl" 2>/dev/null || fail "generator failed"
head -n 1500 "$WORK/all.jsonl" >"$WORK/first.jsonl"
tail -n +1501 "$WORK/all.jsonl" >"$WORK/second.jsonl"
# 2400 documents x 32 bands: 76,800 band keys, more than one run under 4M.
banding=(--bands 32 --rows 4)

expect_exit 0 "build in one segment" -- "$KINDRED" build -q "$WORK/one.kin" "$WORK/all.jsonl" "${banding[@]}"
expect_exit 0 "build the first part" -- "$KINDRED" build -q "$WORK/parts.kin" "$WORK/first.jsonl" "${banding[@]}"
expect_exit 0 "add the second part" -- "$KINDRED" add -q "$WORK/parts.kin" "$WORK/second.jsonl"
cp "$WORK/parts.kin" "$WORK/bounded.kin"

expect_exit 0 "compact" -- "$KINDRED" compact "$WORK/parts.kin"
expect_stderr "2 segments, 2400 documents -> 1 segment, 2400 documents" "compact summary"
cmp -s "$WORK/parts.kin" "$WORK/one.kin" || fail "compact differs from a one-segment build"

expect_exit 0 "compact --memory" -- "$KINDRED" compact "$WORK/bounded.kin" --memory 4M \
  --scratch-dir "$WORK"
expect_stderr "band keys sorted in 2 runs under --memory" "runs on disk"
cmp -s "$WORK/bounded.kin" "$WORK/one.kin" || fail "compact --memory differs from a one-segment build"
[[ -z "$(find "$WORK" -name 'kindred-keys-*')" ]] || fail "scratch file left behind"

# Replacing documents: compact leaves the old versions out, and equals a
# build of the live documents in their order.
head -n 3 "$WORK/all.jsonl" | sed 's/"text": "/"text": "Changed. /' >"$WORK/changed.jsonl"
expect_exit 0 "replace three" -- "$KINDRED" add -q "$WORK/bounded.kin" "$WORK/changed.jsonl" \
  --on-duplicate replace
expect_exit 0 "compact after replace" -- "$KINDRED" compact -q "$WORK/bounded.kin" --memory 4M
{ tail -n +4 "$WORK/all.jsonl"; cat "$WORK/changed.jsonl"; } >"$WORK/live.jsonl"
expect_exit 0 "build the live documents" -- "$KINDRED" build -q "$WORK/live.kin" "$WORK/live.jsonl" "${banding[@]}"
cmp -s "$WORK/bounded.kin" "$WORK/live.kin" || fail "compact after replace differs from a build"
expect_exit 0 "audit" -- "$KINDRED" audit -q "$WORK/bounded.kin"

expect_exit 2 "bad --memory" -- "$KINDRED" compact "$WORK/bounded.kin" --memory lots
finish
