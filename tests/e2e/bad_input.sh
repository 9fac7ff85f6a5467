# End to end: the bad-input battery. Every case checks the exit code, that the
# message names the file and line (or byte offset) and document where known,
# that no output appears under its final name unless complete, and that an
# index is untouched or consistent afterwards. Cases of sweep.sh and
# index_upload_check.sh are not repeated here.
source "$(dirname "$0")/common.bash"

story="The harbour board met on Tuesday evening to discuss the dredging of the north channel, which has silted up badly since the winter storms."
printf '{"id":"a","text":"%s"}\n{"id":"b","text":"%s Reprinted."}\n' "$story" "$story" >"$WORK/good.jsonl"

# expect_no_outputs DIR DESCRIPTION: no final-named record file in DIR.
expect_no_outputs() {
  local name
  for name in pairs groups decisions; do
    [[ ! -e "$1/$name.jsonl" ]] || fail "$2: $1/$name.jsonl exists after a failed run"
  done
}

# json_line_fails FILE LINE DESCRIPTION: sweep of FILE with -o exits 3, names
# FILE:LINE and writes no output.
json_line_fails() {
  rm -rf "$WORK/o"
  expect_exit 3 "$3" -- "$KINDRED" sweep -q "$1" -o "$WORK/o"
  expect_stderr "$(basename "$1"):$2" "$3: file and line named"
  expect_no_outputs "$WORK/o" "$3"
}

# 1. NUL bytes: a JSON \u0000 escape is text; a raw NUL or other raw control
# byte inside a JSON string is malformed JSON (RFC 8259, section 7).
printf '{"id":"n1","text":"%s \\u0000 tail"}\n{"id":"n2","text":"%s \\u0000 tail"}\n' \
  "$story" "$story" >"$WORK/nul_escape.jsonl"
expect_exit 0 "NUL escapes" -- "$KINDRED" sweep -q "$WORK/nul_escape.jsonl" --print pairs
grep -q '"a":"n1","b":"n2","jaccard":1.000000' "$WORK/out" || fail "NUL escape text: $(cat "$WORK/out")"
printf '{"id":"a","text":"fine"}\n{"id":"raw","text":"raw \0 NUL"}\n' >"$WORK/nul_raw.jsonl"
json_line_fails "$WORK/nul_raw.jsonl" 2 "raw NUL in a JSON string"
printf '{"id":"a\\u0000b","text":"%s"}\n{"id":"c","text":"%s"}\n' "$story" "$story" >"$WORK/nul_id.jsonl"
expect_exit 0 "NUL in an id" -- "$KINDRED" sweep -q "$WORK/nul_id.jsonl" --print pairs
grep -qF '"a":"a\u0000b"' "$WORK/out" || fail "NUL in an id is escaped in JSON output: $(cat -v "$WORK/out")"

# 2. Empty documents: an empty text file, an empty JSON string, a document of
# punctuation only; never anyone's duplicate, listed with the reason.
mkdir -p "$WORK/empty_tree"
: >"$WORK/empty_tree/empty.txt"
printf '... !!! ---\n' >"$WORK/empty_tree/punct.txt"
printf '%s\n' "$story" >"$WORK/empty_tree/story.txt"
expect_exit 0 "empty documents" -- "$KINDRED" sweep "$WORK/empty_tree" --print decisions
expect_stderr "3 documents (2 empty)" "empty documents counted"
[[ $(grep -c '"decision":"keep","group":null.*empty document' "$WORK/out") -eq 2 ]] ||
  fail "empty documents listed as kept with a reason: $(cat "$WORK/out")"
printf '{"id":"e1","text":""}\n{"id":"e2","text":""}\n' >"$WORK/empty.jsonl"
expect_exit 0 "two empty texts" -- "$KINDRED" sweep -q "$WORK/empty.jsonl" --print pairs
[[ ! -s "$WORK/out" ]] || fail "two empty documents paired: $(cat "$WORK/out")"
: >"$WORK/zero.jsonl"
printf '\n  \r\n\n' >"$WORK/blank.jsonl"
expect_exit 0 "empty and blank inputs" -- "$KINDRED" sweep "$WORK/zero.jsonl" "$WORK/blank.jsonl"
expect_stderr "0 documents" "no documents counted"

