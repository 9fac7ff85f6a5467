# End to end: `kindred sweep` on real files, its outputs and exit codes.
source "$(dirname "$0")/common.bash"

# A small corpus: two near-duplicate stories, an exact copy, an unrelated
# story, an empty document and one with broken UTF-8.
story="The harbour board met on Tuesday evening to discuss the dredging of the north channel, which has silted up badly since the winter storms. Fishermen told the board that boats with a deep keel can no longer reach the fuel dock at low tide. The chair promised a decision before the end of the month and asked the engineers for a costed plan."
mkdir -p "$WORK/tree/news" "$WORK/tree/other"
printf '%s\n' "$story" >"$WORK/tree/news/a.txt"
printf '%s\n' "$story Reprinted with permission." >"$WORK/tree/news/b.txt"
cp "$WORK/tree/news/a.txt" "$WORK/tree/other/copy.txt"
printf 'Lost cat: grey tabby answering to Pepper, last seen near the lighthouse road on Sunday. Reward offered, call the number at the bakery.\n' >"$WORK/tree/other/cat.txt"
: >"$WORK/tree/other/empty.txt"
printf 'Broken \xff\xfe bytes inside a line of text that is otherwise fine\n' >"$WORK/tree/other/broken.txt"

# 1. A directory tree: groups on stdout, summary on stderr, exit 0.
expect_exit 0 "sweep tree" -- "$KINDRED" sweep "$WORK/tree"
grep -q '"keeper":"news/a.txt"' "$WORK/out" || fail "keeper of the story group: $(cat "$WORK/out")"
grep -q '"drops":\["news/b.txt","other/copy.txt"\]' "$WORK/out" || fail "drops: $(cat "$WORK/out")"
[[ $(wc -l <"$WORK/out") -eq 1 ]] || fail "one group expected: $(cat "$WORK/out")"
expect_stderr "6 documents (1 empty)" "summary counts"
expect_stderr "drops             2" "summary drops"
expect_stderr "invalid UTF-8     1 document" "summary invalid UTF-8"

# 2. Output directory: three files of valid JSON Lines; nothing on stdout.
expect_exit 0 "sweep --output-dir" -- "$KINDRED" sweep -q "$WORK/tree" -o "$WORK/result"
[[ ! -s "$WORK/out" && ! -s "$WORK/err" ]] || fail "quiet run printed something"
for kind in pairs groups decisions; do
  $PY -c 'import json,sys; [json.loads(l) for l in open(sys.argv[1])]' "$WORK/result/$kind.jsonl" ||
    fail "$kind.jsonl is not JSON Lines"
done
[[ $(wc -l <"$WORK/result/pairs.jsonl") -eq 3 ]] || fail "three pairs expected"
grep -q '"id":"other/empty.txt","decision":"keep"' "$WORK/result/decisions.jsonl" ||
  fail "empty document listed as kept"
grep -q '"id":"news/b.txt","decision":"drop"' "$WORK/result/decisions.jsonl" || fail "b dropped"

# 3. Same bytes for any thread count, and TSV / CSV headers.
"$KINDRED" sweep -q "$WORK/tree" --print pairs --threads 1 >"$WORK/p1"
"$KINDRED" sweep -q "$WORK/tree" --print pairs --threads 3 >"$WORK/p3"
cmp -s "$WORK/p1" "$WORK/p3" || fail "thread count changed the output"
"$KINDRED" sweep -q "$WORK/tree" --print pairs --format tsv >"$WORK/tsv"
head -1 "$WORK/tsv" | grep -q $'^a\tb\tjaccard\testimate' || fail "TSV header"
"$KINDRED" sweep -q "$WORK/tree" --print decisions --format csv >"$WORK/csv"
head -1 "$WORK/csv" | grep -q '^id,decision,group,keeper' || fail "CSV header"

# 4. JSON Lines, plain, gzip, zstd and standard input give the same pairs.
$PY - "$WORK" <<'PY'
import json, os, sys
work = sys.argv[1]
with open(os.path.join(work, "corpus.jsonl"), "w") as out:
    for root, _, files in sorted(os.walk(os.path.join(work, "tree"))):
        for name in sorted(files):
            path = os.path.join(root, name)
            rel = os.path.relpath(path, os.path.join(work, "tree"))
            text = open(path, "rb").read().decode("utf-8", "replace")
            out.write(json.dumps({"id": rel, "text": text, "rank": len(text)}) + "\n")
