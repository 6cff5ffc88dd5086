#!/usr/bin/python3
"""Reference fixtures for Moderato's regression diagnostics (leverage,
standardised and studentised residuals, Cook's distance, Pearson and deviance
residuals, normal plotting positions), computed with statsmodels.

Usage:
    /usr/bin/python3 tests/reference/make_diagnostics_reference.py [--out DIR]

DIR defaults to tests/reference/fixtures next to this script.  Cases:

  diag_ols      OLS, y ~ x + z + x*z, n = 150, one planted outlier and one
                high-leverage row.  statsmodels OLSInfluence.
  diag_wls      WLS, y ~ x + g + x*g (g 0/1), weights in [0.5, 3], n = 120.
                statsmodels OLSInfluence of the OLS fit of the whitened data
                (sqrt(w) y on sqrt(w) X), which is the weighted fit; checked
                against GLM(Gaussian, var_weights=w) GLMInfluence.
  diag_logit    Logit, y ~ x + z + x*z, n = 400.  statsmodels
                GLM(Binomial) GLMInfluence: hat_matrix_diag,
                resid_studentized (standardised Pearson), cooks_distance;
                resid_pearson and resid_deviance of the GLM results.
  diag_aliased  OLS, y ~ x1 + x2 + x3 with x3 = x1 + x2 exactly (integers),
                n = 60: x3 is aliased.  statsmodels OLSInfluence of the fit
                without x3 (the same column space; Cook's distance divides by
                the rank, 3); the script checks that the hat matrix from the
                full design's pseudo-inverse is the same.

Each case writes CASE.csv (the data; doubles in shortest round-trip form, read
back and checked bit for bit) and CASE.json with "spec" (as in
make_statsmodels_reference.py) and "diagnostics":

  leverage, standardised, studentised (linear), cooks_distance,
  residuals (y - fitted), fitted, pearson, deviance (logit),
  qq.observed / qq.theoretical: statsmodels ProbPlot(values, a=3/8) (Blom
  plotting positions (i - 3/8)/(n + 1/4)) of the studentised residuals
  (linear) or standardised deviance residuals (logit), sorted_data and
  theoretical_quantiles.

Before writing, the script checks that the externally studentised residual
of a few rows equals a brute-force refit without that row, that Cook's
distance of those rows equals the change in fitted values
|X b - X b_(i)|^2 / (p s^2), and that every number is finite.
"""

import argparse
import json
import math
import os
import sys

import numpy as np
import pandas as pd
import scipy
import scipy.special
import scipy.stats
import statsmodels
import statsmodels.api as sm
from statsmodels.graphics.gofplots import ProbPlot
from statsmodels.stats.outliers_influence import OLSInfluence

from reference_io import atomic_write, write_csv_roundtrip, fl, library_source

BASE_SEED = 20240921
COMMAND = "/usr/bin/python3 tests/reference/make_diagnostics_reference.py --out DIR"
TIMES = "\u00d7"
SM = f"statsmodels {statsmodels.__version__}"
BLOM_A = 0.375


def rng_for(k):
    return np.random.Generator(np.random.PCG64(np.random.SeedSequence([BASE_SEED, k])))


def design(df, spec):
    """Intercept, predictors in order, then the products in the order given
    (Moderato's column order for numeric columns)."""
    cols = [np.ones(len(df))]
    labels = ["intercept"]
    for v in spec["predictors"]:
        cols.append(df[v].to_numpy(float))
        labels.append(v)
    for a, b in spec["interactions"]:
        cols.append(df[a].to_numpy(float) * df[b].to_numpy(float))
        labels.append(f"{a}{TIMES}{b}")
    return np.column_stack(cols), labels


def qq_block(values, what):
    pp = ProbPlot(np.asarray(values), a=BLOM_A)
    n = len(values)
    blom = scipy.stats.norm.ppf((np.arange(1, n + 1) - BLOM_A) / (n + 1 - 2 * BLOM_A))
    theo = np.asarray(pp.theoretical_quantiles)
    if not np.allclose(theo, blom, rtol=1e-14, atol=1e-14):
        raise AssertionError("ProbPlot(a=3/8) is not Blom's (i - 3/8)/(n + 1/4)")
    return {"of": what, "observed": fl(pp.sorted_data), "theoretical": fl(theo),
            "source": f"{SM} ProbPlot(values, a=0.375): sorted_data, theoretical_quantiles "
                      "(Blom plotting positions (i - 3/8)/(n + 1/4), normal quantiles)"}