# 3. Malformed JSON Lines, each named by file and line.
printf '{"id":"a","text":"x"} trailing\n' >"$WORK/trailing.jsonl"
json_line_fails "$WORK/trailing.jsonl" 1 "garbage after the object"
printf '{"id":"a","text":"x"}\n["an","array"]\n' >"$WORK/array.jsonl"
json_line_fails "$WORK/array.jsonl" 2 "a line that is not an object"
printf '{"id":"a","text":"x"}\n{"id":"b","text":"x"}\n{"id":"c","text":"unterminated}\n' >"$WORK/open.jsonl"
json_line_fails "$WORK/open.jsonl" 3 "an unterminated string"
printf '{"id":"a","text":"x",}\n' >"$WORK/comma.jsonl"
json_line_fails "$WORK/comma.jsonl" 1 "a trailing comma"

# 4. Missing fields and fields of the wrong type.
printf '{"id":"a","text":"x"}\n{"text":"no id"}\n' >"$WORK/noid.jsonl"
json_line_fails "$WORK/noid.jsonl" 2 "missing id"
expect_stderr '"id"' "missing id field named"
printf '{"id":["a"],"text":"x"}\n' >"$WORK/arrayid.jsonl"
json_line_fails "$WORK/arrayid.jsonl" 1 "id of the wrong type"
printf '{"id":"a","text":42}\n' >"$WORK/numtext.jsonl"
json_line_fails "$WORK/numtext.jsonl" 1 "text of the wrong type"
printf '{"id":"a","body":"x"}\n' >"$WORK/body.jsonl"
json_line_fails "$WORK/body.jsonl" 1 "text under another name"
expect_exit 0 "--text-field names it" -- "$KINDRED" sweep -q "$WORK/body.jsonl" --text-field body

# 5. Duplicate ids across inputs, and an integer id equal to a string id.
printf '{"id":"x","text":"one"}\n' >"$WORK/first.jsonl"
printf '{"id":"y","text":"two"}\n{"id":"x","text":"three"}\n' >"$WORK/second.jsonl"
rm -rf "$WORK/o"
expect_exit 3 "duplicate id across files" -- "$KINDRED" sweep -q "$WORK/first.jsonl" "$WORK/second.jsonl" -o "$WORK/o"
expect_stderr 'duplicate id "x"' "duplicate id named"
expect_no_outputs "$WORK/o" "duplicate id across files"
printf '{"id":1,"text":"one"}\n{"id":"1","text":"two"}\n' >"$WORK/intid.jsonl"
expect_exit 3 "integer and string ids" -- "$KINDRED" sweep -q "$WORK/intid.jsonl"
expect_stderr 'duplicate id "1"' "integer id rendered in decimal"

# 6. Truncated and corrupt compressed input, named with a byte offset.
$PY - "$WORK/big.jsonl" <<'PY'
import json, sys
with open(sys.argv[1], "w") as out:
    for i in range(2000):
        out.write(json.dumps({"id": f"doc{i}", "text": f"story number {i} about the harbour board and the dredging of channel {i % 7}"}) + "\n")
