#!/usr/bin/python3
"""Reference fixtures for Moderato's binned and smooth (kernel) estimates of a
focal predictor's effect across a moderator, computed with statsmodels.

Usage:
    /usr/bin/python3 tests/reference/make_linearity_reference.py [--out DIR]

DIR defaults to tests/reference/fixtures next to this script.  Cases:

  linearity_ols     OLS, y ~ x + w + c + x*w, 25 clusters; the effect of x
                    bends with w.  Bins K = 3 and 4 with classical, HC3 and
                    cluster-robust covariances; kernel at a fixed bandwidth.
  linearity_wls     WLS (weights wt), 0/1 focal d, skewed moderator w, control
                    c; bins K = 3 with classical and HC3; weighted kernel.
  linearity_logit   Logit, y ~ x + w + x*w; bins K = 3 (model-based
                    covariance, chi-square Wald test); kernel by GLM Binomial
                    with var_weights.

Per K, "bins" holds the cuts (numpy.quantile at j/K, linear interpolation),
each bin's median, rows, and per covariance the binning regression's focal
coefficients and SEs and the linearity test: statsmodels wald_test of the
4(K-1) bin terms added to the straight-line model (F with the covariance's
df for OLS/WLS, chi-square for Logit).  "kernel" holds the bandwidth, the
50-point grid over the moderator's range and, at each point, the focal
coefficient of the weighted regression on [1, x, w - z0, x (w - z0),
controls] with weights exp(-((w - z0)/h)^2/2) (times the model's weights).
Before writing, the script checks the binning regression's effects against
separate per-bin regressions where they must agree (no controls), and the
kernel coefficients against a numpy weighted least-squares solve.
"""

import argparse
import os
import sys

import numpy as np
import pandas as pd
import statsmodels
import statsmodels.api as sm

from reference_io import write_case, fl, library_source

BASE_SEED = 20261205
COMMAND = "/usr/bin/python3 tests/reference/make_linearity_reference.py --out DIR"
SM = f"statsmodels {statsmodels.__version__}"


def rng_for(k):
    return np.random.Generator(np.random.PCG64(np.random.SeedSequence([BASE_SEED, k])))


def make_ols():
    rng = rng_for(1)
    n = 500
    x = np.round(rng.normal(5, 2, n), 3)
    w = np.round(rng.uniform(0, 10, n), 3)
    c = np.round(rng.normal(0, 1, n), 3)
    team = rng.integers(0, 25, n)
    shift = rng.normal(0, 1.5, 25)
    slope = 0.2 + 0.25 * w - 0.025 * w ** 2
    y = 1 + slope * x + 0.3 * w + 0.5 * c + shift[team] + rng.normal(0, 2, n)
    df = pd.DataFrame({"y": np.round(y, 4), "x": x, "w": w, "c": c, "team": [f"T{t:02d}" for t in team]})
    desc = ("simulated: x ~ N(5, 2^2), w ~ U(0, 10), c ~ N(0, 1), team = 25 clusters with N(0, 1.5^2) shifts; "
            "y = 1 + (0.2 + 0.25 w - 0.025 w^2) x + 0.3 w + 0.5 c + team + N(0, 2^2)")
    spec = dict(outcome="y", predictors=["x", "w", "c"], interactions=[["x", "w"]], family="linear",
                intercept=True, weights=None, cluster="team", categorical={}, focal="x", moderator="w",
                controls=["c"], bins=[3, 4], covariances=["classical", "hc3", "cluster"], bandwidth=1.2)
    return df, desc, spec