def brute_force_checks(X, y, w, infl_ext, cooks, rows):
    """Refit without each of `rows`: the externally studentised residual and
    Cook's distance from their definitions."""
    n, p = X.shape
    sw = np.sqrt(w)
    Xw, yw = X * sw[:, None], y * sw
    b = np.linalg.lstsq(Xw, yw, rcond=None)[0]
    e = yw - Xw @ b
    s2 = e @ e / (n - p)
    h = np.einsum("ij,ji->i", Xw, np.linalg.pinv(Xw))
    worst = 0.0
    for i in rows:
        keep = np.arange(n) != i
        bi = np.linalg.lstsq(Xw[keep], yw[keep], rcond=None)[0]
        ei = yw[keep] - Xw[keep] @ bi
        s2i = ei @ ei / (n - 1 - p)
        t = e[i] / math.sqrt(s2i * (1 - h[i]))
        d = float(np.sum((Xw @ b - Xw @ bi) ** 2) / (p * s2))
        worst = max(worst, abs(t - infl_ext[i]) / abs(t), abs(d - cooks[i]) / abs(d))
    if not worst <= 1e-9:
        raise AssertionError(f"leave-one-out refit disagrees with OLSInfluence: {worst:.3g}")
    return worst


def linear_block(X, y, w, source):
    sw = np.sqrt(w)
    res = sm.OLS(y * sw, X * sw[:, None]).fit()
    infl = OLSInfluence(res)
    cooks = np.asarray(infl.cooks_distance[0])
    ext = np.asarray(infl.resid_studentized_external)
    fitted = X @ np.asarray(res.params)
    out = {
        "n": int(X.shape[0]), "rank": int(np.linalg.matrix_rank(X)),
        "leverage": fl(infl.hat_matrix_diag),
        "standardised": fl(infl.resid_studentized_internal),
        "studentised": fl(ext),
        "cooks_distance": fl(cooks),
        "fitted": fl(fitted),
        "residuals": fl(y - fitted),
        "pearson": fl(np.asarray(res.resid)),
        "qq": qq_block(ext, "externally studentised residuals"),
        "source": (f"{SM} OLSInfluence({source}): hat_matrix_diag, resid_studentized_internal, "
                   "resid_studentized_external, cooks_distance[0]; pearson = the fit's resid "
                   "(sqrt(w) e for the whitened fit); fitted = X b, residuals = y - X b"),
    }
    return out, res, infl, cooks, ext


def sim_ols():
    rng = rng_for(1)
    n = 150
    x = rng.normal(50, 10, n)
    z = rng.uniform(0, 10, n)
    y = 2 + 0.3 * x + 1.2 * z + 0.05 * x * z + rng.normal(0, 3, n)
    y[17] += 20.0          # an outlier in y
    x[42] = 105.0          # a high-leverage row, on the model
    y[42] = 2 + 0.3 * x[42] + 1.2 * z[42] + 0.05 * x[42] * z[42] + rng.normal(0, 3)
    df = pd.DataFrame({"y": y, "x": x, "z": z})
    desc = ("simulated: x ~ N(50, 10), z ~ U(0, 10), y = 2 + .3 x + 1.2 z + .05 x z + N(0, 3); "
            "row 17 (0-based) y + 20; row 42 x = 105 (y redrawn on the model)")
    spec = {"outcome": "y", "predictors": ["x", "z"], "interactions": [["x", "z"]], "family": "linear",
            "intercept": True, "weights": None, "cluster": None, "categorical": {}}
    return df, desc, spec


def fit_ols(df, spec):
    X, labels = design(df, spec)
    y = df[spec["outcome"]].to_numpy(float)
    block, res, infl, cooks, ext = linear_block(X, y, np.ones(len(y)), "OLS(y, X).fit()")
    checks = {"leave_one_out": brute_force_checks(X, y, np.ones(len(y)), ext, cooks, [0, 17, 42, 99])}
    return labels, block, checks


