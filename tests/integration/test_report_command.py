"""rigcal report: the calibration report from a CSV file or from rigcald's journal.

The numbers on the page are checked against `rigcal fit --json` on the same file and against
independent formulas (numpy, scipy); the plotted numbers are checked against the tables; bad input is
checked for its exit status and its file:line message.
"""
import datetime
import json
import math
import subprocess

import numpy as np
import pytest
from scipy import stats

from conftest import BUILD_DIR, read_dat, run_rigcal
from report_page import by_class, field, notes, numbers, svgs, table

JOURNAL_WRITER = BUILD_DIR / "tests" / "rigcal_journal_writer"

# An invented as-found check of a process thermometer against a reference PRT: 17 points from 20 to
# 180 degC, a small offset and gain error, and a fixed scatter pattern.
SCATTER = [0.021, -0.034, 0.012, 0.040, -0.018, -0.027, 0.033, -0.006, 0.015, -0.041, 0.028, 0.003, -0.022,
           0.037, -0.011, -0.030, 0.019]
REF = [20.0 + 10 * i for i in range(17)]
IND = [round(0.12 + 1.0015 * x + e, 4) for x, e in zip(REF, SCATTER)]
START = datetime.datetime(2026, 3, 2, 6, 0, tzinfo=datetime.timezone.utc)


def stamp(i):
    return (START + datetime.timedelta(minutes=5 * i)).strftime("%Y-%m-%dT%H:%M:%SZ")


def write_rig_csv(tmp_path, with_time=True):
    path = tmp_path / "asfound.csv"
    lines = ["time,ref_degC,tt_degC" if with_time else "ref_degC,tt_degC"]
    for i, (x, y) in enumerate(zip(REF, IND)):
        lines.append(f"{stamp(i)},{x},{y}" if with_time else f"{x},{y}")
    path.write_text("\n".join(lines) + "\n")
    return path


def write_norris_csv(tmp_path):
    path = tmp_path / "norris.csv"
    path.write_text("reference,sensor\n" + "".join(f"{x},{y}\n" for y, x in read_dat("nist_strd_norris.dat")))
    return path


RIG_COLUMNS = ["--reference-column", "ref_degC", "--sensor-column", "tt_degC"]


def report(tmp_path, *args, name="report.html"):
    out = tmp_path / name
    proc = run_rigcal("report", *args, "--output", out)
    assert proc.returncode == 0, proc.stderr
    return out.read_text()


def ols(x, y):
    """Independent straight-line fit: b0, b1, s, mean x, Sxx, n."""
    x, y = np.asarray(x, float), np.asarray(y, float)
    n = len(x)
    xm = x.mean()
    sxx = ((x - xm) ** 2).sum()
    b1 = ((x - xm) * (y - y.mean())).sum() / sxx
    b0 = y.mean() - b1 * xm
    s = math.sqrt(((y - b0 - b1 * x) ** 2).sum() / (n - 2))
    return b0, b1, s, xm, sxx, n


def close(a, b, rel=1e-9, abs_=1e-12):
    return abs(a - b) <= max(rel * max(abs(a), abs(b)), abs_)


def test_coefficients_on_the_page_and_on_the_plot_equal_rigcal_fit(tmp_path):
    csv = write_norris_csv(tmp_path)
    fit = json.loads(run_rigcal("fit", csv, "--json").stdout)
    html = report(tmp_path, "--csv", csv, "--channel", "OZ-3", "--units", "ppb")
    coef = table(html, "coefficients")
    for key in ["b0", "b1", "se_b0", "se_b1"]:
        assert coef[key] == [fit[key]], key
    assert coef["ci_b0_lo"] == [fit["ci_b0"][0]] and coef["ci_b1_hi"] == [fit["ci_b1"][1]]
    st = table(html, "statistics")
    for key in ["cov_b0_b1", "corr_b0_b1", "s", "r2", "dof", "t", "n", "sxx", "mean_x"]:
        assert st[key] == [fit[key]], key
    # The printed digits agree with the exact value too.
    assert "1.00211681802" in html and "-0.262323073774" in html
    line = by_class(svgs(html)["plot-calibration"], "fitted-line")[0]
    assert float(line.get("data-b0")) == fit["b0"] and float(line.get("data-b1")) == fit["b1"]
    ys = numbers(line.get("data-y"))
    for x, y in zip(numbers(line.get("data-x")), ys):
        assert close(y, fit["b0"] + fit["b1"] * x, rel=1e-12)
    assert field(html, "pairs") == "36"
    assert "A high R\u00b2 does not make a calibration fit for purpose" in html


