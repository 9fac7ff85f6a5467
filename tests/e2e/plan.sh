#!/bin/bash
# End-to-end test of `kindred plan`: output in the three formats, the S-curve
# against the published formula 1 - (1 - s^r)^b (Leskovec, Rajaraman, Ullman,
# "Mining of Massive Datasets", 3.4.2) recomputed in Python, the automatic
# choice against a brute-force search done independently in Python (midpoint
# rule instead of the program's Simpson rule), and exit codes.
# Usage: plan.sh KINDRED_BINARY SOURCE_DIR
set -u
bin=$1
tmp=$(mktemp -d)
trap 'rm -rf "$tmp"' EXIT
fail() {
  echo "FAIL: $*" >&2
  exit 1
}

# Text: the three parts, the choice and how to use it.
"$bin" plan >"$tmp/text" 2>"$tmp/err" || fail "plan exited $?"
[ -s "$tmp/err" ] && fail "plan wrote to stderr: $(cat "$tmp/err")"
grep -q '^Candidate probability by similarity' "$tmp/text" || fail "no S-curve heading"
grep -q '^Alternatives, best first' "$tmp/text" || fail "no alternatives heading"
grep -q '0.8000 .*<- threshold$' "$tmp/text" || fail "threshold row not marked"
grep -q '0.8500 .*<- recall point$' "$tmp/text" || fail "recall point row not marked"
grep -Eq '^Use it with: --bands [0-9]+ --rows [0-9]+$' "$tmp/text" || fail "no usage line"
# Aligned columns: every row of the alternatives table has the header's width.
awk '/^ rank/{on=1; w=length($0); next} on && NF==0{exit} on && length($0)!=w{bad=1} END{exit bad}' \
  "$tmp/text" || fail "alternatives table not aligned"

# Same input, same bytes.
"$bin" plan >"$tmp/text2" || fail "second run exited $?"
cmp -s "$tmp/text" "$tmp/text2" || fail "two runs differ"

# JSON Lines: checked against an independent computation.
"$bin" plan --format jsonl --threshold 0.8 --perms 128 --alternatives 5 >"$tmp/plan.jsonl" ||
  fail "jsonl exited $?"
/usr/bin/python3 - "$tmp/plan.jsonl" <<'EOF' || fail "jsonl check"
import json, sys

records = [json.loads(line) for line in open(sys.argv[1])]
kinds = [r["record"] for r in records]
assert kinds[0] == "settings" and kinds[-1] == "choice", kinds
assert kinds.count("alternative") == 5, kinds

def p(s, b, r):
    return 1 - (1 - s ** r) ** b

curves = [r for r in records if r["record"] == "curve"]
assert len(curves) >= 21 * 4, len(curves)
for c in curves:
    assert abs(c["probability"] - p(c["similarity"], c["bands"], c["rows"])) < 2e-6, c

# Brute force: every (b, r) with b * r <= 128; FN and FP masses by the
# midpoint rule; the choice must meet the recall floor P(0.85) >= 0.99 and
# have the least weighted cost (4 * FN + FP) among those that do.
t, n, steps = 0.8, 128, 1000
def masses(b, r):
    h_fp, h_fn = t / steps, (1 - t) / steps
    fp = sum(p((i + 0.5) * h_fp, b, r) for i in range(steps)) * h_fp
    fn = sum(1 - p(t + (i + 0.5) * h_fn, b, r) for i in range(steps)) * h_fn
    return fn, fp

best = None
for r in range(1, n + 1):
    for b in range(1, n // r + 1):
        if p(0.85, b, r) < 0.99:
            continue
        fn, fp = masses(b, r)
        cost = 4 * fn + fp
        if best is None or cost < best[0]:
            best = (cost, b, r)
choice = records[-1]
assert choice["meets_recall_floor"] is True
assert p(0.85, choice["bands"], choice["rows"]) >= 0.99
fn, fp = masses(choice["bands"], choice["rows"])
assert abs(choice["false_negative_mass"] - fn) < 1e-5, (choice, fn)
assert abs(choice["false_positive_mass"] - fp) < 1e-5, (choice, fp)
assert 4 * fn + fp <= best[0] + 1e-5, (choice, best)
EOF

# TSV: three tables with header lines, separated by one empty line.
"$bin" plan --format tsv >"$tmp/plan.tsv" || fail "tsv exited $?"
[ "$(grep -c '^$' "$tmp/plan.tsv")" = 2 ] || fail "tsv: expected three tables"
head -1 "$tmp/plan.tsv" | grep -q $'^similarity\t' || fail "tsv: curve header"
grep -q $'^rank\tbands\trows\tslots\t' "$tmp/plan.tsv" || fail "tsv: alternatives header"
tail -2 "$tmp/plan.tsv" | head -1 | grep -q $'^bands\trows$' || fail "tsv: choice header"

# A given setting is shown with its rank.
"$bin" plan --bands 8 --rows 8 >"$tmp/given" || fail "given exited $?"
grep -Eq '^Given: 8 bands x 8 rows ranks [0-9]+ of [0-9]+$' "$tmp/given" || fail "given line"
grep -q '8x8 (given)' "$tmp/given" || fail "given curve column"

# Bad values: usage errors (exit 2) with a message naming the problem.
expect_usage() {
  local pattern=$1
  shift
  "$bin" plan "$@" >"$tmp/out" 2>"$tmp/err"
  local code=$?
  [ "$code" = 2 ] || fail "plan $* exited $code, expected 2"
  grep -qi -- "$pattern" "$tmp/err" || fail "plan $*: message '$(cat "$tmp/err")'"
  [ -s "$tmp/out" ] && fail "plan $* wrote output"
  return 0
}
expect_usage threshold --threshold 0
expect_usage threshold --threshold 1.5
expect_usage threshold --threshold abc
expect_usage perms --perms 0
expect_usage "bands and rows" --bands 3
expect_usage exceeds --bands 20 --rows 20
expect_usage format --format xml
expect_usage weight --fn-weight -1
echo "plan: ok"
