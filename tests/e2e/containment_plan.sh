# End to end: `kindred plan --measure containment`.
# Reference: LSH Ensemble (Zhu, Nargesian, Pu, Miller, VLDB 2016): a pair of
# sizes q <= x and containment c has Jaccard s = c q / (q + x - c q), and a
# banding of b bands of r rows proposes it with probability 1 - (1 - s^r)^b;
# recomputed here in Python from the printed bandings and partition bounds.
source "$(dirname "$0")/common.bash"

expect_exit 0 "containment plan, jsonl" -- \
  "$KINDRED" plan --measure containment --threshold 0.7 --largest-size 5000 --documents 1000 \
  --format jsonl
cp "$WORK/out" "$WORK/plan.jsonl"
$PY - "$WORK/plan.jsonl" <<'PYEOF' || fail "jsonl plan"
import json, sys
records = [json.loads(l) for l in open(sys.argv[1])]
parts = [r for r in records if r["record"] == "partition"]
pairs = {(r["smaller"], r["larger"]): r for r in records if r["record"] == "pair"}
curves = [r for r in records if r["record"] == "curve"]
# Partitions double from the least contained size (default 20) and cover 5000.
assert [(p["lower"], p["upper"]) for p in parts[:3]] == [(20, 39), (40, 79), (80, 159)], parts
assert parts[-1]["upper"] >= 5000 and parts[-2]["upper"] < 5000, parts
assert len(pairs) == len(parts) * (len(parts) + 1) // 2
def prob(c, q, x, b, r):
    s = c * q / (q + x - c * q)
    return 1 - (1 - s ** r) ** b
for c in curves:
    p = pairs[(c["smaller"], c["larger"])]
    q, x = parts[c["smaller"]]["lower"], parts[c["larger"]]["upper"]
    want = prob(c["containment"], q, x, p["bands"], p["rows"])
    assert abs(c["probability"] - want) < 2e-6, (c, want)
for (i, j), p in pairs.items():
    assert p["bands"] * p["rows"] <= 128
    at = prob(0.75, parts[i]["lower"], parts[j]["upper"], p["bands"], p["rows"])
    assert abs(p["probability_at_recall_point"] - at) < 2e-6, p
    assert p["meets_recall_floor"] == (at >= 0.99), p
    # Partitions whose bounds are within a factor 8 can meet the floor.
    if parts[j]["upper"] / parts[i]["lower"] <= 8:
        assert p["meets_recall_floor"], p
PYEOF

expect_exit 0 "containment plan, text" -- \
  "$KINDRED" plan --measure containment --threshold 0.9 --largest-size 1000
[[ ! -s "$WORK/err" ]] || fail "text plan wrote to stderr"
grep -q "^Containment plan (LSH Ensemble) for threshold 0.9 with 128 perms" "$WORK/out" ||
  fail "text header: $(head -3 "$WORK/out")"
grep -q "6 size partitions" "$WORK/out" || fail "partition count: $(head -3 "$WORK/out")"

expect_exit 0 "containment plan, tsv" -- "$KINDRED" plan --measure containment --format tsv
head -1 "$WORK/out" | grep -q "^smaller	larger	smaller_from" || fail "tsv header"

expect_exit 2 "bands with containment" -- "$KINDRED" plan --measure containment --bands 4 --rows 2
expect_stderr "a banding per pair of size partitions" "bands with containment message"
expect_exit 2 "size bound 0" -- "$KINDRED" plan --measure containment --min-contained-size 0
finish