PY
gzip -n -c "$WORK/big.jsonl" >"$WORK/big.jsonl.gz"
zstd -q -c "$WORK/big.jsonl" >"$WORK/big.jsonl.zst"
size_gz=$(stat -c %s "$WORK/big.jsonl.gz")
size_zst=$(stat -c %s "$WORK/big.jsonl.zst")
head -c $((size_zst / 2)) "$WORK/big.jsonl.zst" >"$WORK/cut.jsonl.zst"
rm -rf "$WORK/o"
expect_exit 3 "truncated zstd" -- "$KINDRED" sweep -q "$WORK/cut.jsonl.zst" -o "$WORK/o"
expect_stderr "cut.jsonl.zst: truncated zstd stream" "truncated zstd named"
expect_no_outputs "$WORK/o" "truncated zstd"
# flip FILE OFFSET OUT: OUT is FILE with one byte inverted at OFFSET.
flip() { $PY -c 'import sys
d = bytearray(open(sys.argv[1], "rb").read()); d[int(sys.argv[2])] ^= 0xFF
open(sys.argv[3], "wb").write(d)' "$@"; }
flip "$WORK/big.jsonl.gz" $((size_gz / 2)) "$WORK/flip.jsonl.gz"
expect_exit 3 "corrupt gzip" -- "$KINDRED" sweep -q "$WORK/flip.jsonl.gz"
expect_stderr "flip.jsonl.gz: corrupt gzip stream near byte" "corrupt gzip named with an offset"
flip "$WORK/big.jsonl.gz" $((size_gz - 6)) "$WORK/crc.jsonl.gz"
expect_exit 3 "gzip with a bad CRC" -- "$KINDRED" sweep -q "$WORK/crc.jsonl.gz"
expect_stderr "crc.jsonl.gz" "bad CRC named"
flip "$WORK/big.jsonl.zst" $((size_zst / 2)) "$WORK/flip.jsonl.zst"
expect_exit 3 "corrupt zstd" -- "$KINDRED" sweep -q "$WORK/flip.jsonl.zst"
expect_stderr "flip.jsonl.zst" "corrupt zstd named"
{ cat "$WORK/big.jsonl.gz"; printf 'not gzip at all'; } >"$WORK/tail.jsonl.gz"
expect_exit 3 "garbage after a gzip member" -- "$KINDRED" sweep -q "$WORK/tail.jsonl.gz"
expect_stderr "tail.jsonl.gz" "trailing garbage named"
printf '\x28\xb5\x2f\xfd' >"$WORK/magic.zst"
expect_exit 3 "zstd magic alone" -- "$KINDRED" sweep -q "$WORK/magic.zst" --input-format jsonl
expect_stderr "magic.zst" "bare magic named"
expect_exit 3 "truncated gzip on standard input" -- \
  bash -c 'head -c 100 "$1" | "$2" sweep -q -' _ "$WORK/big.jsonl.gz" "$KINDRED"
expect_stderr "standard input" "standard input named"

# 7. Decompression bombs: a few hundred MB of zeros in a tiny file stop at
# --max-decompressed-size, and the default limit is a finite, sane value.
head -c 300M /dev/zero | gzip -1 >"$WORK/bomb.jsonl.gz"
head -c 300M /dev/zero | zstd -q -1 >"$WORK/bomb.jsonl.zst"
for bomb in bomb.jsonl.gz bomb.jsonl.zst; do
  expect_exit 3 "$bomb" -- "$KINDRED" sweep -q "$WORK/$bomb" --max-decompressed-size 50M
  expect_stderr "$bomb: decompressed size exceeds the limit of 52428800 bytes" "$bomb limit message"
done
"$KINDRED" sweep --help >"$WORK/help" 2>&1
default=$(grep -o -- '--max-decompressed-size TEXT=[^ ]*' "$WORK/help" | sed 's/.*=//')
case "$default" in
  [1-9]G | [1-9][0-9]G) ;;  # between 1 and 99 GiB
  *) fail "default --max-decompressed-size is not a finite number of GiB: \"$default\"" ;;
esac

