#!/usr/bin/env bash
# The whole-pipeline benchmark: one command, fixed seeds, bounded time.
#
#   tools/bench/run_bench.sh [--quick] [--build DIR] [--out DIR]
#
# Full run ~15-20 min on a 2-core machine, --quick ~3 min (smaller counts, one repeat, windows
# not all filled). It builds the Release tree, then measures side by side (roadmap):
#   1. bare limit: rigcal_bench_read counting lines from the generator over loopback TCP, from a
#      file and through a pseudo-terminal;
#   2. rigcald's full pipeline over loopback TCP (decode, journal with batched fsync, fit, screening,
#      CUSUM drift detectors, tolerance checks, averaging, historian feed + CSV) at 1 to 100 000
#      channels, window 100 and 10 000, with its CPU time and memory from /proc; and over a pty;
#   3. back-pressure: the same sender unpaced against rigcald, memory sampled every 100 ms;
#   4. latency through the historian feed at 10, 50 and 90 % of the measured maximum rate;
#   5. the engine alone, in process (rigcal_bench_engine);
#   6. refitting OLS on the window after every pair: Eigen QR (C++) and statsmodels (Debian's python3);
# and writes tools/bench/results/RESULTS.md (plus memory.csv / memory.svg). Every number in the
# table comes from this run; nothing is hard-coded. rigcald instances are stopped with SIGKILL after
# each measurement (their state directories are thrown away).
set -euo pipefail

here="$(cd "$(dirname "${BASH_SOURCE[0]}")" && pwd)"
root="$(cd "$here/../.." && pwd)"
build="$root/build"
out_dir="$here/results"
quick=0
command_line="tools/bench/run_bench.sh $*"
while [[ $# -gt 0 ]]; do
  case "$1" in
    --quick) quick=1 ;;
    --build) build="$2"; shift ;;
    --out) out_dir="$2"; shift ;;
    *) echo "usage: $0 [--quick] [--build DIR] [--out DIR]" >&2; exit 2 ;;
  esac
  shift
done

if [[ $quick == 1 ]]; then
  bare_pairs=5000000; pipe_pairs=3000000; pty_pairs=1000000; repeat=1; lat_s=4; fill_cap=3000000
  engine_pairs=2000000; eigen_updates=(20000 200); sm_updates=(1000 100); overload_s=8
else
  bare_pairs=30000000; pipe_pairs=30000000; pty_pairs=5000000; repeat=3; lat_s=15; fill_cap=100000000
  engine_pairs=10000000; eigen_updates=(200000 2000); sm_updates=(4000 400); overload_s=30
fi
channel_counts=(1 100 10000 100000)
python=/usr/bin/python3  # Debian's, with python3-numpy and python3-statsmodels

cmake -S "$root" -B "$build" -DCMAKE_BUILD_TYPE=Release >/dev/null
cmake --build "$build" -j2 --target rigcald rigcal_bench_send rigcal_bench_read rigcal_bench_engine \
  rigcal_bench_refit_eigen >/dev/null
rigcald="$build/daemon/rigcald"
send="$build/tools/rigcal_bench_send"
read_bare="$build/tools/rigcal_bench_read"
engine_bench="$build/tools/rigcal_bench_engine"
eigen_bench="$build/tools/rigcal_bench_refit_eigen"

work="$(mktemp -d /tmp/rigcal-bench.XXXXXX)"
daemon_pid=""
reader_pid=""
cleanup() {
  [[ -n "$daemon_pid" ]] && kill -9 "$daemon_pid" 2>/dev/null || true
  [[ -n "$reader_pid" ]] && kill -9 "$reader_pid" 2>/dev/null || true
  rm -rf "$work"
}
trap cleanup EXIT
mkdir -p "$out_dir"
log() { echo "[$(date +%H:%M:%S)] $*" >&2; }

