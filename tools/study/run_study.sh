#!/usr/bin/env bash
# Runs the drift detector run-length study (rigcal_detector_study) and writes its results.
#
#   tools/study/run_study.sh [--quick] [BUILD_DIR]
#
# Full mode (about 5-10 minutes on one core) writes into tools/study/results/: detector_study.md (the
# report, with date, machine and command), summary_table.md, detector_study.csv, delays.svg, and
# README-section.md (readme_section.md.in with the summary table filled in). --quick (about 30 s) writes
# into BUILD_DIR/study_quick and leaves the committed results alone. BUILD_DIR defaults to build/.
set -euo pipefail

here=$(cd "$(dirname "${BASH_SOURCE[0]}")" && pwd)
root=$(cd "$here/../.." && pwd)
cd "$root"

mode=full
if [[ "${1:-}" == "--quick" ]]; then
    mode=quick
    shift
fi
build=${1:-build}
tool="$build/tools/rigcal_detector_study"
if [[ ! -x "$tool" ]]; then
    echo "run_study.sh: $tool not found; build first (cmake --build $build --target rigcal_detector_study)" >&2
    exit 66
fi

if [[ "$mode" == quick ]]; then
    out="$build/study_quick"
    "$tool" --quick --output-dir "$out" --invoked-as "tools/study/run_study.sh --quick"
    echo "quick results in $out"
    exit 0
fi

out="tools/study/results"
"$tool" --output-dir "$out" --invoked-as "tools/study/run_study.sh"
# The README section: the hand-written text with the freshly computed table in place of its marker.
awk -v table="$out/summary_table.md" '
    /^@SUMMARY_TABLE@$/ { while ((getline line < table) > 0) print line; next }
    { print }
' "$here/readme_section.md.in" > "$out/README-section.md"
echo "results in $out"
