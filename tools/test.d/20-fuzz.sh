#!/bin/sh
# A short bounded run of every libFuzzer target from the committed seed corpus (build-fuzz/).
# RIGCAL_FUZZ_SECONDS sets the time per target; the longer run is in tests/fuzz/README.md.
set -eu
cd "$(dirname "$0")/../.."
JOBS=$(nproc) tests/fuzz/run_fuzzers.sh "${RIGCAL_FUZZ_SECONDS:-30}"