def sim_wls():
    rng = rng_for(2)
    n = 120
    x = rng.normal(0, 1, n)
    g = (rng.random(n) < 0.5).astype(float)
    w = rng.uniform(0.5, 3.0, n)
    y = 1 + 0.8 * x - 0.5 * g + 0.6 * x * g + rng.normal(0, 1, n) / np.sqrt(w)
    y[5] -= 6.0 / math.sqrt(w[5])
    df = pd.DataFrame({"y": y, "x": x, "g": g, "w": w})
    desc = ("simulated: x ~ N(0, 1), g ~ Bernoulli(.5), w ~ U(.5, 3), y = 1 + .8 x - .5 g + .6 x g "
            "+ N(0, 1)/sqrt(w); row 5 (0-based) y - 6/sqrt(w)")
    spec = {"outcome": "y", "predictors": ["x", "g"], "interactions": [["x", "g"]], "family": "linear",
            "intercept": True, "weights": "w", "cluster": None, "categorical": {}}
    return df, desc, spec


def fit_wls(df, spec):
    X, labels = design(df, spec)
    y = df[spec["outcome"]].to_numpy(float)
    w = df["w"].to_numpy(float)
    block, res, infl, cooks, ext = linear_block(X, y, w, "OLS(sqrt(w) y, sqrt(w) X).fit(), the WLS fit whitened")
    # the same fit as a weighted GLM
    glm = sm.GLM(y, X, family=sm.families.Gaussian(), var_weights=w).fit()
    gi = glm.get_influence()
    worst = 0.0
    for a, b in ((gi.hat_matrix_diag, block["leverage"]), (gi.resid_studentized, block["standardised"]),
                 (gi.cooks_distance[0], block["cooks_distance"]), (glm.resid_pearson, block["pearson"])):
        a, b = np.asarray(a), np.asarray(b)
        worst = max(worst, float(np.max(np.abs(a - b) / np.maximum(np.abs(b), 1e-300))))
    if not worst <= 1e-8:
        raise AssertionError(f"whitened OLS vs GLM(var_weights) influence: {worst:.3g}")
    wls = sm.WLS(y, X, weights=w).fit()
    if not np.allclose(np.asarray(wls.params), np.asarray(res.params), rtol=1e-10):
        raise AssertionError("WLS and the whitened OLS disagree")
    checks = {"glm_var_weights_max_rel_diff": worst,
              "leave_one_out": brute_force_checks(X, y, w, ext, cooks, [0, 5, 60])}
    return labels, block, checks


def sim_logit():
    rng = rng_for(3)
    n = 400
    x = rng.normal(0, 1, n)
    z = rng.normal(0, 1, n)
    eta = -0.3 + 0.9 * x + 0.4 * z + 0.5 * x * z
    y = (rng.random(n) < scipy.special.expit(eta)).astype(float)
    df = pd.DataFrame({"y": y, "x": x, "z": z})
    desc = "simulated: x, z ~ N(0, 1), logit P(y = 1) = -.3 + .9 x + .4 z + .5 x z"
    spec = {"outcome": "y", "predictors": ["x", "z"], "interactions": [["x", "z"]], "family": "logistic",
            "intercept": True, "weights": None, "cluster": None, "categorical": {}}
    return df, desc, spec


def fit_logit(df, spec):
    X, labels = design(df, spec)
    y = df[spec["outcome"]].to_numpy(float)
    glm = sm.GLM(y, X, family=sm.families.Binomial()).fit(tol=1e-13)
    logit = sm.Logit(y, X).fit(method="newton", tol=1e-12, maxiter=100, disp=0)
    assert np.allclose(np.asarray(glm.params), np.asarray(logit.params), rtol=1e-9, atol=0)
    mu = np.asarray(glm.fittedvalues)
    grad = float(np.abs(X.T @ (y - mu)).max())
    assert grad < 1e-8, grad
    gi = glm.get_influence()
    h = np.asarray(gi.hat_matrix_diag)
    # hat diagonal from the definition: v_i x_i'(X'VX)^-1 x_i, v = mu(1 - mu)
    v = mu * (1 - mu)
    h_def = v * np.einsum("ij,jk,ik->i", X, np.linalg.inv(X.T @ (X * v[:, None])), X)
    if not np.allclose(h, h_def, rtol=1e-10, atol=0):
        raise AssertionError("GLMInfluence hat_matrix_diag differs from v x'(X'VX)^-1 x")
    dev = np.asarray(glm.resid_deviance)
    block = {
        "n": int(X.shape[0]), "rank": int(np.linalg.matrix_rank(X)),
        "leverage": fl(h),
        "standardised": fl(gi.resid_studentized),
        "cooks_distance": fl(gi.cooks_distance[0]),
        "fitted": fl(mu),
        "residuals": fl(y - mu),
        "pearson": fl(glm.resid_pearson),
        "deviance": fl(dev),
        "standardised_deviance": fl(dev / np.sqrt(1 - h)),
        "qq": qq_block(dev / np.sqrt(1 - h), "standardised deviance residuals"),
        "source": (f"{SM} GLM(y, X, family=Binomial()).fit(tol=1e-13).get_influence(): hat_matrix_diag, "
                   "resid_studentized (standardised Pearson), cooks_distance[0]; the results' resid_pearson, "
                   "resid_deviance; standardised_deviance = resid_deviance / sqrt(1 - h) in numpy"),
    }
    return labels, block, {"max_abs_score_at_estimate": grad}


