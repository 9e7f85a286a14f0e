"""No leaks over a whole life: start, restore, ingest over TCP, a reload, SIGTERM. In the sanitized
build (RIGCAL_SANITIZE=ON, tests/run_sanitized.sh) rigcald runs under LeakSanitizer; in any other
build under valgrind --leak-check=full. Either fails the test on a definite or indirect leak."""
import os
import random
import shutil
import signal

import pytest

from daemon_harness import Daemon, pair_lines

INTERVAL = """
  - id: TT-101
    units: degC
    reference: {id: PRT-REF-07, expanded_uncertainty: 0.02}
    certificate: {intercept: 0.0, slope: 1.0}
    sensor: {noise_sd: 0.05, resolution: 0.01}
    fit: {window_pairs: 200}
    detector: {kind: interval}
    averaging: {block_readings: 10}
"""


def life(d):
    d.start(timeout=120)
    rng = random.Random(3)
    s = d.sender("leak-check", timeout=60)
    pairs = [(x, x + rng.gauss(0, 0.05)) for x in (rng.uniform(20, 180) for _ in range(300))]
    text = pair_lines(pairs, start_seq=1) + "".join(f"@{301 + i} R TT-101 - {100 + rng.gauss(0, 0.05)!r}\n"
                                                   for i in range(30))
    text += "@331 P TT-101 - 1 bad\n"
    s.send_text(text)
    s.wait_ack(331, timeout=120)
    assert "OK checkpoint" in d.control("checkpoint", timeout=60)
    d.proc.send_signal(signal.SIGHUP)
    d.wait_for(lambda: "reloaded:" in d.log(), timeout=60, what="reload")
    assert '"channels"' in d.control("status", timeout=60)  # the whole answer is serialised, under the tool
    s.close()
    return d.stop(timeout=120)


def test_a_daemon_life_leaks_nothing(tmp_path):
    d = Daemon(tmp_path, channels=INTERVAL)
    if os.environ.get("RIGCAL_SANITIZED") == "1":
        d.env = dict(os.environ, ASAN_OPTIONS="detect_leaks=1:abort_on_error=0:exitcode=23",
                     LSAN_OPTIONS="exitcode=23")
        rc = life(d)
        assert "LeakSanitizer" not in d.log() and "AddressSanitizer" not in d.log(), d.log()[-6000:]
        assert rc == 0
    else:
        if shutil.which("valgrind") is None:
            pytest.fail("the leak test needs valgrind outside the sanitized build (tools/setup.sh installs it)")
        d.command_prefix = ["valgrind", "--leak-check=full", "--show-leak-kinds=definite,indirect",
                            "--errors-for-leak-kinds=definite,indirect", "--error-exitcode=99", "--quiet",
                            "--child-silent-after-fork=yes"]
        rc = life(d)
        assert rc == 0, f"valgrind reported errors or leaks (exit {rc}):\n{d.log()[-6000:]}"
        assert "definitely lost" not in d.log() and "indirectly lost" not in d.log()
