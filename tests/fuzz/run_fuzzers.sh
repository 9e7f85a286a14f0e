#!/bin/sh
# Builds the libFuzzer targets with clang (ASan + UBSan) in their own build tree and runs each for
# SECONDS (default 60), JOBS at a time, starting from the committed seed corpus. Fails if any target
# finds a crash, leak, timeout or sanitizer report; the input that did it is left in BUILD/artifacts/.
#
#   tests/fuzz/run_fuzzers.sh [SECONDS] [TARGET...]
#
# Environment: RIGCAL_FUZZ_BUILD (default build-fuzz beside the sources), JOBS (default 2).
# New inputs found go to BUILD/corpus/TARGET/, not into the source tree.
set -eu

seconds=${1:-60}
[ $# -gt 0 ] && shift
src=$(cd "$(dirname "$0")/../.." && pwd)
build=${RIGCAL_FUZZ_BUILD:-$src/build-fuzz}
jobs=${JOBS:-2}
targets=${*:-"fuzz_record_decoder fuzz_line_splitter fuzz_config_loader fuzz_scenario_loader fuzz_journal_reader
  fuzz_checkpoint_decoder fuzz_control_request"}

command -v clang++ >/dev/null || { echo "run_fuzzers: clang++ not found (tools/setup.sh installs clang)" >&2; exit 2; }
mkdir -p "$build"
cmake -S "$src" -B "$build" -DCMAKE_BUILD_TYPE=RelWithDebInfo -DCMAKE_CXX_COMPILER=clang++ -DRIGCAL_FUZZ=ON \
  -DRIGCAL_TESTS=OFF -DRIGCAL_WERROR=ON >"$build/configure.log" 2>&1 || { cat "$build/configure.log"; exit 1; }
cmake --build "$build" --target rigcal_fuzzers -j"$jobs" >"$build/build.log" 2>&1 || { tail -50 "$build/build.log"; exit 1; }

mkdir -p "$build/artifacts"

# One target: runs it, prints one line, leaves its log; returns non-zero on a finding.
run_one() {
  t=$1
  mkdir -p "$build/corpus/$t"
  log="$build/$t.log"
  start=$(date +%s)
  # -rss_limit_mb: a decoder must never need much memory; -timeout: nor take long on one input.
  if ASAN_OPTIONS=detect_leaks=1:abort_on_error=1 UBSAN_OPTIONS=print_stacktrace=1:halt_on_error=1 \
    "$build/tests/fuzz/$t" -max_total_time="$seconds" -timeout=10 -rss_limit_mb=2048 -max_len=65536 \
      -print_final_stats=1 -artifact_prefix="$build/artifacts/$t-" \
      "$build/corpus/$t" "$src/tests/fuzz/corpus/$t" >"$log" 2>&1; then
    runs=$(sed -n 's/^stat::number_of_executed_units: *//p' "$log")
    cov=$(grep -o 'cov: [0-9]*' "$log" | tail -1)
    echo "fuzz $t: ok, ${runs:-?} runs in $(( $(date +%s) - start )) s, $cov"
  else
    echo "fuzz $t: FAILED (see $log)"
    grep -E 'ERROR|SUMMARY|Test unit written' "$log" | head -5
    return 1
  fi
}

# JOBS targets at a time, each on its own core.
failed=""
set -- $targets
while [ $# -gt 0 ]; do
  batch=""
  i=0
  while [ $# -gt 0 ] && [ "$i" -lt "$jobs" ]; do
    run_one "$1" >"$build/$1.result" 2>&1 &
    batch="$batch $!:$1"
    i=$((i + 1))
    shift
  done
  for job in $batch; do
    if ! wait "${job%%:*}"; then failed="$failed ${job#*:}"; fi
    cat "$build/${job#*:}.result"
  done
done
[ -z "$failed" ] || { echo "run_fuzzers: failures in:$failed"; exit 1; }
echo "run_fuzzers: every target ran ${seconds} s without a finding"
