"""rigcal send: reliable replay of a record file over TCP, and plain writing to a serial line.

NOTE: "the server" in the TCP tests is FakeSessionServer (fake_session_server.py), a stand-in for
rigcald's session protocol (HELLO / OK HELLO / ACK / REJ / ERR, dedup by sequence number, dropped
connections and restarts). rigcald is not ready on this branch; tests against the real daemon will
be added when it lands.
"""
import os
import pty
import re
import select
import socket
import subprocess
import threading
import time

import pytest

from conftest import RIGCAL, run_rigcal
from fake_session_server import FakeSessionServer

SUMMARY = re.compile(r"(\d+) sent, (\d+) acknowledged, (\d+) rejected, (\d+) failed")


def write_records(path, n, channel="TT-101", every=None):
    """A record file of n pairs, with comments and blank lines between them that send must skip."""
    lines = ["# test records", ""]
    records = []
    for i in range(1, n + 1):
        ch = every(i) if every else channel
        rec = f"P {ch} 2026-12-01T08:{i // 60 % 60:02d}:{i % 60:02d}.000Z {i / 10:.1f} {i / 10 + 0.01:.2f}"
        records.append(rec)
        lines.append(rec)
        if i % 100 == 0:
            lines.append("# a comment in the middle")
    path.write_text("\n".join(lines) + "\n")
    return records


def counts(stdout):
    m = SUMMARY.search(stdout)
    assert m, stdout
    return tuple(int(g) for g in m.groups())


def default_stream(path):
    return f"{socket.gethostname().split('.')[0]}:{path.name}"


@pytest.fixture
def server():
    servers = []

    def make(**kw):
        s = FakeSessionServer(**kw).start()
        servers.append(s)
        return s

    yield make
    for s in servers:
        s.stop()


def test_every_record_arrives_once_and_in_order(tmp_path, server):
    srv = server()
    path = tmp_path / "rig.txt"
    records = write_records(path, 2500)
    out = run_rigcal("send", path, "--tcp", srv.address())
    assert out.returncode == 0, out.stderr
    assert counts(out.stdout) == (2500, 2500, 0, 0)
    assert out.stdout == f"rigcal send: {path}: 2500 sent, 2500 acknowledged, 0 rejected, 0 failed\n"
    assert out.stderr == ""  # not a terminal: no progress line
    assert srv.hellos == [default_stream(path)]
    assert srv.stored(default_stream(path)) == list(enumerate(records, start=1))


@pytest.mark.parametrize("lose_unacked", [False, True], ids=["journaled-before-cut", "lost-before-ack"])
def test_forced_disconnects_lose_nothing_and_duplicate_nothing(tmp_path, server, lose_unacked):
    srv = server(drop_at={300, 1100, 1101, 2400}, lose_unacked=lose_unacked)
    path = tmp_path / "rig.txt"
    records = write_records(path, 3000)
    out = run_rigcal("send", path, "--tcp", srv.address(), "--stream", "rig-a")
    assert out.returncode == 0, out.stderr
    sent, acked, rejected, failed = counts(out.stdout)
    assert (sent, acked, rejected, failed) == (3000, 3000, 0, 0)
    assert "resent after reconnecting" in out.stdout
    assert srv.connections >= 5
    assert srv.stored("rig-a") == list(enumerate(records, start=1))
    assert out.stderr.count("lost") >= 4 and "reconnecting" in out.stderr


def test_a_server_restart_keeping_its_high_water_mark_is_survived(tmp_path, server):
    srv = server()
    path = tmp_path / "rig.txt"
    records = write_records(path, 1500)
    proc = subprocess.Popen([str(RIGCAL), "send", str(path), "--tcp", srv.address(), "--stream", "rig-b",
                             "--rate", "1500"], stdout=subprocess.PIPE, stderr=subprocess.PIPE, text=True)
    deadline = time.time() + 10
    while len(srv.stored("rig-b")) < 300 and time.time() < deadline:
        time.sleep(0.01)
    srv.restart(down_s=0.7)  # refused connections meanwhile: the sender must back off and retry
    stdout, stderr = proc.communicate(timeout=60)
    assert proc.returncode == 0, stderr
    assert counts(stdout) == (1500, 1500, 0, 0)
    assert srv.stored("rig-b") == list(enumerate(records, start=1))


