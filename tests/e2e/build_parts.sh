# End to end: `kindred build --memory`, which signs and writes a corpus in
# parts (one segment each), gives an index that answers like one built whole,
# and leaves nothing behind when it fails.
source "$(dirname "$0")/common.bash"

$PY "$SOURCE_DIR/tools/gen_corpus.py" --docs 6000 --seed 5 --dup-rate 0.05 --out "$WORK/corpus.jsonl" ||
  fail "gen_corpus"
head -300 "$WORK/corpus.jsonl" | sed 's/"id": "doc/"id": "query/' >"$WORK/queries.jsonl"

expect_exit 0 "build whole" -- "$KINDRED" build "$WORK/whole.kin" "$WORK/corpus.jsonl"
expect_exit 0 "build in parts" -- "$KINDRED" build --memory 2M "$WORK/parts.kin" "$WORK/corpus.jsonl"
expect_stderr "6000 documents (0 empty)" "build in parts: summary"
expect_exit 0 "info" -- "$KINDRED" info "$WORK/parts.kin"
grep -q "^documents *6000 live" "$WORK/out" || fail "info: documents: $(cat "$WORK/out")"
segments=$(sed -n 's/^segments *//p' "$WORK/out")
((segments >= 3)) || fail "expected several segments, got $segments"
expect_exit 0 "audit" -- "$KINDRED" audit "$WORK/parts.kin"
expect_exit 0 "check whole" -- "$KINDRED" check -q "$WORK/whole.kin" "$WORK/queries.jsonl"
cp "$WORK/out" "$WORK/whole.out"
[[ $(wc -l <"$WORK/whole.out") -ge 300 ]] || fail "every query should match its original"
expect_exit 0 "check parts" -- "$KINDRED" check -q "$WORK/parts.kin" "$WORK/queries.jsonl"
cmp -s "$WORK/out" "$WORK/whole.out" || fail "check answers differ between the two indexes"

# An id repeated in a later part: exit 3 naming it, no index, no leftovers.
{ cat "$WORK/corpus.jsonl"; head -1 "$WORK/corpus.jsonl"; } >"$WORK/repeat.jsonl"
expect_exit 3 "repeated id across parts" -- "$KINDRED" build --memory 2M "$WORK/repeat.kin" \
  "$WORK/repeat.jsonl"
expect_stderr "doc000000000" "repeated id message"
[[ ! -e "$WORK/repeat.kin" ]] || fail "an index was left after a failed build"
[[ -z $(find "$WORK" -name '*.building.*') ]] || fail "a partial file was left: $(ls "$WORK")"

# Over an existing index: refused, the index untouched.
before=$(md5sum <"$WORK/parts.kin")
expect_exit 2 "build over an existing index" -- "$KINDRED" build --memory 2M "$WORK/parts.kin" \
  "$WORK/corpus.jsonl"
[[ $(md5sum <"$WORK/parts.kin") == "$before" ]] || fail "existing index changed"
expect_exit 2 "bad --memory" -- "$KINDRED" build --memory much "$WORK/x.kin" "$WORK/corpus.jsonl"

finish
