# End to end: `kindred sweep --index` lists the pairs and groups of an index
# without re-reading the corpus, identical to a sweep of the corpus itself.
source "$(dirname "$0")/common.bash"

corpus="$SOURCE_DIR/sample_corpus/archive"
expect_exit 0 "build" -- "$KINDRED" build -q "$WORK/a.kin" "$corpus"
for kind in pairs groups decisions; do
  "$KINDRED" sweep -q "$corpus" --print "$kind" >"$WORK/direct.$kind"
  expect_exit 0 "sweep --index $kind" -- "$KINDRED" sweep -q --index "$WORK/a.kin" --print "$kind"
  [[ -s "$WORK/out" ]] || fail "no $kind from the index"
  cmp -s "$WORK/out" "$WORK/direct.$kind" || fail "$kind from the index differ from the corpus sweep"
done

# Settings that do not change signatures may differ per query.
"$KINDRED" sweep -q "$corpus" --print pairs --threshold 0.6 --bands 20 --rows 5 >"$WORK/direct.t6"
expect_exit 0 "query-time threshold and banding" -- \
  "$KINDRED" sweep -q --index "$WORK/a.kin" --print pairs --threshold 0.6 --bands 20 --rows 5
cmp -s "$WORK/out" "$WORK/direct.t6" || fail "threshold 0.6 pairs differ"

# A new threshold without bands and rows chooses the banding for it, as a
# sweep of the corpus does.
"$KINDRED" sweep -q "$corpus" --print pairs --threshold 0.7 >"$WORK/direct.t7"
expect_exit 0 "query-time threshold" -- "$KINDRED" sweep -q --index "$WORK/a.kin" --print pairs --threshold 0.7
cmp -s "$WORK/out" "$WORK/direct.t7" || fail "threshold 0.7 pairs differ"

# Errors.
expect_exit 5 "other signature settings" -- "$KINDRED" sweep --index "$WORK/a.kin" -k 3
expect_stderr "other settings" "mismatch explained"
expect_exit 2 "inputs and --index" -- "$KINDRED" sweep --index "$WORK/a.kin" "$corpus"
expect_exit 2 "neither inputs nor --index" -- "$KINDRED" sweep
expect_exit 2 "kept corpus from an index" -- "$KINDRED" sweep --index "$WORK/a.kin" --write-kept "$WORK/k.jsonl"
printf 'not an index at all' >"$WORK/bad.kin"
expect_exit 4 "not an index" -- "$KINDRED" sweep --index "$WORK/bad.kin"
expect_exit 3 "missing index" -- "$KINDRED" sweep --index "$WORK/missing.kin"

finish