def test_resuming_sends_only_what_the_server_does_not_have(tmp_path, server):
    srv = server(stop_at=400)
    path = tmp_path / "rig.txt"
    records = write_records(path, 1000)
    first = run_rigcal("send", path, "--tcp", srv.address(), "--give-up-after", "1")
    assert first.returncode == 69, first.stdout + first.stderr
    sent, acked, rejected, failed = counts(first.stdout)
    assert acked == 400 and rejected == 0 and acked + failed == 1000
    assert "gave up after 1 s" in first.stderr

    srv.stop_at = None
    srv.start()  # same port, same high-water mark: a restarted daemon
    second = run_rigcal("send", path, "--tcp", srv.address())
    assert second.returncode == 0, second.stderr
    assert counts(second.stdout) == (600, 600, 0, 0)
    assert "(400 already held by the server)" in second.stdout
    stored = srv.stored(default_stream(path))
    assert stored == list(enumerate(records, start=1))
    assert srv.hellos == [default_stream(path)] * 2


def test_rejects_are_counted_shown_and_make_the_status_65(tmp_path, server):
    def reject(text):
        channel = text.split()[1]
        return None if channel == "TT-101" else ("unknown_channel", f'channel "{channel}" is not configured')

    srv = server(reject=reject)
    path = tmp_path / "rig.txt"
    write_records(path, 50, every=lambda i: "TT-999" if i in (7, 31) else "TT-101")
    quiet = run_rigcal("send", path, "--tcp", srv.address(), "--stream", "quiet")
    assert quiet.returncode == 65, quiet.stderr
    assert counts(quiet.stdout) == (50, 48, 2, 0)
    assert "rejected (" not in quiet.stdout

    shown = run_rigcal("send", path, "--tcp", srv.address(), "--stream", "shown", "--show-rejects")
    assert shown.returncode == 65
    # Record 7 is on line 9 of the file (a comment and a blank line come first).
    assert f'{path}:9: rejected (unknown_channel): channel "TT-999" is not configured\n' in shown.stdout
    assert f'{path}:33: rejected (unknown_channel): channel "TT-999" is not configured\n' in shown.stdout
    assert len(srv.stored("shown")) == 48


def test_records_never_acknowledged_fail_the_run(tmp_path, server):
    srv = server(acknowledge=False)
    path = tmp_path / "rig.txt"
    write_records(path, 20)
    started = time.time()
    out = run_rigcal("send", path, "--tcp", srv.address(), "--ack-timeout", "1")
    assert out.returncode == 69
    assert counts(out.stdout) == (20, 0, 0, 20)
    assert "20 sent but not acknowledged" in out.stdout
    assert "no acknowledgement for 1 s (--ack-timeout)" in out.stderr
    assert time.time() - started < 10


def test_a_server_that_never_answers_hello_is_left_after_the_deadlines(tmp_path, server):
    srv = server(answer_hello=False)
    path = tmp_path / "rig.txt"
    write_records(path, 5)
    out = run_rigcal("send", path, "--tcp", srv.address(), "--ack-timeout", "0.5", "--give-up-after", "2")
    assert out.returncode == 69
    assert "no reply to HELLO within 0.5 s (--ack-timeout) (gave up after 2 s without a connection)" in out.stderr
    assert counts(out.stdout) == (0, 0, 0, 5)
    assert srv.connections >= 2  # it was retried


def test_authentication(tmp_path, server):
    srv = server(secret="s3cret")
    path = tmp_path / "rig.txt"
    write_records(path, 10)
    good, bad = tmp_path / "good.secret", tmp_path / "bad.secret"
    good.write_text("s3cret\n")
    bad.write_text("guess\n")
    ok = run_rigcal("send", path, "--tcp", srv.address(), "--secret-file", good)
    assert ok.returncode == 0, ok.stderr
    assert counts(ok.stdout) == (10, 10, 0, 0)
    refused = run_rigcal("send", path, "--tcp", srv.address(), "--secret-file", bad, "--stream", "other")
    assert refused.returncode == 69
    assert "refused the connection: not_authenticated" in refused.stderr
    assert "(check --secret-file)" in refused.stderr
    missing = run_rigcal("send", path, "--tcp", srv.address(), "--secret-file", tmp_path / "none")
    assert missing.returncode == 66
    assert "none: No such file or directory" in missing.stderr


