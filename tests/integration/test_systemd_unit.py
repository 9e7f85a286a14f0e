"""The systemd unit's hardening, scored by systemd-analyze (offline), the directives a review would
look for, and `cmake --install` into a DESTDIR putting the binaries, unit, sysusers entry and example
configuration where the unit expects them."""
import configparser
import os
import pathlib
import re
import shutil
import subprocess

import pytest

from conftest import BUILD_DIR, RIGCALD, SOURCE_DIR

UNIT = BUILD_DIR / "systemd" / "rigcald.service"
# What is left exposed is what the service is for: Internet sockets (senders, historian), AF_UNIX
# (the control socket), the serial devices and the dialout group, the host's network (PrivateNetwork
# would cut senders off) and no IP allow list (that is site policy: IPAddressAllow= in a drop-in).
# systemd 252 scores that 1.5; 2.0 leaves room for scoring changes and fails on any real loosening
# (NoNewPrivileges alone is worth 0.2, an unrestricted SystemCallFilter 0.2-0.4, capabilities more).
MAX_EXPOSURE = 2.0


def systemd_analyze():
    tool = shutil.which("systemd-analyze")
    if tool is None:
        pytest.fail("systemd-analyze is missing (package systemd; tools/setup.sh installs it)")
    return tool


def unit_for_here(tmp_path):
    """The configured unit with ExecStart pointing at the build's rigcald (verify checks it exists)."""
    text = UNIT.read_text()
    text = re.sub(r"^ExecStart=\S+", f"ExecStart={RIGCALD}", text, flags=re.M)
    out = tmp_path / "rigcald.service"
    out.write_text(text)
    return out


def directives(path):
    found = {}
    for line in path.read_text().splitlines():
        line = line.strip()
        if line and not line.startswith(("#", "[")):
            k, v = line.split("=", 1)
            found.setdefault(k, []).append(v)
    return found


def test_the_unit_has_the_required_hardening_directives():
    d = directives(UNIT)
    want = {"Type": "notify", "NoNewPrivileges": "yes", "ProtectSystem": "strict", "ProtectHome": "yes",
            "PrivateTmp": "yes", "PrivateDevices": "no", "StateDirectory": "rigcald",
            "ConfigurationDirectory": "rigcald", "RuntimeDirectory": "rigcald", "SupplementaryGroups": "dialout",
            "RestrictAddressFamilies": "AF_INET AF_INET6 AF_UNIX", "LockPersonality": "yes",
            "MemoryDenyWriteExecute": "yes", "RestrictNamespaces": "yes", "RestrictRealtime": "yes",
            "ProtectKernelTunables": "yes", "ProtectKernelModules": "yes", "ProtectKernelLogs": "yes",
            "ProtectControlGroups": "yes", "CapabilityBoundingSet": "", "UMask": "0027", "User": "rigcald",
            "Restart": "on-failure", "ExecReload": "/bin/kill -HUP $MAINPID", "DevicePolicy": "closed"}
    for k, v in want.items():
        assert v in d.get(k, []), f"{k}={v} missing (found {d.get(k)})"
    assert "@system-service" in d["SystemCallFilter"]
    assert sorted(d["DeviceAllow"]) == ["char-ttyACM rw", "char-ttyS rw", "char-ttyUSB rw"]
    assert int(d["WatchdogSec"][0]) > 0 and int(d["LimitNOFILE"][0]) >= 4096
    assert d["ExecStart"][0].split()[0].endswith("/rigcald")


def test_systemd_analyze_security_scores_the_unit_below_the_threshold(tmp_path):
    unit = unit_for_here(tmp_path)
    out = subprocess.run([systemd_analyze(), "security", "--offline=true", "--no-pager", str(unit)],
                         capture_output=True, text=True, timeout=60)
    m = re.search(r"Overall exposure level for \S+: ([0-9.]+)", out.stdout)
    assert m, out.stdout + out.stderr
    score = float(m.group(1))
    print(f"systemd-analyze security exposure: {score}")
    assert score <= MAX_EXPOSURE, out.stdout
    # --threshold makes systemd-analyze itself fail above it: the same check, by the tool
    strict = subprocess.run([systemd_analyze(), "security", "--offline=true", "--no-pager",
                             f"--threshold={int(MAX_EXPOSURE * 10)}", str(unit)], capture_output=True, text=True)
    assert strict.returncode == 0, strict.stdout + strict.stderr


def test_systemd_analyze_verify_accepts_the_unit(tmp_path):
    unit = unit_for_here(tmp_path)
    out = subprocess.run([systemd_analyze(), "verify", "--man=no", str(unit)], capture_output=True, text=True,
                         timeout=60)
    # offline verify may remark on the machine (no rigcald user here); it must find nothing in the unit
    problems = [l for l in (out.stdout + out.stderr).splitlines() if "rigcald.service" in l]
    assert out.returncode == 0 and not problems, out.stdout + out.stderr


def test_cmake_install_into_a_destdir_puts_everything_in_place(tmp_path):
    dest = tmp_path / "root"
    out = subprocess.run(["cmake", "--install", str(BUILD_DIR)], env=dict(os.environ, DESTDIR=str(dest)),
                         capture_output=True, text=True, timeout=120)
    assert out.returncode == 0, out.stdout + out.stderr
    cache = (BUILD_DIR / "CMakeCache.txt").read_text()
    prefix = re.search(r"^CMAKE_INSTALL_PREFIX:PATH=(.*)$", cache, re.M).group(1)
    root = dest / prefix.lstrip("/")
    rigcald = root / "sbin" / "rigcald"
    assert os.access(rigcald, os.X_OK) and os.access(root / "bin" / "rigcal", os.X_OK)
    unit = root / "lib" / "systemd" / "system" / "rigcald.service"
    sysusers = root / "lib" / "sysusers.d" / "rigcald.conf"
    assert unit.exists() and sysusers.exists()
    assert f"ExecStart={prefix}/sbin/rigcald " in unit.read_text()
    assert not re.search(r"@[A-Z_]+@", unit.read_text()), "an unconfigured placeholder is left in the unit"
    assert re.search(r"^u rigcald ", sysusers.read_text(), re.M) and "m rigcald dialout" in sysusers.read_text()
    etc = dest / ("etc" if prefix == "/usr" else (prefix.lstrip("/") + "/etc"))
    config = etc / "rigcald" / "rigcald.yaml"
    assert config.exists() and (root / "share" / "doc" / "rigcal" / "examples" / "rigcald.yaml").exists()
    assert (root / "share" / "doc" / "rigcal" / "THREAT_MODEL.md").exists()
    assert subprocess.run([str(rigcald), "--version"], capture_output=True).returncode == 0
    check = subprocess.run([str(rigcald), "--check-config", str(config)], capture_output=True, text=True)
    assert check.returncode == 0, check.stderr
