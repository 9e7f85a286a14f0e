"""Bad days against the real rigcald: kill -9 at random moments in a loop, a full state directory,
and clocks that jump. Each test checks that nothing acknowledged is lost and nothing is counted
twice: the fit at the end equals a batch fit of exactly the pairs sent once each."""
import datetime
import os
import random
import shutil
import socket
import subprocess
import time

import pytest

from conftest import RIGCAL
from daemon_harness import CUMULATIVE_TT101, Daemon, assert_fit_is_batch_fit_of, write_pairs

CUMULATIVE = CUMULATIVE_TT101


# ---- kill -9 in a loop ----

def test_kill_9_at_fifteen_random_moments_of_a_fast_stream_loses_and_duplicates_nothing(tmp_path):
    rng = random.Random(7_0_2026)
    d = Daemon(tmp_path, channels=CUMULATIVE).start()
    data = tmp_path / "pairs.txt"
    pairs = write_pairs(data, 200_000, seed=71)
    sender = subprocess.Popen([str(RIGCAL), "send", str(data), "--tcp", f"127.0.0.1:{d.tcp_port}", "--rate", "12000",
                               "--stream", "kill-loop", "--give-up-after", "60", "--ack-timeout", "3"],
                              stdout=subprocess.PIPE, stderr=subprocess.PIPE, text=True)
    kills = 0
    # 200 000 pairs at 12 000/s outlast fifteen kills and restarts with room to spare, also for a
    # sanitized rigcald, which restarts and replays more slowly.
    try:
        while kills < 15 and sender.poll() is None:
            # anywhere from during the restart's replay to well into the stream
            time.sleep(rng.uniform(0.0, 0.7))
            d.kill9()
            kills += 1
            time.sleep(rng.uniform(0.0, 0.2))
            d.start()
        out, err = sender.communicate(timeout=120)
        assert kills == 15, f"the stream ended after {kills} kills; make it longer"
        assert sender.returncode == 0, out + err
        assert "200000 sent, 200000 acknowledged, 0 rejected, 0 failed" in out
        assert_fit_is_batch_fit_of(d, pairs)
        st = d.status()
        # (the last restart may come after the sender finished: that process has no input counters)
        assert sum(i["rejects_total"] for i in st["inputs"]) == 0
        assert st["channels"][0]["counters"]["pairs"] == 200_000  # each counted once, resends dropped
    finally:
        if sender.poll() is None:
            sender.kill()
        d.stop()


# ---- disk full ----

def mount_tmpfs(path, size):
    path.mkdir()
    if os.geteuid() != 0:
        pytest.fail("the disk-full test mounts a small tmpfs and needs root (CI runs as root)")
    r = subprocess.run(["mount", "-t", "tmpfs", "-o", f"size={size},mode=0750", "tmpfs", str(path)],
                       capture_output=True, text=True)
    if r.returncode != 0:
        pytest.fail(f"cannot mount a tmpfs for the disk-full test (needs root and CAP_SYS_ADMIN): {r.stderr.strip()}")


def fill(path):
    """Writes a filler file until the file system is full (ENOSPC), to the last byte."""
    fd = os.open(path, os.O_WRONLY | os.O_CREAT | os.O_TRUNC, 0o600)
    try:
        for size in (1 << 20, 4096, 1):
            while True:
                try:
                    if os.write(fd, b"\0" * size) < size:
                        break
                except OSError:
                    break
    finally:
        os.close(fd)


def metric(d, name):
    for line in d.control("metrics").splitlines():
        if line.startswith(name + " ") or line.startswith(name + "{"):
            return float(line.split()[-1])
    raise AssertionError(f"no metric {name}")


