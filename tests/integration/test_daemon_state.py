"""State that survives: kill -9 mid-stream, torn journal tails, corrupt checkpoints, clean restarts
and configuration reloads, all against the real rigcald with rigcal send as the sender."""
import random
import signal
import subprocess
import time

from conftest import RIGCAL
from daemon_harness import CUMULATIVE_TT101, Daemon, assert_fit_is_batch_fit_of, ols, write_pairs

CUMULATIVE = CUMULATIVE_TT101 + """
  - id: PT-204
    units: bar
    certificate: {intercept: 0.0, slope: 1.0}
    sensor: {noise_sd: 0.004}
    fit: {memory: cumulative}
    detector: {kind: interval}
    screening: {enabled: false}
"""


def test_kill_9_at_random_moments_during_a_replay_loses_and_duplicates_nothing(tmp_path):
    rng = random.Random(20261201)
    d = Daemon(tmp_path, channels=CUMULATIVE).start()
    data = tmp_path / "pairs.txt"
    pairs = write_pairs(data, 30000, seed=5)
    sender = subprocess.Popen([str(RIGCAL), "send", str(data), "--tcp", f"127.0.0.1:{d.tcp_port}", "--rate", "15000",
                               "--stream", "kill-test", "--give-up-after", "60", "--ack-timeout", "5"],
                              stdout=subprocess.PIPE, stderr=subprocess.PIPE, text=True)
    try:
        kills = 0
        while sender.poll() is None and kills < 4:
            time.sleep(rng.uniform(0.2, 0.6))
            if sender.poll() is not None:
                break
            d.kill9()
            kills += 1
            time.sleep(rng.uniform(0.05, 0.3))
            d.start()
        out, err = sender.communicate(timeout=120)
        assert sender.returncode == 0, out + err
        assert kills >= 2, "the replay finished before the daemon could be killed twice"
        assert "30000 sent, 30000 acknowledged, 0 rejected, 0 failed" in out
        assert_fit_is_batch_fit_of(d, pairs)
        # the last restart may come after the sender finished: that process then has no input counters
        assert sum(i["rejects_total"] for i in d.status()["inputs"]) == 0
    finally:
        if sender.poll() is None:
            sender.kill()
        d.stop()


def test_a_clean_restart_restores_the_checkpoint_and_continues(tmp_path):
    d = Daemon(tmp_path, channels=CUMULATIVE).start()
    data = tmp_path / "a.txt"
    pairs = write_pairs(data, 2000, seed=6)
    assert subprocess.run([str(RIGCAL), "send", str(data), "--tcp", f"127.0.0.1:{d.tcp_port}", "--stream", "a"],
                          capture_output=True, timeout=60).returncode == 0
    assert d.stop() == 0
    d.start()
    assert "restored checkpoint" in d.log()
    more = tmp_path / "b.txt"
    pairs += write_pairs(more, 1000, seed=7)
    assert subprocess.run([str(RIGCAL), "send", str(more), "--tcp", f"127.0.0.1:{d.tcp_port}", "--stream", "b"],
                          capture_output=True, timeout=60).returncode == 0
    assert_fit_is_batch_fit_of(d, pairs)
    assert d.stop() == 0


def newest(d, pattern):
    return sorted(d.state.glob(pattern))[-1]


def test_a_torn_final_journal_record_is_skipped_with_a_warning(tmp_path):
    d = Daemon(tmp_path, channels=CUMULATIVE).start()
    data = tmp_path / "a.txt"
    pairs = write_pairs(data, 500, seed=8)
    # paced, so that the pairs arrive in many reads and the journal holds many frames
    assert subprocess.run([str(RIGCAL), "send", str(data), "--tcp", f"127.0.0.1:{d.tcp_port}", "--stream", "t",
                           "--rate", "2000"], capture_output=True, timeout=60).returncode == 0
    d.kill9()  # no checkpoint: the state is in the journal only
    seg = newest(d, "journal-*.rgj")
    size = seg.stat().st_size
    with open(seg, "r+b") as f:  # cut the last frame short, as a power cut in mid-write would
        f.truncate(size - 5)
    d.start()
    assert "torn final record" in d.log()
    fit = d.status("TT-101")["fit"]
    assert 0 < fit["n"] < 500  # the torn frame's pairs were never acknowledged; everything before it is back
    ref = ols(*zip(*pairs[:fit["n"]]))
    assert abs(fit["b1"] - ref["b1"]) < 1e-10
    # a sender resuming the stream fills the gap exactly once
    assert subprocess.run([str(RIGCAL), "send", str(data), "--tcp", f"127.0.0.1:{d.tcp_port}", "--stream", "t"],
                          capture_output=True, timeout=60).returncode == 0
    assert_fit_is_batch_fit_of(d, pairs)
    assert d.stop() == 0