# 8. A ~300 MB single line with default limits: refused at the document limit
# with the file and line named, in bounded memory (peak RSS under 1 GB).
{
  printf '{"id":"small","text":"fine"}\n{"id":"huge","text":"'
  head -c 300M /dev/zero | tr '\0' 'a'
  printf '"}\n'
} >"$WORK/huge.jsonl"
expect_exit 3 "a 300 MB line" -- /usr/bin/time -f 'peak-rss-kb %M' "$KINDRED" sweep -q "$WORK/huge.jsonl"
expect_stderr "huge.jsonl:2" "huge line named"
expect_stderr "--max-document-size" "the option to raise is named"
rss=$(sed -n 's/^peak-rss-kb \([0-9]*\)$/\1/p' "$WORK/err")
[[ -n "$rss" && "$rss" -lt 1000000 ]] || fail "peak RSS of the 300 MB line: ${rss:-unknown} kB"
# The same bytes as one text file.
tail -c +30 "$WORK/huge.jsonl" >"$WORK/huge.txt"
expect_exit 3 "a 300 MB text file" -- /usr/bin/time -f 'peak-rss-kb %M' "$KINDRED" sweep -q "$WORK/huge.txt"
expect_stderr "huge.txt" "huge text file named"
rss=$(sed -n 's/^peak-rss-kb \([0-9]*\)$/\1/p' "$WORK/err")
[[ -n "$rss" && "$rss" -lt 1000000 ]] || fail "peak RSS of the 300 MB file: ${rss:-unknown} kB"
rm -f "$WORK/huge.jsonl" "$WORK/huge.txt" "$WORK/bomb.jsonl.gz" "$WORK/bomb.jsonl.zst"

# 9. Index files. An index of 300 documents, then 100 more in a second segment.
head -n 300 "$WORK/big.jsonl" >"$WORK/first.jsonl"
sed -n '301,400p' "$WORK/big.jsonl" >"$WORK/second.jsonl"
sed -n '401,500p' "$WORK/big.jsonl" >"$WORK/third.jsonl"
head -n 1 "$WORK/big.jsonl" >"$WORK/query.jsonl"
INDEX="$WORK/idx.kin"
expect_exit 0 "build" -- "$KINDRED" build -q "$INDEX" "$WORK/first.jsonl"
cp "$INDEX" "$WORK/one_segment.kin"
expect_exit 0 "add" -- "$KINDRED" add -q "$INDEX" "$WORK/second.jsonl"
cp "$INDEX" "$WORK/idx.orig"
size=$(stat -c %s "$INDEX")
first_size=$(stat -c %s "$WORK/one_segment.kin")

# live_documents FILE: the live document count `info` reports.
live_documents() { "$KINDRED" info "$1" 2>/dev/null | sed -n 's/^documents *\([0-9]*\) live.*/\1/p'; }
[[ "$(live_documents "$INDEX")" == 400 ]] || fail "index holds 400 documents"

# 9a. Truncated: inside the header it is not an index (exit 4); inside the
# second segment it is damage too (the file records its committed length):
# exit 4 for readers and writers, and nothing cuts it shorter.
for cut in 8 60; do
  head -c $cut "$INDEX" >"$WORK/cut.kin"
  expect_exit 4 "index cut at $cut bytes" -- "$KINDRED" check -q "$WORK/cut.kin" "$WORK/query.jsonl"
  expect_stderr "cut.kin" "cut index named"
done
head -c $(((first_size + size) / 2)) "$INDEX" >"$WORK/cut.kin"
cut_size=$(((first_size + size) / 2))
head -c $cut_size "$INDEX" >"$WORK/cut.kin"
expect_exit 4 "index cut inside its second segment" -- "$KINDRED" check -q "$WORK/cut.kin" "$WORK/query.jsonl" --format tsv
expect_stderr "records $size committed bytes" "cut index: committed length named"
expect_exit 4 "add after a cut" -- "$KINDRED" add -q "$WORK/cut.kin" "$WORK/second.jsonl"
expect_exit 4 "audit after a cut" -- "$KINDRED" audit -q "$WORK/cut.kin"
[[ $(stat -c %s "$WORK/cut.kin") -eq $cut_size ]] || fail "a command cut a damaged index shorter"