def sim_aliased():
    rng = rng_for(4)
    n = 60
    x1 = rng.integers(0, 20, n).astype(float)
    x2 = rng.integers(-5, 15, n).astype(float)
    x3 = x1 + x2
    y = 3 + 0.5 * x1 - 0.25 * x2 + rng.normal(0, 1, n)
    df = pd.DataFrame({"y": y, "x1": x1, "x2": x2, "x3": x3})
    desc = "simulated: x1, x2 integers, x3 = x1 + x2 exactly; y = 3 + .5 x1 - .25 x2 + N(0, 1)"
    spec = {"outcome": "y", "predictors": ["x1", "x2", "x3"], "interactions": [], "family": "linear",
            "intercept": True, "weights": None, "cluster": None, "categorical": {}}
    return df, desc, spec


def fit_aliased(df, spec):
    Xfull, labels = design(df, spec)
    y = df[spec["outcome"]].to_numpy(float)
    X = Xfull[:, :3]            # without x3: the same column space
    assert np.linalg.matrix_rank(Xfull) == 3
    block, res, infl, cooks, ext = linear_block(X, y, np.ones(len(y)), "OLS(y, X without the aliased x3).fit()")
    full = OLSInfluence(sm.OLS(y, Xfull).fit())
    if not np.allclose(full.hat_matrix_diag, block["leverage"], rtol=1e-9, atol=1e-12):
        raise AssertionError("hat matrix of the full (aliased) design differs from the reduced one")
    checks = {"leave_one_out": brute_force_checks(X, y, np.ones(len(y)), ext, cooks, [0, 30])}
    return labels, block, checks


CASES = [("diag_ols", sim_ols, fit_ols), ("diag_wls", sim_wls, fit_wls),
         ("diag_logit", sim_logit, fit_logit), ("diag_aliased", sim_aliased, fit_aliased)]


def all_finite(obj, where):
    if isinstance(obj, float):
        if not math.isfinite(obj):
            raise AssertionError(f"non-finite number in {where}")
    elif isinstance(obj, dict):
        for k, v in obj.items():
            all_finite(v, f"{where}.{k}")
    elif isinstance(obj, list):
        for i, v in enumerate(obj):
            all_finite(v, f"{where}[{i}]")


def main():
    here = os.path.dirname(os.path.abspath(__file__))
    ap = argparse.ArgumentParser(description=__doc__.split("\n")[0])
    ap.add_argument("--out", default=os.path.join(here, "fixtures"),
                    help="output folder (default: fixtures/ next to this script)")
    args = ap.parse_args()
    os.makedirs(args.out, exist_ok=True)
    source = library_source()
    print(f"statsmodels {statsmodels.__version__}  ({source})")
    for case, make, fit in CASES:
        df, desc, spec = make()
        back = write_csv_roundtrip(df, os.path.join(args.out, f"{case}.csv"))
        labels, block, checks = fit(back, spec)
        doc = {"case": case, "source": source, "command": COMMAND, "data": f"{case}.csv",
               "dataset": {"generated": desc, "generator": (
                   f"numpy.random.Generator(PCG64(SeedSequence([{BASE_SEED}, case number]))) "
                   f"in make_diagnostics_reference.py")},
               "spec": spec, "terms": labels, "diagnostics": block, "checks": checks}
        all_finite(doc, case)
        atomic_write(os.path.join(args.out, f"{case}.json"),
                     json.dumps(doc, indent=1, ensure_ascii=False, allow_nan=False) + "\n")
        print(f"  {case:14s} n={block['n']:4d} rank={block['rank']}  terms: {', '.join(labels)}")
    return 0


if __name__ == "__main__":
    sys.exit(main())
