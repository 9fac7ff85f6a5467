# End to end: what a user points kindred at. Two mirrors read together
# (--ids-with-path), links and special files of a tree, binary files, and
# unreadable files.
source "$(dirname "$0")/common.bash"

ARCHIVE="$SOURCE_DIR/sample_corpus/archive"
A="$ARCHIVE/2023/01/new-bus-route-links-the-town.txt"
B="$ARCHIVE/2023/01/seafront-parking-charges-scrapped-for-winter.txt"

# 1. Two mirrors with the same relative paths.
mkdir -p "$WORK/m1/doc" "$WORK/m2/doc"
cp "$A" "$WORK/m1/doc/news.txt"
cp "$A" "$WORK/m2/doc/news.txt"
cp "$B" "$WORK/m2/doc/parking.txt"
expect_exit 3 "two mirrors, plain ids" -- "$KINDRED" sweep "$WORK/m1" "$WORK/m2"
expect_stderr 'duplicate id "doc/news.txt"' "duplicate id named"
expect_stderr "--ids-with-path" "duplicate id across inputs suggests --ids-with-path"
expect_exit 0 "two mirrors, ids with paths" -- "$KINDRED" sweep "$WORK/m1" "$WORK/m2/" --ids-with-path --print decisions
grep -qF "{\"id\":\"$WORK/m1/doc/news.txt\",\"decision\":\"keep\"" "$WORK/out" || fail "keeper id: $(cat "$WORK/out")"
grep -qF "{\"id\":\"$WORK/m2/doc/news.txt\",\"decision\":\"drop\"" "$WORK/out" || fail "drop id: $(cat "$WORK/out")"
expect_exit 0 "two mirrors, kept list" -- "$KINDRED" sweep -q "$WORK/m1" "$WORK/m2" --ids-with-path --list-kept "$WORK/kept.txt"
[[ "$(cat "$WORK/kept.txt")" == "$WORK/m1/doc/news.txt"$'\n'"$WORK/m2/doc/parking.txt" ]] || fail "kept list: $(cat "$WORK/kept.txt")"

# JSON Lines files with the same ids: FILE:id, also when the lines are read a
# second time (verification) and from standard input.
$PY - "$A" "$WORK/j1.jsonl" "$WORK/j2.jsonl" <<'PY'
import json, sys
text = open(sys.argv[1]).read()
for path in sys.argv[2:]:
    with open(path, "w") as f:
        f.write(json.dumps({"id": "x", "text": text}) + "\n")
PY
expect_exit 3 "same JSON ids" -- "$KINDRED" sweep "$WORK/j1.jsonl" "$WORK/j2.jsonl"
expect_exit 0 "same JSON ids, with paths" -- "$KINDRED" sweep -q "$WORK/j1.jsonl" "$WORK/j2.jsonl" --ids-with-path --print pairs
grep -qF "\"a\":\"$WORK/j1.jsonl:x\",\"b\":\"$WORK/j2.jsonl:x\"" "$WORK/out" || fail "JSON ids with paths: $(cat "$WORK/out")"
expect_exit 0 "stdin ids with paths" -- sh -c "\"$KINDRED\" sweep -q \"$WORK/j1.jsonl\" - --ids-with-path --print pairs <\"$WORK/j2.jsonl\""
grep -qF "\"a\":\"$WORK/j1.jsonl:x\",\"b\":\"-:x\"" "$WORK/out" || fail "stdin ids with paths: $(cat "$WORK/out")"
expect_exit 0 "@line ids unchanged" -- "$KINDRED" sweep -q "$WORK/j1.jsonl" "$WORK/j2.jsonl" --ids-with-path --id-field @line --print pairs
grep -qF "\"a\":\"$WORK/j1.jsonl:1\"" "$WORK/out" || fail "@line ids: $(cat "$WORK/out")"

finish
