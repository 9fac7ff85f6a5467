#!/usr/bin/env bash
# tools/setup.sh writes nothing on standard output (the README's first command
# pipes its output together with kindred's records), while the build's
# progress and its errors stay visible on stderr and a failed build still
# fails. The Debian package check and CMake are replaced here by small
# stand-ins on PATH that print on standard output as the real ones do, so the
# script's own routing is what is tested, in a fraction of a second.
source "$(dirname "$0")/common.bash"

bin="$WORK/bin"
mkdir -p "$bin"
cat >"$bin/dpkg-query" <<'SHIM'
#!/bin/sh
printf 'install ok installed'
SHIM
cat >"$bin/cmake" <<'SHIM'
#!/bin/sh
# configure: a line on stdout; build: ninja's progress on stdout, and on a
# requested failure a compiler error on stdout (as ninja prints it) and exit 1
case "$1" in
  --build)
    echo "[1/2] Building CXX object src/CMakeFiles/kindred.dir/core/signer.cc.o"
    if [ -n "${SHIM_FAIL:-}" ]; then
      echo "signer.cc:1:1: error: expected unqualified-id"
      echo "ninja: build stopped: subcommand failed." >&2
      exit 1
    fi
    echo "[2/2] Linking CXX executable kindred"
    ;;
  *) echo "-- Configuring done" ;;
esac
SHIM
chmod +x "$bin/dpkg-query" "$bin/cmake"

run_setup() {
  PATH="$bin:$PATH" KINDRED_BUILD_DIR="$WORK/build" bash "$SOURCE_DIR/tools/setup.sh" \
    >"$WORK/out" 2>"$WORK/err"
}

run_setup
rc=$?
[[ $rc -eq 0 ]] || fail "setup: exit $rc, expected 0: $(cat "$WORK/err")"
[[ ! -s "$WORK/out" ]] || fail "setup: standard output is not empty: $(head -c 300 "$WORK/out")"
expect_stderr "[2/2] Linking CXX executable kindred" "setup: build progress on stderr"

SHIM_FAIL=1 run_setup
rc=$?
[[ $rc -ne 0 ]] || fail "setup with a failing build: exit 0"
[[ ! -s "$WORK/out" ]] || fail "setup with a failing build: standard output is not empty"
expect_stderr "error: expected unqualified-id" "setup with a failing build: the error on stderr"

finish