def make_wls():
    rng = rng_for(2)
    n = 400
    d = (rng.uniform(0, 1, n) < 0.4).astype(int)
    w = np.round(rng.gamma(2.0, 1.5, n), 3)
    c = np.round(rng.normal(0, 1, n), 3)
    wt = np.round(rng.uniform(0.5, 2.0, n), 3)
    y = 2 + d * (1.0 + 0.5 * w - 0.06 * w ** 2) + 0.4 * w - 0.3 * c + rng.normal(0, 1.5, n) / np.sqrt(wt)
    df = pd.DataFrame({"y": np.round(y, 4), "d": d, "w": w, "c": c, "wt": wt})
    desc = ("simulated: d ~ Bernoulli(0.4), w ~ Gamma(2, 1.5), c ~ N(0, 1), wt ~ U(0.5, 2); "
            "y = 2 + d (1 + 0.5 w - 0.06 w^2) + 0.4 w - 0.3 c + N(0, 1.5^2 / wt)")
    spec = dict(outcome="y", predictors=["d", "w", "c"], interactions=[["d", "w"]], family="linear",
                intercept=True, weights="wt", cluster=None, categorical={}, focal="d", moderator="w",
                controls=["c"], bins=[3], covariances=["classical", "hc3"], bandwidth=0.9)
    return df, desc, spec


def make_logit():
    rng = rng_for(3)
    n = 800
    x = np.round(rng.normal(0, 1, n), 3)
    w = np.round(rng.uniform(-2, 2, n), 3)
    eta = -0.3 + x * (0.8 - 0.3 * w ** 2) + 0.4 * w
    y = (rng.uniform(0, 1, n) < 1 / (1 + np.exp(-eta))).astype(int)
    df = pd.DataFrame({"y": y, "x": x, "w": w})
    desc = "simulated: x ~ N(0, 1), w ~ U(-2, 2); logit P(y = 1) = -0.3 + x (0.8 - 0.3 w^2) + 0.4 w"
    spec = dict(outcome="y", predictors=["x", "w"], interactions=[["x", "w"]], family="logistic",
                intercept=True, weights=None, cluster=None, categorical={}, focal="x", moderator="w",
                controls=[], bins=[3], covariances=["classical"], bandwidth=0.8)
    return df, desc, spec


def fit_with(y, X, spec, df, se, weights):
    if spec["family"] == "logistic":
        return sm.Logit(y, X).fit(disp=0, tol=1e-12, maxiter=200), f"{SM} Logit, model-based covariance"
    model = sm.WLS(y, X, weights=weights) if weights is not None else sm.OLS(y, X)
    name = "WLS" if weights is not None else "OLS"
    if se == "classical":
        return model.fit(), f"{SM} {name} cov_type='nonrobust'"
    if se == "hc3":
        return model.fit(cov_type="HC3", use_t=True), f"{SM} {name} cov_type='HC3', use_t=True"
    codes = pd.factorize(df[spec["cluster"]])[0]
    return (model.fit(cov_type="cluster", cov_kwds={"groups": codes}, use_t=True),
            f"{SM} {name} cov_type='cluster', use_t=True (t and F with G-1 df)")


def bins_of(z, k):
    cuts = np.quantile(z, [j / k for j in range(1, k)])
    b = np.searchsorted(cuts, z, side="left")
    medians = [float(np.quantile(z[b == j], 0.5)) for j in range(k)]
    return cuts, b, medians