PY
gzip -c "$WORK/corpus.jsonl" >"$WORK/corpus.jsonl.gz"
zstd -q -c "$WORK/corpus.jsonl" >"$WORK/corpus.jsonl.zst"
"$KINDRED" sweep -q "$WORK/corpus.jsonl" --print pairs >"$WORK/plain"
"$KINDRED" sweep -q "$WORK/corpus.jsonl.gz" --print pairs >"$WORK/gz"
"$KINDRED" sweep -q "$WORK/corpus.jsonl.zst" --print pairs >"$WORK/zst"
"$KINDRED" sweep -q - --print pairs <"$WORK/corpus.jsonl.gz" >"$WORK/stdin"
[[ -s "$WORK/plain" ]] || fail "no pairs from JSON Lines"
cmp -s "$WORK/plain" "$WORK/gz" || fail "gzip input differs"
cmp -s "$WORK/plain" "$WORK/zst" || fail "zstd input differs"
cmp -s "$WORK/plain" "$WORK/stdin" || fail "standard input differs"

# 5. Keep policies and the kept corpus: lines verbatim, in input order.
expect_exit 0 "keep priority" -- "$KINDRED" sweep -q "$WORK/corpus.jsonl" --keep priority \
  --priority-field rank --write-kept "$WORK/kept.jsonl"
grep -q '"keeper":"news/b.txt"' "$WORK/out" || fail "priority keeper: $(cat "$WORK/out")"
grep -v -e '"other/copy.txt"' -e '"news/a.txt"' "$WORK/corpus.jsonl" >"$WORK/expected_kept"
cmp -s "$WORK/expected_kept" "$WORK/kept.jsonl" || fail "kept lines are not the input lines"
expect_exit 0 "copy kept tree" -- "$KINDRED" sweep -q "$WORK/tree" --copy-kept "$WORK/kept_tree"
[[ -f "$WORK/kept_tree/news/a.txt" && ! -e "$WORK/kept_tree/news/b.txt" ]] || fail "kept tree"
cmp -s "$WORK/tree/other/broken.txt" "$WORK/kept_tree/other/broken.txt" || fail "copy not verbatim"

# 6. Bad input: a clear message naming the place, and a documented exit code.
expect_exit 3 "missing input" -- "$KINDRED" sweep "$WORK/nowhere"
expect_stderr "nowhere" "missing input named"
printf '{"id":"a","text":"fine"}\n{"id":"b","text":\n' >"$WORK/bad.jsonl"
expect_exit 3 "malformed JSON" -- "$KINDRED" sweep "$WORK/bad.jsonl"
expect_stderr "bad.jsonl:2" "malformed line named"
printf '{"id":"a","text":"fine"}\n{"id":"b","body":"no text"}\n' >"$WORK/missing.jsonl"
expect_exit 3 "missing field" -- "$KINDRED" sweep "$WORK/missing.jsonl"
expect_stderr "missing.jsonl:2" "missing field line named"
printf '{"id":"a","text":"one"}\n{"id":"a","text":"two"}\n' >"$WORK/dup.jsonl"
expect_exit 3 "duplicate id" -- "$KINDRED" sweep "$WORK/dup.jsonl"
expect_stderr 'duplicate id "a"' "duplicate id named"
head -c 100 "$WORK/corpus.jsonl.gz" >"$WORK/truncated.jsonl.gz"
expect_exit 3 "truncated gzip" -- "$KINDRED" sweep "$WORK/truncated.jsonl.gz"
expect_stderr "truncated.jsonl.gz" "truncated input named"
printf '{"id":"big","text":"%s"}\n' "$(head -c 5000 /dev/zero | tr '\0' 'x')" >"$WORK/big.jsonl"
expect_exit 3 "document over the size limit" -- "$KINDRED" sweep "$WORK/big.jsonl" --max-document-size 1K
expect_stderr "big.jsonl:1" "oversized line named"
printf 'a\0b\0c NUL bytes are only characters\n' >"$WORK/nul.txt"
expect_exit 0 "NUL bytes" -- "$KINDRED" sweep "$WORK/nul.txt"

printf '{"id":"u","text":"bad \xff byte"}\n{"id":"v","text":"fine"}\n' >"$WORK/badutf.jsonl"
expect_exit 0 "invalid UTF-8 in JSON Lines is replaced, not fatal" -- "$KINDRED" sweep -v "$WORK/badutf.jsonl"
expect_stderr "u: 1 invalid UTF-8 sequences" "verbose names the document"