# kv FILE KEY: a value from a program's key=value output.
kv() { sed -n "s/^$2=//p" "$1" | tail -n 1; }
# best FILE... KEY: the largest value of KEY over several outputs.
best() {
  local key="${*: -1}" files=("${@:1:$#-1}")
  for f in "${files[@]}"; do kv "$f" "$key"; done | sort -g | tail -n 1
}
calc() { awk "BEGIN { printf \"%.${2:-3}g\", $1 }"; }
whole() { awk "BEGIN { printf \"%d\", $1 }"; }  # an integer expression's value
port() { $python -c 'import socket; s=socket.socket(); s.bind(("127.0.0.1",0)); print(s.getsockname()[1])'; }

# --- rigcald configuration and lifetime ---

# write_config DIR CHANNELS WINDOW TCP_PORT HIST_PORT [PTY_LINK]
write_config() {
  local dir="$1" channels="$2" window="$3" tcp="$4" hist="$5" link="${6:-}"
  mkdir -p "$dir/state"
  {
    cat <<EOF
state_directory: $dir/state
log_level: warning
journal: {fsync: interval, fsync_interval_ms: 20}
checkpoint_interval_s: 86400
inputs:
  tcp:
    - {name: bench, address: 127.0.0.1, port: $tcp, idle_timeout_s: 3600}
EOF
    [[ -n "$link" ]] && cat <<EOF
  serial:
    - {name: pty, device: $link, baud: 4000000, reopen_initial_ms: 20, reopen_max_ms: 50}
EOF
    cat <<EOF
outputs:
  alerts: {file: alerts.jsonl}
  historian:
    listen: {address: 127.0.0.1, port: $hist, queue_records: 1000000}
    csv_directory: historian
  rejects: {file: rejects.jsonl}
channel_defaults:
  units: degC
  reference: {id: PRT-REF-07, expanded_uncertainty: 0.02, coverage_factor: 2}
  sensor: {resolution: 0.0001, noise_sd: 0.03}
  range: [20, 180]
  tolerance: {absolute: 0.3}
  fit: {memory: window, window_pairs: $window, confidence: 0.95}
  min_pairs: 30
  detector: {kind: cusum, target_arl0_pairs: 1.0e7, min_slope_change: 0.005}
  alert: {clear_after: 200}
  averaging: {block_readings: 100, include_pair_readings: true}
channels:
EOF
    awk -v n="$channels" 'BEGIN { for (i = 0; i < n; i++) printf "  - {id: c%06d, certificate: {intercept: 0.0, slope: 1.0, u_intercept: 0.01, u_slope: 0.0002}}\n", i }'
  } >"$dir/rigcald.yaml"
}

control() {  # control DIR REQUEST
  $python - "$1/state/control.sock" "$2" <<'EOF'
import socket, sys
c = socket.socket(socket.AF_UNIX); c.settimeout(30); c.connect(sys.argv[1])
c.sendall((sys.argv[2] + "\n").encode()); data = b""
while True:
    b = c.recv(65536)
    if not b: break
    data += b
print(data.decode(), end="")
EOF
}

# start_daemon DIR: starts rigcald, waits until its control socket answers; sets daemon_pid.
rt_prefix=()  # (chrt -f 20) while the latency runs under SCHED_FIFO
start_daemon() {
  "${rt_prefix[@]}" "$rigcald" "$1/rigcald.yaml" >"$1/rigcald.log" 2>&1 &
  daemon_pid=$!
  local deadline=$((SECONDS + 600))
  until control "$1" "status c000000" >/dev/null 2>&1; do
    kill -0 "$daemon_pid" 2>/dev/null || { cat "$1/rigcald.log" >&2; exit 1; }
    ((SECONDS < deadline)) || { echo "rigcald did not start" >&2; exit 1; }
    sleep 0.2
  done
}
stop_daemon() {
  kill -9 "$daemon_pid" 2>/dev/null || true
  wait "$daemon_pid" 2>/dev/null || true
  daemon_pid=""
}

