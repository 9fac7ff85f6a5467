# End to end: every output location and option combination is checked
# before any input is read, so a mistake costs nothing and prints nothing.
source "$(dirname "$0")/common.bash"

ARCHIVE="$SOURCE_DIR/sample_corpus/archive"
LABELS="$SOURCE_DIR/sample_corpus/labels.tsv"
# A corpus that fails when read: a run that reads it cannot reach the
# output checks, so a clean usage or output error proves they came first.
mkdir -p "$WORK/tree/sub"
cp "$ARCHIVE/2023/01/new-bus-route-links-the-town.txt" "$WORK/tree/sub/a.txt"
printf 'broken\n' | gzip -c | head -c 12 >"$WORK/tree/sub/b.gz"
printf '{"id":"a","text":"one"}\n' | gzip -c | head -c 12 >"$WORK/cut.jsonl.gz"

# Kept outputs that do not fit the inputs: exit 2, nothing on stdout.
expect_exit 2 "--write-kept for a tree" -- "$KINDRED" sweep "$WORK/tree" --write-kept "$WORK/k.jsonl"
expect_stderr "--copy-kept DIR or --list-kept FILE" "tree message names --copy-kept/--list-kept"
[[ -s "$WORK/out" ]] && fail "groups printed before the kept-output error"
[[ -e "$WORK/k.jsonl" ]] && fail "kept file written"
expect_exit 2 "--list-kept for JSON Lines" -- "$KINDRED" sweep "$WORK/cut.jsonl.gz" --list-kept "$WORK/l.txt"
expect_stderr "give --write-kept FILE" "JSON Lines message names --write-kept"
expect_exit 2 "--copy-kept and --list-kept" -- "$KINDRED" sweep "$WORK/tree" --copy-kept "$WORK/c" --list-kept "$WORK/l.txt"
expect_stderr "not both" "both message"
expect_exit 2 "--write-kept unused" -- "$KINDRED" sweep "$WORK/tree" --write-kept "$WORK/k.jsonl" --list-kept "$WORK/l.txt"
expect_stderr "no input is JSON Lines" "unused --write-kept message"
expect_exit 2 "copy directory inside the input" -- "$KINDRED" sweep "$WORK/tree" --copy-kept "$WORK/tree/kept"

# Output locations that cannot be written: exit 7 before reading (the
# broken .gz of the tree would otherwise give exit 3).
expect_exit 7 "-o under /proc" -- "$KINDRED" sweep "$WORK/tree" -o /proc/nope
expect_stderr "cannot write /proc/nope" "-o message"
expect_exit 7 "--list-kept under /proc" -- "$KINDRED" sweep "$WORK/tree" --list-kept /proc/nope/x
expect_stderr "/proc/nope/x" "--list-kept message"
expect_exit 7 "--write-kept under /proc" -- "$KINDRED" sweep "$WORK/cut.jsonl.gz" --write-kept /proc/nope/k.jsonl
expect_exit 7 "--copy-kept under /proc" -- "$KINDRED" sweep "$WORK/tree" --copy-kept /proc/nope/c
expect_exit 7 "-o is a file" -- "$KINDRED" sweep "$WORK/tree" -o "$LABELS"
# The same runs with the inputs' fault alone fail as input errors.
expect_exit 3 "the broken tree itself" -- "$KINDRED" sweep "$WORK/tree" --list-kept "$WORK/l.txt"
[[ -e "$WORK/l.txt" ]] && fail "path list written after an input error"

# Other commands' outputs.
expect_exit 7 "tune --report under /proc" -- "$KINDRED" tune "$WORK/tree" --labels "$LABELS" --report /proc/nope/r.html
expect_stderr "cannot write /proc/nope/r.html" "tune message"
expect_exit 7 "build under /proc" -- "$KINDRED" build /proc/nope/a.kin "$WORK/tree"
expect_stderr "cannot write /proc/nope/a.kin" "build message"

# Nothing is left behind by the checks of a run that succeeds.
expect_exit 0 "a good run" -- "$KINDRED" sweep -q "$ARCHIVE" --list-kept "$WORK/good/l.txt" -o "$WORK/good/rec"
[[ $(ls -A "$WORK/good" | tr '\n' ' ') == "l.txt rec " ]] || fail "leftovers: $(ls -A "$WORK/good")"
[[ $(wc -l <"$WORK/good/l.txt") -eq 119 ]] || fail "kept list of the archive"

finish
