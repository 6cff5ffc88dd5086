#!/usr/bin/env python3
"""Predicted outcomes with confidence intervals from statsmodels'
get_prediction, as an independent check of Moderato's prediction lines (the
Lines plot: predicted outcome along the focal predictor at fixed moderator
values, every other predictor at its mean).

    /usr/bin/python3 tests/reference/make_prediction_reference.py [--out DIR]

Cases:
  ols: fixtures/ols_continuous_3way.csv, y on x, z, c1, x*z, OLS with the
       classical covariance and with HC3 (use_t=True, so the intervals use t
       with n - p df, as Moderato does); rows at x in a grid, z at three
       values, c1 at its mean. Columns: mean, mean_se, mean_ci_lower/upper.
  logit: fixtures/logit_interaction.csv, y on x, g, x*g, statsmodels GLM
       Binomial (logit link, IRLS); rows at x in a grid, g at 0 and 1.
       get_prediction gives the probability with the interval of the linear
       predictor mapped through the inverse link, and the delta-method SE.
"""
import argparse
import json
import os

import numpy as np
import pandas as pd
import statsmodels
import statsmodels.api as sm

HERE = os.path.dirname(os.path.abspath(__file__))


def frame_rows(frame):
    return {k: [float(v) for v in frame[k].to_numpy()] for k in ("mean", "mean_se", "mean_ci_lower", "mean_ci_upper")}


def main():
    ap = argparse.ArgumentParser()
    ap.add_argument("--out", default=os.path.join(HERE, "fixtures"))
    args = ap.parse_args()
    cases = []

    ols = pd.read_csv(os.path.join(HERE, "fixtures", "ols_continuous_3way.csv"))
    y, x, z, c1 = (ols[c].to_numpy(float) for c in ("y", "x", "z", "c1"))
    X = np.column_stack([np.ones_like(x), x, z, c1, x * z])
    xs = [float(v) for v in np.linspace(x.min(), x.max(), 7)]
    zs = [float(np.mean(z) - np.std(z, ddof=1)), float(np.mean(z)), float(np.mean(z) + np.std(z, ddof=1))]
    c1_mean = float(np.mean(c1))
    for cov in ("classical", "hc3"):
        res = sm.OLS(y, X).fit() if cov == "classical" else sm.OLS(y, X).fit(cov_type="HC3", use_t=True)
        for zv in zs:
            rows = np.array([[1.0, xv, zv, c1_mean, xv * zv] for xv in xs])
            frame = res.get_prediction(rows).summary_frame(alpha=0.05)
            cases.append({"case": "ols", "data": "ols_continuous_3way.csv", "family": "linear", "se": cov,
                          "outcome": "y", "predictors": ["x", "z", "c1"], "interaction": ["x", "z"],
                          "focal": "x", "held": {"z": zv, "c1": c1_mean}, "x": xs, **frame_rows(frame)})

    lg = pd.read_csv(os.path.join(HERE, "fixtures", "logit_interaction.csv"))
    y, x, g = (lg[c].to_numpy(float) for c in ("y", "x", "g"))
    X = np.column_stack([np.ones_like(x), x, g, x * g])
    res = sm.GLM(y, X, family=sm.families.Binomial()).fit(tol=1e-12, maxiter=100)
    xs = [float(v) for v in np.linspace(x.min(), x.max(), 7)]
    for gv in (0.0, 1.0):
        rows = np.array([[1.0, xv, gv, xv * gv] for xv in xs])
        frame = res.get_prediction(rows).summary_frame(alpha=0.05)
        cases.append({"case": "logit", "data": "logit_interaction.csv", "family": "logistic", "se": "classical",
                      "outcome": "y", "predictors": ["x", "g"], "interaction": ["x", "g"], "focal": "x",
                      "held": {"g": gv}, "x": xs, **frame_rows(frame)})

    out = {
        "source": "statsmodels %s get_prediction(...).summary_frame(alpha=0.05) (Debian python3-statsmodels): "
                  "OLS (classical; HC3 with use_t=True) and GLM Binomial" % statsmodels.__version__,
        "command": "/usr/bin/python3 tests/reference/make_prediction_reference.py --out DIR",
        "cases": cases,
    }
    os.makedirs(args.out, exist_ok=True)
    tmp = os.path.join(args.out, "prediction_lines.json.tmp")
    with open(tmp, "w") as f:
        json.dump(out, f, indent=1)
    os.replace(tmp, os.path.join(args.out, "prediction_lines.json"))


if __name__ == "__main__":
    main()
