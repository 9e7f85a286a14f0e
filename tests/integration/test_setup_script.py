"""tools/setup.sh: idempotent, and quiet when everything is installed (it is, by the time tests run)."""
import subprocess

from conftest import SOURCE_DIR


def test_setup_is_quiet_and_succeeds_when_everything_is_present():
    for args in ([], ["--minimal"]):
        out = subprocess.run(["sh", str(SOURCE_DIR / "tools" / "setup.sh"), *args], capture_output=True, text=True,
                             timeout=120)
        assert out.returncode == 0, out.stderr
        assert out.stdout == "" and out.stderr == ""
