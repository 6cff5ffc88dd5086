#!/usr/bin/env python3
"""Probability-scale effects of a logistic model with an interaction, computed
from statsmodels predictions by numerical differentiation, as an independent
check of Moderato's analytic marginal effects and its Ai & Norton (2003)
interaction effects.

    /usr/bin/python3 tests/reference/make_logit_effects_reference.py [--out DIR]

Data: fixtures/logit_interaction.csv (seeded, made by
make_statsmodels_reference.py). Model: y on x, g, x*g, statsmodels Logit
(Newton, tol 1e-12). For each quantity the script differentiates averaged
statsmodels predictions (`results.predict`) with central differences, and gets
the delta-method standard error from a numerical Jacobian of that quantity
with respect to the parameters and statsmodels' covariance (model-based).
"""
import argparse
import json
import os

import numpy as np
import pandas as pd
import statsmodels
import statsmodels.api as sm

HERE = os.path.dirname(os.path.abspath(__file__))


def main():
    ap = argparse.ArgumentParser()
    ap.add_argument("--out", default=os.path.join(HERE, "fixtures"))
    args = ap.parse_args()
    data = pd.read_csv(os.path.join(HERE, "fixtures", "logit_interaction.csv"))
    y, x, g = data["y"].to_numpy(float), data["x"].to_numpy(float), data["g"].to_numpy(float)

    def design(xv, gv):
        return np.column_stack([np.ones_like(xv), xv, gv, xv * gv])

    res = sm.Logit(y, design(x, g)).fit(method="newton", tol=1e-12, maxiter=100, disp=0)
    params, cov = res.params, res.cov_params()

    def predict(b, xv, gv):
        return 1.0 / (1.0 + np.exp(-design(xv, gv) @ b))

    hx = 1e-4 * np.std(x)

    def me_x_at_g(b, gval):  # average dP/dx with g set to gval, by central differences in x
        gv = np.full_like(x, gval)
        return np.mean((predict(b, x + hx, gv) - predict(b, x - hx, gv)) / (2 * hx))

    def me_g_at_x(b, xval):  # average discrete change of g from 0 to 1 with x set to xval
        xv = np.full_like(x, xval)
        return np.mean(predict(b, xv, np.ones_like(x)) - predict(b, xv, np.zeros_like(x)))

    def slope_difference(b):  # d/dx [P(g=1) - P(g=0)], averaged, by central differences in x
        one, zero = np.ones_like(x), np.zeros_like(x)
        up = predict(b, x + hx, one) - predict(b, x + hx, zero)
        down = predict(b, x - hx, one) - predict(b, x - hx, zero)
        return np.mean((up - down) / (2 * hx))

    def delta(fun):
        est = fun(params)
        jac = np.empty(len(params))
        for j in range(len(params)):
            h = 1e-5 * max(1.0, abs(params[j]))
            up, down = params.copy(), params.copy()
            up[j] += h
            down[j] -= h
            jac[j] = (fun(up) - fun(down)) / (2 * h)
        return float(est), float(np.sqrt(jac @ cov @ jac))

    cases = []
    for gval in (0.0, 1.0):
        e, s = delta(lambda b: me_x_at_g(b, gval))
        cases.append({"quantity": "effect", "focal": "x", "moderator": "g", "at": gval, "averaging": "sample",
                      "estimate": e, "std_error": s})
    for xval in (-1.0, 0.0, 1.0):
        e, s = delta(lambda b: me_g_at_x(b, xval))
        cases.append({"quantity": "effect", "focal": "g", "moderator": "x", "at": xval, "averaging": "sample",
                      "estimate": e, "std_error": s})
    e, s = delta(slope_difference)
    cases.append({"quantity": "interaction", "focal": "x", "moderator": "g", "kind": "difference in slopes",
                  "averaging": "sample", "estimate": e, "std_error": s})
    out = {
        "source": "statsmodels %s Logit predictions (Debian python3-statsmodels), central differences of averaged "
                  "predictions; delta-method SE from a numerical Jacobian and cov_params()" % statsmodels.__version__,
        "command": "/usr/bin/python3 tests/reference/make_logit_effects_reference.py --out DIR",
        "data": "logit_interaction.csv",
        "tolerance_note": "finite differences with step 1e-4 SD(x) (predictions) and 1e-5 (parameters): "
                          "about 7 correct digits",
        "cases": cases,
    }
    os.makedirs(args.out, exist_ok=True)
    tmp = os.path.join(args.out, "logit_effects.json.tmp")
    with open(tmp, "w") as f:
        json.dump(out, f, indent=1)
    os.replace(tmp, os.path.join(args.out, "logit_effects.json"))


if __name__ == "__main__":
    main()
