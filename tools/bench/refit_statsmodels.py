#!/usr/bin/python3
"""The conventional alternative in Python: after each new pair, refit ordinary least squares on the
current window with statsmodels (numpy underneath), reading the coefficients, their standard errors
and the residual standard deviation. Same value distributions as the generator (its own fixed seed).
The window is full before timing; --updates refits are timed and the rate is per pair (best of
--repeat). Prints key=value lines.

    refit_statsmodels.py --window W --updates N [--repeat R]
"""
import argparse
import time

import numpy as np
import statsmodels.api as sm


def main():
    ap = argparse.ArgumentParser()
    ap.add_argument("--window", type=int, default=100)
    ap.add_argument("--updates", type=int, default=2000)
    ap.add_argument("--repeat", type=int, default=3)
    ap.add_argument("--seed", type=int, default=1)
    a = ap.parse_args()
    rng = np.random.default_rng(a.seed)
    total = a.window + a.updates
    x = rng.uniform(20.0, 180.0, total)
    y = x + rng.normal(0.0, 0.03, total)
    design = sm.add_constant(x)
    best, sink = 0.0, 0.0
    for _ in range(a.repeat):
        t0 = time.perf_counter()
        for u in range(a.updates):
            lo = u + 1
            fit = sm.OLS(y[lo:lo + a.window], design[lo:lo + a.window]).fit()
            sink += fit.params[1] + fit.bse[1] + np.sqrt(fit.scale)
        best = max(best, a.updates / (time.perf_counter() - t0))
    print(f"window={a.window}\nupdates={a.updates}\nrefit_per_s={best:.6g}\nnumpy={np.__version__}\n"
          f"statsmodels={sm.__version__ if hasattr(sm, '__version__') else 'unknown'}\nchecksum={sink:.6g}")


if __name__ == "__main__":
    main()
