"""rigcal simulate: reproducible record files from a scenario, the demo scenario's drift visible to
rigcal fit, delivery over TCP and serial, and clear refusals of bad scenarios and options.

NOTE: the TCP test delivers to FakeSessionServer (fake_session_server.py), which stands in for
rigcald's session protocol until the daemon lands on this branch.
"""
import json
import os
import pty
import re
import threading
import time

import pytest

from conftest import SOURCE_DIR, run_rigcal
from fake_session_server import FakeSessionServer
from test_send_command import read_pty

DEMO = SOURCE_DIR / "config" / "demo-scenario.yaml"
PAIR = re.compile(r"^P (TT-101|PT-204) (2026-11-30T\d\d:\d\d:\d\d\.\d{3}Z) (-?\d+\.\d+) (-?\d+\.\d+)$")
READING = re.compile(r"^R (TT-101|PT-204) (2026-11-30T\d\d:\d\d:\d\d\.\d{3}Z) (-?\d+\.\d+)$")


def simulate(tmp_path, name, *args):
    path = tmp_path / name
    out = run_rigcal("simulate", DEMO, "--output", path, *args)
    assert out.returncode == 0, out.stderr
    assert out.stdout == "" and out.stderr == ""
    return path.read_bytes()


def records_of(data):
    return [line for line in data.decode().splitlines() if not line.startswith("#")]


def test_the_same_seed_gives_the_same_bytes_and_another_seed_others(tmp_path):
    a = simulate(tmp_path, "a.txt", "--duration", "3600")
    b = simulate(tmp_path, "b.txt", "--duration", "3600")
    c = simulate(tmp_path, "c.txt", "--duration", "3600", "--seed", "7")
    assert a == b
    assert a != c
    # Same schedule, other draws: about as many records (dropouts differ), other values.
    assert abs(len(records_of(a)) - len(records_of(c))) < 100
    # The header names what produced the file, so a file can be regenerated from it.
    assert a.decode().splitlines()[0] == ("# rigcal simulate: scenario pilot-plant-demo, seed 20261130, "
                                          "start 2026-11-30T06:00:00.000Z, 3600 s simulated")
    stdout = run_rigcal("simulate", DEMO, "--duration", "3600")
    assert stdout.returncode == 0 and stdout.stdout.encode() == a


def test_records_are_protocol_lines_in_time_order_within_the_duration(tmp_path):
    lines = records_of(simulate(tmp_path, "d.txt", "--duration", "1800"))
    times = []
    kinds = {"P": 0, "R": 0}
    for line in lines:
        m = PAIR.match(line) or READING.match(line)
        assert m, line
        kinds[line[0]] += 1
        times.append(m.group(2))
    assert times == sorted(times)
    assert times[0] == "2026-11-30T06:00:00.000Z" and times[-1] < "2026-11-30T06:30:00.000Z"
    # A pair a second per channel, TT-101 readings every 10 s, PT-204's every 2 s, minus dropouts.
    assert 2 * 1800 * 0.99 < kinds["P"] <= 2 * 1800
    assert (180 + 900) * 0.99 < kinds["R"] <= 180 + 900


def test_records_limit_start_and_arrival_time(tmp_path):
    lines = records_of(simulate(tmp_path, "e.txt", "--records", "25", "--start", "2026-12-01T10:00:00Z",
                                "--arrival-time"))
    assert len(lines) == 25
    assert all(line.split()[2] == "-" for line in lines)
    started = records_of(simulate(tmp_path, "f.txt", "--records", "3", "--start", "2026-12-01T10:00:00.5Z"))
    assert started[0].split()[2] == "2026-12-01T10:00:00.500Z"


def test_rigcal_fit_sees_the_demo_drift_of_tt101(tmp_path):
    lines = records_of(simulate(tmp_path, "demo.txt"))
    before, after = ["reference,sensor"], ["reference,sensor"]
    for line in lines:
        f = line.split()
        if f[0] == "P" and f[1] == "TT-101":
            (before if f[2] < "2026-11-30T10:00:00" else after).append(f"{f[3]},{f[4]}")
    (tmp_path / "before.csv").write_text("\n".join(before) + "\n")
    (tmp_path / "after.csv").write_text("\n".join(after) + "\n")
    fit_before = json.loads(run_rigcal("fit", tmp_path / "before.csv", "--json").stdout)
    fit_after = json.loads(run_rigcal("fit", tmp_path / "after.csv", "--json").stdout)
    assert abs(fit_before["b1"] - 1.0) < 0.0005
    assert abs(fit_after["b1"] - 1.015) < 0.0005
    assert fit_after["ci_b1"][0] > 1.01


