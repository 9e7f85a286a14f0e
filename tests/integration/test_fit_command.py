"""rigcal fit on real CSV files: certified values, column choice, models, and bad input."""
import json
import math

import pytest

from conftest import read_dat, read_named, run_rigcal


def lre(computed, certified):
    """NIST StRD log relative error: number of agreeing significant digits."""
    if computed == certified:
        return 16.0
    return -math.log10(abs(computed - certified) / abs(certified))


def write_strd_csv(tmp_path, dataset, header=True):
    # StRD files list y first, then x.
    path = tmp_path / f"{dataset}.csv"
    lines = ["reference,sensor"] if header else []
    lines += [f"{x},{y}" for y, x in read_dat(f"{dataset}.dat")]
    path.write_text("\n".join(lines) + "\n")
    return path


def test_json_on_norris_prints_every_certified_value_to_12_digits(tmp_path):
    # NIST StRD Norris (itl.nist.gov/div898/strd/lls), certified values in tests/data.
    cert = read_named("nist_strd_norris.certified")
    out = run_rigcal("fit", write_strd_csv(tmp_path, "nist_strd_norris"), "--json")
    assert out.returncode == 0, out.stderr
    fit = json.loads(out.stdout)
    assert fit["n"] == 36 and fit["dof"] == 34
    for key, name in [("b0", "B0"), ("se_b0", "sd_B0"), ("b1", "B1"), ("se_b1", "sd_B1"),
                      ("s", "residual_sd"), ("r2", "r_squared"), ("ssr", "ss_residual")]:
        assert lre(fit[key], cert[name]) >= 12, (key, fit[key], cert[name])
    for key in ["n", "dof", "b0", "b1", "se_b0", "se_b1", "cov_b0_b1", "s", "r2", "ci_b0", "ci_b1"]:
        assert key in fit
    assert fit["ci_b1"][0] < fit["b1"] < fit["ci_b1"][1]


def test_through_origin_reproduces_noint1(tmp_path):
    cert = read_named("nist_strd_noint1.certified")
    out = run_rigcal("fit", write_strd_csv(tmp_path, "nist_strd_noint1", header=False), "--through-origin", "--json")
    assert out.returncode == 0, out.stderr
    fit = json.loads(out.stdout)
    assert fit["model"] == "through_origin" and fit["dof"] == 10
    assert lre(fit["b1"], cert["B1"]) >= 12
    assert lre(fit["se_b1"], cert["sd_B1"]) >= 12
    assert fit["b0"] is None and fit["ci_b0"] is None


def test_columns_by_name_and_by_index_and_weights(tmp_path):
    path = tmp_path / "rig.csv"
    path.write_text("time,sensor_mV,ref_degC,w\n"
                    "t1,10.2,10,1\nt2,20.1,20,2\nt3,29.8,30,1\nt4,40.4,40,0.5\nt5,50.1,50,1\n")
    by_name = json.loads(run_rigcal("fit", path, "--reference-column", "ref_degC", "--sensor-column", "sensor_mV",
                                    "--json").stdout)
    by_index = json.loads(run_rigcal("fit", path, "--reference-column", "3", "--sensor-column", "2", "--json").stdout)
    assert by_name["b1"] == by_index["b1"]
    weighted = json.loads(run_rigcal("fit", path, "--reference-column", "3", "--sensor-column", "2",
                                     "--weight-column", "w", "--json").stdout)
    assert weighted["b1"] != by_name["b1"]


def test_certificate_verdicts_are_reported(tmp_path):
    out = run_rigcal("fit", write_strd_csv(tmp_path, "nist_strd_norris"), "--certified-slope", "1",
                     "--certified-intercept", "0", "--json")
    v = json.loads(out.stdout)["verdict"]
    # Norris's slope 1.00212 +- 0.00087 (95 %) excludes 1; the intercept interval includes 0.
    assert v["slope"]["consistent"] is False
    assert v["intercept"]["consistent"] is True
    assert v["joint"]["consistent"] is False
    text = run_rigcal("fit", write_strd_csv(tmp_path, "nist_strd_norris"), "--certified-slope", "1").stdout
    assert "NOT consistent" in text and "not a\n  tolerance pass/fail" in text


