# End to end: errors keep their kind from where they arise to the exit code
# (README "Exit codes"): an input that changes between two readings is an
# input error (3), not an index made with other settings (5).
source "$(dirname "$0")/common.bash"

printf '%s\n' '{"id":"a","text":"one two three four five six"}' \
  '{"id":"b","text":"one two three four five seven"}' >"$WORK/first.jsonl"
{ cat "$WORK/first.jsonl"; printf '%s\n' '{"id":"c","text":"eight nine"}'; } >"$WORK/second.jsonl"
printf 'a\tb\tduplicate\n' >"$WORK/labels.tsv"

# 1. tune reads its corpus once per shingle setting; a named pipe gives it
# two documents the first time and three the second (feed_pipe.py writes the
# second text only once the first reading has closed the pipe).
fifo="$WORK/corpus.jsonl"
mkfifo "$fifo"
timeout 120 "$PY" "$(dirname "$0")/feed_pipe.py" "$fifo" "$WORK/first.jsonl" \
  "$WORK/second.jsonl" &
writer=$!
expect_exit 3 "tune, input changed between readings" -- timeout 60 "$KINDRED" tune -q \
  "$WORK/corpus.jsonl" --labels "$WORK/labels.tsv" --shingles word:3,word:5 --perms 16 \
  --thresholds 0.5
expect_stderr "kindred: the corpus changed between two readings: 3 documents now, 2 before" \
  "tune, input changed between readings"
kill "$writer" 2>/dev/null
wait "$writer" 2>/dev/null

# 2. The same corpus, unchanged, tunes fine.
expect_exit 0 "tune, unchanged input" -- "$KINDRED" tune -q "$WORK/second.jsonl" \
  --labels "$WORK/labels.tsv" --shingles word:3,word:5 --perms 16 --thresholds 0.5

# 3. `serve` loads its HTTP module from beside the program: a program copied
# alone says what is missing (exit 8), and the other commands still run.
mkdir -p "$WORK/alone"
cp "$KINDRED" "$WORK/alone/kindred"
expect_exit 0 "build with the program alone" -- "$WORK/alone/kindred" build -q \
  "$WORK/alone.kin" "$SOURCE_DIR/sample_corpus/archive.jsonl"
expect_exit 8 "serve without its module" -- "$WORK/alone/kindred" serve "$WORK/alone.kin" \
  --listen 127.0.0.1:0
expect_stderr "kindred: cannot load the HTTP service module kindred_serve.so: " \
  "serve without its module"

finish
