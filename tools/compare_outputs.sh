#!/bin/bash
# Checks that two kindred binaries write byte-identical sweep outputs
# (pairs, groups and decisions files) on the same inputs:
#
#   tools/compare_outputs.sh OLD_KINDRED NEW_KINDRED [WORKDIR]
#
# Inputs: the machine's documentation as a corpus once and three times over
# (tools/make_real_corpus.py), the sample corpus (its JSON Lines archive and
# its directory tree), and corpora of tools/gen_corpus.py (planted
# duplicates at several rates). Settings: word and character shingles, one
# and two threads, with and without --memory (spilled band keys), the keep
# policies, the keepers grouping, Jaccard and containment measures, and a
# small --max-bucket (crowded buckets). Prints one line per run and a
# summary; exits 1 on the first difference (showing the first lines that
# differ), 2 on a usage error.
set -u
if [ $# -lt 2 ]; then
  echo "usage: $0 OLD_KINDRED NEW_KINDRED [WORKDIR]" >&2
  exit 2
fi
OLD=$1
NEW=$2
WORK=${3:-/tmp/kindred-compare}
ROOT=$(cd "$(dirname "$0")/.." && pwd)
mkdir -p "$WORK"

corpus() {  # corpus NAME: makes the input once, prints its path
  local name=$1 path
  case $name in
    real-1 | real-3)
      path=$WORK/$name.jsonl
      [ -e "$path" ] || /usr/bin/python3 "$ROOT/tools/make_real_corpus.py" --out "$path" \
        --copies "${name#real-}" >&2
      ;;
    sample-jsonl) path=$ROOT/sample_corpus/archive.jsonl ;;
    sample-tree) path=$ROOT/sample_corpus/archive ;;
    gen-*)
      path=$WORK/$name.jsonl
      local rate=${name#gen-}
      [ -e "$path" ] || /usr/bin/python3 "$ROOT/tools/gen_corpus.py" --docs 20000 --seed 7 \
        --dup-rate "$rate" --edit-rates 0.001,0.005,0.02,0.05 --boilerplate 0.05 \
        --out "$path" >/dev/null
      ;;
  esac
  echo "$path"
}

runs=0
check() {  # check CORPUS_NAME OPTIONS...
  local name=$1
  shift
  local input
  input=$(corpus "$name")
  runs=$((runs + 1))
  rm -rf "$WORK/old" "$WORK/new"
  if ! "$OLD" sweep -q -o "$WORK/old" "$@" "$input" 2>"$WORK/old.err"; then
    echo "old binary failed: $name $*: $(tail -1 "$WORK/old.err")" >&2
    exit 1
  fi
  if ! "$NEW" sweep -q -o "$WORK/new" "$@" "$input" 2>"$WORK/new.err"; then
    echo "new binary failed: $name $*: $(tail -1 "$WORK/new.err")" >&2
    exit 1
  fi
  for kind in pairs groups decisions; do
    if ! cmp -s "$WORK/old/$kind.jsonl" "$WORK/new/$kind.jsonl"; then
      echo "DIFFERENT $kind.jsonl: $name $*" >&2
      diff "$WORK/old/$kind.jsonl" "$WORK/new/$kind.jsonl" | head -6 >&2
      exit 1
    fi
  done
  echo "same  $name $* ($(wc -l <"$WORK/new/pairs.jsonl") pairs)"
}

for name in real-1 real-3 sample-jsonl sample-tree gen-0.05 gen-0.5; do
  for shingle in word char; do
    for threads in 1 2; do
      check "$name" --shingle "$shingle" --threads "$threads"
    done
    check "$name" --shingle "$shingle" --threads 2 --memory 1M
  done
done
for name in real-3 sample-jsonl gen-0.5; do
  check "$name" --keep longest --threads 2
  check "$name" --grouping keepers --threads 1
  check "$name" --threshold 0.5 --threads 2
  check "$name" --measure containment --bands 16 --rows 8 --threads 2
  check "$name" --max-bucket 3 --threads 2
  check "$name" --max-bucket 3 --threads 1 --memory 1M
done
echo "all $runs runs: pairs, groups and decisions byte-identical"