def test_tcp_delivers_exactly_the_records_of_the_file(tmp_path):
    srv = FakeSessionServer().start()
    try:
        expected = records_of(simulate(tmp_path, "g.txt", "--records", "700"))
        out = run_rigcal("simulate", DEMO, "--records", "700", "--tcp", srv.address(), "--as-fast-as-possible")
        assert out.returncode == 0, out.stderr
        assert out.stdout == (f"rigcal simulate: {DEMO}: 700 sent, 700 acknowledged, 0 rejected, 0 failed\n")
        (stream,) = srv.hellos
        assert stream.startswith("sim:") and "pilot-plant-demo:20261130:" in stream
        assert srv.stored(stream) == list(enumerate(expected, start=1))
    finally:
        srv.stop()


def test_serial_output_to_a_pty(tmp_path):
    expected = records_of(simulate(tmp_path, "h.txt", "--records", "40"))
    data = "".join(f"@{i} {r}\n" for i, r in enumerate(expected, start=1)).encode()
    master, slave = pty.openpty()
    try:
        got = {}
        reader = threading.Thread(target=lambda: got.setdefault("data", read_pty(master, len(data))))
        reader.start()
        out = run_rigcal("simulate", DEMO, "--records", "40", "--serial", os.ttyname(slave), "--baud", "57600",
                         "--as-fast-as-possible")
        reader.join()
        assert out.returncode == 0, out.stderr
        assert got["data"] == data
        assert "40 written (a serial line has no acknowledgements)" in out.stdout
    finally:
        os.close(master)
        os.close(slave)


def write(tmp_path, text):
    path = tmp_path / "s.yaml"
    path.write_text(text)
    return path


MINIMAL = "name: t\nchannels:\n  - id: A\n    pairs: {interval_s: 1}\n    profile: {set_points: [1, 2]}\n"


@pytest.mark.parametrize("text, message", [
    (MINIMAL.replace("set_points", "setpoints"),
     "s.yaml:5:15: channels[0].profile.setpoints: unknown key 'setpoints' (did you mean 'set_points'?)"),
    (MINIMAL + "    faults: [{kind: gain_step, after_s: 10}]\n",
     "s.yaml:6:14: channels[0].faults[0].change: required key is missing"),
    (MINIMAL + "    sensor: {raw: {kind: rtd, type: K}}\n",
     "s.yaml:6:31: channels[0].sensor.raw.type: unknown key 'type'"),
    ("name: t\nchannels: [\n", "s.yaml:3:1: not valid YAML"),
])
def test_bad_scenarios_are_refused_with_file_line_and_column(tmp_path, text, message):
    out = run_rigcal("simulate", write(tmp_path, text), "--records", "1")
    assert out.returncode == 65
    assert message in out.stderr, out.stderr
    assert out.stdout == ""


@pytest.mark.parametrize("args, message", [
    (["--start", "2026-12-01T10:00:00+02:00"], "--start '2026-12-01T10:00:00+02:00'"),
    (["--seed", "-3"], "--seed must be an integer"),
    (["--duration", "0"], "--duration must be a number of seconds above 0"),
    (["--records", "-1"], "--records must be a whole number, got '-1'"),
    (["--output", "x.txt", "--tcp", "127.0.0.1:1"], "give one of --output, --tcp and --serial"),
    ([], "the scenario sets no duration_s: give --duration SECONDS or --records N"),
])
def test_bad_options_are_usage_errors(tmp_path, args, message):
    out = run_rigcal("simulate", write(tmp_path, MINIMAL), *args)
    assert out.returncode == 64
    assert message in out.stderr, out.stderr


def test_unreadable_scenario_and_unwritable_output(tmp_path):
    missing = run_rigcal("simulate", tmp_path / "none.yaml", "--records", "1")
    assert missing.returncode == 66
    assert "none.yaml: No such file or directory" in missing.stderr
    unwritable = run_rigcal("simulate", DEMO, "--records", "1", "--output", tmp_path / "no-dir" / "x.txt")
    assert unwritable.returncode == 74
    assert "x.txt: No such file or directory" in unwritable.stderr


def test_tcp_follows_the_simulated_clock_by_default(tmp_path):
    srv = FakeSessionServer().start()
    try:
        started = time.time()
        out = run_rigcal("simulate", DEMO, "--duration", "2", "--tcp", srv.address())
        elapsed = time.time() - started
        assert out.returncode == 0, out.stderr
        # Records stamped 0 s and 1 s after the start: the second second's go a second after the first.
        assert 0.9 <= elapsed < 10
        assert "0 failed" in out.stdout
    finally:
        srv.stop()
