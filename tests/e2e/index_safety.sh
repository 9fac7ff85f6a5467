# End to end: an index file records what it committed. A file cut short
# anywhere inside its committed part is damage for every command (exit 4)
# and no command makes it shorter; only bytes after the recorded commit are
# a torn tail. A damaged shingle set stops writers. audit --repair writes a
# repaired copy and never cuts the file. Version-1 files still answer
# queries and are upgraded by compact. Interrupted build and compact leave
# no temporary files (or the next command removes them), and a compact
# killed at any moment leaves the old or the new index, whole.
source "$(dirname "$0")/common.bash"

DATA="$SOURCE_DIR/tests/e2e/data"
size_of() { stat -c %s "$1"; }

$PY "$SOURCE_DIR/tools/gen_corpus.py" --docs 450 --seed 17 --dup-rate 0.05 --out "$WORK/corpus.jsonl" \
  >/dev/null 2>&1 || fail "gen_corpus"
sed -n 1,150p "$WORK/corpus.jsonl" >"$WORK/a.jsonl"
sed -n 151,300p "$WORK/corpus.jsonl" >"$WORK/b.jsonl"
sed -n 301,450p "$WORK/corpus.jsonl" >"$WORK/c.jsonl"
head -10 "$WORK/b.jsonl" | sed 's/"id": "doc/"id": "upload/' >"$WORK/uploads.jsonl"

expect_exit 0 "build" -- "$KINDRED" build -q "$WORK/x.kin" "$WORK/a.jsonl"
expect_exit 0 "add b" -- "$KINDRED" add -q "$WORK/x.kin" "$WORK/b.jsonl"
expect_exit 0 "add c" -- "$KINDRED" add -q "$WORK/x.kin" "$WORK/c.jsonl"
cp "$WORK/x.kin" "$WORK/intact.kin"
expect_exit 1 "uploads match the intact index" -- "$KINDRED" check -q --fail-on-match \
  "$WORK/intact.kin" "$WORK/uploads.jsonl"

# Segment offsets and the committed length, from info --format json.
offsets_of() {
  "$KINDRED" info --format json "$1" | $PY -c '
import json, sys
info = json.load(sys.stdin)
print(" ".join(str(s["offset"]) for s in info["segments"]), info["committed_bytes"])'
}

# Every command on a copy of $1 cut to $2 bytes: exit 4, never shorter.
check_cut() {
  local source=$1 length=$2 label=$3
  head -c "$length" "$source" >"$WORK/cut.kin"
  for command in info audit check add compact; do
    local args=("$WORK/cut.kin")
    [[ $command == check || $command == add ]] && args+=("$WORK/uploads.jsonl")
    [[ $command != info ]] && args+=(-q)
    expect_exit 4 "$label: $command after a cut to $length bytes" -- "$KINDRED" "$command" \
      "${args[@]}"
    [[ $(size_of "$WORK/cut.kin") -eq $length ]] ||
      fail "$label: $command changed the size of a file cut to $length bytes"
  done
}

