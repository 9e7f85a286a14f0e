"""Figures measured by the limits tests: each test records what it measured here, and
tests/integration/write_limits.py turns them into LIMITS.md."""
import json
import os
import pathlib

from conftest import BUILD_DIR


def record(name, **figures):
    out = pathlib.Path(os.environ.get("RIGCAL_LIMITS_DIR", BUILD_DIR / "limits"))
    out.mkdir(parents=True, exist_ok=True)
    (out / f"{name}.json").write_text(json.dumps(figures, indent=1, sort_keys=True) + "\n")


def proc_status(pid, key):
    """A /proc/PID/status figure in KiB (VmRSS, VmHWM) or a count (FDSize)."""
    for line in pathlib.Path(f"/proc/{pid}/status").read_text().splitlines():
        if line.startswith(key + ":"):
            return int(line.split()[1])
    raise KeyError(key)


def open_fds(pid):
    return len(os.listdir(f"/proc/{pid}/fd"))


def cpu_seconds(pid):
    fields = pathlib.Path(f"/proc/{pid}/stat").read_text().rsplit(")", 1)[1].split()
    return (int(fields[11]) + int(fields[12])) / os.sysconf("SC_CLK_TCK")  # utime + stime