def corrupt(path):
    b = bytearray(path.read_bytes())
    b[len(b) // 2] ^= 0x20
    path.write_bytes(bytes(b))


def send_file(d, path, stream):
    out = subprocess.run([str(RIGCAL), "send", str(path), "--tcp", f"127.0.0.1:{d.tcp_port}", "--stream", stream],
                         capture_output=True, text=True, timeout=60)
    assert out.returncode == 0, out.stdout + out.stderr


def test_a_corrupted_checkpoint_is_detected_and_the_state_rebuilt_from_the_previous_one_and_the_journal(tmp_path):
    d = Daemon(tmp_path, channels=CUMULATIVE).start()
    pairs = write_pairs(tmp_path / "a.txt", 1500, seed=9)
    send_file(d, tmp_path / "a.txt", "c1")
    assert "OK checkpoint" in d.control("checkpoint")
    d.wait_for(lambda: len(list(d.state.glob("checkpoint-*.rgc"))) >= 1, what="checkpoint")
    pairs += write_pairs(tmp_path / "b.txt", 700, seed=19)
    send_file(d, tmp_path / "b.txt", "c2")
    assert d.stop() == 0  # a second (final) checkpoint
    corrupt(newest(d, "checkpoint-*.rgc"))
    d.start()
    assert "checkpoint checksum mismatch (file corrupted)" in d.log()
    assert "restored checkpoint 1" in d.log()
    assert_fit_is_batch_fit_of(d, pairs)
    assert d.stop() == 0


def test_with_archived_segments_even_every_checkpoint_lost_is_rebuilt_from_the_journal(tmp_path):
    d = Daemon(tmp_path, channels=CUMULATIVE)
    d.write_config(d.config.read_text().replace("journal: {fsync: interval, fsync_interval_ms: 10}",
                                                "journal: {fsync: interval, fsync_interval_ms: 10, retain: archive}"))
    d.start()
    pairs = []
    for i in range(3):  # three checkpoints: the oldest segments move to the archive
        pairs += write_pairs(tmp_path / f"{i}.txt", 400, seed=30 + i)
        send_file(d, tmp_path / f"{i}.txt", f"s{i}")
        assert "OK checkpoint" in d.control("checkpoint")
        time.sleep(0.3)
    assert d.stop() == 0
    assert list((d.state / "archive").glob("journal-*.rgj"))
    for cp in d.state.glob("checkpoint-*.rgc"):
        corrupt(cp)
    d.start()
    assert "replaying" in d.log() and "archived segments first" in d.log()
    assert_fit_is_batch_fit_of(d, pairs)
    assert d.stop() == 0


def test_sighup_with_a_broken_configuration_keeps_running_on_the_old_one(tmp_path):
    d = Daemon(tmp_path).start()
    good = d.config.read_text()
    d.write_config(good.replace("window_pairs: 400", "window_pairs: lots"))
    d.proc.send_signal(signal.SIGHUP)
    d.wait_for(lambda: "reload refused" in d.log(), what="reload refused")
    assert "channels[0].fit.window_pairs: expected an integer from 3 to 10000000, got 'lots'" in d.log()
    assert d.status()["channels"][0]["id"] == "TT-101"
    assert d.proc.poll() is None
    d.write_config(good)
    assert d.stop() == 0


def test_sighup_keeps_unchanged_channels_and_restarts_changed_ones(tmp_path):
    d = Daemon(tmp_path, channels=CUMULATIVE).start()
    data = tmp_path / "a.txt"
    write_pairs(data, 300, seed=10)
    text = data.read_text()
    data.write_text(text + text.replace("TT-101", "PT-204"))
    assert subprocess.run([str(RIGCAL), "send", str(data), "--tcp", f"127.0.0.1:{d.tcp_port}", "--stream", "h"],
                          capture_output=True, timeout=60).returncode == 0
    before = d.status()
    assert [c["fit"]["n"] for c in before["channels"]] == [300, 300]
    d.write_config(d.config.read_text().replace("sensor: {noise_sd: 0.004}", "sensor: {noise_sd: 0.005}"))
    d.proc.send_signal(signal.SIGHUP)
    d.wait_for(lambda: "reloaded:" in d.log(), what="reload")
    after = {c["id"]: c for c in d.status()["channels"]}
    assert after["TT-101"]["fit"]["n"] == 300 and after["TT-101"]["calibration_version"] == 1
    assert after["PT-204"]["fit"]["valid"] is False and after["PT-204"]["calibration_version"] == 2
    assert "1 channels kept, 1 changed" in d.log()
    assert d.stop() == 0
