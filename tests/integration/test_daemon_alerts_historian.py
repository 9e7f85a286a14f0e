"""Drift alerts and the historian feed from the real rigcald: one alert per drift, clearing, the hook
program, corrected averages whose uncertainty matches the core's formula, daily CSV, and a stalled
subscriber that must not stall ingest."""
import json
import math
import os
import random
import socket
import stat
import time

import numpy as np
from scipy import stats as sps

from daemon_harness import Daemon, ols, pair_lines


def drifting_pairs(n, shift_at, slope_after, seed=7):
    rng = random.Random(seed)
    out = []
    for i in range(n):
        x = round(rng.uniform(20, 180), 4)
        slope = 1.0 if i < shift_at else slope_after
        out.append((x, round(slope * x + rng.gauss(0, 0.05), 4)))
    return out


def test_a_slope_shift_mid_stream_raises_exactly_one_alert_and_clearing_works(tmp_path):
    hook_out = tmp_path / "hook.log"
    hook = tmp_path / "hook.sh"
    hook.write_text(f"#!/bin/sh\n{{ echo \"ARGS $*\"; echo \"ENV $(env | sort | tr '\\n' ' ')\"; cat; }} >> {hook_out}\n")
    hook.chmod(0o755)
    d = Daemon(tmp_path, extra=f"""  alerts:
    file: alerts.jsonl
    hook: {{program: {hook}, args: [--site, pilot-plant], timeout_s: 5}}
""".replace("  alerts:", "outputs_alerts_placeholder"))
    # put the alert outputs under `outputs:` (the harness writes the historian part)
    cfg = d.config.read_text().replace("outputs_alerts_placeholder", "")
    cfg = cfg.replace("outputs:\n", "outputs:\n  alerts:\n    file: alerts.jsonl\n"
                      f"    hook: {{program: {hook}, args: [--site, pilot-plant], timeout_s: 5}}\n")
    d.write_config(cfg.replace(f"\n    file: alerts.jsonl\n    hook: {{program: {hook}, args: [--site, pilot-plant], timeout_s: 5}}\nchannels:", "\nchannels:"))
    d.start()
    try:
        s = d.sender("drift")
        pairs = drifting_pairs(3000, 1500, 1.01)
        s.send_text(pair_lines(pairs, start_seq=1))
        s.wait_ack(3000)
        # back to the certificate: the alert clears after clear_after (300) evaluations without a finding
        back = drifting_pairs(2000, 10**9, 1.0, seed=8)
        s.send_text(pair_lines(back, start_seq=3001))
        s.wait_ack(5000)
        d.wait_for(lambda: len([a for a in d.read_jsonl("alerts.jsonl") if a["kind"] == "drift"]) >= 2,
                   what="raised and cleared")
        drift = [a for a in d.read_jsonl("alerts.jsonl") if a["kind"] == "drift"]
        assert [a["event"] for a in drift] == ["raised", "cleared"]
        raised = drift[0]
        assert raised["channel"] == "TT-101" and raised["detector"] == "cusum"
        assert raised["ne107"] == "maintenance_required"
        assert raised["certified"] == {"b0": 0.0, "b1": 1.0}
        assert raised["fit"]["n"] > 0 and len(raised["ci_b1"]) == 2
        assert "no longer agrees with certificate CAL-TT101" in raised["message"]
        assert "Decision support only" in raised["message"]
        assert not d.status("TT-101")["alert"]["raised"]
        d.wait_for(lambda: hook_out.exists() and hook_out.read_text().count("ARGS") >= 2, what="hook runs")
        text = hook_out.read_text()
        assert "ARGS --site pilot-plant TT-101 drift_raised cusum " in text
        env_line = [l for l in text.splitlines() if l.startswith("ENV")][0]
        # nothing of the daemon's environment: PATH and LANG as rigcald sets them, the rest is the
        # shell's own (PWD is /, where the hook is started)
        assert set(env_line.split()[1:]) <= {"LANG=C.UTF-8", "PATH=/usr/bin:/bin", "PWD=/", "SHLVL=1",
                                             "OLDPWD=/", "_=/usr/bin/env"}, env_line
        assert {"LANG=C.UTF-8", "PATH=/usr/bin:/bin", "PWD=/"} <= set(env_line.split()[1:]), env_line
        assert '"type":"alert"' in text  # the event's JSON on standard input
    finally:
        assert d.stop() == 0


def test_a_failing_hook_is_logged_and_does_not_stop_the_daemon(tmp_path):
    hook = tmp_path / "slow.sh"
    hook.write_text("#!/bin/sh\necho 'pager unreachable' >&2\nsleep 30\n")
    hook.chmod(0o755)
    d = Daemon(tmp_path)
    cfg = d.config.read_text().replace("outputs:\n", f"outputs:\n  alerts:\n    hook: {{program: {hook}, timeout_s: 1}}\n")
    d.write_config(cfg)
    d.start()
    try:
        s = d.sender("hook")
        s.send_text(pair_lines(drifting_pairs(800, 200, 1.02), start_seq=1))
        s.wait_ack(800)
        d.wait_for(lambda: "killed after 1 s" in d.log(), what="hook timeout in the log")
        assert "pager unreachable" in d.log()
        assert d.status()["channels"][0]["alert"]["raised"]
    finally:
        assert d.stop() == 0


def read_lines(sock, n, timeout=15):
    sock.settimeout(timeout)
    buf = b""
    while buf.count(b"\n") < n:
        chunk = sock.recv(65536)
        if not chunk:
            break
        buf += chunk
    return [json.loads(l) for l in buf.decode().splitlines()[:n]]