# pipeline NAME CHANNELS WINDOW PAIRS [extra sender args]: one rigcald run over TCP (unpaced unless
# --rate is given), with one historian subscriber.
# Leaves $work/NAME.out (sender) and $work/NAME.status (status of channel c000000 afterwards).
pipeline() {
  local name="$1" channels="$2" window="$3" pairs="$4"; shift 4
  local dir="$work/$name" tcp hist
  tcp=$(port); hist=$(port)
  write_config "$dir" "$channels" "$window" "$tcp" "$hist"
  local t0=$SECONDS
  start_daemon "$dir"
  local startup=$((SECONDS - t0))
  local idle_rss
  idle_rss=$(awk '/VmRSS/ {print $2}' "/proc/$daemon_pid/status")
  # A historian subscriber is always connected (the feed's JSON is made only for subscribers).
  "${rt_prefix[@]}" "$send" --connect "127.0.0.1:$tcp" --channels "$channels" --pairs "$pairs" \
    --control "$dir/state/control.sock" --watch-pid "$daemon_pid" --historian "127.0.0.1:$hist" --block 100 "$@" \
    >"$work/$name.out"
  { echo "startup_s=$startup"; echo "idle_rss_kib=$idle_rss"; } >>"$work/$name.out"
  control "$dir" "metrics" >"$work/$name.metrics"
  stop_daemon
  rm -rf "$dir"
}

# ==== 1. bare limit ====
log "bare limit: loopback TCP, file, pty"
for r in $(seq "$repeat"); do
  p=$(port)
  "$read_bare" --listen "$p" >"$work/bare_tcp_$r.out" &
  reader_pid=$!
  sleep 0.3
  "$send" --connect "127.0.0.1:$p" --channels 100 --pairs "$bare_pairs" >"$work/bare_tcp_send_$r.out"
  wait "$reader_pid"; reader_pid=""
done
"$send" --file "$work/lines.txt" --channels 100 --pairs "$bare_pairs" >/dev/null
cat "$work/lines.txt" >/dev/null
for r in $(seq "$repeat"); do "$read_bare" --file "$work/lines.txt" >"$work/bare_file_$r.out"; done
rm -f "$work/lines.txt"
for r in $(seq "$repeat"); do
  "$send" --pty-link "$work/tty-bare" --channels 100 --pairs "$pty_pairs" >"$work/bare_pty_send_$r.out" &
  sender=$!
  until [[ -e "$work/tty-bare" ]]; do sleep 0.05; done
  "$read_bare" --device "$work/tty-bare" --lines "$pty_pairs" >"$work/bare_pty_$r.out"
  wait "$sender"
done
bare_tcp=$(best "$work"/bare_tcp_[0-9]*.out lines_per_s)
bare_tcp_mib=$(best "$work"/bare_tcp_[0-9]*.out mib_per_s)
bare_file=$(best "$work"/bare_file_*.out lines_per_s)
bare_pty=$(best "$work"/bare_pty_[0-9]*.out lines_per_s)
bare_pty_mib=$(best "$work"/bare_pty_[0-9]*.out mib_per_s)
line_bytes=$(calc "$(kv "$work/bare_tcp_send_1.out" bytes) / $(kv "$work/bare_tcp_send_1.out" pairs)" 3)