# 9b. One inverted byte anywhere: audit always finds it (exit 4); readers
# either fail with exit 4 or answer; a writer refuses or appends, and when it
# refuses the file is unchanged.
for i in $(seq 0 23); do
  pos=$((i * (size - 1) / 23))
  flip "$INDEX" "$pos" "$WORK/flip.kin"
  expect_exit 4 "audit of a byte flipped at $pos" -- "$KINDRED" audit "$WORK/flip.kin"
  "$KINDRED" check -q "$WORK/flip.kin" "$WORK/query.jsonl" >/dev/null 2>"$WORK/err"
  code=$?
  [[ $code -eq 0 || $code -eq 4 ]] || fail "check of a byte flipped at $pos: exit $code: $(cat "$WORK/err")"
  [[ $code -eq 0 ]] || expect_stderr "flip.kin" "flip at $pos named"
  cp "$WORK/flip.kin" "$WORK/flip.before"
  "$KINDRED" add -q "$WORK/flip.kin" "$WORK/third.jsonl" >/dev/null 2>"$WORK/err"
  code=$?
  [[ $code -eq 0 || $code -eq 4 ]] || fail "add to a byte flipped at $pos: exit $code: $(cat "$WORK/err")"
  [[ $code -ne 4 ]] || cmp -s "$WORK/flip.kin" "$WORK/flip.before" || fail "refused add changed the file ($pos)"
done

# 9c. Other settings: refused with exit 5, the index untouched.
for option in "-k 4" "--perms 64" "--shingle char" "--signer classic" "--seed 7"; do
  # shellcheck disable=SC2086
  expect_exit 5 "add with $option" -- "$KINDRED" add -q "$INDEX" "$WORK/third.jsonl" $option
  expect_stderr "idx.kin" "settings mismatch names the index"
done
cmp -s "$INDEX" "$WORK/idx.orig" || fail "a refused add changed the index"

# 9d. A full disk (the file size limit, RLIMIT_FSIZE, with SIGXFSZ ignored so
# writes fail with EFBIG) during add, build and sweep -o.
limited() {  # limited KILOBYTES COMMAND...
  local kb=$1
  shift
  (trap '' XFSZ; ulimit -f "$kb"; exec "$@")
}
expect_exit 7 "add on a full disk" -- limited $((size / 1024 + 2)) "$KINDRED" add -q "$INDEX" "$WORK/big.jsonl" --on-duplicate skip
expect_stderr "idx.kin" "full disk names the index"
expect_exit 0 "audit after a full disk" -- "$KINDRED" audit -q "$INDEX"
[[ "$(live_documents "$INDEX")" == 400 ]] || fail "full disk during add lost or added documents"
expect_exit 0 "add after the disk has room" -- "$KINDRED" add -q "$INDEX" "$WORK/third.jsonl"
[[ "$(live_documents "$INDEX")" == 500 ]] || fail "add after a full disk"
expect_exit 7 "build on a full disk" -- limited 8 "$KINDRED" build -q "$WORK/full.kin" "$WORK/big.jsonl"
[[ ! -e "$WORK/full.kin" ]] || fail "a failed build left an index file"
mkdir -p "$WORK/fullout"
# 200 documents give some 400 kB of pairs at 0.5 (all 2000: 46 MB).
head -n 200 "$WORK/big.jsonl" >"$WORK/some.jsonl"
expect_exit 7 "sweep -o on a full disk" -- limited 8 "$KINDRED" sweep -q "$WORK/some.jsonl" -o "$WORK/fullout" --threshold 0.5
expect_no_outputs "$WORK/fullout" "sweep -o on a full disk"
[[ -z "$(ls -A "$WORK/fullout")" ]] || fail "temporary outputs left behind: $(ls -A "$WORK/fullout")"

# 9e. Two writers at once: each succeeds or fails with exit 6; the index
# stays sound and holds exactly the documents of the adds that succeeded.
$PY - "$WORK" <<'PY'
import json, os, sys
for w in ("w1", "w2"):
    with open(os.path.join(sys.argv[1], w + ".jsonl"), "w") as out:
        for i in range(3000):
            out.write(json.dumps({"id": f"{w}-{i}", "text": f"writer {w} document {i} about the town council and its budget for {i % 13} years"}) + "\n")
