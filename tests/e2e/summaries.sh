#!/usr/bin/env bash
# Summaries and small promises of the interface: counts of one read in the
# singular; add's summary names its threshold and banding as check's does;
# add --on-duplicate skip does not report a document as matching its own
# indexed copy; info prints the seed the same way in text and JSON;
# --priority-field is offered only where a priority is used or stored.
source "$(dirname "$0")/common.bash"

story="the harbour board met on tuesday to discuss the new ferry timetable and the repairs to the north pier"
other="a choir from the valley will sing at the old chapel on saturday evening and tickets are on sale"
printf '{"id":"one","text":"%s"}\n' "$story" >"$WORK/one.jsonl"
printf '{"id":"two","text":"%s"}\n' "$story today" >"$WORK/two.jsonl"
printf '{"id":"one","text":"%s"}\n{"id":"three","text":"%s"}\n' "$story" "$other" >"$WORK/again.jsonl"

# One document: singular everywhere.
expect_exit 0 "sweep of one" -- "$KINDRED" sweep "$WORK/one.jsonl"
expect_stderr "kindred sweep: 1 document (0 empty)" "sweep of one"
INDEX="$WORK/i.kin"
expect_exit 0 "build of one" -- "$KINDRED" build "$INDEX" "$WORK/one.jsonl"
expect_stderr ": 1 document (0 empty)," "build of one"
expect_exit 0 "audit" -- "$KINDRED" audit "$INDEX"
expect_stderr "ok (1 segment, 1 document;" "audit of one"
expect_exit 0 "check one" -- "$KINDRED" check "$INDEX" "$WORK/two.jsonl"
expect_stderr "kindred check: 1 document checked against 1 indexed (jaccard >= 0.8, " "check of one"
expect_stderr "): 1 matches indexed documents, 0 empty" "check of one"
expect_exit 0 "plan with one band" -- "$KINDRED" plan --bands 1 --rows 128
grep -q "^Given: 1 band x 128 rows ranks" "$WORK/out" || fail "plan: $(grep Given "$WORK/out")"

# add: one match, and the summary names threshold and banding like check's.
expect_exit 0 "add two" -- "$KINDRED" add "$INDEX" "$WORK/two.jsonl"
bands=$("$KINDRED" info --format json "$INDEX" | $PY -c 'import json,sys; d=json.load(sys.stdin); print(d["bands"], d["rows"])')
read -r b r <<<"$bands"
expect_stderr "1 added, 0 replaced, 0 skipped (segment 1); 1 match (jaccard >= 0.8, $b bands x $r rows); 2 documents live" "add summary"

# add --on-duplicate skip: "one" again is skipped and is not its own match;
# "three" is new and matches nothing.
expect_exit 0 "add skip" -- "$KINDRED" add --on-duplicate skip "$INDEX" "$WORK/again.jsonl"
expect_stderr "1 added, 0 replaced, 1 skipped (segment 2); 1 match (jaccard >= 0.8" "add skip summary"
grep -q '"id":"one","match":"one"' "$WORK/out" && fail "skip: one matched its own indexed copy"
# but it still matches the other indexed document ("two")
grep -q '"id":"one","match":"two"' "$WORK/out" || fail "skip: lost the match with two: $(cat "$WORK/out")"
expect_exit 0 "add replace" -- "$KINDRED" add --on-duplicate replace "$INDEX" "$WORK/one.jsonl"
grep -q '"id":"one","match":"one"' "$WORK/out" && fail "replace: one matched its own indexed copy"

# A torn tail of one byte reads "1 byte" in info and in the writer that cuts it.
cp "$INDEX" "$WORK/tail.kin"
printf 'x' >>"$WORK/tail.kin"
expect_exit 0 "info with a one-byte tail" -- "$KINDRED" info "$WORK/tail.kin"
grep -q "torn tail        1 byte at byte" "$WORK/out" || fail "info tail: $(grep tail "$WORK/out")"
expect_exit 0 "remove cuts a one-byte tail" -- "$KINDRED" remove "$WORK/tail.kin" two
expect_stderr "cut a torn tail of 1 byte off" "remove tail"

# info: the seed in JSON is the text form's hex string.
expect_exit 0 "info text" -- "$KINDRED" info "$INDEX"
text_seed=$(sed -n 's/.* seed=\(0x[0-9a-f]*\) .*/\1/p' "$WORK/out")
json_seed=$("$KINDRED" info --format json "$INDEX" | $PY -c 'import json,sys; print(json.load(sys.stdin)["seed"])')
[[ -n "$text_seed" && "$text_seed" == "$json_seed" ]] || fail "seed: text $text_seed, json $json_seed"
[[ "$json_seed" == 0x6b696e6472656431 ]] || fail "default seed printed as $json_seed"
expect_exit 0 "info of another seed" -- "$KINDRED" build "$WORK/s.kin" --seed 42 "$WORK/one.jsonl"
json_seed=$("$KINDRED" info --format json "$WORK/s.kin" | $PY -c 'import json,sys; print(json.load(sys.stdin)["seed"])')
[[ "$json_seed" == 0x000000000000002a ]] || fail "seed 42 printed as $json_seed"

# --priority-field: sweep (--keep), build and add (stored for sweep --index);
# not check, explain or tune.
for command in check explain tune; do
  "$KINDRED" "$command" --help | grep -- --priority-field >/dev/null && fail "$command offers --priority-field"
done
for command in sweep build add; do
  "$KINDRED" "$command" --help | grep -- --priority-field >/dev/null || fail "$command lacks --priority-field"
done
expect_exit 2 "check --priority-field" -- "$KINDRED" check --priority-field p "$INDEX" "$WORK/two.jsonl"
expect_stderr "kindred: check: unexpected argument" "check --priority-field"

# --memory says what it bounds (band keys) and what it does not count.
"$KINDRED" sweep --help | tr -s ' \n' ' ' >"$WORK/help"
grep -q -- "--memory TEXT bound on the band keys held in memory" "$WORK/help" ||
  fail "sweep --memory help: $(grep -o -- '--memory.\{0,120\}' "$WORK/help")"
grep -q "Not counted: signatures, ids, documents being signed" "$WORK/help" ||
  fail "sweep --memory help does not say what it leaves out"
grep -qi "memory budget" "$WORK/help" && fail "sweep --help still calls --memory a budget"

finish