# 7. Usage errors exit 2.
expect_exit 2 "bad threshold" -- "$KINDRED" sweep "$WORK/tree" --threshold 1.5
expect_stderr "threshold" "threshold named"
expect_exit 2 "bands without rows" -- "$KINDRED" sweep "$WORK/tree" --bands 4
expect_exit 2 "too many slots" -- "$KINDRED" sweep "$WORK/tree" --bands 20 --rows 10
expect_exit 2 "unknown option" -- "$KINDRED" sweep "$WORK/tree" --frobnicate
expect_exit 2 "bad keep policy" -- "$KINDRED" sweep "$WORK/tree" --keep newest
expect_exit 2 "no subcommand" -- "$KINDRED"

# 8. Exhaustive mode agrees with LSH on this small corpus.
"$KINDRED" sweep -q "$WORK/tree" --print pairs --exhaustive >"$WORK/exhaustive"
cmp -s "$WORK/p1" "$WORK/exhaustive" || fail "exhaustive and LSH differ on a tiny corpus"

# 9. A memory budget: band keys spilled to sorted runs in the scratch
# directory give the same outputs; the scratch directory is left empty.
$PY "$SOURCE_DIR/tools/gen_corpus.py" --docs 20000 --seed 9 --dup-rate 0.05 --out "$WORK/big.jsonl" ||
  fail "gen_corpus"
expect_exit 0 "sweep without budget" -- "$KINDRED" sweep --threads 2 -o "$WORK/unspilled" "$WORK/big.jsonl"
mkdir "$WORK/scratch"
expect_exit 0 "sweep --memory 1M" -- "$KINDRED" sweep --threads 2 --memory 1M --scratch-dir "$WORK/scratch" \
  -o "$WORK/spilled" "$WORK/big.jsonl"
expect_stderr "spilled " "summary says it spilled"
for kind in pairs groups decisions; do
  cmp -s "$WORK/unspilled/$kind.jsonl" "$WORK/spilled/$kind.jsonl" || fail "$kind differ when spilled"
done
[[ -s "$WORK/spilled/pairs.jsonl" ]] || fail "no pairs in the budget test corpus"
[[ -z $(ls -A "$WORK/scratch") ]] || fail "scratch directory not left empty: $(ls "$WORK/scratch")"
expect_exit 2 "sweep --memory nonsense" -- "$KINDRED" sweep --memory lots "$WORK/big.jsonl"
expect_stderr "is not a size" "bad --memory message"
expect_exit 7 "sweep --scratch-dir missing" -- "$KINDRED" sweep --memory 1M --scratch-dir "$WORK/missing" \
  "$WORK/big.jsonl"
expect_stderr "scratch directory" "missing scratch directory message"
# The scratch directory is checked before any input is read: an input that
# is malformed on its fifth line is not reached.
{ head -n 4 "$WORK/big.jsonl"; echo '{"id": "broken"'; } >"$WORK/broken.jsonl"
expect_exit 7 "sweep --scratch-dir missing, checked first" -- "$KINDRED" sweep --memory 1M \
  --scratch-dir "$WORK/missing" "$WORK/broken.jsonl"
expect_stderr "kindred: scratch directory $WORK/missing: cannot" "scratch directory checked first"
# A full disk under the scratch file (a file size limit with SIGXFSZ ignored:
# writes fail with EFBIG, as on a full disk with ENOSPC): exit 7 naming the
# scratch directory, no output, nothing left in the scratch directory.
expect_exit 7 "sweep --memory on a full disk" -- bash -c 'trap "" XFSZ; ulimit -f 64; exec "$@"' limit \
  "$KINDRED" sweep -q --memory 1M --scratch-dir "$WORK/scratch" -o "$WORK/fullspill" "$WORK/big.jsonl"
expect_stderr "cannot spill band keys: scratch directory $WORK/scratch: cannot write the scratch file: File too large" \
  "full disk under the scratch file message"
[[ -z $(ls -A "$WORK/fullspill") ]] || fail "a sweep that failed to spill left $(ls -A "$WORK/fullspill")"
[[ -z $(ls -A "$WORK/scratch") ]] || fail "scratch directory not left empty: $(ls "$WORK/scratch")"

finish
