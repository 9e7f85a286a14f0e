"""The report page as a browser shows it: headless Chromium renders it offline, without console
errors, with every figure in the DOM, and the screenshot is a real page (not blank).

Chromium is a test dependency (tools/setup.sh installs Debian's package); without it these tests
fail, they are not skipped.
"""
import shutil
import struct
import subprocess
import tempfile

import pytest

from conftest import run_rigcal
from test_report_command import RIG_COLUMNS, write_rig_csv

FIGURES = ["plot-calibration", "plot-residual-reference", "plot-residual-time", "plot-joint-region",
           "plot-tolerance", "plot-averaging"]


def chromium():
    path = shutil.which("chromium") or shutil.which("chromium-browser")
    if not path:
        pytest.fail("chromium is not installed: run tools/setup.sh (it installs Debian's chromium package)")
    return path


def run_chromium(*args):
    with tempfile.TemporaryDirectory() as profile:
        return subprocess.run([chromium(), "--headless", "--no-sandbox", "--disable-gpu", "--disable-quic",
                               "--no-first-run", "--disable-background-networking", "--disable-component-update",
                               "--disable-sync", f"--user-data-dir={profile}", "--enable-logging=stderr", "--v=0",
                               *args], capture_output=True, text=True, timeout=120)


def page_errors(stderr):
    """Lines of Chromium's log that come from the page (console messages, script errors), not Chromium's
    own start-up noise (D-Bus, GPU, sandbox warnings)."""
    return [line for line in stderr.splitlines()
            if "CONSOLE" in line or "Uncaught" in line or ("ERROR" in line and "file://" in line)]


def png_size(path):
    data = path.read_bytes()
    assert data[:8] == b"\x89PNG\r\n\x1a\n", "not a PNG"
    return struct.unpack(">II", data[16:24])


@pytest.fixture
def full_report(tmp_path):
    out = tmp_path / "report.html"
    proc = run_rigcal("report", "--csv", write_rig_csv(tmp_path), *RIG_COLUMNS, "--time-column", "time",
                      "--channel", "TT-17", "--description", "jacket outlet <RTD> & transmitter", "--units", "degC",
                      "--reference-id", "PRT-REF-3", "--certificate-id", "CAL-17", "--certified-intercept", "0.1",
                      "--certified-slope", "1.0015", "--certified-intercept-u", "0.01", "--certified-slope-u",
                      "0.0001", "--tolerance-absolute", "0.1", "--tolerance-percent-of-reading", "0.1", "--range",
                      "0", "200", "--reference-expanded-uncertainty", "0.02", "--resolution", "0.01",
                      "--errors-in-variables", "--u-reference", "0.01", "--u-sensor", "0.03", "--output", out)
    assert proc.returncode == 0, proc.stderr
    return out


def test_the_page_is_self_contained(full_report):
    html = full_report.read_text()
    for forbidden in ["<script", " src=", " href=", "@import", "url(http", "<link", "<iframe", "<object"]:
        assert forbidden not in html, forbidden
    assert html.count("<svg ") == len(FIGURES)


def test_chromium_renders_every_figure_without_page_errors(full_report):
    out = run_chromium("--dump-dom", full_report.as_uri())
    assert out.returncode == 0, out.stderr
    dom = out.stdout
    for figure in FIGURES:
        assert f'id="{figure}"' in dom, figure
    assert "Calibration report: TT-17" in dom
    assert "jacket outlet &lt;RTD&gt; &amp; transmitter" in dom  # escaped text stays text in the DOM
    assert dom.count("<circle") > 3 * 17  # the data markers survived parsing
    assert page_errors(out.stderr) == [], page_errors(out.stderr)


def test_the_error_scan_sees_a_broken_page(tmp_path):
    # The scan above must be able to fail: a page with a script error is caught by it.
    bad = tmp_path / "bad.html"
    bad.write_text("<!DOCTYPE html><html><body><p>x</p><script>no_such_function();</script></body></html>")
    out = run_chromium("--dump-dom", bad.as_uri())
    assert any("Uncaught ReferenceError" in line for line in page_errors(out.stderr)), out.stderr


def test_the_screenshot_is_a_full_page_not_a_blank_one(full_report, tmp_path):
    shot, blank_shot = tmp_path / "report.png", tmp_path / "blank.png"
    out = run_chromium(f"--screenshot={shot}", "--window-size=1200,2400", "--hide-scrollbars", full_report.as_uri())
    assert out.returncode == 0 and shot.exists(), out.stderr
    assert png_size(shot) == (1200, 2400)
    blank = tmp_path / "blank.html"
    blank.write_text("<!DOCTYPE html><html><body></body></html>")
    run_chromium(f"--screenshot={blank_shot}", "--window-size=1200,2400", "--hide-scrollbars", blank.as_uri())
    assert png_size(blank_shot) == (1200, 2400)
    # A compressed screenshot grows with what is drawn: text, plots and tables against an empty page.
    assert shot.stat().st_size > 8 * blank_shot.stat().st_size, (shot.stat().st_size, blank_shot.stat().st_size)
