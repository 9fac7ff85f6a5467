# End to end: `kindred tune --measure containment` searches each threshold
# with the containment plan `sweep --measure containment` uses. On a corpus
# of planted excerpts (tools/gen_excerpts.py), labelled from the exhaustive
# containment sweep (every pair compared exactly), the precision and recall
# of every setting are recomputed in Python from the pairs the sweep reports
# with that setting; the candidate rate by containment, the plan records,
# the text and the HTML report (parsed with xmllint) are checked.
source "$(dirname "$0")/common.bash"

has_out() { grep -qF -- "$1" "$WORK/out" || fail "$2: stdout lacks \"$1\""; }

$PY "$SOURCE_DIR/tools/gen_excerpts.py" --docs 160 --planted 0.4 --sources 0.06 \
  --long-min 1000 --long-max 8000 --short-max 1500 --out "$WORK/corpus.jsonl" 2>/dev/null ||
  fail "generator failed"
"$KINDRED" sweep -q --measure containment -t 0.5 --exhaustive --print pairs \
  "$WORK/corpus.jsonl" >"$WORK/exhaustive.jsonl" || fail "exhaustive sweep"

# Labels: exhaustive pairs of containment >= 0.7 are duplicates, those of
# 0.5 to 0.7 distinct, and 40 random other pairs distinct.
$PY - "$WORK/exhaustive.jsonl" "$WORK/corpus.jsonl" >"$WORK/labels.tsv" <<'PY' || fail "labels"
import json, random, sys
pairs = [json.loads(l) for l in open(sys.argv[1])]
ids = [json.loads(l)["id"] for l in open(sys.argv[2])]
c = lambda p: max(p["containment_a_in_b"], p["containment_b_in_a"])
print("a\tb\tlabel")
seen = set()
for p in pairs:
    seen.add((p["a"], p["b"]))
    print(f"{p['a']}\t{p['b']}\t{'duplicate' if c(p) >= 0.7 else 'distinct'}")
rng, n = random.Random(7), 0
while n < 40:
    a, b = sorted(rng.sample(ids, 2))
    if (a, b) not in seen:
        seen.add((a, b)); n += 1
        print(f"{a}\t{b}\tdistinct")
if sum(c(p) >= 0.7 for p in pairs) < 20:
    sys.exit("too few planted pairs")
PY

GRID=(--shingles word:5 --perms 64,128 --thresholds 0.5,0.7,0.8)
expect_exit 0 "containment tune jsonl" -- "$KINDRED" tune -q "$WORK/corpus.jsonl" \
  --labels "$WORK/labels.tsv" --measure containment "${GRID[@]}" --format jsonl \
  --report "$WORK/report.html"
cp "$WORK/out" "$WORK/tune.jsonl"

$PY - "$KINDRED" "$WORK/corpus.jsonl" "$WORK/labels.tsv" "$WORK/tune.jsonl" <<'PY' ||
import json, subprocess, sys
kindred, corpus, labels_path, tune_path = sys.argv[1:5]
records = [json.loads(line) for line in open(tune_path)]
kinds = lambda k: [r for r in records if r["record"] == k]
settings = kinds("setting")
assert len(settings) == 6, settings
labels = {}
for line in open(labels_path).read().splitlines()[1:]:
    a, b, label = line.split("\t")
    labels[(a, b)] = label == "duplicate"
for s in settings:
    # A containment search: no banding of its own, a plan of partitions.
    assert (s["bands"], s["rows"]) == (0, 0) and s["partitions"] >= 2, s
    out = subprocess.run([kindred, "sweep", "-q", corpus, "--print", "pairs", "--measure",
                          "containment", "--shingle", "word", "-k", "5", "--perms",
                          str(s["perms"]), "--threshold", "%.2f" % s["threshold"]],
                         capture_output=True, text=True, check=True)
    reported = {(p["a"], p["b"]) for p in map(json.loads, out.stdout.splitlines())}
    tp = sum(1 for pair, dup in labels.items() if dup and pair in reported)
    fp = sum(1 for pair, dup in labels.items() if not dup and pair in reported)
    fn = sum(1 for pair, dup in labels.items() if dup and pair not in reported)
    p = tp / (tp + fp) if tp + fp else 0.0
    r = tp / (tp + fn) if tp + fn else 0.0
    if (s["true_positives"], s["false_positives"], s["false_negatives"]) != (tp, fp, fn) or \
            abs(s["precision"] - p) > 1e-6 or abs(s["recall"] - r) > 1e-6:
        sys.exit(f"setting {s['rank']}: program {s}, sweep gives tp {tp} fp {fp} fn {fn}")
best = settings[0]
# The duplicates are planted copies of containment >= 0.7: found at t = 0.7.
if best["threshold"] != 0.7 or best["recall"] < 0.95:
    sys.exit(f"recommendation {best}")
parts = kinds("partition")
assert len(parts) == best["partitions"] and parts[0]["lower"] == 20, parts
assert all(parts[i]["upper"] + 1 == parts[i + 1]["lower"] for i in range(len(parts) - 1))
n = len(parts)
assert len(kinds("partition_pair")) == n * (n + 1) // 2
rates = kinds("candidate_rate")
assert len(rates) == 10 and sum(r["pairs"] for r in rates) == len(labels), rates
# Pairs well above the threshold are candidates as often as the plan says.
for r in rates:
    if r["from"] >= 0.7 and r["pairs"] > 0:
        assert r["observed"] >= 0.9 and r["expected"] >= 0.9, r
rec = kinds("recommendation")[0]
assert "--measure containment" in rec["command"] and "--bands" not in rec["command"], rec
PY
  fail "containment tune numbers"

# Text: the plan and the candidate rate; the HTML report is XML.
expect_exit 0 "containment tune text" -- "$KINDRED" tune -q "$WORK/corpus.jsonl" \
  --labels "$WORK/labels.tsv" --measure containment "${GRID[@]}" --min-contained-size 30
has_out "Containment plan of the recommendation (LSH Ensemble)" "text shows the plan"
has_out "the smaller document at least 30 shingles" "text shows the least size"
has_out "Candidate rate of the labelled pairs by containment" "text shows the rates"
has_out "--min-contained-size 30" "command line carries the least size"
xmllint --noout "$WORK/report.html" || fail "report is not XML"
grep -q "Containment plan (LSH Ensemble)" "$WORK/report.html" || fail "report lacks the plan"
grep -q "Candidate rate of the labelled pairs" "$WORK/report.html" || fail "report lacks rates"

# Bandings are the plan's to choose.
expect_exit 2 "containment with --bandings" -- "$KINDRED" tune -q "$WORK/corpus.jsonl" \
  --labels "$WORK/labels.tsv" --measure containment --bandings 16x8
expect_stderr "bandings cannot be listed with the containment measure" "bandings message"

finish