def test_an_unreachable_daemon_fails_with_status_69(tmp_path):
    with socket.socket() as s:  # a port nobody listens on
        s.bind(("127.0.0.1", 0))
        port = s.getsockname()[1]
    path = tmp_path / "rig.txt"
    write_records(path, 5)
    out = run_rigcal("send", path, "--tcp", f"127.0.0.1:{port}", "--give-up-after", "1")
    assert out.returncode == 69
    assert f"cannot connect to 127.0.0.1:{port}: Connection refused (gave up after 1 s" in out.stderr
    assert counts(out.stdout) == (0, 0, 0, 5)
    assert "5 never sent" in out.stdout


@pytest.mark.parametrize("args, status, message", [
    (["--tcp", "localhost"], 64, "--tcp 'localhost' is not HOST:PORT"),
    (["--tcp", "localhost:0"], 64, "the port must be a number from 1 to 65535"),
    (["--tcp", "[::1:7410"], 64, "is not HOST:PORT or [IPV6]:PORT"),
    ([], 64, "give --tcp HOST:PORT or --serial DEVICE"),
    (["--tcp", "127.0.0.1:7410", "--serial", "/dev/null"], 64, "give --tcp or --serial, not both"),
    (["--tcp", "127.0.0.1:7410", "--baud", "19200"], 64, "--baud applies to --serial only"),
    (["--serial", "/dev/null", "--stream", "x"], 64, "--stream applies to --tcp only"),
    (["--tcp", "127.0.0.1:7410", "--stream", "has space"], 64, "--stream 'has space' must be 1-64 characters"),
    (["--tcp", "127.0.0.1:7410", "--rate", "0"], 64, "--rate must be a number of records per second above 0"),
    (["--tcp", "127.0.0.1:7410", "--rate", "5", "--as-fast-as-possible"], 64, "not both"),
    (["--serial", "/dev/null", "--baud", "12345"], 64, "--baud 12345 is not a standard speed"),
    (["--serial", "/dev/null", "--parity", "mark"], 64, "--parity must be none, odd or even, got 'mark'"),
    (["--serial", "/dev/null", "--stop-bits", "1.5"], 64, "--stop-bits 1.5 cannot be set"),
    (["--tcp", "127.0.0.1:7410", "--max-unacknowledged", "-1"], 64, "--max-unacknowledged must be a whole number"),
    (["--serial", "/dev/null"], 69, "/dev/null: not a serial device"),
    (["--serial", "/nonexistent/tty"], 69, "cannot open /nonexistent/tty: No such file or directory"),
])
def test_bad_command_lines_are_named(tmp_path, args, status, message):
    path = tmp_path / "rig.txt"
    write_records(path, 3)
    out = run_rigcal("send", path, *args)
    assert out.returncode == status, out.stderr
    assert message in out.stderr


def test_lines_that_cannot_be_sent_are_refused_before_anything_is_sent(tmp_path, server):
    srv = server()
    path = tmp_path / "rig.txt"
    path.write_text("P TT-101 - 1 1\n@7 P TT-101 - 2 2\n")
    out = run_rigcal("send", path, "--tcp", srv.address())
    assert out.returncode == 65
    assert f"{path}:2: the record already carries a sequence number (@7)" in out.stderr
    path.write_text("# x\nHELLO mine\nP TT-101 - 1 1\n")
    out = run_rigcal("send", path, "--tcp", srv.address())
    assert out.returncode == 65
    assert f"{path}:2: HELLO is a session line" in out.stderr
    assert srv.connections == 0
    missing = run_rigcal("send", tmp_path / "absent.txt", "--tcp", srv.address())
    assert missing.returncode == 66
    assert "absent.txt: No such file or directory" in missing.stderr


def read_pty(master, expected_bytes, timeout=20):
    """Everything written to the pty's other end, until expected_bytes have come or the time is up."""
    data = b""
    deadline = time.time() + timeout
    while len(data) < expected_bytes and time.time() < deadline:
        ready, _, _ = select.select([master], [], [], 0.2)
        if ready:
            try:
                data += os.read(master, 65536)
            except OSError:
                break
    return data