def test_plotted_points_are_the_data_at_the_stated_pixels(tmp_path):
    html = report(tmp_path, "--csv", write_rig_csv(tmp_path), *RIG_COLUMNS)
    svg = svgs(html)["plot-calibration"]
    (group,) = by_class(svg, "data-points")
    circles = [c for c in group if c.tag.endswith("circle")]
    assert [float(c.get("data-x")) for c in circles] == REF
    assert [float(c.get("data-y")) for c in circles] == IND
    x0, x1 = numbers(svg.get("data-x-domain"))
    p0, p1 = numbers(svg.get("data-x-pixels"))
    y0, y1 = numbers(svg.get("data-y-domain"))
    q0, q1 = numbers(svg.get("data-y-pixels"))
    assert q0 > q1  # upwards on the page
    for c in circles:
        x, y = float(c.get("data-x")), float(c.get("data-y"))
        assert abs(float(c.get("cx")) - (p0 + (x - x0) / (x1 - x0) * (p1 - p0))) < 0.006
        assert abs(float(c.get("cy")) - (q0 + (y - y0) / (y1 - y0) * (q1 - q0))) < 0.006
    assert x0 <= min(REF) and x1 >= max(REF)


@pytest.mark.parametrize("confidence", [0.95, 0.90])
def test_band_edges_equal_the_textbook_formulas(tmp_path, confidence):
    html = report(tmp_path, "--csv", write_rig_csv(tmp_path), *RIG_COLUMNS, "--confidence", str(confidence))
    b0, b1, s, xm, sxx, n = ols(REF, IND)
    t = stats.t.ppf(0.5 + confidence / 2, n - 2)
    pages = svgs(html)
    for plot, relative in [("plot-calibration", False), ("plot-residual-reference", True)]:
        (cb,) = by_class(pages[plot], "confidence-band")
        (pb,) = by_class(pages[plot], "prediction-band")
        assert close(float(cb.get("data-t")), t, rel=1e-12)
        xs = numbers(cb.get("data-x"))
        assert len(xs) > 10 and xs == numbers(pb.get("data-x"))
        for i in [0, len(xs) // 3, len(xs) // 2, len(xs) - 1]:
            x = xs[i]
            fit = 0.0 if relative else b0 + b1 * x
            half_c = t * s * math.sqrt(1 / n + (x - xm) ** 2 / sxx)
            half_p = t * s * math.sqrt(1 + 1 / n + (x - xm) ** 2 / sxx)
            assert close(numbers(cb.get("data-lo"))[i], fit - half_c, abs_=1e-11)
            assert close(numbers(cb.get("data-hi"))[i], fit + half_c, abs_=1e-11)
            assert close(numbers(pb.get("data-lo"))[i], fit - half_p, abs_=1e-11)
            assert close(numbers(pb.get("data-hi"))[i], fit + half_p, abs_=1e-11)
    residuals = [c for c in by_class(pages["plot-residual-reference"], "residuals")[0] if c.tag.endswith("circle")]
    for c, x, y in zip(residuals, REF, IND):
        assert close(float(c.get("data-y")), y - (b0 + b1 * x), abs_=1e-12)


def test_averaging_plot_floor_equals_the_calibration_terms(tmp_path):
    U, k_ref, resolution, reading = 0.04, 2.0, 0.01, 160.0
    html = report(tmp_path, "--csv", write_rig_csv(tmp_path), *RIG_COLUMNS, "--reference-expanded-uncertainty", U,
                  "--reference-coverage-factor", k_ref, "--resolution", resolution, "--reading", reading,
                  "--averaged-readings", 4)
    b0, b1, s, xm, sxx, n = ols(REF, IND)
    x_hat = (reading - b0) / b1
    u_cal = s / abs(b1) * math.sqrt(1 / n + (x_hat - xm) ** 2 / sxx)
    u_ref = U / k_ref
    u_res = resolution / math.sqrt(12) / abs(b1)
    floor = math.sqrt(u_cal ** 2 + u_ref ** 2 + u_res ** 2)
    svg = svgs(html)["plot-averaging"]
    assert svg.get("data-x-scale") == "log10"
    (floor_line,) = by_class(svg, "uncertainty-floor")
    assert close(float(floor_line.get("data-floor")), floor)
    (total,) = by_class(svg, "total-uncertainty")
    (rep,) = by_class(svg, "repeatability-term")
    ms = numbers(total.get("data-x"))
    assert ms[0] == 1 and close(ms[-1], 1e4)
    for m, u_c, u_r in zip(ms, numbers(total.get("data-y")), numbers(rep.get("data-y"))):
        assert close(u_r, s / (abs(b1) * math.sqrt(m)))
        assert close(u_c, math.sqrt(floor ** 2 + s ** 2 / (b1 ** 2 * m)))
    # The budget at m = 4: GUM components, Welch-Satterthwaite with the fit's two terms pooled.
    budget = table(html, "budget")
    u_rep = s / (abs(b1) * 2)
    assert [round(v, 12) for v in budget["contribution"]] == [round(v, 12) for v in [u_rep, u_cal, u_ref, u_res]]
    u_c = math.sqrt(u_rep ** 2 + floor ** 2)
    nu_eff = u_c ** 4 / ((u_rep ** 2 + u_cal ** 2) ** 2 / (n - 2))
    expanded = table(html, "expanded")
    assert close(budget["u_c"][0], u_c) and close(expanded["nu_eff"][0], nu_eff)
    k = stats.t.ppf(0.975, math.floor(nu_eff))
    assert close(expanded["k"][0], k, rel=1e-9) and close(expanded["expanded"][0], k * u_c, rel=1e-9)


def test_tolerance_and_certificate_verdicts(tmp_path):
    csv = write_rig_csv(tmp_path)
    certificate = ["--csv", csv, *RIG_COLUMNS, "--certified-intercept", "0", "--certified-slope", "1"]
    guarded = report(tmp_path, *certificate, "--tolerance-absolute", "0.2", "--range", "0", "200",
                     "--reference-expanded-uncertainty", "0.02", "--certificate-id", "CAL-17", name="guarded.html")
    b0, b1, s, xm, sxx, n = ols(REF, IND)
    points = table(guarded, "tolerance-points")
    assert points["x"][:2] == [0.0, 200.0]
    for x, e in zip(points["x"], points["error"]):
        assert close(e, b0 + b1 * x - x, abs_=1e-12)  # certificate y = x: e(x) = fit(x) - x
    # e(200) = 0.12 + 0.3 = 0.42 > 0.2 + U: a clear fail under either rule.
    assert 'data-verdict="tolerance">Tolerance: FAIL (guarded acceptance)' in guarded
    assert "Guarded acceptance (ILAC-G8:09/2019 4.2.3" in guarded
    simple = report(tmp_path, *certificate, "--tolerance-absolute", "0.5", "--range", "0", "200",
                    "--decision-rule", "simple", name="simple.html")
    assert 'Tolerance: PASS (simple acceptance)' in simple and "Simple acceptance (ILAC-G8" in simple
    fit = json.loads(run_rigcal("fit", csv, *RIG_COLUMNS, "--certified-intercept", "0", "--certified-slope", "1",
                                "--json").stdout)
    cert = table(guarded, "certificate")
    assert cert["joint_statistic"] == [fit["verdict"]["joint"]["statistic"]]
    assert cert["joint_critical"] == [fit["verdict"]["joint"]["critical"]]
    assert close(cert["joint_critical"][0], stats.f.ppf(0.95, 2, n - 2), rel=1e-9)
    region = svgs(guarded)["plot-joint-region"]
    (poly,) = by_class(region, "joint-region")
    assert float(poly.get("data-statistic")) == fit["verdict"]["joint"]["statistic"]
    assert poly.get("data-consistent") == ("true" if fit["verdict"]["joint"]["consistent"] else "false")
    # Every vertex of the drawn region lies on its boundary: quadratic form / 2 = F critical.
    cov = np.array([[fit["se_b0"] ** 2, fit["cov_b0_b1"]], [fit["cov_b0_b1"], fit["se_b1"] ** 2]])
    inv = np.linalg.inv(cov)
    for bx, by in list(zip(numbers(poly.get("data-x")), numbers(poly.get("data-y"))))[::17]:
        d = np.array([bx - fit["b0"], by - fit["b1"]])
        assert close(d @ inv @ d / 2, fit["verdict"]["joint"]["critical"], rel=1e-6)
    assert "No certificate id was given" not in guarded
    assert field(guarded, "certificate-id") == "CAL-17"


def test_residuals_against_time_and_the_period(tmp_path):
    html = report(tmp_path, "--csv", write_rig_csv(tmp_path), *RIG_COLUMNS, "--time-column", "time")
    svg = svgs(html)["plot-residual-time"]
    assert svg.get("data-x-scale") == "time"
    (group,) = by_class(svg, "residuals-time")
    assert group.get("data-axis") == "time"
    xs = [float(c.get("data-x")) for c in group if c.tag.endswith("circle")]
    assert xs == [(START + datetime.timedelta(minutes=5 * i)).timestamp() for i in range(17)]
    assert field(html, "period").startswith("2026-03-02T06:00:00Z to 2026-03-02T07:20:00Z")
    labels = [t.text for t in svg.iter() if t.get("class") == "tick-label x-tick"]
    assert all(":" in label for label in labels)
    untimed = report(tmp_path, "--csv", write_rig_csv(tmp_path, with_time=False), name="untimed.html")
    svg = svgs(untimed)["plot-residual-time"]
    assert by_class(svg, "residuals-time")[0].get("data-axis") == "order"
    assert "pair order (the data carries no time stamps)" in untimed


def test_what_was_not_given_is_said(tmp_path):
    html = report(tmp_path, "--csv", write_rig_csv(tmp_path, with_time=False))
    said = " ".join(notes(html))
    for sentence in ["No certificate line was given", "No tolerance was given", "resolution was not given",
                     "uncertainty was not given", "No reference standard id", "No errors-in-variables fit"]:
        assert sentence in said, sentence
    assert "plot-joint-region" not in svgs(html) and "plot-tolerance" not in svgs(html)
    assert "Tolerance: not judged" in html and "Certificate: not tested" in html
    no_range = report(tmp_path, "--csv", write_rig_csv(tmp_path), *RIG_COLUMNS, "--certified-slope", "1",
                      "--certified-intercept", "0", "--tolerance-absolute", "0.5", name="norange.html")
    assert "No range was given (--range LO HI)" in " ".join(notes(no_range))


def test_text_summary_carries_the_same_results(tmp_path):
    csv = write_rig_csv(tmp_path)
    out = run_rigcal("report", "--csv", csv, *RIG_COLUMNS, "--channel", "TT-17", "--certified-slope", "1",
                     "--certified-intercept", "0", "--tolerance-absolute", "0.5", "--range", "0", "200",
                     "--output", tmp_path / "r.html", "--text", "-")
    assert out.returncode == 0, out.stderr
    text = out.stdout
    fit = json.loads(run_rigcal("fit", csv, *RIG_COLUMNS, "--json").stdout)
    assert f"{fit['b1']:.12g}" in text and f"{fit['b0']:.12g}" in text
    assert "CALIBRATION REPORT: TT-17" in text and "VERDICT: " in text
    assert "do not replace a calibration by an accredited laboratory" in text.replace("\n  ", " ")
    (tmp_path / "summary.txt").unlink(missing_ok=True)
    quiet = run_rigcal("report", "--csv", csv, *RIG_COLUMNS, "--output", tmp_path / "r2.html", "--text", tmp_path / "summary.txt")
    assert quiet.returncode == 0 and "wrote" in quiet.stdout
    assert (tmp_path / "summary.txt").read_text().startswith("CALIBRATION REPORT")


def test_errors_in_variables_adds_the_york_line(tmp_path):
    u_x, u_y = 0.02, 0.03
    html = report(tmp_path, "--csv", write_rig_csv(tmp_path), *RIG_COLUMNS, "--errors-in-variables",
                  "--u-reference", u_x, "--u-sensor", u_y)
    # With the same u for every pair York's line is Deming's regression, lambda = u_y^2 / u_x^2.
    x, y = np.array(REF), np.array(IND)
    lam = u_y ** 2 / u_x ** 2
    sxx, syy = ((x - x.mean()) ** 2).sum(), ((y - y.mean()) ** 2).sum()
    sxy = ((x - x.mean()) * (y - y.mean())).sum()
    b = (syy - lam * sxx + math.sqrt((syy - lam * sxx) ** 2 + 4 * lam * sxy ** 2)) / (2 * sxy)
    a = y.mean() - b * x.mean()
    (line,) = by_class(svgs(html)["plot-calibration"], "york-line")
    assert close(float(line.get("data-b")), b, rel=1e-10)
    assert close(float(line.get("data-a")), a, rel=1e-8, abs_=1e-10)
    assert table(html, "york")["york_b"] == [float(line.get("data-b"))]
    assert "The verdicts and the budget of this report use the ordinary least-squares fit" in html


@pytest.mark.parametrize("content, args, message", [
    ("ref,ind\n1,2\n2,abc\n3,4\n", [], "bad.csv:3: field 2 (ind): \"abc\" is not a finite number"),
    ("ref,ind\n1,2\n2\n3,4\n", [], "bad.csv:3: row has 1 field(s), but the sensor reading is field 2"),
    ("time,ref,ind\n2026-03-02T06:00:00Z,1,2\nyesterday,2,3\n2026-03-02T06:10:00Z,3,4\n",
     ["--reference-column", "ref", "--sensor-column", "ind", "--time-column", "time"],
     "bad.csv:3: time column 'time': \"yesterday\" is not a UTC time"),
    ("time,ref,ind\n2026-03-02T06:00:00+01:00,1,2\n2026-03-02T06:05:00Z,2,3\n2026-03-02T06:10:00Z,3,4\n",
     ["--reference-column", "ref", "--sensor-column", "ind", "--time-column", "time"],
     "bad.csv:2: time column 'time'"),
    ("ref,ind\n1,2\n2,3\n", [], "too few pairs"),
    ("ref,ind\n5,1\n5,2\n5,3\n", [], "no spread in the reference values"),
])
def test_bad_input_names_file_and_line(tmp_path, content, args, message):
    path = tmp_path / "bad.csv"
    path.write_text(content)
    out = run_rigcal("report", "--csv", path, *args, "--output", tmp_path / "r.html")
    assert out.returncode == 65, out.stderr
    assert message in out.stderr
    assert not (tmp_path / "r.html").exists()


@pytest.mark.parametrize("args, message", [
    ([], "give exactly one data source"),
    (["--csv", "a.csv", "--journal", "state"], "give exactly one data source"),
    (["--journal", "state"], "--journal needs --config"),
    (["--journal", "s", "--config", "c.yaml", "--channel", "TT", "--tolerance-absolute", "1"],
     "--tolerance-absolute is for --csv reports"),
    (["--csv", "a.csv", "--since", "2026-01-01T00:00:00Z"], "--since is for --journal reports"),
    (["--csv", "a.csv", "--decision-rule", "lenient"], "--decision-rule must be simple or guarded"),
    (["--csv", "a.csv", "--range", "0"], "--range takes two numbers"),
    (["--csv", "a.csv", "--certified-slope", "1"], "needs both --certified-slope and --certified-intercept"),
    (["--csv", "a.csv", "--errors-in-variables", "--u-reference", "0.1"], "uncertainty of both variables"),
    (["--csv", "a.csv", "--u-sensor", "0.1"], "used only with --errors-in-variables"),
    (["--csv", "a.csv", "--decision-rule", "simple"], "--decision-rule needs a tolerance"),
    (["--csv", "a.csv", "--through-origin", "--errors-in-variables", "--u-reference", "1", "--u-sensor", "1"],
     "fits the line model only"),
])
def test_bad_command_lines_exit_64(tmp_path, args, message):
    out = run_rigcal("report", *args, "--output", tmp_path / "r.html")
    assert out.returncode == 64, (out.returncode, out.stderr)
    assert message in out.stderr


def test_missing_input_and_unwritable_output(tmp_path):
    out = run_rigcal("report", "--csv", tmp_path / "none.csv", "--output", tmp_path / "r.html")
    assert out.returncode == 66 and "none.csv: No such file or directory" in out.stderr
    out = run_rigcal("report", "--csv", write_rig_csv(tmp_path), *RIG_COLUMNS, "--output",
                     tmp_path / "no" / "dir" / "r.html")
    assert out.returncode == 74 and "r.html: No such file or directory" in out.stderr
    assert run_rigcal("report", "--help").returncode == 0
    assert run_rigcal("report", "-h").returncode == 0
    assert run_rigcal("report", "--csv", "a.csv", "--range", "-50", "150", "--bogus", "--output", "x").returncode == 64


# --- reports from the journal -------------------------------------------------------------------

CONFIG = """\
state_directory: {state}
journal: {{retain: archive}}
channels:
  - id: TT-7
    description: "test rig RTD <jacket> & return"
    units: degC
    reference: {{id: PRT-9, expanded_uncertainty: 0.02, coverage_factor: 2}}
    certificate: {{id: CERT-7, intercept: 0.0, slope: 1.0, u_intercept: 0.01, u_slope: 0.0001}}
    sensor:
      resolution: 0.01
      linearisation: {{kind: rtd, r0_ohm: 100}}
    range: [0, 200]
    tolerance: {{absolute: 0.3}}
    decision_rule: guarded
  - id: PT-2
    units: bar
    detector: {{min_offset_change: 0.01}}
"""

A, B = 3.9083e-3, -5.775e-7  # IEC 60751 Callendar-Van Dusen, t >= 0


def pt100(t):
    return 100.0 * (1 + A * t + B * t * t)


def journal_case(tmp_path, script):
    state = tmp_path / "state"
    out = subprocess.run([str(JOURNAL_WRITER), str(state)], input=script, capture_output=True, text=True, timeout=30)
    assert out.returncode == 0, out.stderr
    config = tmp_path / "rigcald.yaml"
    config.write_text(CONFIG.format(state=state))
    return state, config


def rig_script(reset_at=None):
    """Two archived segments and a live one; the sensor reports ohms, the reference degC."""
    lines = ["segment 1 archive"]
    for i, (x, y) in enumerate(zip(REF, IND)):
        if i == 6:
            lines.append("segment 2 archive")
        if i == 12:
            lines.append("segment 3")
        if reset_at is not None and i == reset_at:
            lines.append(f"reset TT-7 {stamp(i)}")
        lines.append(f"pair TT-7 {stamp(i)} {x!r} {pt100(y)!r}")
        lines.append(f"pair PT-2 {stamp(i)} 1.0 1.001")
        lines.append(f"reading TT-7 {stamp(i)} {pt100(y)!r}")
        lines.append("frame")
    return "\n".join(lines) + "\n"


def test_journal_report_linearises_and_fits_every_pair_of_the_period(tmp_path):
    state, config = journal_case(tmp_path, rig_script())
    html = report(tmp_path, "--journal", state, "--config", config, "--channel", "TT-7")
    b0, b1, s, xm, sxx, n = ols(REF, IND)
    coef = table(html, "coefficients")
    assert n == 17 and field(html, "pairs") == "17"
    assert close(coef["b1"][0], b1, rel=1e-9) and close(coef["b0"][0], b0, rel=1e-7, abs_=1e-9)
    assert field(html, "reference-id") == "PRT-9" and field(html, "certificate-id") == "CERT-7"
    assert field(html, "units") == "degC"
    assert field(html, "description") == "test rig RTD &lt;jacket&gt; &amp; return"
    assert "3 segment(s), 2 archived" in field(html, "source")
    assert field(html, "period").startswith("2026-03-02T06:00:00Z to 2026-03-02T07:20:00Z")
    assert "data-verdict=\"tolerance\">Tolerance: " in html  # judged from the configuration's tolerance
    budget = table(html, "budget")
    assert close(budget["contribution"][2], 0.01)  # U/k of the reference standard
    said = " ".join(notes(html))
    assert "rigcald fits a window of the last 1000 pairs" in said
    assert "converted as rigcald converts them" in said
    svg = svgs(html)["plot-residual-time"]
    xs = [float(c.get("data-x")) for c in by_class(svg, "residuals-time")[0] if c.tag.endswith("circle")]
    assert xs[0] == START.timestamp() and len(xs) == 17


def test_journal_period_selection_and_resets(tmp_path):
    state, config = journal_case(tmp_path, rig_script(reset_at=10))
    base = ["--journal", state, "--config", config, "--channel", "TT-7"]
    mixed = run_rigcal("report", *base, "--output", tmp_path / "r.html")
    assert mixed.returncode == 65
    assert "operator reset (as-left) of TT-7 at 2026-03-02T06:50:00.000Z" in mixed.stderr
    assert "--until 2026-03-02T06:50:00.000Z" in mixed.stderr
    as_found = report(tmp_path, *base, "--until", "2026-03-02T06:50:00Z", name="asfound.html")
    assert field(as_found, "pairs") == "10"
    b0, b1, *_ = ols(REF[:10], IND[:10])
    assert close(table(as_found, "coefficients")["b1"][0], b1, rel=1e-9)
    assert "selected: from the start of the journal until 2026-03-02T06:50:00.000Z" in field(as_found, "period")
    as_left = report(tmp_path, *base, "--since", "2026-03-02T06:50:00Z", name="asleft.html")
    assert field(as_left, "pairs") == "7"
    said = " ".join(notes(as_left))
    assert "An operator reset (as-left) at 2026-03-02T06:50:00.000Z" in said
    assert "10 further pair(s) of TT-7 in the journal lie outside the selected period" in said


def test_journal_damage_is_reported_and_config_errors_stop_the_report(tmp_path):
    script = rig_script() + "garbage 40\ntorn\n"
    state, config = journal_case(tmp_path, script)
    html = report(tmp_path, "--journal", state, "--config", config, "--channel", "TT-7")
    said = " ".join(notes(html))
    assert "Journal damage: journal-0000000000000003.rgj: at byte" in said and "torn" in said
    assert field(html, "pairs") == "17"
    out = run_rigcal("report", "--journal", state, "--config", config, "--channel", "TT-9", "--output",
                     tmp_path / "r.html")
    assert out.returncode == 64 and "no channel 'TT-9'" in out.stderr and "TT-7, PT-2" in out.stderr
    bad = tmp_path / "bad.yaml"
    bad.write_text(CONFIG.format(state=state).replace("resolution: 0.01", "resolutoin: 0.01"))
    out = run_rigcal("report", "--journal", state, "--config", bad, "--channel", "TT-7", "--output",
                     tmp_path / "r.html")
    assert out.returncode == 65 and f"{bad}:10:7:" in out.stderr and "did you mean 'resolution'" in out.stderr
    out = run_rigcal("report", "--journal", tmp_path / "nowhere", "--config", config, "--channel", "TT-7",
                     "--output", tmp_path / "r.html")
    assert out.returncode == 66 and "nowhere" in out.stderr
    out = run_rigcal("report", "--journal", state, "--config", config, "--channel", "TT-7", "--since",
                     "2027-01-01T00:00:00Z", "--output", tmp_path / "r.html")
    assert out.returncode == 65 and "no usable pairs of channel TT-7" in out.stderr