# Cuts at every segment boundary, inside the header region, and in the
# middle and at the last byte of each committed segment (the unit tests of
# the index cut at many more offsets, in-process).
cut_sweep() {
  local source=$1 label=$2
  shift 2
  read -ra marks <<<"$(offsets_of "$source")"
  local committed=${marks[-1]} lengths=("$@")
  for ((i = 0; i < ${#marks[@]}; ++i)); do
    local start=${marks[i]} end=$committed
    ((i + 1 < ${#marks[@]})) && end=${marks[i + 1]}
    lengths+=("$start")
    ((end > start)) || continue
    for fraction in 50; do lengths+=($((start + (end - start) * fraction / 100))); done
    lengths+=($((end - 1)))
  done
  for length in "${lengths[@]}"; do
    ((length < committed)) && check_cut "$source" "$length" "$label"
  done
}
cut_sweep "$WORK/intact.kin" "three segments" 0 600 1200  # and inside the header region

# The same after compact (one segment).
cp "$WORK/intact.kin" "$WORK/compacted.kin"
expect_exit 0 "compact" -- "$KINDRED" compact -q "$WORK/compacted.kin"
cut_sweep "$WORK/compacted.kin" "compacted"

# The truncated file says what is missing.
head -c 5000 "$WORK/intact.kin" >"$WORK/short.kin"
expect_exit 4 "info on a cut file" -- "$KINDRED" info "$WORK/short.kin"
expect_stderr "the file is 5000 bytes but records $(size_of "$WORK/intact.kin") committed bytes" \
  "info names the missing committed bytes"
expect_exit 4 "check on a cut file" -- "$KINDRED" check --fail-on-match "$WORK/short.kin" \
  "$WORK/uploads.jsonl"
[[ ! -s $WORK/out ]] || fail "check on a cut file printed matches as if complete"
expect_exit 4 "sweep --index on a cut file" -- "$KINDRED" sweep -q --index "$WORK/short.kin"
expect_exit 4 "explain --index on a cut file" -- "$KINDRED" explain --index "$WORK/short.kin" \
  doc000000000 doc000000001
expect_exit 4 "build onto a cut file" -- "$KINDRED" build -q "$WORK/short.kin" "$WORK/a.jsonl"
expect_stderr "is damaged" "build names the damage"
[[ $(size_of "$WORK/short.kin") -eq 5000 ]] || fail "a command changed the cut file"

# audit --repair on a cut file: a repaired copy, the file left as it is.
expect_exit 4 "repair a cut file" -- "$KINDRED" audit --repair "$WORK/short.kin"
cmp -s "$WORK/short.kin" <(head -c 5000 "$WORK/intact.kin") || fail "repair changed the cut file"
grep -q "^lost: committed segments 1..2 at bytes .* documents 150..449 lost" "$WORK/out" ||
  fail "repair: lost lines: $(cat "$WORK/out")"
expect_stderr "wrote $WORK/short.repaired.kin" "repair names its copy"
expect_exit 0 "the repaired copy audits clean" -- "$KINDRED" audit "$WORK/short.repaired.kin"

# Bytes after the recorded commit are a torn tail: reported, cut by add.
cp "$WORK/intact.kin" "$WORK/tail.kin"
printf 'KSEG and the rest of an interrupted write' >>"$WORK/tail.kin"
expect_exit 0 "info with a torn tail" -- "$KINDRED" info "$WORK/tail.kin"
grep -q "^torn tail  *41 bytes at byte $(size_of "$WORK/intact.kin") after the last recorded commit" \
  "$WORK/out" || fail "info: torn tail line: $(cat "$WORK/out")"
expect_exit 0 "audit with a torn tail" -- "$KINDRED" audit "$WORK/tail.kin"
expect_exit 0 "add cuts the torn tail" -- "$KINDRED" add --on-duplicate skip "$WORK/tail.kin" \
  "$WORK/uploads.jsonl"
expect_stderr "cut a torn tail of 41 bytes" "add reports the cut"

# A flipped byte in a shingle set: add refuses, naming the id and the bytes.
cp "$WORK/intact.kin" "$WORK/flip.kin"
read -ra marks <<<"$(offsets_of "$WORK/flip.kin")"
at=$((marks[1] - 200))  # inside the last shingle sets of segment 0
$PY - "$WORK/flip.kin" "$at" <<'EOF'
import sys
path, at = sys.argv[1], int(sys.argv[2])
with open(path, "r+b") as f:
    f.seek(at); b = f.read(1); f.seek(at); f.write(bytes([b[0] ^ 0x20]))
EOF
cp "$WORK/flip.kin" "$WORK/flip.before"
expect_exit 4 "add to a file with a damaged shingle set" -- "$KINDRED" add "$WORK/flip.kin" \
  "$WORK/uploads.jsonl"
expect_stderr 'shingle set does not verify: bytes ' "add names the damaged bytes"
grep -qE 'document "doc[0-9]+" \(number [0-9]+\)' "$WORK/err" || fail "add names no id: $(cat "$WORK/err")"
cmp -s "$WORK/flip.kin" "$WORK/flip.before" || fail "add changed a damaged file"
expect_exit 4 "audit a damaged shingle set" -- "$KINDRED" audit "$WORK/flip.kin"
expect_stderr "flip.kin: 1 problem" "audit: singular"
expect_exit 4 "repair a damaged shingle set" -- "$KINDRED" audit --repair "$WORK/flip.kin"
grep -qE '^lost: document "doc[0-9]+" \(number [0-9]+\): shingle set at bytes' "$WORK/out" ||
  fail "repair: lost lines: $(cat "$WORK/out")"
expect_stderr "with its 449 readable live documents" "repair keeps the rest"
cmp -s "$WORK/flip.kin" "$WORK/flip.before" || fail "repair changed a damaged file"

# A version-1 file (made by the previous release) answers queries; add asks
# for compact, which upgrades it.
cp "$DATA/v1_index.kin" "$WORK/v1.kin"
expect_exit 0 "info v1" -- "$KINDRED" info "$WORK/v1.kin"
grep -q "^format version   1 " "$WORK/out" || fail "info v1: $(head -3 "$WORK/out")"
expect_exit 1 "check against v1" -- "$KINDRED" check -q --fail-on-match "$WORK/v1.kin" \
  "$DATA/v1_more.jsonl"
[[ $(wc -l <"$WORK/out") -eq 2 ]] || fail "check against v1: $(cat "$WORK/out")"
expect_exit 5 "add to v1" -- "$KINDRED" add "$WORK/v1.kin" "$DATA/v1_more.jsonl"
expect_stderr "kindred compact" "add to v1 names compact"
cmp -s "$WORK/v1.kin" "$DATA/v1_index.kin" || fail "add changed a version-1 file"
expect_exit 0 "compact v1" -- "$KINDRED" compact "$WORK/v1.kin"
expect_exit 0 "info upgraded" -- "$KINDRED" info "$WORK/v1.kin"
grep -q "^format version   2 " "$WORK/out" || fail "compact did not upgrade: $(head -3 "$WORK/out")"
grep -q "^documents *6 live" "$WORK/out" || fail "upgraded documents: $(cat "$WORK/out")"
expect_exit 0 "add after the upgrade" -- "$KINDRED" add -q --on-duplicate replace "$WORK/v1.kin" \
  "$DATA/v1_more.jsonl"

# remove retires ids in a new segment (all or nothing); writers can wait for
# the lock for a bounded time.
cp "$WORK/intact.kin" "$WORK/r.kin"
printf 'doc000000003\n\ndoc000000004\r\n' >"$WORK/ids.txt"
expect_exit 3 "remove an id not indexed" -- "$KINDRED" remove "$WORK/r.kin" doc000000001 no-such-id
expect_stderr '1 id is not live in the index' "remove names the missing id"
cmp -s "$WORK/r.kin" "$WORK/intact.kin" || fail "a refused remove changed the index"
expect_exit 0 "remove" -- "$KINDRED" remove "$WORK/r.kin" doc000000001 --ids-from "$WORK/ids.txt"
expect_stderr "3 documents retired (segment 3); 447 documents live" "remove summary"
expect_exit 0 "info after remove" -- "$KINDRED" info "$WORK/r.kin"
grep -q "^documents *447 live, 3 retired, 450 in all" "$WORK/out" || fail "info: $(cat "$WORK/out")"
grep -qE '^ +3 +[0-9]+ +[0-9]+ +450 +0 +3 ' "$WORK/out" || fail "info: retiring segment: $(cat "$WORK/out")"
expect_exit 0 "audit after remove" -- "$KINDRED" audit -q "$WORK/r.kin"
# The lock is held until the test says so (no timing assumptions: under a
# sanitizer a start of the program can take longer than any fixed sleep).
flock "$WORK/r.kin" sh -c "touch '$WORK/held'; while [ ! -e '$WORK/release' ]; do sleep 0.05; done" &
holder=$!
for _ in $(seq 200); do [[ -e "$WORK/held" ]] && break; sleep 0.05; done
expect_exit 6 "remove while locked" -- "$KINDRED" remove "$WORK/r.kin" doc000000005
expect_exit 6 "remove while locked, waiting too little" -- "$KINDRED" remove --wait-lock 0.1 \
  "$WORK/r.kin" doc000000005
expect_stderr "after waiting 0.1 s" "the wait is named"
(sleep 0.5; touch "$WORK/release") &
expect_exit 0 "remove waiting for the lock" -- "$KINDRED" remove --wait-lock 20 "$WORK/r.kin" \
  doc000000005
wait "$holder"

# A temporary file of a process that no longer runs is removed, and said.
sh -c 'exit 0' &
dead=$!
wait "$dead"
head -c 3000 "$WORK/intact.kin" >"$WORK/x.kin.tmp.$dead"
head -c 10 "$WORK/intact.kin" >"$WORK/x.kin.tmp.$$"  # ours: runs, kept
expect_exit 0 "info removes a stale temporary file" -- "$KINDRED" info "$WORK/x.kin"
expect_stderr "removed $WORK/x.kin.tmp.$dead (3000 bytes), left by process $dead" "stale file named"
[[ ! -e $WORK/x.kin.tmp.$dead ]] || fail "stale temporary file kept"
[[ -e $WORK/x.kin.tmp.$$ ]] || fail "a running process's temporary file was removed"
rm -f "$WORK/x.kin.tmp.$$"

# SIGTERM during build --memory: the partial file goes with the process.
# (timeout sends the signals: it is the program's parent, so the signal
# cannot reach another process that took a finished program's pid.)
timeout -s TERM 0.05 "$KINDRED" build -q --memory 1M "$WORK/built.kin" "$WORK/corpus.jsonl" \
  "$WORK/corpus.jsonl" "$WORK/corpus.jsonl" 2>/dev/null
[[ -z $(find "$WORK" -name 'built.kin.*') ]] || fail "build left: $(ls "$WORK")"

# Compact killed at random moments (SIGTERM, then SIGKILL): the old index
# or the new one, whole; no temporary file survives the next command.
cp "$WORK/intact.kin" "$WORK/k.kin"
RANDOM=7
for trial in $(seq 1 20); do
  signal=TERM
  ((trial % 2 == 0)) && signal=KILL
  timeout -s "$signal" "0.00$((RANDOM % 9 + 1))" "$KINDRED" compact -q "$WORK/k.kin" 2>/dev/null
  expect_exit 0 "audit after compact killed by SIG$signal (trial $trial)" -- "$KINDRED" audit \
    "$WORK/k.kin"
  grep -q "450 documents" "$WORK/err" || fail "trial $trial: $(cat "$WORK/err")"
  [[ -z $(find "$WORK" -name 'k.kin.*') ]] || fail "trial $trial left: $(ls "$WORK")"
  # Fresh segments for the next compact to merge.
  [[ $trial -eq 10 ]] && cp "$WORK/intact.kin" "$WORK/k.kin"
done

finish
