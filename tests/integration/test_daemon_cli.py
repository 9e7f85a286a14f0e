"""rigcald's command line and start-up stages: exit statuses and messages are interface."""
import subprocess

from conftest import RIGCALD, SOURCE_DIR
from daemon_harness import Daemon


def run(*args, timeout=30):
    return subprocess.run([str(RIGCALD), *map(str, args)], capture_output=True, text=True, timeout=timeout)


def test_version_and_help():
    out = run("--version")
    assert out.returncode == 0 and out.stdout.startswith("rigcald ")
    out = run("--help")
    assert out.returncode == 0
    assert "--check-config" in out.stdout and "not a safety function" in out.stdout


def test_check_config_accepts_the_bundled_example():
    out = run("--check-config", SOURCE_DIR / "config" / "rigcald.yaml")
    assert out.returncode == 0, out.stderr
    assert "valid (2 channel(s)" in out.stdout


def test_check_config_reports_every_problem_with_file_line_and_column(tmp_path):
    bad = tmp_path / "bad.yaml"
    bad.write_text("journal:\n  fsync: sometimes\nchannels:\n  - id: TT-101\n    certificate: {slope: 1}\n"
                   "    fit: {widow_pairs: 10}\n")
    out = run("--check-config", bad)
    assert out.returncode == 78
    assert f"{bad}:2:10: journal.fsync: expected one of interval, every_batch, got 'sometimes'" in out.stderr
    assert "channels[0].certificate.intercept: required key is missing" in out.stderr
    assert "unknown key 'widow_pairs' (did you mean 'window_pairs'?)" in out.stderr
    assert "3 problem(s)" in out.stderr


def test_usage_errors_exit_64():
    assert run().returncode == 64
    assert run("--bogus").returncode == 64


def test_a_state_directory_that_cannot_be_created_exits_73(tmp_path):
    d = Daemon(tmp_path)
    d.write_config(d.config.read_text().replace(str(d.state), "/proc/rigcald-cannot-exist"))
    out = run(d.config)
    assert out.returncode == 73
    assert "cannot start" in out.stdout + out.stderr


def test_a_port_in_use_exits_75_and_a_second_daemon_on_one_state_directory_is_refused(tmp_path):
    d = Daemon(tmp_path).start()
    try:
        second = run(d.config)
        assert second.returncode in (73, 75)
        text = second.stdout + second.stderr
        assert "another rigcald is using this state directory" in text or "Address already in use" in text
    finally:
        assert d.stop() == 0


def test_sigterm_stops_cleanly_with_exit_0_and_a_checkpoint(tmp_path):
    d = Daemon(tmp_path).start()
    assert d.stop() == 0
    assert list(d.state.glob("checkpoint-*.rgc"))
    assert "stopped" in d.log()
