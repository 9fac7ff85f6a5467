# End to end: `kindred tune` on the sample corpus. Its precision, recall and
# F1 are recomputed in Python from the pairs `kindred sweep` reports with
# each setting and from the labels; the exact Jaccard of the wrong pairs is
# recomputed with the independent shingle reference (PyICU + xxhash); the
# HTML report is parsed with xmllint and checked to load nothing.
source "$(dirname "$0")/common.bash"

ARCHIVE="$SOURCE_DIR/sample_corpus/archive"
LABELS="$SOURCE_DIR/sample_corpus/labels.tsv"
GRID=(--shingles word:3,word:5 --perms 64,128 --thresholds 0.5,0.6,0.7,0.8,0.9)

# 1. JSON Lines output and the report.
expect_exit 0 "tune jsonl" -- "$KINDRED" tune -q "$ARCHIVE" --labels "$LABELS" "${GRID[@]}" \
  --format jsonl --beta 2 --report "$WORK/report.html"
cp "$WORK/out" "$WORK/tune.jsonl"
[[ ! -s "$WORK/err" ]] || fail "quiet tune printed on stderr: $(cat "$WORK/err")"

# 2. Independent check of the numbers of several settings.
$PY - "$KINDRED" "$ARCHIVE" "$LABELS" "$WORK/tune.jsonl" "$SOURCE_DIR" <<'PY' || fail "numbers differ"
import json, subprocess, sys
kindred, archive, labels_path, tune_path, source = sys.argv[1:6]
sys.path.insert(0, source + "/tests/reference")
import shingle_reference as ref

records = [json.loads(line) for line in open(tune_path)]
settings = [r for r in records if r["record"] == "setting"]
summary = records[0]
labels = {}
for line in open(labels_path).read().splitlines()[1:]:
    a, b, label = line.split("\t")
    labels[tuple(sorted((a, b)))] = label == "duplicate"
