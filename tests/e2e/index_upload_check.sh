#!/usr/bin/env bash
# The upload-check workflow end to end: build an index from the sample
# archive, check the sample submissions against it (exit status included),
# add them, and exercise the index failure paths (busy, corrupt, torn,
# other settings) with their documented exit codes.
# Usage: index_upload_check.sh KINDRED_BINARY SOURCE_DIR
set -u
K=$1
SRC=$2
ARCHIVE="$SRC/sample_corpus/archive"
SUBMISSIONS="$SRC/sample_corpus/submissions"
T=$(mktemp -d)
trap 'rm -rf "$T"' EXIT
fail() { echo "FAIL: $*" >&2; exit 1; }
expect_rc() {  # expect_rc WANT DESCRIPTION -- command...
  local want=$1 what=$2
  shift 3
  "$@" >"$T/out" 2>"$T/err"
  local rc=$?
  [ "$rc" -eq "$want" ] || { cat "$T/err" >&2; fail "$what: exit $rc, expected $want"; }
}

INDEX="$T/archive.kin"
expect_rc 0 "build" -- "$K" build "$INDEX" "$ARCHIVE" -q
expect_rc 2 "build over an existing index" -- "$K" build "$INDEX" "$ARCHIVE" -q
grep -q "already exists" "$T/err" || fail "build over an existing index: message"

# info: counts agree with the archive on disk.
documents=$(find "$ARCHIVE" -type f | wc -l)
expect_rc 0 "info" -- "$K" info "$INDEX"
grep -q "^documents *$documents live, 0 retired" "$T/out" || fail "info: document count"
grep -q "^banding .* bands x .* rows" "$T/out" || fail "info: banding"
grep -q "^signature *word k=5 " "$T/out" || fail "info: settings"

# The gate: some submissions are copies of archive stories.
expect_rc 1 "check --fail-on-match" -- "$K" check "$INDEX" "$SUBMISSIONS" --fail-on-match -q
expect_rc 0 "check without the gate" -- "$K" check "$INDEX" "$SUBMISSIONS" -q
# Verbose: per-document latency figures after the summary.
expect_rc 0 "check -v" -- "$K" check "$INDEX" "$SUBMISSIONS" -v
grep -Eq "latency per document: median [0-9.]+ ms, 99th percentile [0-9.]+ ms, largest [0-9.]+ ms \([0-9]+ documents" \
  "$T/err" || fail "check -v: latency line: $(cat "$T/err")"
# Every planted submission is found, by containment, with a looser query-time
# banding (32 x 2 fits the stored 128-slot signatures; nothing is re-signed).
expect_rc 0 "check, containment" -- "$K" check "$INDEX" "$SUBMISSIONS" --format tsv \
  --measure containment -t 0.6 --bands 32 --rows 2 -q
tail -n +2 "$SRC/sample_corpus/submissions_expected.tsv" | while IFS=$'\t' read -r sub arch how; do
  awk -F'\t' -v s="$sub" -v a="$arch" '$1 == s && $2 == a && $3 == "index" {found = 1}
    END {exit !found}' "$T/out" || fail "check did not find $sub -> $arch ($how)"
