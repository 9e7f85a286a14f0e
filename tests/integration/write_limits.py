#!/usr/bin/env python3
"""Writes tests/integration/LIMITS.md from the figures the limits tests recorded (BUILD/limits/*.json).

    python3 -m pytest tests/integration/test_daemon_limits.py     (with RIGCAL_BUILD_DIR set)
    python3 tests/integration/write_limits.py BUILD_DIR
"""
import json
import pathlib
import platform
import sys
import time


def main():
    build = pathlib.Path(sys.argv[1] if len(sys.argv) > 1 else "build")
    figures = {p.stem: json.loads(p.read_text()) for p in sorted((build / "limits").glob("*.json"))}
    need = ["thousand_senders", "out_of_descriptors", "slow_loris", "line_100mb", "connection_cap", "reject_storm"]
    missing = [n for n in need if n not in figures]
    if missing:
        sys.exit(f"write_limits: no figures for {', '.join(missing)}: run test_daemon_limits.py first")
    t, o, s, l, c, r = (figures[n] for n in need)
    mib = lambda kib: f"{kib / 1024:.1f} MiB"
    text = f"""# rigcald limits under load

Measured by `tests/integration/test_daemon_limits.py` against the real rigcald on loopback
({time.strftime('%Y-%m-%d')}, {platform.machine()}, 2 shared cores; Release build), written by
`tests/integration/write_limits.py`. Each figure is also an assertion of that test.

| limit | configured | measured | asserted |
|---|---|---|---|
| concurrent TCP senders | max_connections 1500, started with a soft open-file limit of 1024 (raised by rigcald to the hard limit) | {t['senders']} senders connected at once, {t['records']} records acknowledged, {t['descriptors_held']} descriptors held; all connected in {t['connect_seconds']} s, all acknowledged after {t['all_acknowledged_seconds']} s; peak RSS {mib(t['vm_hwm_kib'])} | every sender served, each record counted once, fit = batch fit |
| out of descriptors | hard limit {o['fd_limit']}, {o['connections_attempted']} connections | {o['cpu_seconds_in_2s']} s CPU in 2 s while accept fails (EMFILE) | < 0.5 s (no spinning accept), one log line per episode, accepting again afterwards |
| slow-loris sender (1 byte/s) | idle_timeout_s {s['idle_timeout_s']} | closed after {s['closed_after_seconds']} s with `ERR idle_timeout` | closed within 2-5.5 s; another sender served meanwhile |
| one line of 100 MiB without newline | max_line_bytes 1024 | {l['line_too_long_rejects']} `line_too_long` reject; RSS {mib(l['rss_before_kib'])} before, peak {mib(l['vm_hwm_kib'])} (growth {l['growth_kib']} KiB) | growth < {mib(l['ceiling_kib'])} |
| connection cap | max_connections {c['max_connections']} | the 4th gets `ERR connection_limit this input already has its maximum of 3 connections`; {c['refused']} refusal counted | exact message, then closed; a freed slot is usable |
| reject storm | log_per_minute 10 | {r['sent']} bad lines sent, {r['counted']} counted, {r['reject_file_lines']} in the reject file; {r['logged']} logged one by one + {r['summarised']} in summaries; {r['log_lines_total']} log lines in all; {r['seconds']} s | counted = sent = reject file; logged <= 10 per minute; logged + summarised = sent |
"""
    out = pathlib.Path(__file__).with_name("LIMITS.md")
    out.write_text(text)
    print(f"wrote {out}")


if __name__ == "__main__":
    main()