def test_historian_subscribers_receive_corrected_averages_with_the_cores_uncertainty(tmp_path):
    d = Daemon(tmp_path, window=500).start()
    try:
        sub = socket.create_connection(("127.0.0.1", d.historian_port))
        time.sleep(0.2)
        s = d.sender("hist")
        rng = random.Random(11)
        # a sensor that follows its certificate (y = x), so quality is good
        pairs = [(round(x, 4), round(x + rng.gauss(0, 0.05), 4)) for x in (rng.uniform(20, 180) for _ in range(500))]
        readings = [round(120.0 + rng.gauss(0, 0.05), 4) for _ in range(40)]
        text = pair_lines(pairs, start_seq=1)
        text += "".join(f"@{501 + i} R TT-101 - {y!r}\n" for i, y in enumerate(readings))
        s.send_text(text)
        s.wait_ack(540)
        recs = read_lines(sub, 2)
        assert [r["seq"] for r in recs] == [1, 2]
        # Independent check (numpy/scipy): GUM budget of the inverse prediction, JCGM 100 eq. (10)
        # and Welch-Satterthwaite G.2b, with the reference's U/k and the resolution's rectangular term.
        ref = ols(*zip(*pairs))
        for r, block in zip(recs, (readings[:20], readings[20:])):
            ybar = float(np.mean(block))
            x_hat = ref["mean_x"] + (ybar - (ref["b0"] + ref["b1"] * ref["mean_x"])) / ref["b1"]
            u_fit2 = (ref["s"] / ref["b1"]) ** 2 * (1 / 20 + 1 / 500 + (x_hat - ref["mean_x"]) ** 2 / ref["sxx"])
            u_ref2 = (0.02 / 2) ** 2
            u_res2 = (0.01 / math.sqrt(12) / ref["b1"]) ** 2
            u = math.sqrt(u_fit2 + u_ref2 + u_res2)
            nu = u ** 4 / (u_fit2 ** 2 / 498)
            k = sps.t.ppf(0.975, math.floor(nu))
            assert r["type"] == "average" and r["channel"] == "TT-101" and r["m"] == 20
            assert r["units"] == "degC" and r["quality"] == "good" and r["opc_ua_status"] == 0
            assert abs(r["indication"] - ybar) < 1e-9
            assert abs(r["corrected"] - x_hat) < 1e-8
            assert abs(r["u"] - u) < 1e-9 * u
            assert abs(r["nu_eff"] - nu) < 1e-6 * nu
            assert abs(r["k"] - k) < 1e-9
            assert abs(r["U"] - k * u) < 1e-9
            assert r["calibration"]["n"] == 500 and r["reference_id"] == "PRT-REF-07"
            assert r["derived"] is True
            assert r["window_start"].endswith("Z") and r["window_end"].endswith("Z")
        sub.close()
        # the daily CSV has the same records
        d.control("status")
        time.sleep(1.2)  # flushed at the next tick
        csvs = list((d.state / "historian").glob("historian-*.csv"))
        assert len(csvs) == 1
        rows = csvs[0].read_text().splitlines()
        assert rows[0].startswith("channel,seq,window_start,window_end,m,units,raw_mean,indication,corrected,u,U,k")
        assert len(rows) == 3
    finally:
        assert d.stop() == 0


def test_a_stalled_subscriber_does_not_stall_ingest(tmp_path):
    d = Daemon(tmp_path, window=100).start()
    try:
        stalled = socket.socket()
        stalled.setsockopt(socket.SOL_SOCKET, socket.SO_RCVBUF, 4096)
        stalled.connect(("127.0.0.1", d.historian_port))  # never reads
        reader = socket.create_connection(("127.0.0.1", d.historian_port))
        time.sleep(0.2)
        s = d.sender("flood")
        rng = random.Random(3)
        s.send_text(pair_lines([(x, x + rng.gauss(0, 0.05)) for x in (rng.uniform(20, 180) for _ in range(100))],
                               start_seq=1))
        n = 20 * 4000  # 4000 averages of 20 readings each
        body = "".join(f"@{101 + i} R TT-101 - {100 + rng.gauss(0, 0.05)!r}\n" for i in range(n))
        start = time.time()
        s.send_text(body)
        s.wait_ack(100 + n, timeout=60)
        elapsed = time.time() - start
        st = d.status()
        assert st["channels"][0]["counters"]["historian_records"] == 4000
        metrics = d.control("metrics")
        dropped = int([l for l in metrics.splitlines() if l.startswith("rigcald_historian_dropped_total")][0].split()[1])
        assert dropped > 0  # the stalled subscriber lost records (counted), ingest did not wait for it
        assert elapsed < 30
        # Every subscriber's account is exact: averages received + drops announced in gap lines =
        # the 4000 published, in order, none twice; and the drops announced are the drops counted.
        announced = 0
        for sub in (reader, stalled):  # the stalled one reads at last: its bounded queue, then a gap
            sub.settimeout(30)
            buf, seqs, gaps = b"", [], 0
            while not seqs or seqs[-1] < 4000:
                chunk = sub.recv(65536)
                assert chunk, "historian feed closed"
                buf += chunk
                *complete, buf = buf.split(b"\n")
                for line in complete:
                    r = json.loads(line)
                    assert r["type"] in ("average", "gap")
                    if r["type"] == "average":
                        seqs.append(r["seq"])
                    else:
                        gaps += r["dropped"]
            assert seqs == sorted(set(seqs)), "records out of order or twice"
            assert len(seqs) + gaps == 4000, (len(seqs), gaps)
            announced += gaps
        assert announced == dropped
        stalled.close()
        reader.close()
    finally:
        assert d.stop() == 0
