#!/bin/sh
# Every test of rigcal, from a fresh Debian 12 machine: installs what is missing (tools/setup.sh),
# builds a Release tree with warnings as errors, and runs the unit and integration tests (ctest),
# then the checks that need their own builds (tools/test.d/*.sh, run in name order: sanitizers,
# fuzzers). Exits non-zero on the first failure. Build trees: build-test/ and build-*/ beside it.
set -eu
cd "$(dirname "$0")/.."
jobs=$(nproc)

tools/setup.sh
echo "== Release build with -Werror (build-test/)"
cmake -S . -B build-test -DCMAKE_BUILD_TYPE=Release -DRIGCAL_WERROR=ON >/dev/null
cmake --build build-test -j"$jobs"
echo "== unit and integration tests"
ctest --test-dir build-test -j"$jobs" --output-on-failure

for step in tools/test.d/*.sh; do
  [ -e "$step" ] || continue
  echo "== $step"
  sh "$step"
done
echo "== all tests passed"