def binning_block(df, spec, k):
    D = df[spec["focal"]].to_numpy(float)
    z = df[spec["moderator"]].to_numpy(float)
    y = df[spec["outcome"]].to_numpy(float)
    C = [df[c].to_numpy(float) for c in spec["controls"]]
    weights = None if spec["weights"] is None else df[spec["weights"]].to_numpy(float)
    cuts, b, med = bins_of(z, k)
    cols = []
    for j in range(k):
        g = (b == j).astype(float)
        u = z - med[j]
        cols += [g, g * D, g * u, g * D * u]
    Xb = np.column_stack(cols + C)
    lin = [np.ones(len(y)), D, z, D * z] + C
    for j in range(1, k):
        g = (b == j).astype(float)
        lin += [g, g * D, g * z, g * D * z]
    Xl = np.column_stack(lin)
    q = 4 * (k - 1)
    R = np.zeros((q, Xl.shape[1]))
    R[:, Xl.shape[1] - q:] = np.eye(q)
    out = {"cuts": fl(cuts), "medians": fl(med), "rows": [int(np.sum(b == j)) for j in range(k)], "by_se": {}}
    for se in spec["covariances"]:
        rb, src = fit_with(y, Xb, spec, df, se, weights)
        rl, _ = fit_with(y, Xl, spec, df, se, weights)
        wt = rl.wald_test(R, use_f=spec["family"] != "logistic", scalar=False)
        idx = [4 * j + 1 for j in range(k)]
        if not C:  # without controls the pooled fit is K separate fits
            for j in range(k):
                m = b == j
                sub = np.column_stack([np.ones(m.sum()), D[m], z[m] - med[j], D[m] * (z[m] - med[j])])
                rj, _ = fit_with(y[m], sub, spec, df[m], "classical", None if weights is None else weights[m])
                assert abs(rj.params[1] - rb.params[idx[j]]) <= 1e-7 * (1 + abs(rj.params[1])), (j, rj.params[1])
        stat = float(np.squeeze(wt.statistic))
        entry = {"effects": fl(rb.params[idx]), "std_errors": fl(rb.bse[idx]),
                 "linearity": {"statistic": stat, "df1": float(q), "p_value": float(wt.pvalue)},
                 "source": src + "; wald_test of the bin terms (use_f for OLS/WLS)"}
        if spec["family"] != "logistic":
            entry["linearity"]["df2"] = float(wt.df_denom)
        out["by_se"][se] = entry
    return out


def kernel_block(df, spec):
    D = df[spec["focal"]].to_numpy(float)
    z = df[spec["moderator"]].to_numpy(float)
    y = df[spec["outcome"]].to_numpy(float)
    C = [df[c].to_numpy(float) for c in spec["controls"]]
    base = np.ones(len(y)) if spec["weights"] is None else df[spec["weights"]].to_numpy(float)
    h = spec["bandwidth"]
    grid = np.linspace(z.min(), z.max(), 50)
    effects = []
    for z0 in grid:
        X = np.column_stack([np.ones(len(y)), D, z - z0, D * (z - z0)] + C)
        wk = np.exp(-0.5 * ((z - z0) / h) ** 2) * base
        if spec["family"] == "logistic":
            res = sm.GLM(y, X, family=sm.families.Binomial(), var_weights=wk).fit(tol=1e-13, maxiter=200)
        else:
            res = sm.WLS(y, X, weights=wk).fit()
            sw = np.sqrt(wk)
            direct = np.linalg.lstsq(X * sw[:, None], y * sw, rcond=None)[0]
            assert abs(direct[1] - res.params[1]) <= 1e-9 * (1 + abs(direct[1]))
        effects.append(float(res.params[1]))
    src = (f"{SM} GLM Binomial var_weights=kernel" if spec["family"] == "logistic"
           else f"{SM} WLS weights=kernel" + ("" if spec["weights"] is None else " x wt"))
    return {"bandwidth": h, "grid": fl(grid), "effects": effects, "source": src}


def fit_case(df, spec):
    body = {"n": int(len(df)), "terms": [], "bins": {}}
    for k in spec["bins"]:
        body["bins"][str(k)] = binning_block(df, spec, k)
    body["kernel"] = kernel_block(df, spec)
    return body


def check(doc, case):
    for k, blk in doc["bins"].items():
        assert sum(blk["rows"]) == doc["n"], case
        assert all(np.isfinite(blk["by_se"][s]["linearity"]["p_value"]) for s in blk["by_se"])


CASES = [("linearity_ols", make_ols), ("linearity_wls", make_wls), ("linearity_logit", make_logit)]


def main():
    here = os.path.dirname(os.path.abspath(__file__))
    ap = argparse.ArgumentParser(description=__doc__.split("\n")[0])
    ap.add_argument("--out", default=os.path.join(here, "fixtures"),
                    help="output folder (default: fixtures/ next to this script)")
    args = ap.parse_args()
    os.makedirs(args.out, exist_ok=True)
    source = library_source()
    for case, make in CASES:
        write_case(args.out, case, make(), fit_case, source=source, command=COMMAND, base_seed=BASE_SEED,
                   script="make_linearity_reference.py", check=check)
    return 0


if __name__ == "__main__":
    sys.exit(main())