PY
expected=$(live_documents "$INDEX")
for round in 1 2; do
  for w in w1 w2; do sed "s/\"id\": \"w/\"id\": \"r${round}w/" "$WORK/$w.jsonl" >"$WORK/$w-$round.jsonl"; done
  "$KINDRED" add -q "$INDEX" "$WORK/w1-$round.jsonl" >/dev/null 2>"$WORK/err1" & first=$!
  "$KINDRED" add -q "$INDEX" "$WORK/w2-$round.jsonl" >/dev/null 2>"$WORK/err2" & second=$!
  wait $first; code1=$?
  wait $second; code2=$?
  for code in $code1 $code2; do
    [[ $code -eq 0 || $code -eq 6 ]] || fail "concurrent add: exit $code: $(cat "$WORK/err1" "$WORK/err2")"
    [[ $code -ne 0 ]] || expected=$((expected + 3000))
  done
  [[ $code1 -eq 0 || $code2 -eq 0 ]] || fail "both concurrent adds failed"
  expect_exit 0 "audit after concurrent adds" -- "$KINDRED" audit -q "$INDEX"
  [[ "$(live_documents "$INDEX")" == "$expected" ]] || fail "concurrent adds: $(live_documents "$INDEX") live, expected $expected"
done

# 10. Outputs are never partial: kill -9 of a sweep leaves no final-named
# file, and earlier complete outputs stay complete.
mkfifo "$WORK/fifo"
rm -rf "$WORK/killed"
"$KINDRED" sweep -q "$WORK/fifo" --input-format jsonl -o "$WORK/killed" >/dev/null 2>&1 &
pid=$!
exec 3>"$WORK/fifo"
head -n 1000 "$WORK/big.jsonl" >&3
sleep 0.5
kill -9 $pid 2>/dev/null || fail "the sweep reading a pipe ended before it was killed"
wait $pid 2>/dev/null
[[ $? -eq 137 ]] || fail "the sweep reading a pipe was not killed"
exec 3>&-
expect_no_outputs "$WORK/killed" "kill -9 while reading"
$PY - "$WORK/many.jsonl" <<'PY'
import json, sys
with open(sys.argv[1], "w") as out:
    for i in range(12000):
        out.write(json.dumps({"id": f"m{i}", "text": f"notice {i % 500}: the council meets on day {i % 28} to discuss item {i % 97} of the agenda"}) + "\n")
PY
"$KINDRED" sweep -q "$WORK/good.jsonl" -o "$WORK/killed" --threshold 0.5
start=$(date +%s.%N)
"$KINDRED" sweep -q "$WORK/many.jsonl" -o "$WORK/complete" --threshold 0.5
took=$(echo "$start $(date +%s.%N)" | awk '{print $2 - $1}')
# Kills spread over the time a whole sweep took on this build (a sanitizer
# build is ten times slower): early, mid-way, and while writing.
for fraction in 0.1 0.3 0.5 0.7 0.9; do
  delay=$(echo "$took $fraction" | awk '{printf "%.3f", $1 * $2}')
  cp -r "$WORK/killed" "$WORK/before_kill"
  # (timeout, the program's parent, kills it: never another process that
  # took the pid of a sweep already done.)
  timeout -s KILL "$delay" "$KINDRED" sweep -q "$WORK/many.jsonl" -o "$WORK/killed" \
    --threshold 0.5 >/dev/null 2>&1
  for name in pairs groups decisions; do
    cmp -s "$WORK/killed/$name.jsonl" "$WORK/before_kill/$name.jsonl" ||
      cmp -s "$WORK/killed/$name.jsonl" "$WORK/complete/$name.jsonl" ||
      fail "kill -9 after $delay s left $name.jsonl neither old nor complete"
  done
  rm -rf "$WORK/before_kill"
done

finish
