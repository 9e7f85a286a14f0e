"""Shared fixtures for the integration tests: they run the real rigcal and rigcald binaries.

The binaries come from the build tree named by RIGCAL_BUILD_DIR (CTest sets it); test data from
tests/data.
"""
import json
import os
import pathlib
import subprocess

import pytest

BUILD_DIR = pathlib.Path(os.environ.get("RIGCAL_BUILD_DIR", "build")).resolve()
SOURCE_DIR = pathlib.Path(__file__).resolve().parents[2]
DATA_DIR = SOURCE_DIR / "tests" / "data"
RIGCAL = BUILD_DIR / "tools" / "rigcal"
RIGCALD = BUILD_DIR / "daemon" / "rigcald"


def run_rigcal(*args, input_text=None, timeout=60):
    """Runs `rigcal ARGS...` and returns the CompletedProcess (text mode)."""
    return subprocess.run([str(RIGCAL), *map(str, args)], input=input_text, capture_output=True, text=True,
                          timeout=timeout)


def read_dat(name):
    """Rows of numbers from a tests/data .dat file (comments dropped)."""
    rows = []
    for line in (DATA_DIR / name).read_text().splitlines():
        if line.strip() and not line.startswith("#"):
            rows.append(line.split())
    return rows


def read_named(name):
    out = {}
    for row in read_dat(name):
        out[row[0]] = float(row[1])
    return out


@pytest.fixture
def rigcal():
    return run_rigcal
