"""rigcal status against the real rigcald: the readable summary, --json, --metrics and --reset."""
import json
import random

from conftest import run_rigcal
from daemon_harness import Daemon, pair_lines


def test_status_table_json_metrics_and_reset(tmp_path):
    d = Daemon(tmp_path).start()
    try:
        rng = random.Random(4)
        s = d.sender("status")
        s.send_text(pair_lines([(x, x + rng.gauss(0, 0.05)) for x in (rng.uniform(20, 180) for _ in range(200))],
                               start_seq=1) + "@201 P TT-101 - oops 1\n")
        s.wait_ack(201)
        out = run_rigcal("status", "--state-directory", d.state)
        assert out.returncode == 0, out.stderr
        assert "TT-101 (degC)" in out.stdout
        assert "fit       n 200" in out.stdout
        assert "vs cert   slope consistent, intercept consistent, joint consistent" in out.stdout
        assert "drift     cusum, monitoring  no alert" in out.stdout
        assert "input rig-lan: 202 lines, 200 pairs, 0 readings, 0 duplicates, 1 rejected" in out.stdout
        assert "Decision support only" in out.stdout
        j = json.loads(run_rigcal("status", "--state-directory", d.state, "--json").stdout)
        assert j["channels"][0]["fit"]["n"] == 200
        one = json.loads(run_rigcal("status", "--state-directory", d.state, "--channel", "TT-101", "--json").stdout)
        assert one["id"] == "TT-101"
        metrics = run_rigcal("status", "--state-directory", d.state, "--metrics").stdout
        assert 'rigcald_records_total{input="rig-lan",kind="pair"} 200' in metrics
        assert 'rigcald_rejects_total{input="rig-lan",reason="bad_number"} 1' in metrics
        assert metrics.endswith("# EOF\n")
        reset = run_rigcal("status", "--state-directory", d.state, "--reset", "TT-101")
        assert reset.stdout.strip() == "OK reset TT-101"
        after = d.status("TT-101")
        assert after["calibration_version"] == 2 and after["fit"]["valid"] is False
        bad = run_rigcal("status", "--state-directory", d.state, "--channel", "NOPE")
        assert bad.returncode == 69 and "no channel 'NOPE' is configured" in bad.stderr
    finally:
        assert d.stop() == 0


def test_status_without_a_daemon_says_so(tmp_path):
    out = run_rigcal("status", "--socket", tmp_path / "missing.sock")
    assert out.returncode == 69
    assert "is rigcald running?" in out.stderr
