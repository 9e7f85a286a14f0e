#!/bin/sh
# Builds rigcal with AddressSanitizer + UndefinedBehaviorSanitizer (RIGCAL_SANITIZE=ON, GCC, -Werror)
# in its own tree and runs the whole test suite there: unit tests and integration tests, whose rigcald
# then runs sanitized too, with LeakSanitizer checking every clean stop (test_daemon_leaks.py asserts
# that explicitly). Any sanitizer report fails the run.
#
#   tests/run_sanitized.sh [ctest arguments...]     e.g.  tests/run_sanitized.sh -L unit
#
# Environment: RIGCAL_SANITIZE_BUILD (default build-sanitize beside the sources), JOBS (default 2).
set -eu
src=$(cd "$(dirname "$0")/.." && pwd)
build=${RIGCAL_SANITIZE_BUILD:-$src/build-sanitize}
jobs=${JOBS:-2}

# -O1 -g1: what the sanitizers' authors recommend (readable stacks, line numbers), and half the
# compile time of -O2 -g, which matters because this tree is built on every CI run.
cmake -S "$src" -B "$build" -DCMAKE_BUILD_TYPE=RelWithDebInfo -DCMAKE_CXX_FLAGS_RELWITHDEBINFO="-O1 -g1 -DNDEBUG" \
  -DRIGCAL_SANITIZE=ON -DRIGCAL_WERROR=ON >/dev/null
cmake --build "$build" -j"$jobs"
# halt_on_error / abort: the first report fails the process that made it; detect_leaks: on exit.
export ASAN_OPTIONS="detect_leaks=1:abort_on_error=1:strict_string_checks=1:detect_stack_use_after_return=1"
export UBSAN_OPTIONS="print_stacktrace=1:halt_on_error=1"
ctest --test-dir "$build" -j"$jobs" --output-on-failure --timeout 900 "$@"
