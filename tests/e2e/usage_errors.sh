#!/usr/bin/env bash
# Command-line mistakes: out-of-range and malformed numbers are usage errors
# (never wrapped or read as octal), and every usage error, whether found by
# the option parser or by a command's own checks, is one line
# "kindred: <command>: <what is wrong>" with exit code 2.
source "$(dirname "$0")/common.bash"

corpus="$SOURCE_DIR/sample_corpus/archive"

# usage_error DESCRIPTION EXPECTED_TEXT -- ARGS...: exit 2, one line on
# stderr in the house style, naming what is wrong, nothing on stdout.
usage_error() {
  local what=$1 text=$2 command=$4
  shift 3
  expect_exit 2 "$what" -- "$KINDRED" "$@"
  expect_stderr "$text" "$what"
  local lines
  lines=$(wc -l <"$WORK/err")
  [[ $lines -eq 1 ]] || fail "$what: $lines lines on stderr: $(cat "$WORK/err")"
  grep -q "^kindred: $command: " "$WORK/err" || fail "$what: not \"kindred: $command: ...\": $(cat "$WORK/err")"
  grep -qi "run with\|could not convert\|not expected\|required INT" "$WORK/err" &&
    fail "$what: the option library's stock wording: $(cat "$WORK/err")"
  [[ ! -s "$WORK/out" ]] || fail "$what: wrote to standard output"
}

# Numbers out of range or not whole numbers.
usage_error "seed -1" '--seed: expected a whole number from 0 to 18446744073709551615, not "-1"' \
  -- sweep --seed -1 "$corpus"
usage_error "seed 2^64" 'not "18446744073709551616"' -- sweep --seed 18446744073709551616 "$corpus"
usage_error "seed with a fraction" 'not "1.5"' -- check --seed 1.5 x.kin "$corpus"
usage_error "threads -5" '--threads: expected a whole number from 1 to 256, not "-5"' \
  -- sweep --threads -5 "$corpus"
usage_error "threads 0" 'not "0"' -- build --threads 0 "$WORK/x.kin" "$corpus"
usage_error "threads 100000" 'not "100000"' -- sweep --threads 100000 "$corpus"
usage_error "threads in tune" 'not "100000"' -- tune -j 100000 "$corpus"
usage_error "perms -3" '--perms: expected a whole number' -- plan --perms -3
usage_error "perms list item" 'not "-1"' -- tune --perms 64,-1 "$corpus"
usage_error "max-bucket 1" '--max-bucket: expected a whole number from 2' \
  -- sweep --max-bucket 1 "$corpus"
usage_error "bands 2^32" 'not "4294967296"' -- compact --bands 4294967296 x.kin
usage_error "k 0 (a setting check)" 'shingle size k=0 is out of range 1..64' -- sweep -k 0 "$corpus"
usage_error "threshold not a number" '--threshold: "abc" is not a number' \
  -- sweep --threshold abc "$corpus"
usage_error "option without its value" '--threads: needs a value' -- sweep "$corpus" --threads
usage_error "unknown option" 'unexpected argument: --bogus (kindred sweep --help lists the options)' \
  -- sweep --bogus "$corpus"
usage_error "missing index" 'index is required' -- info

# Without a command, or with a word that is no command.
expect_exit 2 "no command" -- "$KINDRED"
expect_stderr "kindred: a command is required: sweep, plan," "no command"
expect_exit 2 "unknown command" -- "$KINDRED" sweeep "$corpus"
expect_stderr 'kindred: unknown command "sweeep": expected sweep, plan,' "unknown command"

# The largest thread count is accepted and gives the same bytes as one thread.
expect_exit 0 "threads 256" -- "$KINDRED" sweep -q --threads 256 "$corpus"
cp "$WORK/out" "$WORK/groups-256"
expect_exit 0 "threads 1" -- "$KINDRED" sweep -q -j 1 "$corpus"
cmp -s "$WORK/out" "$WORK/groups-256" || fail "256 threads and 1 thread differ"

# A seed in hex (as info prints it) is the same seed in decimal; a leading
# zero is decimal, not octal.
expect_exit 0 "hex seed" -- "$KINDRED" sweep -q --print pairs --seed 0x2a "$corpus"
cp "$WORK/out" "$WORK/pairs-hex"
expect_exit 0 "decimal seed" -- "$KINDRED" sweep -q --print pairs --seed 42 "$corpus"
cmp -s "$WORK/out" "$WORK/pairs-hex" || fail "--seed 0x2a and --seed 42 differ"
expect_exit 0 "default seed" -- "$KINDRED" sweep -q --print pairs "$corpus"
cmp -s "$WORK/out" "$WORK/pairs-hex" && fail "--seed 42 changed nothing: the seed is not used"
expect_exit 0 "k 010" -- "$KINDRED" sweep -q --print pairs -k 010 "$corpus"
cp "$WORK/out" "$WORK/pairs-010"
expect_exit 0 "k 10" -- "$KINDRED" sweep -q --print pairs -k 10 "$corpus"
cmp -s "$WORK/out" "$WORK/pairs-010" || fail "-k 010 is not -k 10"

finish