def test_a_full_state_directory_pauses_ingest_stops_acks_and_resumes_without_loss(tmp_path):
    mnt = tmp_path / "small"
    mount_tmpfs(mnt, "48m")
    try:
        d = Daemon(tmp_path, channels=CUMULATIVE)
        d.state = mnt / "state"
        d.write_config(d.config.read_text().replace(f"state_directory: {tmp_path / 'state'}",
                                                    f"state_directory: {d.state}"))
        d.start()
        try:
            rng = random.Random(5)
            # more than the kernel's socket buffers hold (several MB on loopback), so that back-pressure shows
            pairs = [(round(rng.uniform(20, 180), 4), 0.0) for _ in range(600_000)]
            pairs = [(x, round(x + rng.gauss(0, 0.05), 4)) for x, _ in pairs]
            lines = [f"@{i + 1} P TT-101 - {x} {y}\n".encode() for i, (x, y) in enumerate(pairs)]
            s = d.sender("disk-full")
            s.send_text(b"".join(lines[:1000]))
            s.wait_ack(1000)

            fill(mnt / "filler")
            # Everything after this needs journal space: nothing more may be acknowledged.
            sock = s.sock
            sock.setblocking(False)
            body = b"".join(lines[1000:])
            sent = 0
            stalled_since = None
            deadline = time.time() + 30
            while time.time() < deadline:
                try:
                    sent += sock.send(body[sent:sent + 65536])
                    stalled_since = None
                except BlockingIOError:
                    stalled_since = stalled_since or time.time()
                    if time.time() - stalled_since > 1.5:
                        break  # the kernel's buffers are full and rigcald reads no more: back-pressure
                    time.sleep(0.05)
                if sent == len(body):
                    break
            assert sent < len(body), "rigcald kept reading although its journal cannot be written"
            assert "journal cannot be written" in d.log() and "No space left on device" in d.log()
            assert "Inputs are paused and nothing is acknowledged" in d.log()
            st = d.status()
            assert st["daemon"]["journal"]["blocked"] is True
            assert "No space left on device" in st["daemon"]["journal"]["error"]
            assert metric(d, "rigcald_journal_blocked") == 1
            held = st["channels"][0]["fit"]["n"]
            assert held == 1000, "pairs were applied before they were journaled"
            # no ACK beyond the 1000 already acknowledged
            sock.setblocking(True)
            sock.settimeout(0.5)
            try:
                s.buffer += sock.recv(65536)
            except socket.timeout:
                pass
            acks = [int(l.split()[1]) for l in s.buffer.decode().splitlines() if l.startswith("ACK ")]
            assert all(a <= 1000 for a in acks), acks
            time.sleep(1.2)  # several retries (every 500 ms) while still full
            assert d.status()["channels"][0]["fit"]["n"] == 1000

            os.unlink(mnt / "filler")  # space again
            sock.settimeout(60)
            sock.sendall(body[sent:])
            s.wait_ack(len(pairs), timeout=60)
            assert "journal writable again; inputs resumed" in d.log()
            assert d.status()["daemon"]["journal"]["blocked"] is False
            assert_fit_is_batch_fit_of(d, pairs)
            s.close()
        finally:
            assert d.stop() == 0
        # and the journal on the once-full disk replays to the same state
        d.start()
        try:
            assert_fit_is_batch_fit_of(d, pairs)
        finally:
            assert d.stop() == 0
    finally:
        subprocess.run(["umount", "-l", str(mnt)], check=False)


# ---- clock jumps ----

def rfc3339(t):
    return datetime.datetime.fromtimestamp(t, datetime.timezone.utc).strftime("%Y-%m-%dT%H:%M:%S.%fZ")


def test_timestamps_that_jump_back_or_far_ahead_are_rejected_by_the_documented_rule(tmp_path):
    d = Daemon(tmp_path, channels=CUMULATIVE)
    d.write_config(d.config.read_text().replace("channels:", "time: {max_future_s: 60, max_backwards_s: 600}\nchannels:"))
    d.start()
    try:
        now = time.time()
        rows = [  # (offset from now in s, x, y, accepted?)
            (0, 20.0, 20.01, True),
            (-300, 40.0, 40.02, True),      # back 5 min, within max_backwards_s (600): taken
            (-900, 60.0, 60.0, False),      # back 15 min from the latest: clock_backwards
            (30, 80.0, 80.03, True),        # 30 s ahead, within max_future_s (60): taken; now the latest
            (-620, 100.0, 100.0, False),    # 590 s before now but 650 s before the latest: clock_backwards
            (3600, 120.0, 120.0, False),    # an hour ahead of rigcald's clock: clock_future
            (-500, 140.0, 140.04, True),    # 530 s before the latest: taken
            (86400 * 365, 160.0, 160.0, False),  # a year ahead: clock_future
            (5, 180.0, 179.97, True),
        ]
        s = d.sender("clock")
        s.send_text("".join(f"@{i + 1} P TT-101 {rfc3339(now + off)} {x} {y}\n" for i, (off, x, y, _) in enumerate(rows)))
        s.wait_ack(len(rows))
        rej = {int(r.split()[1]): r.split()[2] for r in s.replies if r.startswith("REJ ")}
        assert rej == {6: "clock_future", 8: "clock_future"}, s.replies  # refused before the journal
        d.wait_for(lambda: len(d.read_jsonl("rejects.jsonl")) == 4, what="four rejects in the reject file")
        reasons = sorted(r["reason"] for r in d.read_jsonl("rejects.jsonl"))
        assert reasons == ["clock_backwards", "clock_backwards", "clock_future", "clock_future"]
        taken = [(x, y) for off, x, y, ok in rows if ok]
        ch = d.status("TT-101")
        assert ch["counters"]["clock_rejects"] == 2
        assert_fit_is_batch_fit_of(d, taken)
        st = d.status()
        rig = [i for i in st["inputs"] if i["name"] == "rig-lan"][0]
        assert rig["rejects"] == {"clock_future": 2}
        engine = [i for i in st["inputs"] if i["name"] == "engine"][0]
        assert engine["rejects"] == {"clock_backwards": 2}
        # a replay after kill -9 takes the same decisions
        d.kill9()
        d.start()
        assert_fit_is_batch_fit_of(d, taken)
        assert d.status("TT-101")["counters"]["clock_rejects"] == 2
    finally:
        assert d.stop() == 0
