#!/bin/sh
# The main job on a bundled demo, from a fresh Debian 12 machine, needing no input:
#   1. installs what is missing (tools/setup.sh --minimal) and builds rigcald and rigcal;
#   2. starts rigcald on config/demo.yaml with a state directory in a new temporary folder;
#   3. replays eight simulated hours of the invented pilot-plant rig (config/demo-scenario.yaml)
#      over TCP, faster than real time: TT-101's gain steps up 1.5 % four hours in, PT-204 ages;
#   4. shows the drift alerts and the historian feed of corrected averages as they happen;
#   5. prints rigcal status, writes TT-101's calibration report, stops rigcald cleanly;
#   6. says where the files are.
# Environment: RIGCAL_DEMO_RATE (records per second, default 800), RIGCAL_BUILD_DIR (default build).
set -eu
cd "$(dirname "$0")/.."
rate=${RIGCAL_DEMO_RATE:-800}
build=${RIGCAL_BUILD_DIR:-build}

tools/setup.sh --minimal
echo "== building rigcald and rigcal (Release) in $build/"
cmake -S . -B "$build" -DCMAKE_BUILD_TYPE=Release >/dev/null
cmake --build "$build" -j"$(nproc)" --target rigcald rigcal >/dev/null

demo=$(mktemp -d /tmp/rigcal-demo.XXXXXX)
state="$demo/state"
# Simulate the eight hours that end now, so every timestamp is in the past (rigcald refuses records
# stamped ahead of its clock) and the replay can run faster than real time.
start=$(date -u -d '-8 hours' +%Y-%m-%dT%H:%M:%SZ)

echo "== starting rigcald (log: $demo/rigcald.log)"
"$build/daemon/rigcald" config/demo.yaml --state-directory "$state" >"$demo/rigcald.log" 2>&1 &
rigcald_pid=$!
watch_pid=""
cleanup() {
  [ -n "$watch_pid" ] && kill "$watch_pid" 2>/dev/null || true
  kill "$rigcald_pid" 2>/dev/null || true
}
trap cleanup EXIT INT TERM
i=0
until "$build/tools/rigcal" status --state-directory "$state" --json >/dev/null 2>&1; do
  i=$((i + 1))
  if [ "$i" -gt 100 ] || ! kill -0 "$rigcald_pid" 2>/dev/null; then
    echo "rigcald did not start:"; cat "$demo/rigcald.log"; exit 1
  fi
  sleep 0.1
done

echo "== historian feed (every 30th average per channel) and alerts, as rigcald produces them"
"$build/tools/rigcal" watch --historian 127.0.0.1:47420 --alerts "$state/alerts.jsonl" --every 30 &
watch_pid=$!

echo "== replaying 8 simulated hours of the pilot-plant rig at $rate records/s"
"$build/tools/rigcal" simulate config/demo-scenario.yaml --start "$start" --tcp 127.0.0.1:47410 --rate "$rate" \
  --stream pilot-plant-demo
sleep 2  # the last averages and alerts reach the watcher

echo
echo "== rigcal status"
"$build/tools/rigcal" status --state-directory "$state"

echo "== as-found calibration report of TT-101: the last two simulated hours, from the daemon's journal"
"$build/tools/rigcal" report --journal "$state" --config config/demo.yaml --channel TT-101 \
  --since "$(date -u -d '-2 hours' +%Y-%m-%dT%H:%M:%SZ)" \
  --output "$demo/TT-101-report.html" --text "$demo/TT-101-report.txt"
cat "$demo/TT-101-report.txt"

echo "== stopping rigcald (SIGTERM: drain, checkpoint, exit)"
kill -TERM "$rigcald_pid"
wait "$rigcald_pid" && echo "rigcald stopped cleanly (exit status 0)"
wait "$watch_pid" 2>/dev/null || true
watch_pid=""
trap - EXIT INT TERM

cat <<END

== files of this demo, in $demo
  TT-101-report.html   the calibration report (open it in a browser)
  TT-101-report.txt    its plain-text summary
  rigcald.log          the daemon's log
  state/alerts.jsonl   alert events (JSON lines)
  state/historian/     corrected averages, one CSV file per UTC day
  state/rejects.jsonl  rejected input with source and reason
  state/journal-*.rgj  the journal of every accepted record; state/checkpoint-*.rgc checkpoints

rigcal's alerts and corrected values are decision support for maintenance: they do not replace a
calibration by an accredited laboratory and must not feed safety functions.
END
