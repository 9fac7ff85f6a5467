# End to end: `kindred explain` on two files, two ids of a corpus and of an
# index. The exact Jaccard is recomputed with the independent shingle
# reference (PyICU + xxhash); the marked spans are checked to hold exactly
# the text of the shared shingles.
source "$(dirname "$0")/common.bash"

ARCHIVE="$SOURCE_DIR/sample_corpus/archive"
A=2023/01/new-bus-route-links-the-town.txt
B=partners/orrin-valley-weekly/2023/01-brannock-and-port-tessary-linked-by.txt

# 1. Two files: numbers first, then passages, then both texts marked with
#    [[ ]] (standard output is not a terminal).
expect_exit 0 "explain files" -- "$KINDRED" explain "$ARCHIVE/$A" "$ARCHIVE/$B"
for field in "exact Jaccard" "signature estimate" "containment of a in b" "containment of b in a" \
  "shared shingles" "only in a" "only in b" "Longest shared passages"; do
  grep -q "^$field" "$WORK/out" || fail "explain output lacks $field"
done
grep -q '\[\[' "$WORK/out" || fail "no [[ ]] markers"
grep -q $'\x1b\[' "$WORK/out" && fail "colour codes when not a terminal"
expect_exit 0 "explain colour" -- "$KINDRED" explain "$ARCHIVE/$A" "$ARCHIVE/$B" --color always
grep -q $'\x1b\[30;43m' "$WORK/out" || fail "--color always gives no colour"

# 2. JSON: the numbers against the independent reference, and the spans.
for k in 3 5; do
  "$KINDRED" explain "$ARCHIVE/$A" "$ARCHIVE/$B" -k $k --format jsonl >"$WORK/e.json" ||
    fail "explain jsonl k=$k"
  $PY - "$ARCHIVE/$A" "$ARCHIVE/$B" "$WORK/e.json" "$SOURCE_DIR" $k <<'PY' || fail "explain k=$k differs from the reference"
import json, sys
a_path, b_path, record_path, source, k = sys.argv[1], sys.argv[2], sys.argv[3], sys.argv[4], int(sys.argv[5])
sys.path.insert(0, source + "/tests/reference")
import shingle_reference as ref
seed = 0x6b696e6472656431
raw = [open(p, "rb").read() for p in (a_path, b_path)]
sets = [ref.shingle_set(ref.normalize(r), "word", k, seed) for r in raw]
e = json.load(open(record_path))
shared = len(sets[0] & sets[1])
bad = 0
if (e["shingles_a"], e["shingles_b"], e["shared"]) != (len(sets[0]), len(sets[1]), shared):
    print("counts", e, len(sets[0]), len(sets[1]), shared); bad += 1
if abs(e["jaccard"] - shared / len(sets[0] | sets[1])) > 1e-6:
    print("jaccard", e["jaccard"]); bad += 1
if abs(e["containment_a_in_b"] - shared / len(sets[0])) > 1e-6:
    print("containment", e["containment_a_in_b"]); bad += 1
# Every marked span's words (per the reference tokenizer) are shared text:
# the k-shingles inside a marked span all belong to the other set.
for side, spans in ((0, e["marked_a"]), (1, e["marked_b"])):
    other = sets[1 - side]
    for begin, end in spans:
        piece = ref.normalize(raw[side][begin:end])
        inside = ref.shingle_set(piece, "word", k, seed)
        if not inside <= other:
            print("side", side, "span", begin, end, "holds unshared shingles"); bad += 1
    if sum(end - begin for begin, end in spans) == 0 and shared:
        print("nothing marked"); bad += 1
sys.exit(1 if bad else 0)
PY
done

# 3. Ids in a corpus, and ids in an index (numbers only, then with passages).
expect_exit 0 "explain corpus ids" -- "$KINDRED" explain --corpus "$ARCHIVE" "$A" "$B" -k 3 --format jsonl
"$KINDRED" explain "$ARCHIVE/$A" "$ARCHIVE/$B" -k 3 --format jsonl >"$WORK/files.json"
cmp -s <(sed 's/"a":"[^"]*","b":"[^"]*",//' "$WORK/out") <(sed 's/"a":"[^"]*","b":"[^"]*",//' "$WORK/files.json") ||
  fail "corpus ids and files differ"
"$KINDRED" build "$WORK/archive.kin" "$ARCHIVE" -q -k 3 >/dev/null 2>&1 || fail "build index"
expect_exit 0 "explain index ids" -- "$KINDRED" explain --index "$WORK/archive.kin" "$A" "$B" --format jsonl
$PY - "$WORK/out" "$WORK/files.json" <<'PY' || fail "index numbers differ from the texts'"
import json, sys
a, b = json.load(open(sys.argv[1])), json.load(open(sys.argv[2]))
keys = ["jaccard", "estimate", "containment_a_in_b", "containment_b_in_a", "shingles_a", "shingles_b", "shared"]
sys.exit(0 if all(a[k] == b[k] for k in keys) and "marked_a" not in a else 1)
PY
expect_exit 0 "explain index and corpus" -- "$KINDRED" explain --index "$WORK/archive.kin" --corpus "$ARCHIVE" "$A" "$B"
grep -q '\[\[' "$WORK/out" || fail "index with corpus shows no passages"

# 4. Errors.
expect_exit 3 "missing file" -- "$KINDRED" explain "$WORK/nope.txt" "$ARCHIVE/$A"
expect_stderr "nope.txt: cannot open" "missing file message"
expect_exit 3 "unknown id" -- "$KINDRED" explain --corpus "$ARCHIVE" "$A" no/such.txt
expect_stderr "id \"no/such.txt\" is not in the corpus" "unknown id message"
expect_exit 3 "unknown index id" -- "$KINDRED" explain --index "$WORK/archive.kin" "$A" no/such.txt
expect_exit 3 "a directory as a file" -- "$KINDRED" explain "$ARCHIVE" "$ARCHIVE/$A"
expect_stderr "is a directory" "directory message"

# 5. Files are read as every other command reads them: compression is found
#    by content, so a gzip or zstd copy explains like its plain original.
gzip -c "$ARCHIVE/$A" >"$WORK/a.gz"
zstd -q -c "$ARCHIVE/$B" >"$WORK/b.bin"
"$KINDRED" explain "$ARCHIVE/$A" "$ARCHIVE/$B" --format jsonl >"$WORK/plain.json" || fail "explain plain"
expect_exit 0 "explain compressed" -- "$KINDRED" explain "$WORK/a.gz" "$WORK/b.bin" --format jsonl
cmp -s <(sed 's/"a":"[^"]*","b":"[^"]*",//' "$WORK/out") <(sed 's/"a":"[^"]*","b":"[^"]*",//' "$WORK/plain.json") ||
  fail "compressed files explain differently from their plain copies"
expect_exit 0 "explain a file and its gzip copy" -- "$KINDRED" explain "$ARCHIVE/$A" "$WORK/a.gz" --format jsonl
grep -q '"jaccard":1.000000' "$WORK/out" || fail "a file and its gzip copy: $(cat "$WORK/out")"
head -c 100 "$WORK/a.gz" >"$WORK/cut.gz"
expect_exit 3 "truncated gzip" -- "$KINDRED" explain "$WORK/cut.gz" "$ARCHIVE/$A"
expect_stderr "cut.gz" "truncated gzip names the file"
expect_exit 2 "bad k" -- "$KINDRED" explain "$ARCHIVE/$A" "$ARCHIVE/$B" -k 0

finish