# ==== 2. rigcald over loopback TCP, by channel count and window ====
declare -A rate cpu rss hwm idle startup fill
for w in 100 10000; do
  for c in "${channel_counts[@]}"; do
    if [[ $w == 10000 && $c == 100000 ]]; then continue; fi  # 1e9 windowed pairs = 16 GB: see the table
    need=$((c * w)); ((need < pipe_pairs)) && need=$pipe_pairs; ((need > fill_cap)) && need=$fill_cap
    ((need % c)) && need=$(((need / c + 1) * c))
    reps=$repeat; ((need > pipe_pairs)) && reps=1
    log "rigcald TCP: $c channels, window $w, $need pairs x $reps"
    for r in $(seq "$reps"); do pipeline "tcp_${c}_${w}_$r" "$c" "$w" "$need"; done
    rate[$c,$w]=$(best "$work"/tcp_${c}_${w}_*.out pairs_per_s)
    f=$(grep -l "pairs_per_s=${rate[$c,$w]}$" "$work"/tcp_${c}_${w}_*.out | head -n 1)
    cpu[$c,$w]=$(calc "$(kv "$f" receiver_cpu_s) / $(kv "$f" pairs) * 1e6" 3)
    rss[$c,$w]=$(kv "$f" receiver_rss_kib); hwm[$c,$w]=$(kv "$f" receiver_hwm_kib)
    idle[$c,$w]=$(kv "$f" idle_rss_kib); startup[$c,$w]=$(kv "$f" startup_s)
    fill[$c,$w]=$(awk -v p="$(kv "$f" pairs)" -v n=$((c * w)) 'BEGIN { v = p / n * 100; if (v > 100) v = 100; printf "%.3g", v }')
  done
done

# ==== 2b. rigcald over a pty ====
# The sender makes the pty and its link first and waits until rigcald has put the slave in raw mode.
log "rigcald over a pty"
for r in $(seq "$repeat"); do
  dir="$work/pty_$r"; tcp=$(port); hist=$(port)
  write_config "$dir" 100 100 "$tcp" "$hist" "$work/tty-rigcald"
  "$send" --pty-link "$work/tty-rigcald" --channels 100 --pairs "$pty_pairs" --control "$dir/state/control.sock" \
    --watch-pid-file "$dir/pid" >"$work/pty_$r.out" &
  sender=$!
  until [[ -e "$work/tty-rigcald" ]]; do sleep 0.05; done
  start_daemon "$dir"
  echo "$daemon_pid" >"$dir/pid"
  wait "$sender"
  stop_daemon
  rm -rf "$dir" "$work/tty-rigcald"
done
pty_rate=$(best "$work"/pty_*.out pairs_per_s)
f=$(grep -l "pairs_per_s=${pty_rate}$" "$work"/pty_*.out | head -n 1)
pty_cpu=$(calc "$(kv "$f" receiver_cpu_s) / $(kv "$f" pairs) * 1e6" 3)

# ==== 3. back-pressure: an unpaced sender against rigcald, memory over time ====
overload_pairs=$(whole "${rate[100,100]} * $overload_s")
overload_pairs=$((overload_pairs / 100 * 100))
log "back-pressure: $overload_pairs pairs unpaced, memory sampled every 100 ms"
pipeline overload 100 100 "$overload_pairs" --timeline "$out_dir/memory.csv"
sent_ok=$(kv "$work/overload.out" pairs)
taken=$(sed -n 's/^rigcald_records_total{input="bench",kind="pair"} //p' "$work/overload.metrics")
rejected=$(sed -n 's/^rigcald_rejects_total{[^}]*} //p' "$work/overload.metrics" | awk '{s += $1} END {print s + 0}')
hist_records=$(sed -n 's/^rigcald_historian_records_total //p' "$work/overload.metrics")
hist_received=$(kv "$work/overload.out" historian_records)
hist_dropped=$(sed -n 's/^rigcald_historian_dropped_total //p' "$work/overload.metrics")
journal_bytes=$(sed -n 's/^rigcald_journal_bytes_total //p' "$work/overload.metrics")
ov_write_rate=$(calc "$sent_ok / $(kv "$work/overload.out" write_s)" 4)
ov_rate=$(kv "$work/overload.out" pairs_per_s)
ov_rss_first=$(sed -n '3p' "$out_dir/memory.csv" | cut -d, -f3)
ov_rss_peak=$(kv "$work/overload.out" receiver_rss_peak_kib)
ov_rss_last=$(tail -n 1 "$out_dir/memory.csv" | cut -d, -f3)
"$here/plot_memory.sh" "$out_dir/memory.csv" >"$out_dir/memory.svg"

