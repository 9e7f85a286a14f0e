# Sourced by run_bench.sh after the measurements: writes $out_dir/RESULTS.md from the variables the
# run filled in. Only formatting here; every figure is a measurement of this run.
fmt_rate() { awk -v v="$1" 'BEGIN { if (v == "") print "n/a"; else if (v >= 1e6) printf "%.2f M", v / 1e6; else if (v >= 1e3) printf "%.1f k", v / 1e3; else printf "%.0f", v }'; }
mib() { awk -v v="$1" 'BEGIN { if (v == "") print "n/a"; else printf "%.1f", v / 1024 }'; }
ratio() { awk -v a="$1" -v b="$2" 'BEGIN { if (a == "" || b == "" || b == 0) print "n/a"; else printf "%.3g", a / b }'; }
met() { awk -v v="$1" -v t="$2" -v dir="${3:-ge}" 'BEGIN { ok = dir == "ge" ? v >= t : v <= t; print ok ? "met" : "**missed**" }'; }

commit=$(git -C "$root" rev-parse --short HEAD)
dirty=$(git -C "$root" status --porcelain --untracked-files=no | grep -q . && echo " (with uncommitted changes)" || true)
cpu_model=$(lscpu | sed -n 's/^Model name: *//p' | head -n 1)
cpus=$(nproc)
caches=$(lscpu | awk -F: '/^L[123][di]? cache/ { gsub(/^ +/, "", $2); printf "%s%s %s", sep, $1, $2; sep = ", " }')
mem_total=$(free -g | awk '/^Mem:/ {print $2}')
kernel=$(uname -r)
mode=$([[ $quick == 1 ]] && echo "quick" || echo "full")

# Per-channel memory beyond the window ring: RSS growth from 1 channel, per added channel, less 16 B x W.
per_channel() {  # per_channel C W -> bytes
  awk -v a="${rss[$1,$2]}" -v b="${rss[1,$2]}" -v c="$1" -v w="$2" 'BEGIN { printf "%.0f", (a - b) * 1024 / (c - 1) - 16 * w }'
}

