#!/usr/bin/env bash
# The CI steps beside the normal Release build and its tests (the README's
# test command runs them after ctest):
#   1. the whole test suite built with AddressSanitizer and
#      UndefinedBehaviorSanitizer (build-asan/, any report fails the test);
#   2. the libFuzzer targets of tests/fuzz built with clang (build-fuzz/),
#      each run for a bounded time from its seeds and regression inputs;
#      any crash, sanitizer report, leak, timeout or broken property fails;
#      this build treats compiler warnings (clang's) as errors.
#   3. a report (never a failure) of the files over 400 lines and functions
#      over 60 that no comment or allow-list entry explains
#      (tools/check_sizes.py).
# Prints a summary and exits non-zero when a step failed.
#
#   tools/ci_checks.sh                      # both steps, 40 s per fuzz target
#   KINDRED_FUZZ_SECONDS=300 tools/ci_checks.sh fuzz
#   tools/ci_checks.sh asan
#   tools/ci_checks.sh sizes
#
# Environment: KINDRED_FUZZ_SECONDS (default 40) per target, KINDRED_FUZZ_SEED
# (default 1), KINDRED_JOBS (default: all cores). A finding is saved as
# build-fuzz/findings/<target>-crash-<sha1>; once the bug is fixed, commit it
# under tests/fuzz/regressions/<target>/ so every build replays it.
set -uo pipefail

cd "$(dirname "$0")/.." || exit 2
steps=("$@")
((${#steps[@]} > 0)) || steps=(asan fuzz sizes)
jobs=${KINDRED_JOBS:-$(nproc)}
fuzz_seconds=${KINDRED_FUZZ_SECONDS:-40}
fuzz_seed=${KINDRED_FUZZ_SEED:-1}
summary=()
failed=0

note() { summary+=("$1"); }
elapsed() { echo "$(($(date +%s) - $1)) s"; }

# Sanitizer reports end the process with an error instead of a warning.
export ASAN_OPTIONS=${ASAN_OPTIONS:-abort_on_error=1:detect_leaks=1:strict_string_checks=1}
export UBSAN_OPTIONS=${UBSAN_OPTIONS:-halt_on_error=1:print_stacktrace=1}

run_asan() {
  local start
  start=$(date +%s)
  echo "== build-asan: AddressSanitizer + UndefinedBehaviorSanitizer build" >&2
  if ! KINDRED_SANITIZE=ON KINDRED_BUILD_DIR=build-asan tools/setup.sh; then
    note "asan   FAIL  build ($(elapsed "$start"))"
    return 1
  fi
  echo "== build-asan: test suite" >&2
  if ctest --test-dir build-asan --output-on-failure -j"$jobs"; then
    note "asan   ok    whole suite under ASan+UBSan ($(elapsed "$start"))"
  else
    note "asan   FAIL  tests, see above ($(elapsed "$start"))"
    return 1
  fi
}

build_fuzz() {
  CC=clang CXX=clang++ cmake -S . -B build-fuzz -G Ninja -DCMAKE_BUILD_TYPE=RelWithDebInfo \
    -DKINDRED_FUZZ=ON -DKINDRED_BUILD_TESTS=OFF -DKINDRED_WERROR=ON >/dev/null || return 1
  # Only the fuzz targets (and the library under them), not the program.
  local targets=()
  for source in tests/fuzz/*_fuzz.cc; do targets+=("$(basename "$source" .cc)"); done
  cmake --build build-fuzz -j"$jobs" --target "${targets[@]}"
}

# fuzz_one NAME: runs build-fuzz/fuzz/NAME_fuzz from a scratch copy of its
# corpus (the seeds and regression inputs stay as committed).
fuzz_one() {
  local name=$1 binary="build-fuzz/fuzz/$1_fuzz"
  local corpus="build-fuzz/corpus/$name" log="build-fuzz/logs/$name.log"
  local inputs=(tests/fuzz/seeds/"$name")
  [[ -d tests/fuzz/regressions/$name ]] && inputs+=(tests/fuzz/regressions/"$name")
  mkdir -p "$corpus" build-fuzz/logs build-fuzz/findings
  "$binary" "$corpus" "${inputs[@]}" -max_total_time="$fuzz_seconds" -seed="$fuzz_seed" \
    -timeout=10 -rss_limit_mb=2048 -max_len=16384 -print_final_stats=1 \
    -artifact_prefix="build-fuzz/findings/$name-" >"$log" 2>&1
  local rc=$?
  local runs coverage
  runs=$(sed -n 's/^stat::number_of_executed_units: *//p' "$log" | tail -1)
  coverage=$(grep -o 'cov: [0-9]*' "$log" | tail -1)
  if ((rc == 0)); then
    note "fuzz   ok    $name: ${runs:-?} runs, ${coverage:-cov: ?}, $(find "$corpus" -type f | wc -l) inputs in its working corpus"
  else
    note "fuzz   FAIL  $name (exit $rc): $(grep -m1 -E 'ERROR|property failed|SUMMARY' "$log"); log $log; input $(ls build-fuzz/findings/"$name"-* 2>/dev/null | head -1)"
    return 1
  fi
}

run_fuzz() {
  local start name status=0
  start=$(date +%s)
  echo "== build-fuzz: libFuzzer targets (clang)" >&2
  if ! build_fuzz; then
    note "fuzz   FAIL  build ($(elapsed "$start"))"
    return 1
  fi
  for binary in build-fuzz/fuzz/*_fuzz; do
    name=$(basename "$binary" _fuzz)
    echo "== fuzzing $name for $fuzz_seconds s" >&2
    fuzz_one "$name" || status=1
  done
  note "fuzz   total $(elapsed "$start")"
  return $status
}

# A report only: the sizes of files and functions (DEVELOPERS.md).
run_sizes() {
  echo "== sizes: files over 400 lines, functions over 60 (tools/check_sizes.py)" >&2
  local report count
  report=$(python3 tools/check_sizes.py)
  count=$(grep -c . <<<"$report")
  [[ -n $report ]] && echo "$report" >&2
  note "sizes  report $count over the limits without a reason (not a failure)"
}

overall=$(date +%s)
for step in "${steps[@]}"; do
  case "$step" in
    asan) run_asan || failed=1 ;;
    fuzz) run_fuzz || failed=1 ;;
    sizes) run_sizes ;;
    *) echo "ci_checks: unknown step \"$step\" (asan, fuzz or sizes)" >&2; exit 2 ;;
  esac
done

echo
echo "ci_checks summary ($(elapsed "$overall") in all)"
printf '  %s\n' "${summary[@]}"
if ((failed)); then
  echo "ci_checks: FAILED"
  exit 1
fi
echo "ci_checks: all passed"
