#!/usr/bin/env bash
# End to end: containment against an index. `build --measure containment`
# stores the containment search's keys (format version 3); `check` and
# `add --measure containment` find indexed documents that contain an upload
# and indexed documents contained in it, and say which way in `contained`.
# Reference: `sweep --measure containment --exhaustive` over the same
# documents, which compares every pair exactly. An index without stored
# keys (format version 2, built for Jaccard) gives the same answers from
# keys computed in memory, and answers Jaccard queries as the version-3
# index does.
source "$(dirname "$0")/common.bash"

$PY "$SOURCE_DIR/tools/gen_excerpts.py" --docs 160 --planted 0.4 --sources 0.06 \
  --long-min 1000 --long-max 8000 --short-max 1500 --out "$WORK/all.jsonl" 2>/dev/null ||
  fail "generator failed"
head -n 100 "$WORK/all.jsonl" >"$WORK/indexed.jsonl"
tail -n +101 "$WORK/all.jsonl" >"$WORK/uploads.jsonl"
t=0.7

expect_exit 0 "build for containment" -- "$KINDRED" build -q "$WORK/c.kin" "$WORK/indexed.jsonl" \
  --measure containment -t $t
expect_exit 0 "build for jaccard" -- "$KINDRED" build -q "$WORK/j.kin" "$WORK/indexed.jsonl"
expect_exit 0 "info" -- "$KINDRED" info "$WORK/c.kin"
grep -q "^format version   3 " "$WORK/out" || fail "containment index: $(head -3 "$WORK/out")"
grep -q "^containment keys for containment >= 0.7, smaller document at least 20 shingles, 16 size partitions$" "$WORK/out" || fail "info: containment keys"
expect_exit 0 "info jaccard" -- "$KINDRED" info "$WORK/j.kin"
grep -q "^format version   2 " "$WORK/out" || fail "jaccard index: $(head -3 "$WORK/out")"
expect_exit 0 "audit" -- "$KINDRED" audit -q "$WORK/c.kin"

expect_exit 0 "exhaustive sweep" -- "$KINDRED" sweep --measure containment -t $t --exhaustive \
  --print pairs "$WORK/all.jsonl"
cp "$WORK/out" "$WORK/exhaustive.jsonl"
expect_exit 0 "check" -- "$KINDRED" check "$WORK/c.kin" "$WORK/uploads.jsonl" --measure containment -t $t
cp "$WORK/out" "$WORK/check.jsonl"
expect_exit 0 "check, version-2 index" -- "$KINDRED" check "$WORK/j.kin" "$WORK/uploads.jsonl" \
  --measure containment -t $t
cmp -s "$WORK/out" "$WORK/check.jsonl" || fail "keys computed in memory answer otherwise"

$PY - "$WORK/check.jsonl" "$WORK/exhaustive.jsonl" "$WORK/indexed.jsonl" "$t" <<'PYEOF' || fail "check against the exhaustive sweep"
import json, sys
matches = [json.loads(l) for l in open(sys.argv[1])]
pairs = [json.loads(l) for l in open(sys.argv[2])]
indexed = {json.loads(l)["id"] for l in open(sys.argv[3])}
t = float(sys.argv[4])
# The reference pairs between an upload and an indexed document, or two uploads.
ref = {}
for p in pairs:
    if p["a"] in indexed and p["b"] in indexed:
        continue
    ref[frozenset((p["a"], p["b"]))] = p
found = set()
for m in matches:
    key = frozenset((m["id"], m["match"]))
    assert key in ref, ("not in the reference", m)
    p = ref[key]
    a_is_id = p["a"] == m["id"]
    assert m["match_in"] == ("index" if m["match"] in indexed else "batch"), m
    assert m["shared"] == p["shared"], (m, p)
    c_id = m["containment_id_in_match"]
    c_match = m["containment_match_in_id"]
    assert abs(c_id - (p["containment_a_in_b"] if a_is_id else p["containment_b_in_a"])) < 1e-6
    way = {(True, True): "both", (True, False): "id_in_match", (False, True): "match_in_id"}
    assert m["contained"] == way[(c_id >= t - 1e-9, c_match >= t - 1e-9)], m
    found.add(key)
strong = [k for k, p in ref.items()
          if max(p["containment_a_in_b"], p["containment_b_in_a"]) >= t + 0.05]
missed = [k for k in strong if k not in found]
assert len(strong) >= 20, len(strong)
assert len(missed) <= 0.01 * len(strong), (len(missed), len(strong))
ways = {m["contained"] for m in matches if m["match_in"] == "index"}
assert {"id_in_match", "match_in_id"} <= ways, ways
print(len(matches), "matches,", len(strong), "reference pairs >= t + 0.05,", len(missed), "missed")
PYEOF

# Another threshold than the stored one: keys computed in memory.
expect_exit 0 "check -t 0.9" -- "$KINDRED" check "$WORK/c.kin" "$WORK/uploads.jsonl" --measure containment -t 0.9
$PY - "$WORK/out" "$WORK/check.jsonl" <<'PYEOF' || fail "check -t 0.9 differs from the matches of -t 0.7 that reach 0.9"
import json, sys
high = [json.loads(l) for l in open(sys.argv[1])]
low = [json.loads(l) for l in open(sys.argv[2])]
want = {(m["id"], m["match"]) for m in low
        if max(m["containment_id_in_match"], m["containment_match_in_id"]) >= 0.95}
got = {(m["id"], m["match"]) for m in high}
assert want <= got, want - got
PYEOF

# Jaccard queries: the same answers from both indexes.
expect_exit 0 "jaccard check, version 3" -- "$KINDRED" check "$WORK/c.kin" "$WORK/uploads.jsonl" --measure jaccard -t 0.8
cp "$WORK/out" "$WORK/jaccard3.jsonl"
expect_exit 0 "jaccard check, version 2" -- "$KINDRED" check "$WORK/j.kin" "$WORK/uploads.jsonl" --measure jaccard -t 0.8
cmp -s "$WORK/out" "$WORK/jaccard3.jsonl" || fail "Jaccard answers differ between versions 2 and 3"
grep -q '"contained"' "$WORK/out" && fail "Jaccard match records grew a field"

# add: the new segment stores its keys too; compact keeps them.
expect_exit 0 "add" -- "$KINDRED" add "$WORK/c.kin" "$WORK/uploads.jsonl" --measure containment -t $t
cmp -s "$WORK/out" "$WORK/check.jsonl" || fail "add reports other matches than check"
expect_exit 0 "audit after add" -- "$KINDRED" audit -q "$WORK/c.kin"
expect_exit 0 "compact" -- "$KINDRED" compact -q "$WORK/c.kin"
expect_exit 0 "build all" -- "$KINDRED" build -q "$WORK/all.kin" "$WORK/all.jsonl" --measure containment -t $t
cmp -s "$WORK/c.kin" "$WORK/all.kin" || fail "compact of a version-3 index differs from its build"
finish