@pytest.mark.parametrize("content, message", [
    ("reference,sensor\n1,2\n2,abc\n3,4\n", "bad.csv:3: field 2 (sensor): \"abc\" is not a finite number"),
    ("reference,sensor\n1,2\n2,nan\n3,4\n", "bad.csv:3: field 2 (sensor): \"nan\" is not a finite number"),
    ("reference,sensor\n1,2\ninf,3\n3,4\n", "bad.csv:3: field 1 (reference): \"inf\" is not a finite number"),
    ("reference,sensor\n1,2\n2\n3,4\n", "bad.csv:3: row has 1 field(s), but the sensor reading is field 2"),
    ("reference,sensor\n1,2\n2,3\n", "too few pairs"),
    ("reference,sensor\n5,1\n5,2\n5,3\n", "no spread in the reference values"),
    ("", "no data rows"),
])
def test_bad_input_exits_nonzero_naming_file_line_and_field(tmp_path, content, message):
    path = tmp_path / "bad.csv"
    path.write_text(content)
    out = run_rigcal("fit", path)
    assert out.returncode == 65
    assert message in out.stderr
    assert out.stdout == ""


def test_missing_file_and_bad_options():
    out = run_rigcal("fit", "/nonexistent/asfound.csv")
    assert out.returncode == 66 and "/nonexistent/asfound.csv: No such file or directory" in out.stderr
    assert run_rigcal("fit").returncode == 64
    assert run_rigcal("fit", "x.csv", "--confidence", "1.5").returncode == 64
    assert run_rigcal("nonsense").returncode == 64


def test_reads_standard_input():
    out = run_rigcal("fit", "-", "--json", input_text="1,1.1\n2,2.0\n3,3.2\n4,3.9\n")
    assert out.returncode == 0, out.stderr
    assert json.loads(out.stdout)["n"] == 4


def test_errors_in_variables_reproduces_pearson_york(tmp_path):
    # Pearson (1901) data with York's weights; published York-fit values in tests/data/pearson_york.expected
    # (their provenance is stated there: full digits copied from a stored public test of York 2004).
    expected = read_named("pearson_york.expected")
    path = tmp_path / "pearson.csv"
    rows = ["reference,sensor,u_ref,u_sen"]
    for x, wx, y, wy in read_dat("pearson_york.dat"):
        rows.append(f"{x},{y},{float(wx) ** -0.5!r},{float(wy) ** -0.5!r}")
    path.write_text("\n".join(rows) + "\n")
    out = run_rigcal("fit", path, "--errors-in-variables", "--u-reference-column", "u_ref",
                     "--u-sensor-column", "u_sen", "--json")
    assert out.returncode == 0, out.stderr
    fit = json.loads(out.stdout)
    assert fit["method"] == "york" and fit["dof"] == 8
    assert abs(fit["b0"] - expected["a"]) < 5e-10
    assert abs(fit["b1"] - expected["b"]) < 5e-10
    assert abs(fit["se_b0"] - expected["sigma_a"]) < 5e-10
    assert abs(fit["se_b1"] - expected["sigma_b"]) < 5e-11
    assert abs(fit["york"]["chi_square"] - expected["S_weighted_ssr"]) < 5e-7
    assert abs(fit["york"]["se_b1_scaled"] - expected["sigma_b_scaled"]) < 5e-12
    assert fit["s"] is None and fit["r2"] is None
    text = run_rigcal("fit", path, "--errors-in-variables", "--u-reference-column", "u_ref",
                      "--u-sensor-column", "u_sen").stdout
    assert "York fit (uncertainty in both variables)" in text


def test_errors_in_variables_needs_both_uncertainties(tmp_path):
    path = tmp_path / "a.csv"
    path.write_text("1,1\n2,2.1\n3,2.9\n")
    assert run_rigcal("fit", path, "--errors-in-variables", "--u-reference", "0.1").returncode == 64
    assert run_rigcal("fit", path, "--u-sensor", "0.1").returncode == 64
    out = run_rigcal("fit", path, "--errors-in-variables", "--u-reference", "0.1", "--u-sensor", "0.1", "--json")
    assert out.returncode == 0 and json.loads(out.stdout)["method"] == "york"
