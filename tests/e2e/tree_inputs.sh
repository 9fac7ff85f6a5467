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

# 2. Links and special files: counted; --follow-links reads linked files and
#    walks linked directories once, never round a loop.
mkdir -p "$WORK/links/sub"
cp "$A" "$WORK/links/a.txt"
cp "$B" "$WORK/links/sub/b.txt"
ln -s a.txt "$WORK/links/link-to-a.txt"
ln -s .. "$WORK/links/sub/up"
ln -s nowhere "$WORK/links/broken"
mkfifo "$WORK/links/fifo"
expect_exit 0 "links not followed" -- "$KINDRED" sweep "$WORK/links"
expect_stderr "kindred sweep: 2 documents" "links: documents"
expect_stderr "symbolic links    3 not followed (--follow-links follows them)" "links counted"
expect_stderr "special files     1 not read (1 FIFOs, 0 sockets, 0 devices)" "FIFO counted"
[[ -s "$WORK/out" ]] && fail "groups without links: $(cat "$WORK/out")"
expect_exit 0 "links followed" -- "$KINDRED" sweep "$WORK/links" --follow-links --print pairs
# a.txt, link-to-a.txt, sub/b.txt; sub/up leads back to the root: walked once.
expect_stderr "kindred sweep: 3 documents" "followed: documents"
expect_stderr "links skipped     1 broken, 1 to directories already walked" "followed: broken and loop counted"
grep -q '"a":"a.txt","b":"link-to-a.txt","jaccard":1.000000' "$WORK/out" || fail "linked file not read: $(cat "$WORK/out")"
expect_exit 0 "links followed, kept copies" -- "$KINDRED" sweep -q "$WORK/links" --follow-links --list-kept "$WORK/links-kept.txt"
[[ "$(cat "$WORK/links-kept.txt")" == "$WORK/links/a.txt"$'\n'"$WORK/links/sub/b.txt" ]] || fail "kept with links: $(cat "$WORK/links-kept.txt")"

# 3. Binary files: skipped and counted (named with -v); --include-binary
#    reads them as text.
mkdir -p "$WORK/bin"
cp "$A" "$WORK/bin/a.txt"
cp "$ARCHIVE/odd/broken-utf8.txt" "$WORK/bin/broken-utf8.txt"  # a few bad bytes: still text
cp /bin/true "$WORK/bin/prog1"
cp /bin/true "$WORK/bin/prog2"
gzip -c /bin/true >"$WORK/bin/prog3.gz"  # binary once decompressed
# 6000 bytes of 0xE9: each an ill-formed sequence but the last, cut off
{ printf '%%PDF-1.4\n'; head -c 6000 /dev/zero | tr '\0' '\351'; } >"$WORK/bin/latin.pdf"
expect_exit 0 "binary skipped" -- "$KINDRED" sweep "$WORK/bin" -v
expect_stderr "kindred sweep: 2 documents" "binary: documents"
expect_stderr "binary files      4 skipped (-v names them; --include-binary reads them)" "binary counted"
expect_stderr "kindred: note: skipped $WORK/bin/prog1: binary: a NUL byte at byte" "-v names an ELF file"
expect_stderr "kindred: note: skipped $WORK/bin/latin.pdf: binary: 5999 of the first 6009 bytes are not UTF-8" "-v names a non-UTF-8 file"
[[ -s "$WORK/out" ]] && fail "binary files grouped: $(cat "$WORK/out")"
expect_exit 0 "binary not named without -v" -- "$KINDRED" sweep "$WORK/bin"
grep -q "note: skipped" "$WORK/err" && fail "binary files named without -v"
expect_exit 0 "binary included" -- "$KINDRED" sweep "$WORK/bin" --include-binary --print pairs
expect_stderr "kindred sweep: 6 documents" "binary included: documents"
grep -q '"a":"prog1","b":"prog2"' "$WORK/out" || fail "included binaries not compared"
expect_exit 0 "binary, kept list" -- "$KINDRED" sweep -q "$WORK/bin" --list-kept "$WORK/bin-kept.txt"
[[ $(wc -l <"$WORK/bin-kept.txt") -eq 2 ]] || fail "kept list holds binary files: $(cat "$WORK/bin-kept.txt")"
expect_exit 0 "binary file given alone" -- "$KINDRED" sweep "$WORK/bin/prog1" "$WORK/bin/a.txt"
expect_stderr "kindred sweep: 1 document (" "a binary file given alone is skipped"

# 4. Unreadable files: an error by default; --skip-unreadable names and
#    counts each one, and a skipped file never enters the results.
mkdir -p "$WORK/bad"
cp "$A" "$WORK/bad/a.txt"
cp "$A" "$WORK/bad/a-copy.txt"
gzip -c "$B" | head -c 200 >"$WORK/bad/m-cut.gz"  # truncated: found at its end
gzip -c "$A" >"$WORK/bad/z-whole.gz"
expect_exit 3 "unreadable, default" -- "$KINDRED" sweep "$WORK/bad"
expect_stderr "m-cut.gz" "unreadable file named"
expect_exit 0 "unreadable skipped" -- "$KINDRED" sweep "$WORK/bad" --skip-unreadable --print decisions
expect_stderr "kindred: skipped $WORK/bad/m-cut.gz: " "skipped file named with its reason"
expect_stderr "unreadable files  1 skipped (--skip-unreadable; named above)" "unreadable counted"
expect_stderr "kindred sweep: 3 documents" "unreadable: documents"
grep -q "m-cut" "$WORK/out" && fail "skipped file in the decisions"
[[ $(grep -c '"decision"' "$WORK/out") -eq 3 ]] || fail "decisions: $(cat "$WORK/out")"
expect_exit 0 "unreadable skipped, kept list" -- "$KINDRED" sweep -q "$WORK/bad" --skip-unreadable --list-kept "$WORK/bad-kept.txt"
[[ "$(cat "$WORK/bad-kept.txt")" == "$WORK/bad/a-copy.txt" ]] || fail "kept list: $(cat "$WORK/bad-kept.txt")"
expect_exit 0 "unreadable file given alone" -- "$KINDRED" sweep "$WORK/bad/m-cut.gz" "$WORK/bad/a.txt" --skip-unreadable
expect_stderr "unreadable files  1 skipped" "a file given alone is skipped too"
expect_exit 0 "build skips the same files" -- "$KINDRED" build "$WORK/bad.kin" "$WORK/bad" --skip-unreadable
expect_stderr "kindred build: $WORK/bad.kin: 3 documents" "build: documents"
expect_stderr "unreadable files  1 skipped" "build counts unreadable files"

finish
