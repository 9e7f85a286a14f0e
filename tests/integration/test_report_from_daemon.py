"""rigcal report from a real rigcald's journal: its monitoring history (the journal replayed through the
daemon's own channel engine) shows exactly the alerts the daemon raised."""
import random
import re

from conftest import run_rigcal
from daemon_harness import Daemon, pair_lines


def test_the_reports_history_matches_the_daemons_alert_file(tmp_path):
    d = Daemon(tmp_path, window=400).start()
    try:
        rng = random.Random(21)
        pairs = []
        for i in range(3000):
            x = round(rng.uniform(20, 180), 4)
            gain = 1.0 if i < 1500 else 1.01
            pairs.append((x, round(gain * x + rng.gauss(0, 0.05), 4)))
        s = d.sender("history")
        s.send_text(pair_lines(pairs, start_seq=1))
        s.wait_ack(3000)
        d.wait_for(lambda: any(a["kind"] == "drift" for a in d.read_jsonl("alerts.jsonl")), what="drift alert")
    finally:
        assert d.stop() == 0
    alerts = d.read_jsonl("alerts.jsonl")
    out = run_rigcal("report", "--journal", d.state, "--config", d.config, "--channel", "TT-101",
                     "--output", tmp_path / "r.html", "--text", "-")
    assert out.returncode == 0, out.stderr
    text = out.stdout
    assert "What rigcald saw" in text
    assert "Drift detector: cusum, monitoring" in text
    html = (tmp_path / "r.html").read_text()
    rows = re.findall(r'<tr class="alert-row" data-kind="([a-z_]+)" data-event="([a-z]+)"><td>([^<]+)</td>', html)
    expected = [(a["kind"], a["event"], a["time"][:19] + "Z") for a in alerts]
    assert [(k, e, t) for k, e, t in rows] == expected
    assert "8. Cautions" in html
