#!/usr/bin/env bash
# Set-up on a fresh Debian 12 machine: installs the Debian packages kindred
# builds, tests and benchmarks with, then configures and builds a Release
# build in build/. Safe to run again: it only installs what is missing and
# rebuilds what changed. Writes nothing on standard output: progress and
# errors go to stderr.
#
#   tools/setup.sh            # packages + build/
#   KINDRED_BUILD_DIR=dir tools/setup.sh
#   KINDRED_SANITIZE=ON KINDRED_BUILD_DIR=build-asan tools/setup.sh
set -euo pipefail

cd "$(dirname "$0")/.."
build_dir=${KINDRED_BUILD_DIR:-build}
sanitize=${KINDRED_SANITIZE:-OFF}
build_type=Release
[[ "$sanitize" == ON ]] && build_type=Debug

packages=(
  build-essential cmake ninja-build pkg-config git
  libicu-dev libxxhash-dev libabsl-dev libcli11-dev catch2
  libsimdjson-dev zlib1g-dev libzstd-dev
  # tests: Unicode test files, the independent Python reference, tools
  unicode-data python3 python3-icu python3-xxhash xxhash zstd gzip bzip2 libxml2-utils
  # tools/ci_checks.sh: libFuzzer targets and symbolized sanitizer reports
  clang libclang-rt-14-dev llvm
  # crawl archives: HTML5 reference parser, brotli, the independent html5lib
  # reference and GNU wget (writes the WARC test crawls)
  libgumbo-dev libbrotli-dev python3-html5lib wget
  # whole gzip members of crawl archives decompressed in one call
  libdeflate-dev
  # kindred serve: HTTP server library; its browser test
  libcpp-httplib-dev chromium chromium-driver python3-selenium
  # the Python package and the cluster sweep
  pybind11-dev python3-dev python3-numpy python3-pytest python3-dask python3-distributed
)

missing=()
for package in "${packages[@]}"; do
  dpkg-query -W -f='${Status}' "$package" 2>/dev/null | grep -q "install ok installed" ||
    missing+=("$package")
done
if ((${#missing[@]} > 0)); then
  sudo=()
  [[ $(id -u) -ne 0 ]] && sudo=(sudo)
  echo "setup: installing ${missing[*]}" >&2
  "${sudo[@]}" apt-get update -qq
  DEBIAN_FRONTEND=noninteractive "${sudo[@]}" apt-get install -y -qq --no-install-recommends \
    "${missing[@]}" >/dev/null
fi

# Standard output stays empty: the build's progress (and any error) goes to
# stderr, so that "tools/setup.sh && build/kindred ..." prints only kindred's
# records on standard output.
cmake -S . -B "$build_dir" -G Ninja -DCMAKE_BUILD_TYPE="$build_type" \
  -DKINDRED_SANITIZE="$sanitize" >/dev/null
cmake --build "$build_dir" -j"$(nproc)" >&2

# The Python package, when built (build/python): a kindred.pth file pointing
# at it in Python's site-packages (/usr/local/lib/python3.X/dist-packages as
# root), else in the user's site directory (python3 -m site --user-site), so
# that "python3 -c 'import kindred'" works with Debian's python3.
if compgen -G "$build_dir/python/kindred/_kindred*.so" >/dev/null; then
  python_dir=$(cd "$build_dir/python" && pwd)
  if [[ $(id -u) -eq 0 ]]; then
    site=$(/usr/bin/python3 -c 'import sysconfig; print(sysconfig.get_paths()["purelib"])')
  else
    site=$(/usr/bin/python3 -m site --user-site)
  fi
  mkdir -p "$site" && echo "$python_dir" >"$site/kindred.pth"
fi