done || exit 1
# An original submission alone passes the gate.
original=""
for f in "$SUBMISSIONS"/*; do
  name=$(basename "$f")
  grep -q "^$name	" "$SRC/sample_corpus/submissions_expected.tsv" && continue
  "$K" check "$INDEX" "$f" --fail-on-match -q >/dev/null 2>&1 && { original=$f; break; }
done
[ -n "$original" ] || fail "no submission passes the gate"
expect_rc 0 "check of an original upload" -- "$K" check "$INDEX" "$original" --fail-on-match -q
[ ! -s "$T/out" ] || fail "an original upload printed matches"

# A full disk during add (a file size limit makes the write fail with EFBIG,
# as a full disk fails with ENOSPC): exit 7, and the index keeps every
# committed document with no partial segment left behind.
size_before=$(stat -c %s "$INDEX")
(
  trap '' XFSZ
  ulimit -f $((size_before / 1024 + 8))
  exec "$K" add "$INDEX" "$SUBMISSIONS" -q
) >"$T/out" 2>"$T/err"
rc=$?
[ "$rc" -eq 7 ] || { cat "$T/err" >&2; fail "add on a full disk: exit $rc, expected 7"; }
[ "$(stat -c %s "$INDEX")" -eq "$size_before" ] || fail "add on a full disk left bytes behind"
expect_rc 0 "audit after a full disk" -- "$K" audit "$INDEX" -q
expect_rc 0 "info after a full disk" -- "$K" info "$INDEX"
grep -q "^documents *$documents live" "$T/out" || fail "full disk changed the document count"

# Admit the submissions; a second add of the same ids is refused, or skipped.
expect_rc 0 "add" -- "$K" add "$INDEX" "$SUBMISSIONS" -q
expect_rc 3 "add of indexed ids" -- "$K" add "$INDEX" "$SUBMISSIONS" -q
grep -q "is already in the index" "$T/err" || fail "duplicate id message"
expect_rc 0 "add --on-duplicate skip" -- "$K" add "$INDEX" "$SUBMISSIONS" --on-duplicate skip -q
submitted=$(find "$SUBMISSIONS" -type f | wc -l)
expect_rc 0 "info after add" -- "$K" info "$INDEX"
grep -q "^documents *$((documents + submitted)) live" "$T/out" || fail "info after add: count"
grep -q "^segments *2" "$T/out" || fail "info after add: segments"
# Now every submission matches itself in the index.
expect_rc 0 "check after add" -- "$K" check "$INDEX" "$SUBMISSIONS" --format tsv -q
[ "$(awk -F'\t' '$1 == $2 && $4 == "1.000000"' "$T/out" | wc -l)" -ge $((submitted - 1)) ] ||
  fail "submissions do not match themselves after add"

# Crowded keys: a template copied into many documents makes buckets of all
# of them; under --max-bucket a copy is checked against the first only, and
# the summary says so. --max-bucket below 2 is a usage error.
mkdir "$T/template"
for i in $(seq 1 12); do
  printf 'Subscribe to our newsletter for the week ahead in Port Tessary and beyond.\n' \
    >"$T/template/page-$i.txt"
done
expect_rc 0 "build an index of a template" -- "$K" build "$T/template.kin" "$T/template" -q
expect_rc 0 "check a template copy, crowded" -- "$K" check "$T/template.kin" \
  "$T/template/page-1.txt" --max-bucket 5 --format tsv
[ "$(wc -l <"$T/out")" -eq 2 ] || fail "crowded check: expected one match: $(cat "$T/out")"
grep -q "crowded keys" "$T/err" || fail "crowded check: no summary line: $(cat "$T/err")"
expect_rc 0 "check a template copy, uncapped" -- "$K" check "$T/template.kin" \
  "$T/template/page-1.txt" --format tsv
[ "$(wc -l <"$T/out")" -eq 13 ] || fail "uncapped check: expected 12 matches: $(cat "$T/out")"
expect_rc 2 "check --max-bucket 1" -- "$K" check "$T/template.kin" "$T/template/page-1.txt" \
  --max-bucket 1

# Another settings than the index's: exit 5.
expect_rc 5 "check with other settings" -- "$K" check "$INDEX" "$SUBMISSIONS" -k 4 -q
grep -q "other settings" "$T/err" || fail "settings mismatch message"

# Two writers: the second fails at once with exit 6 (flock(1) holds the lock).
flock -o "$INDEX" sleep 5 &
holder=$!
sleep 0.5
expect_rc 6 "add while locked" -- timeout 3 "$K" add "$INDEX" "$SUBMISSIONS" --on-duplicate skip -q
expect_rc 6 "compact while locked" -- timeout 3 "$K" compact "$INDEX" -q
expect_rc 0 "check while locked (readers need no lock)" -- "$K" check "$INDEX" "$original" -q
kill "$holder" 2>/dev/null
wait "$holder" 2>/dev/null

expect_rc 0 "audit" -- "$K" audit "$INDEX"
expect_rc 0 "compact" -- "$K" compact "$INDEX" -q
expect_rc 0 "info after compact" -- "$K" info "$INDEX"
grep -q "^segments *1" "$T/out" || fail "compact: segments"
expect_rc 0 "audit after compact" -- "$K" audit "$INDEX" -q

# A torn tail (an interrupted add): reported, ignored, repaired.
cp "$INDEX" "$T/torn.kin"
printf 'KSEG interrupted' >>"$T/torn.kin"
expect_rc 0 "info of a torn index" -- "$K" info "$T/torn.kin"
grep -q "^torn tail *16 bytes" "$T/out" || fail "info: torn tail"
expect_rc 0 "audit of a torn index" -- "$K" audit "$T/torn.kin"
grep -q "torn tail" "$T/out" || fail "audit: torn tail note"
expect_rc 0 "audit --repair" -- "$K" audit "$T/torn.kin" --repair -q
cmp -s "$INDEX" "$T/torn.kin" || fail "repair did not restore the committed bytes"

# A flipped byte: exit 4 from readers and from audit, with the place named.
/usr/bin/python3 - "$INDEX" "$T/flipped.kin" <<'PY'
import sys
data = bytearray(open(sys.argv[1], "rb").read())
data[1536 + 200] ^= 0x04  # inside segment 0 (after the 1536-byte header region)
open(sys.argv[2], "wb").write(bytes(data))
PY
expect_rc 4 "check of a corrupt index" -- "$K" check "$T/flipped.kin" "$original" -q
grep -q "segment 0 at byte" "$T/err" || fail "corrupt index message"
expect_rc 4 "audit of a corrupt index" -- "$K" audit "$T/flipped.kin"
grep -q "^problem: " "$T/out" || fail "audit problem line"
# A newer format version (header re-checksummed with XXH3-64 from Python's
# xxhash package, an implementation independent of this project): exit 5.
/usr/bin/python3 - "$INDEX" "$T/newer.kin" <<'PY'
import struct, sys, xxhash
data = bytearray(open(sys.argv[1], "rb").read())
size = struct.unpack_from("<I", data, 12)[0]
struct.pack_into("<I", data, 8, 4)
struct.pack_into("<Q", data, size - 8, xxhash.xxh3_64_intdigest(bytes(data[:size - 8])))
open(sys.argv[2], "wb").write(bytes(data))
PY
expect_rc 5 "check of a newer index" -- "$K" check "$T/newer.kin" "$original" -q
grep -q "version 4 is newer" "$T/err" || fail "newer version message"
# Not an index at all.
expect_rc 4 "info of a text file" -- "$K" info "$SRC/sample_corpus/README.md"
grep -q "not a kindred index" "$T/err" || fail "bad magic message"
echo "ok"