{
  echo "# rigcald pipeline benchmark"
  echo
  echo "Written by \`tools/bench/run_bench.sh\` ($mode run). Do not edit: run the script again."
  echo
  echo "| | |"
  echo "|---|---|"
  echo "| date | $(date -u +%Y-%m-%dT%H:%M:%SZ) |"
  echo "| machine | $cpu_model, $cpus CPUs, $caches; ${mem_total} GiB RAM; Linux $kernel (a shared VM: other work ran at the same time) |"
  echo "| commit | $commit$dirty |"
  echo "| command | \`$command_line\` |"
  echo "| records | \`P c000123 1764634924.000123456 101.2345 101.2871\`, $line_bytes bytes a line, channels round robin, seed 1 |"
  echo "| rigcald setup | one TCP connection, one I/O thread + journal fsync thread, journal fsync every 20 ms (batched), window fit, outlier screening, CUSUM offset and slope detectors, tolerance verdict every 64 pairs, averaging of the pairs' sensor readings in blocks of 100, historian feed (1 subscriber where stated) and daily CSV |"
  echo "| repeats | best of $repeat for every rate (the least disturbed run); one run where a window fill needs more pairs |"
  echo
  echo "## Throughput against the bare limit and the refit baselines"
  echo
  echo "| path | pairs/s | ratio | CPU s per 1e6 pairs |"
  echo "|---|---:|---:|---:|"
  echo "| bare reader, loopback TCP ($(printf '%.0f' "$bare_tcp_mib") MiB/s) | $(fmt_rate "$bare_tcp") | 1 | |"
  echo "| bare reader, file (page cache) | $(fmt_rate "$bare_file") | $(ratio "$bare_file" "$bare_tcp") of TCP | |"
  echo "| bare reader, pty ($(printf '%.1f' "$bare_pty_mib") MiB/s) | $(fmt_rate "$bare_pty") | $(ratio "$bare_pty" "$bare_tcp") of TCP | |"
  echo "| **rigcald, loopback TCP** (100 channels, window 100) | **$(fmt_rate "${rate[100,100]}")** | $(ratio "${rate[100,100]}" "$bare_tcp") of bare TCP | ${cpu[100,100]} |"
  echo "| rigcald, pty at 4 000 000 baud (100 channels, window 100) | $(fmt_rate "$pty_rate") | $(ratio "$pty_rate" "$bare_pty") of bare pty | $pty_cpu |"
  echo "| engine alone, ChannelEngine::on_pair (100 channels, window 100) | $(fmt_rate "${eng_ch[100,100]}") | | |"
  echo "| engine alone, Engine::find + on_pair (100 channels, window 100) | $(fmt_rate "${eng_lookup[100,100]}") | | |"
  echo "| engine alone, bare accumulator update | $(fmt_rate "${eng_acc[1,100]}") | | |"
  echo "| engine alone, window fit update (window 100) | $(fmt_rate "${eng_fit[1,100]}") | | |"
  for w in 100 10000; do
    echo "| OLS refit per pair, Eigen QR (C++), window $w | $(fmt_rate "${eigen[$w]}") | engine $(ratio "${eng_ch[100,$w]:-${eng_ch[1,$w]}}" "${eigen[$w]}")x, rigcald $(ratio "${rate[100,$w]}" "${eigen[$w]}")x faster | |"
    echo "| OLS refit per pair, statsmodels (numpy), window $w | $(fmt_rate "${sm[$w]}") | engine $(ratio "${eng_ch[100,$w]:-${eng_ch[1,$w]}}" "${sm[$w]}")x, rigcald $(ratio "${rate[100,$w]}" "${sm[$w]}")x faster | |"
  done
  echo
  echo "A pty ignores its baud rate: it carries what its line discipline can copy. A real serial line"
  echo "at 4 000 000 baud (8N1) carries 400 000 bytes/s, about $(awk -v b="$line_bytes" 'BEGIN { printf "%.0f", 400000 / b }') of these lines a second."
  echo
  echo "The refit baselines do less per pair than rigcald (coefficients and residual SD only: no"
  echo "screening, no detectors, no I/O); \"x faster\" compares rigcald's engine (in process) and the"
  echo "whole daemon with them."
  echo
  echo "## Scaling with channels and window"
  echo
  echo "rigcald over loopback TCP, unpaced sender. RSS and HWM after the run (VmRSS, VmHWM from"
  echo "/proc); 'filled' is pairs sent / (channels x window): below 100 % not every window was full"
  echo "(the rings are allocated in full when the channel is built, so RSS already holds them)."
  echo "'per channel' is the RSS growth over 1 channel per added channel, less 16 B x window; the"
  echo "engine's heap per channel (mallinfo2, in process, windows full) excludes the configuration."
  echo "Shown from 10 000 channels on, where fixed costs no longer count."
  echo
  echo "| channels | window | rigcald pairs/s | CPU s per 1e6 | start-up s | idle RSS MiB | RSS MiB | HWM MiB | filled | per channel B | engine alone on_pair/s | find + on_pair/s | engine heap per channel beyond the ring B |"
  echo "|---:|---:|---:|---:|---:|---:|---:|---:|---:|---:|---:|---:|---:|"
  for w in 100 10000; do
    for c in "${channel_counts[@]}"; do
      if [[ $w == 10000 && $c == 100000 ]]; then
        echo "| 100000 | 10000 | not run | | | | | | | | | | |"
        continue
      fi
      pc=""; [[ $c -ge 10000 ]] && pc=$(per_channel "$c" "$w")
      echo "| $c | $w | $(fmt_rate "${rate[$c,$w]}") | ${cpu[$c,$w]} | ${startup[$c,$w]} | $(mib "${idle[$c,$w]}") | $(mib "${rss[$c,$w]}") | $(mib "${hwm[$c,$w]}") | ${fill[$c,$w]} % | $pc | $(fmt_rate "${eng_ch[$c,$w]}") | $(fmt_rate "${eng_lookup[$c,$w]}") | $([[ $c -ge 10000 ]] && printf '%.0f' "${eng_mem[$c,$w]}") |"
    done
  done
  echo
  echo "100 000 channels x window 10 000 is 1e9 windowed pairs = 16 GB of rings alone (plus the"
  echo "checkpoint, which copies the windows): it does not fit in ${mem_total} GiB with headroom and was not"
  echo "run. The ceiling is about (RAM - headroom) / 16 B windowed pairs per instance, e.g. 10 000"
  echo "channels x 100 000 pairs or 100 000 channels x 10 000 pairs needs a 32 GiB machine."
  echo
  echo "## Latency from a pair to its historian record"
  echo
  echo "100 channels, window 100, blocks of 100 readings: the pair that completes a block makes a"
  echo "historian record. The paced sender notes when it write(2)s each batch (~10 000 batches/s,"
  echo "TCP_NODELAY); a subscriber thread in the same process reads the feed and matches each record"
  echo "(channel, seq) to the pair that closed it (line (seq x 100 - 1) x channels + channel); latency"
  echo "= record read - batch written, one clock. The first 10 % of each run is left out. Loads are"
  echo "fractions of the maximum measured above (100 channels, window 100). Three rows per load:"
  echo "rigcald at normal priority on this shared machine; rigcald and the sender under SCHED_FIFO"
  echo "(\`chrt -f 20\`: the other tenants' processes cannot delay them, as on a machine of its own);"
  echo "and the floor: the bare reader writing the same feed records, doing nothing per pair."
  echo
  echo "| load | pairs/s | run | records | p50 us | p99 us | p99.9 us |"
  echo "|---:|---:|---|---:|---:|---:|---:|"
  for pct in 10 50 90; do
    for k in normal rt floor; do
      label=$([[ $k == normal ]] && echo "rigcald" || ([[ $k == rt ]] && echo "rigcald, SCHED_FIFO" || echo "floor (bare reader)"))
      echo "| $pct % | $(fmt_rate "${latrate[$pct]}") | $label | ${latn[$k,$pct]} | $(printf '%.0f' "${lat50[$k,$pct]}") | $(printf '%.0f' "${lat99[$k,$pct]}") | $(printf '%.0f' "${lat999[$k,$pct]}") |"
    done
  done
  echo
  echo "## Back-pressure"
  echo
  echo "An unpaced sender ($sent_ok pairs, about ${overload_s} s) against rigcald (100 channels, window 100,"
  echo "one historian subscriber). rigcald reads only as fast as it processes, so the sender's writes"
  echo "block once the socket buffers are full (TCP flow control): it is held to rigcald's rate."
  echo "Memory over time: [memory.csv](memory.csv), ![memory](memory.svg)"
  echo
  echo "| | |"
  echo "|---|---|"
  echo "| sender's own rate (write calls returning) | $(fmt_rate "$ov_write_rate") pairs/s, against $(fmt_rate "$bare_tcp") into the bare reader |"
  echo "| rigcald's end-to-end rate | $(fmt_rate "$ov_rate") pairs/s |"
  echo "| pairs sent / taken by rigcald / rejected | $sent_ok / $taken / $rejected |"
  echo "| journal bytes | $journal_bytes ($(ratio "$journal_bytes" "$taken") B per pair) |"
  echo "| historian records made / received by the subscriber / dropped | $hist_records / $hist_received / $hist_dropped |"
  echo "| rigcald VmRSS at 0.2 s / peak / end (MiB) | $(mib "$ov_rss_first") / $(mib "$ov_rss_peak") / $(mib "$ov_rss_last") |"
  echo
  echo "## Targets"
  echo
  echo "| target | measured | |"
  echo "|---|---|---|"
  echo "| full pipeline over loopback TCP >= 1 000 000 pairs/s | $(fmt_rate "${rate[100,100]}") pairs/s (100 channels) | $(met "${rate[100,100]}" 1000000) |"
  echo "| ratio to the bare reader >= 0.1 (aim) | $(ratio "${rate[100,100]}" "$bare_tcp") | $(met "$(ratio "${rate[100,100]}" "$bare_tcp")" 0.1) |"
  echo "| engine alone >= 20 000 000 pair updates/s: bare accumulator update | $(fmt_rate "${eng_acc[1,100]}") | $(met "${eng_acc[1,100]}" 20000000) |"
  echo "| engine alone >= 20 000 000 pair updates/s: full channel path | $(fmt_rate "${eng_ch[100,100]}") | $(met "${eng_ch[100,100]}" 20000000) |"
  echo "| p99 latency <= 1 ms at 50 % load (normal priority) | $(printf '%.0f' "${lat99[normal,50]}") us (floor $(printf '%.0f' "${lat99[floor,50]}") us) | $(met "${lat99[normal,50]}" 1000 le) |"
  echo "| p99 latency <= 1 ms at 50 % load (SCHED_FIFO) | $(printf '%.0f' "${lat99[rt,50]}") us | $(met "${lat99[rt,50]}" 1000 le) |"
  pc=$(per_channel 100000 100)
  echo "| <= 1 KiB per channel + 16 B per windowed pair | rigcald RSS: $pc B per channel beyond the ring (100 000 channels); engine heap: $(printf '%.0f' "${eng_mem[100000,100]}") B beyond the ring (a ChannelEngine object alone is $sizeof_engine B, its ChannelConfig $sizeof_config B) + $(printf '%.0f' "${eng_cfg[100000,100]}") B for the loaded configuration | $(met "$pc" 1024 le) |"
  echo "| no slow-down with channels beyond cache effects | 1 / 100 / 10 000 / 100 000 channels: $(fmt_rate "${rate[1,100]}") / $(fmt_rate "${rate[100,100]}") / $(fmt_rate "${rate[10000,100]}") / $(fmt_rate "${rate[100000,100]}") pairs/s | see above |"
  echo
  echo "What limits each figure, and how a site deploys rigcald around them: [SCALING.md](SCALING.md)."
} >"$out_dir/RESULTS.md"