assert summary["labelled_pairs"] == len(labels), summary
bad = 0
for s in settings[:3] + settings[len(settings) // 2:len(settings) // 2 + 2] + settings[-2:]:
    out = subprocess.run([kindred, "sweep", "-q", archive, "--print", "pairs",
                          "--shingle", s["shingle"], "-k", str(s["k"]), "--perms", str(s["perms"]),
                          "--threshold", "%.2f" % s["threshold"], "--bands", str(s["bands"]),
                          "--rows", str(s["rows"])], capture_output=True, text=True, check=True)
    reported = {tuple(sorted((p["a"], p["b"]))) for p in map(json.loads, out.stdout.splitlines())}
    tp = sum(1 for pair, dup in labels.items() if dup and pair in reported)
    fp = sum(1 for pair, dup in labels.items() if not dup and pair in reported)
    fn = sum(1 for pair, dup in labels.items() if dup and pair not in reported)
    p = tp / (tp + fp) if tp + fp else 0.0
    r = tp / (tp + fn) if tp + fn else 0.0
    f1 = 2 * p * r / (p + r) if p + r else 0.0
    f2 = 5 * p * r / (4 * p + r) if p + r else 0.0  # F-beta, beta = 2 (van Rijsbergen)
    for name, want in (("precision", p), ("recall", r), ("f1", f1), ("fbeta", f2)):
        if abs(s[name] - want) > 1e-6:
            print("rank %d %s: program %f, independent %f" % (s["rank"], name, s[name], want))
            bad += 1
    if (s["true_positives"], s["false_positives"], s["false_negatives"]) != (tp, fp, fn):
        print("rank %d counts differ" % s["rank"]); bad += 1
best = settings[0]
if summary["target_met"] and best["recall"] < 0.95:
    print("recommendation misses its target"); bad += 1
for s in settings:
    if s["meets_target"] and s["precision"] == best["precision"] and \
            s["candidates_per_document"] < best["candidates_per_document"]:
        print("a cheaper setting at the same precision:", s); bad += 1
# The wrong pairs' exact Jaccard, from the independent shingle reference.
seed = 0x6b696e6472656431
for w in (r for r in records if r["record"] == "wrong"):
    sets = []
    for doc in (w["a"], w["b"]):
        text = ref.normalize(open(archive + "/" + doc, "rb").read())
        sets.append(ref.shingle_set(text, best["shingle"], best["k"], seed))
    union = len(sets[0] | sets[1])
    jaccard = len(sets[0] & sets[1]) / union if union else 0.0
    if abs(jaccard - w["jaccard"]) > 1e-6:
        print("wrong pair", w["a"], w["b"], "jaccard", w["jaccard"], "reference", jaccard); bad += 1
hist = sum(r["pairs"] for r in records if r["record"] == "histogram")
if hist != best["candidate_pairs"]:
    print("histogram total", hist, "candidates", best["candidate_pairs"]); bad += 1
sys.exit(1 if bad else 0)
PY

# 3. The report: well-formed XML, three plots, the table, nothing loaded.
REPORT="$WORK/report.html"
xmllint --noout "$REPORT" 2>"$WORK/xml" || fail "report is not well-formed: $(head -c 500 "$WORK/xml")"
xmllint --html --noout "$REPORT" 2>"$WORK/html" || fail "HTML parser errors: $(head -c 500 "$WORK/html")"
[[ $(xmllint --xpath 'count(//svg)' "$REPORT") == 3 ]] || fail "three plots expected"
[[ $(xmllint --xpath 'count(//svg[polyline])' "$REPORT") -ge 2 ]] || fail "curves missing"
[[ $(xmllint --xpath 'count(//svg/rect[title])' "$REPORT") -eq 20 ]] || fail "20 histogram bars expected"
[[ $(xmllint --xpath 'count(//table/tr)' "$REPORT") -ge 10 ]] || fail "ranking table missing"
for label in "exact similarity (jaccard)" "probability of becoming a candidate" "threshold" \
  "precision, recall" "candidate pairs"; do
  [[ $(xmllint --xpath "count(//svg/text[.='$label'])" "$REPORT") -ge 1 ]] || fail "axis label $label"
done
[[ $(xmllint --xpath "count(//svg/text[.='recall'])" "$REPORT") -eq 1 ]] || fail "legend entry recall"
if grep -qiE 'https?:|<script|<link|src=|href=|url\(|@import' "$REPORT"; then
  fail "the report refers to something outside itself: $(grep -oiE 'https?:[^"]*|<script|<link|src=|href=|url\(|@import' "$REPORT" | head -3)"
fi
wrong=$($PY -c 'import json,sys; print(sum(1 for l in open(sys.argv[1]) if json.loads(l)["record"]=="wrong"))' "$WORK/tune.jsonl")
[[ $(xmllint --xpath 'count(//div[@class="pair"])' "$REPORT") -eq $wrong ]] || fail "one section per wrong pair"
if [[ $wrong -gt 0 ]]; then
  [[ $(xmllint --xpath 'count(//div[@class="pair"]//mark)' "$REPORT") -gt 0 ]] || fail "passages marked"
fi

# 4. Text output: the table, the recommendation and its command, which runs.
expect_exit 0 "tune text" -- "$KINDRED" tune -q "$ARCHIVE" --labels "$LABELS" "${GRID[@]}"
grep -q '^ rank  shingle  perms  banding threshold precision' "$WORK/out" || fail "table header: $(head -20 "$WORK/out")"
grep -q '^Recommended' "$WORK/out" || fail "recommendation"
command=$(grep -m1 '^  kindred sweep ' "$WORK/out" | sed 's/^  kindred //')
[[ -n "$command" ]] || fail "no command line"
eval "\"\$KINDRED\" $command -q --print pairs" >"$WORK/pairs" || fail "recommended command fails: $command"

# 5. Thread count does not change the output.
"$KINDRED" tune -q "$ARCHIVE" --labels "$LABELS" --shingles word:5 --perms 64 --format jsonl -j 1 >"$WORK/j1"
"$KINDRED" tune -q "$ARCHIVE" --labels "$LABELS" --shingles word:5 --perms 64 --format jsonl -j 3 >"$WORK/j3"
cmp -s "$WORK/j1" "$WORK/j3" || fail "thread count changed the output"

# 6. Labels in other layouts give the same result.
$PY - "$LABELS" "$WORK" <<'PY'
import csv, json, sys
rows = [l.split("\t") for l in open(sys.argv[1]).read().splitlines()[1:]]
with open(sys.argv[2] + "/labels.csv", "w", newline="") as f:
    w = csv.writer(f); w.writerow(["a", "b", "label"])
    for a, b, label in rows: w.writerow([a, b, "YES" if label == "duplicate" else "no"])
with open(sys.argv[2] + "/labels.jsonl", "w") as f:
    for a, b, label in rows: f.write(json.dumps({"a": a, "b": b, "label": label == "duplicate"}) + "\n")
PY
for layout in csv jsonl; do
  "$KINDRED" tune -q "$ARCHIVE" --labels "$WORK/labels.$layout" --shingles word:5 --perms 64 \
    --format jsonl -j 1 | sed -E 's/"(wrong_lines|line)":(\[[0-9,]*\]|[0-9]+)//' >"$WORK/other"
  sed -E 's/"(wrong_lines|line)":(\[[0-9,]*\]|[0-9]+)//' "$WORK/j1" | cmp -s - "$WORK/other" ||
    fail "$layout labels differ"
done

# 7. Errors: unknown ids, bad labels, bad grid values, standard input.
printf 'a\tb\tlabel\nodd/one-word.txt\tnot/there.txt\tdistinct\nodd/one-word.txt\todd/empty.txt\tno\n' >"$WORK/unknown.tsv"
expect_exit 3 "unknown id" -- "$KINDRED" tune -q "$ARCHIVE" --labels "$WORK/unknown.tsv" --shingles word:5 --perms 64
expect_stderr "unknown.tsv:2: id \"not/there.txt\" is not in the corpus" "unknown id message"
expect_exit 0 "skip unknown ids" -- "$KINDRED" tune -q "$ARCHIVE" --labels "$WORK/unknown.tsv" --shingles word:5 --perms 64 --skip-unknown-ids
expect_stderr "warning: $WORK/unknown.tsv:2: id \"not/there.txt\" is not in the corpus; pair skipped" "skip warning"
grep -q '^No setting reaches recall 0.95' "$WORK/out" || fail "unreached target said plainly"
printf 'x\ty\tperhaps\n' >"$WORK/bad.tsv"
expect_exit 3 "bad label" -- "$KINDRED" tune -q "$ARCHIVE" --labels "$WORK/bad.tsv"
expect_stderr "no labelled pairs" "header-only labels"
printf 'a\tb\tlabel\nx\ty\tperhaps\n' >"$WORK/bad.tsv"
expect_exit 3 "bad label" -- "$KINDRED" tune -q "$ARCHIVE" --labels "$WORK/bad.tsv"
expect_stderr "bad.tsv:2: unknown label \"perhaps\"" "bad label message"
expect_exit 3 "missing labels" -- "$KINDRED" tune -q "$ARCHIVE" --labels "$WORK/none.tsv"
expect_exit 2 "bad shingles" -- "$KINDRED" tune -q "$ARCHIVE" --labels "$LABELS" --shingles words:5
expect_exit 2 "bad threshold" -- "$KINDRED" tune -q "$ARCHIVE" --labels "$LABELS" --thresholds 0.5,1.2
expect_exit 2 "standard input" -- "$KINDRED" tune -q - --labels "$LABELS"
expect_stderr "cannot read standard input" "stdin message"

finish
