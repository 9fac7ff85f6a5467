#!/bin/bash
# The synthetic corpus generator (tools/gen_corpus.py): same seed, same
# bytes; the requested number of documents in both formats; a truth file
# whose pairs exist, point backwards and differ in text; planted copies
# that are near their originals while unrelated documents are not.
#
# Usage: generator.sh KINDRED_BINARY SOURCE_DIR (the binary is not used).
set -euo pipefail

source_dir="$2"
gen="$source_dir/tools/gen_corpus.py"
py=/usr/bin/python3
work="$(mktemp -d)"
trap 'rm -rf "$work"' EXIT

fail() {
  echo "generator.sh: $*" >&2
  exit 1
}

# 1. Determinism: the same options give identical bytes, another seed not.
opts=(--docs 3000 --dup-rate 0.1 --edit-rates 0.02,0.05,0.1,0.2
  --boilerplate 0.05)
"$py" "$gen" "${opts[@]}" --seed 11 --out "$work/a.jsonl" \
  --truth "$work/a.tsv" 2>/dev/null
"$py" "$gen" "${opts[@]}" --seed 11 --out - --truth "$work/b.tsv" \
  >"$work/b.jsonl" 2>/dev/null
cmp -s "$work/a.jsonl" "$work/b.jsonl" || fail "same seed, different corpus"
cmp -s "$work/a.tsv" "$work/b.tsv" || fail "same seed, different truth"
"$py" "$gen" "${opts[@]}" --seed 12 --out "$work/c.jsonl" 2>/dev/null
cmp -s "$work/a.jsonl" "$work/c.jsonl" && fail "seeds 11 and 12 agree"

# 2. Document count and truth file of the JSON Lines corpus, and the planted
# pairs checked with word 5-shingles (tokens: runs of ASCII letters, lower
# cased; the generator writes nothing else). One word edit removes at most
# five of a document's shingles and adds at most five, so m edits on a
# document of n shingles leave a Jaccard similarity of at least
# (n - 5m) / (n + 5m): about 0.75 for edit rate 0.02 on the shortest
# documents (80 words, two edits after rounding); the check asks for 0.6.
# At rate 0.2 that bound reaches zero, but edits overlap and such copies
# keep about a quarter of their shingles: the check asks for 0.1. Unrelated
# documents share almost no runs of five words (a shared boilerplate
# paragraph aside, worth at most about 0.35).
"$py" - "$work/a.jsonl" "$work/a.tsv" <<'EOF' || fail "jsonl corpus check"
import json, random, re, sys

docs = {}
for n, line in enumerate(open(sys.argv[1], encoding="ascii")):
    record = json.loads(line)
    assert set(record) == {"id", "text"}, record.keys()
    assert record["id"] == f"doc{n:09d}", (n, record["id"])
    docs[record["id"]] = record["text"]
assert len(docs) == 3000, len(docs)

rows = [l.rstrip("\n").split("\t") for l in open(sys.argv[2])]
assert rows[0] == ["original", "duplicate", "edit_rate"], rows[0]
pairs = rows[1:]
# 10% of 2999 documents: binomial, sd about 16.
assert 220 <= len(pairs) <= 380, len(pairs)

def shingles(text):
    t = re.findall(r"[a-z]+", text.lower())
    return {" ".join(t[i:i + 5]) for i in range(len(t) - 4)}

def jaccard(a, b):
    return len(a & b) / len(a | b)

sets = {i: shingles(t) for i, t in docs.items()}
planted = set()
for original, duplicate, rate in pairs:
    assert original < duplicate, (original, duplicate)
    assert duplicate not in planted, duplicate
    planted.add(duplicate)
    assert float(rate) in (0.02, 0.05, 0.1, 0.2), rate
    assert docs[original] != docs[duplicate], (original, duplicate)
    j = jaccard(sets[original], sets[duplicate])
    assert 0.1 < j < 1.0, (original, duplicate, j)
    if float(rate) == 0.02:
        assert j > 0.6, (original, duplicate, j)
    assert original not in planted, original  # originals are never copies

rng = random.Random(5)
ids = sorted(set(docs) - planted)
for _ in range(3000):
    a, b = rng.sample(ids, 2)
    assert jaccard(sets[a], sets[b]) < 0.5, (a, b)

sizes = [len(t) for t in docs.values()]
mean = sum(sizes) / len(sizes)
assert 800 <= mean <= 1300, mean  # about 1 KB a document by default
EOF

# 3. The tree format: one file per document, ids are relative paths, the
# texts equal the JSON Lines texts of the same options.
"$py" "$gen" "${opts[@]}" --seed 11 --format tree --out "$work/tree" \
  --truth "$work/tree.tsv" 2>/dev/null
count=$(find "$work/tree" -type f -name 'doc*.txt' | wc -l)
[ "$count" -eq 3000 ] || fail "tree has $count files, want 3000"
"$py" - "$work/a.jsonl" "$work/tree" "$work/a.tsv" "$work/tree.tsv" \
  <<'EOF' || fail "tree corpus check"
import json, pathlib, sys

root = pathlib.Path(sys.argv[2])
for line in open(sys.argv[1]):
    record = json.loads(line)
    n = int(record["id"][3:])
    path = root / f"{n // 1000:04d}" / f"{record['id']}.txt"
    assert path.read_text(encoding="ascii") == record["text"] + "\n", path

def to_tree(doc_id):
    n = int(doc_id[3:])
    return f"{n // 1000:04d}/{doc_id}.txt"

flat = [l.rstrip("\n").split("\t") for l in open(sys.argv[3])][1:]
tree = [l.rstrip("\n").split("\t") for l in open(sys.argv[4])][1:]
assert tree == [[to_tree(a), to_tree(b), r] for a, b, r in flat]
EOF

# 4. Bad options are refused.
if "$py" "$gen" --format tree --docs 1 2>/dev/null; then
  fail "tree format without --out accepted"
fi
if "$py" "$gen" --edit-rates 0.1,1.5 --docs 1 >/dev/null 2>&1; then
  fail "edit rate 1.5 accepted"
fi

echo "generator.sh: ok"