def test_serial_writes_every_record_with_its_sequence_number_to_a_pty(tmp_path):
    master, slave = pty.openpty()
    try:
        device = os.ttyname(slave)
        path = tmp_path / "rig.txt"
        records = write_records(path, 300)
        expected = "".join(f"@{i} {r}\n" for i, r in enumerate(records, start=1)).encode()
        got = {}
        reader = threading.Thread(target=lambda: got.setdefault("data", read_pty(master, len(expected))))
        reader.start()
        out = run_rigcal("send", path, "--serial", device, "--baud", "115200")
        reader.join()
        assert out.returncode == 0, out.stderr
        assert out.stdout == f"rigcal send: {path}: 300 written (a serial line has no acknowledgements)\n"
        # Raw mode: no CR added to the line ends, nothing else changed.
        assert got["data"] == expected
    finally:
        os.close(master)
        os.close(slave)


def test_help_says_serial_has_no_acknowledgements():
    out = run_rigcal("send", "--help")
    assert out.returncode == 0
    assert "no acknowledgements exist on a serial line" in out.stdout
    for option in ["--tcp", "--serial", "--rate", "--as-fast-as-possible", "--stream", "--secret-file",
                   "--ack-timeout", "--show-rejects", "--baud"]:
        assert option in out.stdout


def test_rate_paces_the_records(tmp_path, server):
    srv = server()
    path = tmp_path / "rig.txt"
    write_records(path, 60)
    started = time.time()
    out = run_rigcal("send", path, "--tcp", srv.address(), "--rate", "100")
    assert out.returncode == 0, out.stderr
    assert time.time() - started >= 0.55  # 60 records at 100/s: the last goes 0.59 s after the first


def test_an_interrupt_stops_sending_waits_for_acknowledgements_and_the_rest_can_resume(tmp_path, server):
    srv = server()
    path = tmp_path / "rig.txt"
    records = write_records(path, 400)
    proc = subprocess.Popen([str(RIGCAL), "send", str(path), "--tcp", srv.address(), "--rate", "200"],
                            stdout=subprocess.PIPE, stderr=subprocess.PIPE, text=True)
    deadline = time.time() + 10
    while len(srv.stored(default_stream(path))) < 50 and time.time() < deadline:
        time.sleep(0.01)
    proc.send_signal(2)  # SIGINT
    stdout, stderr = proc.communicate(timeout=30)
    assert proc.returncode == 69
    sent, acked, rejected, failed = counts(stdout)
    assert sent == acked and 50 <= acked < 400 and failed == 400 - acked
    assert "interrupted: waiting up to 10 s for acknowledgements" in stderr
    resumed = run_rigcal("send", path, "--tcp", srv.address())
    assert resumed.returncode == 0, resumed.stderr
    assert counts(resumed.stdout) == (400 - acked, 400 - acked, 0, 0)
    assert srv.stored(default_stream(path)) == list(enumerate(records, start=1))


def test_progress_is_one_updating_line_on_a_terminal_only(tmp_path, server):
    srv = server()
    path = tmp_path / "rig.txt"
    write_records(path, 150)
    master, slave = pty.openpty()
    try:
        proc = subprocess.Popen([str(RIGCAL), "send", str(path), "--tcp", srv.address(), "--rate", "200"],
                                stdout=subprocess.PIPE, stderr=slave, text=True)
        stdout, _ = proc.communicate(timeout=30)
        os.close(slave)
        slave = None
        shown = read_pty(master, 1 << 20, timeout=1).decode()
    finally:
        os.close(master)
        if slave is not None:
            os.close(slave)
    assert proc.returncode == 0
    assert counts(stdout) == (150, 150, 0, 0)
    updates = shown.split("\r\x1b[K")
    assert len(updates) >= 3  # redrawn in place, then cleared
    assert any(re.search(r"sent \d+  acknowledged \d+  rejected 0 of 150  \d+ records/s", u) for u in updates)
    assert "\n" not in shown  # never more than the one line
    assert updates[-1] == ""  # cleared before the final line
