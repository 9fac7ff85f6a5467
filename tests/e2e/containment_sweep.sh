# End to end: `kindred sweep --measure containment` finds partial copies.
# Reference: the exhaustive containment sweep (`--exhaustive`), which
# compares every pair exactly. The LSH sweep must find at least 0.99 of the
# pairs whose containment is at least t + 0.05, at t = 0.5, 0.7 and 0.9, on
# a corpus of planted excerpts (tools/gen_excerpts.py: passages of 5% to 60%
# of long documents inside short ones, and short documents inside long
# ones, lightly edited), and report only pairs the reference reports, with
# the same values.
source "$(dirname "$0")/common.bash"

$PY "$SOURCE_DIR/tools/gen_excerpts.py" --docs 160 --planted 0.4 --sources 0.06 \
  --long-min 1000 --long-max 8000 --short-max 1500 --out "$WORK/corpus.jsonl" 2>/dev/null ||
  fail "generator failed"

for t in 0.5 0.7 0.9; do
  expect_exit 0 "containment sweep t=$t" -- \
    "$KINDRED" sweep --measure containment -t "$t" --print pairs "$WORK/corpus.jsonl"
  cp "$WORK/out" "$WORK/lsh.jsonl"
  expect_stderr "containment LSH:" "summary names the containment search"
  expect_exit 0 "exhaustive containment sweep t=$t" -- \
    "$KINDRED" sweep --measure containment -t "$t" --exhaustive --print pairs "$WORK/corpus.jsonl"
  cp "$WORK/out" "$WORK/ex.jsonl"
  $PY - "$WORK/lsh.jsonl" "$WORK/ex.jsonl" "$t" <<'EOF' || fail "recall at t=$t"
import json, sys
lsh = [json.loads(l) for l in open(sys.argv[1])]
ex = [json.loads(l) for l in open(sys.argv[2])]
t = float(sys.argv[3])
key = lambda p: (p["a"], p["b"])
ex_by = {key(p): p for p in ex}
for p in lsh:
    if ex_by.get(key(p)) != p:
        sys.exit(f"LSH pair not reported alike by the reference: {p}")
c = lambda p: max(p["containment_a_in_b"], p["containment_b_in_a"])
want = [key(p) for p in ex if c(p) >= t + 0.05]
found = {key(p) for p in lsh}
recall = sum(k in found for k in want) / len(want)
print(f"t={t}: {len(want)} pairs at t+0.05 or more, recall {recall:.3f}")
if len(want) < 20 or recall < 0.99:
    sys.exit(f"recall {recall} over {len(want)} pairs")
# Partial copies, not near-duplicates: most have a low Jaccard.
if sum(p["jaccard"] < t for p in ex if key(p) in want) < len(want) // 2:
    sys.exit("the corpus plants too few partial copies")
EOF
done

# Same bytes for any thread count.
"$KINDRED" sweep -q --measure containment -t 0.7 --print pairs -j 1 "$WORK/corpus.jsonl" >"$WORK/j1"
"$KINDRED" sweep -q --measure containment -t 0.7 --print pairs -j 3 "$WORK/corpus.jsonl" >"$WORK/j3"
cmp -s "$WORK/j1" "$WORK/j3" || fail "thread count changed the containment pairs"

# A sweep of an index finds the same containment pairs as a sweep of the
# corpus it was built from.
"$KINDRED" build -q "$WORK/corpus.kin" "$WORK/corpus.jsonl" || fail "build"
expect_exit 0 "index containment sweep" -- \
  "$KINDRED" sweep --index "$WORK/corpus.kin" --measure containment -t 0.7 --print pairs
cmp -s "$WORK/out" "$WORK/j1" || fail "index sweep differs from the corpus sweep"
expect_stderr "containment LSH:" "index sweep uses the containment search"

# The least contained size: a sentence inside a story is left out by
# default, counted in the summary, and found with a lower bound.
story="The harbour board met on Tuesday evening to discuss the dredging of the north channel, which has silted up badly since the winter storms. Fishermen told the board that boats with a deep keel can no longer reach the fuel dock at low tide. The chair promised a decision before the end of the month and asked the engineers for a costed plan."
mkdir -p "$WORK/tree"
printf '%s\n' "$story" >"$WORK/tree/story.txt"
printf 'Fishermen told the board that boats with a deep keel can no longer reach the fuel dock.\n' \
  >"$WORK/tree/quote.txt"
expect_exit 0 "small quote, default bound" -- \
  "$KINDRED" sweep --measure containment -t 0.9 --print pairs "$WORK/tree"
[[ ! -s "$WORK/out" ]] || fail "a quote under the bound was reported: $(cat "$WORK/out")"
expect_stderr "small documents   1 under 20 shingles" "summary counts the small document"
expect_exit 0 "small quote, bound 5" -- \
  "$KINDRED" sweep --measure containment -t 0.9 --min-contained-size 5 --print pairs "$WORK/tree"
grep -q '"a":"quote.txt","b":"story.txt"' "$WORK/out" || fail "quote not found: $(cat "$WORK/out")"
grep -q '"containment_a_in_b":1.000000' "$WORK/out" || fail "quote lies wholly in the story"
expect_exit 2 "bound 0" -- \
  "$KINDRED" sweep --measure containment --min-contained-size 0 "$WORK/tree"
expect_stderr "least contained size" "bound 0 message"

finish
