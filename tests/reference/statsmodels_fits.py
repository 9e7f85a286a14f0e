#!/usr/bin/python3
"""Reference fits from statsmodels (Debian's python3-statsmodels) for the C++ tests.

Generates random calibration data sets with a fixed seed, fits them with statsmodels OLS/WLS (with and
without intercept) and writes data + results as JSON. The C++ test fits the same data with the
streaming estimator and compares every quantity to 1e-10 relative. Nothing here is stored in the
repository: the file is regenerated at every test run.

usage: statsmodels_fits.py OUTPUT.json
"""
import json
import sys

import numpy as np
import statsmodels.api as sm


def case(rng, name, n, weighted, intercept, offset):
    x = offset + rng.uniform(0.0, 100.0, n)
    w = rng.uniform(0.2, 5.0, n) if weighted else np.ones(n)
    y = (0.7 if intercept else 0.0) + 1.013 * x + rng.normal(0.0, 0.4, n) / np.sqrt(w)
    design = sm.add_constant(x) if intercept else x.reshape(-1, 1)
    fit = (sm.WLS(y, design, weights=w) if weighted else sm.OLS(y, design)).fit()
    ci = fit.conf_int(alpha=0.05)
    out = {
        "name": name,
        "x": x.tolist(), "y": y.tolist(), "w": w.tolist() if weighted else [],
        "intercept": intercept,
        "slope": float(fit.params[-1]),
        "se_slope": float(fit.bse[-1]),
        "ci_slope": [float(ci[-1][0]), float(ci[-1][1])],
        "s": float(np.sqrt(fit.scale)),
        "r2": float(fit.rsquared),
        "ssr": float(fit.ssr),
        "dof": float(fit.df_resid),
    }
    x_new = offset + 37.5
    row = [1.0, x_new] if intercept else [x_new]
    frame = fit.get_prediction(np.array([row])).summary_frame(alpha=0.05)
    out["x_new"] = x_new
    out["mean_ci_at_x_new"] = [float(frame["mean_ci_lower"][0]), float(frame["mean_ci_upper"][0])]
    # obs_ci is for a new observation of weight 1
    out["obs_ci_at_x_new"] = [float(frame["obs_ci_lower"][0]), float(frame["obs_ci_upper"][0])]
    if intercept:
        out["intercept_value"] = float(fit.params[0])
        out["se_intercept"] = float(fit.bse[0])
        out["cov_intercept_slope"] = float(fit.cov_params()[0][1])
        out["ci_intercept"] = [float(ci[0][0]), float(ci[0][1])]
        if offset <= 1e3:  # beyond that statsmodels judges the 2x2 covariance rank-deficient
            certified = np.array([0.5, 1.01])
            ftest = fit.f_test((np.eye(2), certified))
            out["certified"] = certified.tolist()
            out["joint_f"] = float(np.squeeze(ftest.fvalue))
    return out


def main():
    rng = np.random.default_rng(20261201)
    cases = []
    sizes_and_offsets = [(5, 0.0), (12, 10.0), (40, 1e3), (200, 1e5), (1000, 1e6), (3, 250.0)]
    for n, offset in sizes_and_offsets:
        for weighted in (False, True):
            for intercept in (True, False):
                label = f"n={n} offset={offset:g} {'WLS' if weighted else 'OLS'} {'line' if intercept else 'origin'}"
                cases.append(case(rng, label, n, weighted, intercept, offset))
    with open(sys.argv[1], "w") as f:
        json.dump({"generator": f"statsmodels {sm.__version__}", "cases": cases}, f)


if __name__ == "__main__":
    main()
