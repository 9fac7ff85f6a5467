# Shared helpers of the end-to-end tests (sourced, not run on its own).
# Each test script is run as: bash SCRIPT KINDRED_BINARY SOURCE_DIR

set -uo pipefail
KINDRED=$1
SOURCE_DIR=$2
PY=/usr/bin/python3
WORK=$(mktemp -d)
trap 'rm -rf "$WORK"' EXIT
FAILURES=0

fail() {
  echo "FAIL: $*" >&2
  FAILURES=$((FAILURES + 1))
}

# expect_exit CODE DESCRIPTION -- COMMAND...: runs COMMAND, keeps its stdout
# in $WORK/out and stderr in $WORK/err, and checks the exit code.
expect_exit() {
  local want=$1 what=$2
  shift 3
  "$@" >"$WORK/out" 2>"$WORK/err"
  local got=$?
  if [[ $got -ne $want ]]; then
    fail "$what: exit $got, expected $want; stderr: $(head -c 500 "$WORK/err")"
  fi
}

# expect_stderr TEXT DESCRIPTION: the last command's stderr contains TEXT.
expect_stderr() {
  grep -qF -- "$1" "$WORK/err" || fail "$2: stderr lacks \"$1\": $(head -c 500 "$WORK/err")"
}

finish() {
  if [[ $FAILURES -ne 0 ]]; then
    echo "$FAILURES check(s) failed" >&2
    exit 1
  fi
  echo "all checks passed"
}
