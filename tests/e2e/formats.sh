#!/usr/bin/env bash
# One --format vocabulary across commands (README "Output formats"): text,
# jsonl, json (one object), tsv, csv. Every spelling a command accepted before
# still works with the same bytes; the aliases print what their canonical
# name prints; a name a command does not print is a usage error that lists
# what it does print. The csv form of plan is read back with Python's csv
# module (an independent reader) and must hold the same cells as its tsv
# form.
source "$(dirname "$0")/common.bash"

A="$SOURCE_DIR/sample_corpus/archive"
LABELS="$SOURCE_DIR/sample_corpus/labels.tsv"
DOC_A="$A/2023/01/new-bus-route-links-the-town.txt"
DOC_B="$A/partners/orrin-valley-weekly/2023/01-brannock-and-port-tessary-linked-by.txt"
INDEX="$WORK/a.kin"
expect_exit 0 "build" -- "$KINDRED" build -q "$INDEX" "$A"

# accepted COMMAND-ARGS...: exit 0 and some output, kept in $WORK/out.
accepted() {
  expect_exit 0 "$*" -- "$KINDRED" "$@"
  [[ -s "$WORK/out" ]] || fail "$*: no output"
}
# rejected NAMES-LISTED COMMAND ARGS...: exit 2, the house style, the list.
rejected() {
  local list=$1 command=$2
  shift
  expect_exit 2 "$* rejected" -- "$KINDRED" "$@"
  expect_stderr "kindred: $command: --format: expected one of $list, not" "$*"
}

# Every spelling of before, per command.
for f in jsonl tsv csv; do
  accepted sweep -q --format "$f" "$A"
  accepted check -q --format "$f" "$INDEX" "$SOURCE_DIR/sample_corpus/submissions"
done
for f in text jsonl tsv csv; do accepted plan --format "$f"; done
for f in text json jsonl; do accepted info --format "$f" "$INDEX"; done
for f in text json jsonl; do accepted explain --no-text --format "$f" "$DOC_A" "$DOC_B"; done
for f in text jsonl; do
  accepted tune -q --format "$f" "$A" --labels "$LABELS" --perms 64 --thresholds 0.8
done

# Aliases print the same bytes as their canonical name.
"$KINDRED" info --format json "$INDEX" >"$WORK/info.json"
"$KINDRED" info --format jsonl "$INDEX" >"$WORK/info.jsonl"
cmp -s "$WORK/info.json" "$WORK/info.jsonl" || fail "info: jsonl and json differ"
[[ $(wc -l <"$WORK/info.json") -eq 1 ]] || fail "info json is not one line"
"$KINDRED" explain --format json "$DOC_A" "$DOC_B" >"$WORK/explain.json"
"$KINDRED" explain --format jsonl "$DOC_A" "$DOC_B" >"$WORK/explain.jsonl"
cmp -s "$WORK/explain.json" "$WORK/explain.jsonl" || fail "explain: jsonl and json differ"
$PY -c 'import json,sys; [json.loads(l) for f in sys.argv[1:] for l in open(f)]' \
  "$WORK/info.json" "$WORK/explain.json" || fail "json output is not JSON"

# Names a command does not print.
rejected "jsonl, tsv or csv" sweep --format json "$A"
rejected "jsonl, tsv or csv" add --format text "$INDEX" "$A"
rejected "jsonl, tsv or csv" check --format xml "$INDEX" "$A"
rejected "text, jsonl, tsv or csv" plan --format json
rejected "text, json or jsonl" info --format csv "$INDEX"
rejected "text, json or jsonl" explain --format tsv "$DOC_A" "$DOC_B"
rejected "text or jsonl" tune --format csv "$A" --labels "$LABELS"

# plan: csv and tsv hold the same cells, read by Python's csv module.
"$KINDRED" plan --format tsv >"$WORK/plan.tsv"
"$KINDRED" plan --format csv >"$WORK/plan.csv"
$PY - "$WORK/plan.tsv" "$WORK/plan.csv" <<'PY' || fail "plan csv and tsv differ"
import csv, sys
tsv = list(csv.reader(open(sys.argv[1], newline=""), delimiter="\t"))
comma = list(csv.reader(open(sys.argv[2], newline="")))
assert tsv == comma, "cells differ"
assert len(tsv) > 30 and tsv[0][0] == "similarity", tsv[:2]
PY

finish
