#!/bin/sh
# The whole test suite again, built with AddressSanitizer + UndefinedBehaviorSanitizer (and
# LeakSanitizer at every clean stop of rigcald): build-sanitize/.
set -eu
cd "$(dirname "$0")/../.."
JOBS=$(nproc) tests/run_sanitized.sh