# ==== 4. latency through the historian feed ====
# Three ways at each load: rigcald at normal priority (sharing the machine with whatever else runs),
# rigcald and the sender under SCHED_FIFO (chrt: what a machine without competing load gives), and
# the floor: the bare reader writing the same feed records with nothing done per pair.
declare -A lat50 lat99 lat999 latn latrate
lat_row() {  # lat_row KEY FILE
  lat50[$1]=$(kv "$2" latency_p50_us); lat99[$1]=$(kv "$2" latency_p99_us)
  lat999[$1]=$(kv "$2" latency_p999_us); latn[$1]=$(kv "$2" latency_samples)
}
for pct in 10 50 90; do
  r=$(whole "${rate[100,100]} * $pct / 100")
  n=$((r * lat_s / 10000 * 10000))
  latrate[$pct]=$r
  log "latency at $pct % of the maximum: $r pairs/s for $lat_s s (normal, SCHED_FIFO, floor)"
  pipeline "lat_$pct" 100 100 "$n" --rate "$r"
  lat_row "normal,$pct" "$work/lat_$pct.out"
  rt_prefix=(chrt -f 20)
  pipeline "latrt_$pct" 100 100 "$n" --rate "$r"
  rt_prefix=()
  lat_row "rt,$pct" "$work/latrt_$pct.out"
  p=$(port); f=$(port)
  "$read_bare" --listen "$p" --feed "$f" --channels 100 --block 100 >/dev/null &
  reader_pid=$!
  sleep 0.3
  "$send" --connect "127.0.0.1:$p" --channels 100 --pairs "$n" --rate "$r" --historian "127.0.0.1:$f" --block 100 \
    >"$work/latfloor_$pct.out"
  wait "$reader_pid"; reader_pid=""
  lat_row "floor,$pct" "$work/latfloor_$pct.out"
done

# ==== 5. the engine alone ====
declare -A eng_acc eng_fit eng_ch eng_lookup eng_mem eng_cfg
for w in 100 10000; do
  for c in "${channel_counts[@]}"; do
    if [[ $w == 10000 && $c == 100000 ]]; then continue; fi
    log "engine alone: $c channels, window $w"
    write_config "$work/engine" "$c" "$w" 1 2
    "$engine_bench" --config "$work/engine/rigcald.yaml" --pairs "$engine_pairs" --repeat "$repeat" >"$work/engine_${c}_$w.out"
    f="$work/engine_${c}_$w.out"
    eng_acc[$c,$w]=$(kv "$f" accumulator_per_s); eng_fit[$c,$w]=$(kv "$f" window_fit_per_s)
    eng_ch[$c,$w]=$(kv "$f" channel_per_s); eng_lookup[$c,$w]=$(kv "$f" lookup_per_s)
    eng_mem[$c,$w]=$(kv "$f" engine_warm_heap_beyond_window_b); eng_cfg[$c,$w]=$(kv "$f" config_heap_per_channel_b)
    sizeof_engine=$(kv "$f" sizeof_channel_engine); sizeof_config=$(kv "$f" sizeof_channel_config)
  done
done
rm -rf "$work/engine"

# ==== 6. refitting on the window after every pair ====
declare -A eigen sm
i=0
for w in 100 10000; do
  log "refit baselines, window $w"
  "$eigen_bench" --window "$w" --updates "${eigen_updates[$i]}" --repeat "$repeat" >"$work/eigen_$w.out"
  $python "$here/refit_statsmodels.py" --window "$w" --updates "${sm_updates[$i]}" --repeat "$repeat" >"$work/sm_$w.out"
  eigen[$w]=$(kv "$work/eigen_$w.out" refit_per_s); sm[$w]=$(kv "$work/sm_$w.out" refit_per_s)
  i=$((i + 1))
done

log "writing $out_dir/RESULTS.md"
source "$here/write_results.sh"
