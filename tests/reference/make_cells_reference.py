#!/usr/bin/python3
"""Reference fixtures for Moderato's cell table (two categorical factors),
computed with statsmodels.

Usage:
    /usr/bin/python3 tests/reference/make_cells_reference.py [--out DIR]

DIR defaults to tests/reference/fixtures next to this script.  Cases:

  cells_2x3        OLS, spend ~ plan (2 levels) + discount (3 levels, reference
                   'none') + visits + plan x discount; classical and HC3.
  cells_logit_2x2  Logit, renewed ~ format (2) + mentor (2) + tenure
                   + format x mentor; model-based covariance.

Each case writes CASE.csv (the data; doubles in shortest round-trip form, read
back and checked bit for bit) and CASE.json.  The JSON carries the same
top-level blocks as make_statsmodels_reference.py (spec, terms, estimates,
fit, covariances), so the generic reference test checks the fit itself, plus a
"cells" block:

  cells.by_se[SE].cells           per cell (row level outer): n, observed_mean,
                                  contrast (the design row x), estimate x'b,
                                  std_error sqrt(x'Vx), ci_lower/ci_upper (95 %)
                                  and, for the logit case, probability and its
                                  interval (expit of the link interval)
  cells.by_se[SE].row_effects     row level vs reference at each column level
  cells.by_se[SE].column_effects  column level vs reference at each row level
  cells.by_se[SE].interactions    (mu_ij - mu_i0) - (mu_0j - mu_00)
  cells.by_se[SE].wald            joint Wald test of the product columns

Every estimate/SE/statistic/p-value/CI above is statsmodels' t_test (or
wald_test) of the stored contrast vector(s) on the results object with that
covariance.  Before writing, the script checks that:
  * x'Vx from numpy equals t_test's sd^2, and the closed-form HC3 sandwich
    (X'X)^-1 X' diag(e_i^2/(1-h_i)^2) X (X'X)^-1 reproduces statsmodels HC3;
  * each interaction contrast's vector is the unit vector of its product
    coefficient (this model has no other terms involving both factors);
  * the logit case's probabilities and intervals equal statsmodels
    GLM(Binomial).get_prediction() (which transforms the link interval);
  * every number is finite.

The design matrix is built here in numpy in Moderato's column order:
intercept; main effects in predictor order (dummies for non-reference levels,
levels sorted as text); products in the order given.  Labels: 'a=level',
'a=level\u00d7b=level'.
"""

import argparse
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

from reference_io import write_case, fl, library_source

BASE_SEED = 20240918
COMMAND = "/usr/bin/python3 tests/reference/make_cells_reference.py --out DIR"
TIMES = "\u00d7"
SM = f"statsmodels {statsmodels.__version__}"


def rng_for(k):
    return np.random.Generator(np.random.PCG64(np.random.SeedSequence([BASE_SEED, k])))


# --------------------------------------------------------------------------
# design


def factor_levels(df, var, ref):
    """Moderato's order: the reference first, then the others sorted as text."""
    levels = sorted(set(df[var].astype(str)))
    assert ref in levels
    return [ref] + [lev for lev in levels if lev != ref]


def build_design(df, spec):
    """Columns: intercept, main effects in predictor order, then the two-way
    product of the two factors.  Each column is described by its factors,
    (variable, level) pairs with level None for a numeric column."""
    cat = spec["categorical"]
    cols = [("intercept", ())]
    for v in spec["predictors"]:
        if v in cat:
            for lev in factor_levels(df, v, cat[v])[1:]:
                cols.append((f"{v}={lev}", ((v, lev),)))
        else:
            cols.append((v, ((v, None),)))
    (a, b), = spec["interactions"]
    for la in factor_levels(df, a, cat[a])[1:]:
        for lb in factor_levels(df, b, cat[b])[1:]:
            cols.append((f"{a}={la}{TIMES}{b}={lb}", ((a, la), (b, lb))))
    labels = [c[0] for c in cols]
    factors = [c[1] for c in cols]
    X = np.column_stack([design_row_values(df, f) for f in factors])
    assert np.linalg.matrix_rank(X) == X.shape[1]
    return X, labels, factors


def design_row_values(df, fac):
    col = np.ones(len(df))
    for var, lev in fac:
        col = col * (df[var].to_numpy(float) if lev is None else (df[var].astype(str) == lev).to_numpy(float))
    return col


def design_row(factors, values):
    """x for one cell: numeric variables at values[var], dummies 1 when the
    cell's level matches."""
    x = []
    for fac in factors:
        v = 1.0
        for var, lev in fac:
            v *= float(values[var]) if lev is None else (1.0 if values[var] == lev else 0.0)
        x.append(v)
    return np.array(x)


# --------------------------------------------------------------------------
# cell quantities from statsmodels


def t_block(res, c, what):
    tt = res.t_test(c[None, :])
    use_t = tt.distribution == "t"
    ci = np.asarray(tt.conf_int(alpha=0.05))[0]
    V = np.asarray(res.cov_params())
    sd = float(np.squeeze(tt.sd))
    closed = math.sqrt(float(c @ V @ c))
    if not abs(sd - closed) <= 1e-12 * closed:
        raise AssertionError(f"{what}: t_test sd {sd} vs sqrt(c'Vc) {closed}")
    return {
        "contrast": fl(c),
        "estimate": float(np.squeeze(tt.effect)),
        "std_error": sd,
        "statistic": float(np.squeeze(tt.tvalue)),
        "p_value": float(np.squeeze(tt.pvalue)),
        "ci_lower": float(ci[0]),
        "ci_upper": float(ci[1]),
        "distribution": "t" if use_t else "normal",
        "df": int(tt.df_denom) if use_t else None,
    }


def cell_blocks(df, spec, labels, factors, res, source, logistic=False, glm=None):
    a, b = spec["interactions"][0]
    cat = spec["categorical"]
    la, lb = factor_levels(df, a, cat[a]), factor_levels(df, b, cat[b])
    held = {v: float(np.mean(df[v].to_numpy(float))) for v in spec["predictors"] if v not in cat}
    rows = {}
    for i, ra in enumerate(la):
        for j, cb in enumerate(lb):
            values = dict(held)
            values[a], values[b] = ra, cb
            rows[(i, j)] = design_row(factors, values)
    y = df[spec["outcome"]].to_numpy(float)
    sa, sb = df[a].astype(str).to_numpy(), df[b].astype(str).to_numpy()
    cells = []
    for i, ra in enumerate(la):
        for j, cb in enumerate(lb):
            mask = (sa == ra) & (sb == cb)
            blk = {"row_level": ra, "column_level": cb, "n": int(mask.sum()),
                   "observed_mean": float(np.mean(y[mask]))}
            blk.update(t_block(res, rows[(i, j)], f"cell {ra},{cb}"))
            del blk["statistic"], blk["p_value"]
            if logistic:
                expit = scipy.special.expit
                blk["probability"] = float(expit(blk["estimate"]))
                blk["probability_lower"] = float(expit(blk["ci_lower"]))
                blk["probability_upper"] = float(expit(blk["ci_upper"]))
                pf = glm.get_prediction(rows[(i, j)][None, :]).summary_frame(alpha=0.05)
                for key, col in (("probability", "mean"), ("probability_lower", "mean_ci_lower"),
                                 ("probability_upper", "mean_ci_upper")):
                    g = float(pf[col].iloc[0])
                    if not abs(g - blk[key]) <= 1e-8 * abs(g):
                        raise AssertionError(f"cell {ra},{cb}: {key} {blk[key]} vs GLM get_prediction {g}")
            cells.append(blk)
    row_effects, column_effects, interactions = [], [], []
    for j, cb in enumerate(lb):
        for i in range(1, len(la)):
            blk = {"level": la[i], "at_level": cb}
            blk.update(t_block(res, rows[(i, j)] - rows[(0, j)], f"row effect {la[i]} at {cb}"))
            row_effects.append(blk)
    for i, ra in enumerate(la):
        for j in range(1, len(lb)):
            blk = {"level": lb[j], "at_level": ra}
            blk.update(t_block(res, rows[(i, j)] - rows[(i, 0)], f"column effect {lb[j]} at {ra}"))
            column_effects.append(blk)
    prod_cols = [k for k, f in enumerate(factors) if len(f) == 2]
    for i in range(1, len(la)):
        for j in range(1, len(lb)):
            c = (rows[(i, j)] - rows[(i, 0)]) - (rows[(0, j)] - rows[(0, 0)])
            unit = np.zeros(len(labels))
            unit[labels.index(f"{a}={la[i]}{TIMES}{b}={lb[j]}")] = 1.0
            assert np.array_equal(c, unit), "interaction contrast must be the product coefficient's unit vector"
            blk = {"row_level": la[i], "column_level": lb[j]}
            blk.update(t_block(res, c, f"interaction {la[i]},{lb[j]}"))
            interactions.append(blk)
    R = np.zeros((len(prod_cols), len(labels)))
    for r, k in enumerate(prod_cols):
        R[r, k] = 1.0
    use_f = not logistic
    w = res.wald_test(R, use_f=use_f, scalar=True)
    wald = {"terms": [labels[k] for k in prod_cols],
            "statistic": float(np.squeeze(w.statistic)),
            "p_value": float(np.squeeze(w.pvalue)),
            "distribution": "F" if use_f else "chi2",
            "df_num": int(w.df_num) if use_f else len(prod_cols)}
    if use_f:
        wald["df_denom"] = int(w.df_denom)
    return {
        "row_factor": a, "column_factor": b, "row_levels": la, "column_levels": lb, "held": held,
        "source": (f"{SM} t_test of each stored contrast vector and wald_test of the product columns "
                   f"({'chi-square form' if logistic else 'F form'}) on {source}; "
                   "n and observed_mean by counting in numpy; held = numpy mean of the covariate"
                   + ("; probabilities = scipy expit of the link estimate and interval, checked against "
                      "GLM(Binomial).get_prediction()" if logistic else "")),
        "cells": cells, "row_effects": row_effects, "column_effects": column_effects,
        "interactions": interactions, "wald": wald,
    }


def cov_block(params, cov, dist, df, source):
    se = np.sqrt(np.diag(cov))
    return {"std_errors": fl(se), "covariance": fl(cov), "distribution": dist, "df": df, "source": source}


def hc3_closed_form(X, y):
    Q, R = np.linalg.qr(X)
    beta = np.linalg.solve(R, Q.T @ y)
    e = y - X @ beta
    h = np.sum(Q * Q, axis=1)
    B = np.linalg.solve(R, Q.T)
    return (B * (e ** 2 / (1 - h) ** 2)[None, :]) @ B.T


def assert_cov_close(a, b, what, rtol=1e-10):
    d = np.sqrt(np.outer(np.diag(b), np.diag(b)))
    err = float(np.max(np.abs(a - b) / d))
    if not err <= rtol:
        raise AssertionError(f"{what}: max scaled difference {err:.3g} > {rtol}")
    return err


# --------------------------------------------------------------------------
# cases


def sim_cells_2x3():
    rng = rng_for(1)
    n = 360
    plan = np.where(rng.random(n) < 0.4, "premium", "basic")
    # the discount a customer gets depends on the plan: unbalanced cells, and
    # visits differ by cell, so adjusted cell means differ from raw ones
    p_deep = np.where(plan == "premium", 0.35, 0.2)
    p_small = np.where(plan == "premium", 0.3, 0.35)
    u = rng.random(n)
    discount = np.where(u < p_deep, "deep", np.where(u < p_deep + p_small, "small", "none"))
    visits = rng.gamma(4.0, 1.5, n) + 1.0 * (plan == "premium") + 0.8 * (discount == "deep")
    prem, deep, small = (plan == "premium"), (discount == "deep"), (discount == "small")
    mean = 18 + 5 * prem + 3 * small + 8 * deep + 2.5 * prem * small - 3.0 * prem * deep + 1.1 * visits
    sd = 3.0 * (1 + 0.5 * deep + 0.3 * prem)
    spend = mean + rng.normal(0, 1, n) * sd
    df = pd.DataFrame({"spend": spend, "plan": plan, "discount": discount, "visits": visits})
    desc = ("simulated coffee-roaster customers: plan in {basic, premium} (P(premium) = .4); discount in "
            "{none, small, deep} with plan-dependent shares; visits ~ Gamma(4, 1.5) + 1 premium + .8 deep; "
            "spend = 18 + 5 premium + 3 small + 8 deep + 2.5 premium*small - 3 premium*deep + 1.1 visits "
            "+ N(0, 1) * 3 (1 + .5 deep + .3 premium)")
    spec = {"outcome": "spend", "predictors": ["plan", "discount", "visits"],
            "interactions": [["plan", "discount"]], "family": "linear", "intercept": True,
            "weights": None, "cluster": None, "categorical": {"plan": "basic", "discount": "none"}}
    return df, desc, spec


def sim_cells_logit_2x2():
    rng = rng_for(2)
    n = 800
    fmt = np.where(rng.random(n) < 0.5, "online", "onsite")
    mentor = np.where(rng.random(n) < 0.45, "yes", "no")
    tenure = rng.exponential(2.0, n)
    onsite, ment = (fmt == "onsite"), (mentor == "yes")
    eta = -0.6 + 0.5 * onsite + 0.7 * ment - 0.9 * onsite * ment + 0.25 * tenure
    renewed = (rng.random(n) < 1 / (1 + np.exp(-eta))).astype(float)
    df = pd.DataFrame({"renewed": renewed, "format": fmt, "mentor": mentor, "tenure": tenure})
    desc = ("simulated volunteer retention: format in {online, onsite} (1/2 each), mentor in {no, yes} "
            "(P(yes) = .45), tenure ~ Exp(mean 2); logit P(renewed) = -.6 + .5 onsite + .7 mentor "
            "- .9 onsite*mentor + .25 tenure")
    spec = {"outcome": "renewed", "predictors": ["format", "mentor", "tenure"],
            "interactions": [["format", "mentor"]], "family": "logistic", "intercept": True,
            "weights": None, "cluster": None, "categorical": {"format": "online", "mentor": "no"}}
    return df, desc, spec


def fit_cells_2x3(df, spec):
    X, labels, factors = build_design(df, spec)
    y = df[spec["outcome"]].to_numpy(float)
    n, p = X.shape
    model = sm.OLS(y, X)
    res = model.fit()
    hc3 = model.fit(cov_type="HC3", use_t=True)
    params = np.asarray(res.params)
    checks = {"hc3 closed form vs statsmodels": assert_cov_close(
        hc3_closed_form(X, y), np.asarray(hc3.cov_params()), "HC3 closed form")}
    fit = {
        "r_squared": float(res.rsquared), "adj_r_squared": float(res.rsquared_adj),
        "residual_sd": float(np.sqrt(res.scale)), "log_likelihood": float(res.llf),
        "aic": float(res.aic), "bic": float(res.bic), "f_statistic": float(res.fvalue),
        "f_p_value": float(res.f_pvalue),
        "source": f"{SM} OLS nonrobust fit (rsquared, rsquared_adj, sqrt(scale), llf, aic, bic, fvalue, f_pvalue)",
    }
    dfr = int(n - p)
    covs = {
        "classical": cov_block(params, np.asarray(res.cov_params()), "t", dfr, f"{SM} OLS cov_type='nonrobust'"),
        "hc3": cov_block(params, np.asarray(hc3.cov_params()), "t", dfr,
                         f"{SM} OLS cov_type='HC3', use_t=True; t with df_residual"),
    }
    cells = {"by_se": {
        "classical": cell_blocks(df, spec, labels, factors, res, "OLS nonrobust"),
        "hc3": cell_blocks(df, spec, labels, factors, hc3, "OLS cov_type='HC3', use_t=True"),
    }}
    return {"n": int(n), "df_residual": dfr, "terms": labels, "estimates": fl(params),
            "estimates_source": f"{SM} OLS.fit() on the design built in numpy",
            "fit": fit, "covariances": covs, "cells": cells, "checks": checks}


def fit_cells_logit_2x2(df, spec):
    X, labels, factors = build_design(df, spec)
    y = df[spec["outcome"]].to_numpy(float)
    n, p = X.shape
    res = sm.Logit(y, X).fit(method="newton", tol=1e-12, maxiter=100, disp=0)
    assert res.mle_retvals["converged"]
    params = np.asarray(res.params)
    mu = 1 / (1 + np.exp(-X @ params))
    grad = float(np.abs((X * (y - mu)[:, None]).sum(axis=0)).max())
    assert grad < 1e-8, grad
    glm = sm.GLM(y, X, family=sm.families.Binomial()).fit(tol=1e-13)
    assert np.allclose(np.asarray(glm.params), params, rtol=1e-9, atol=0), "GLM and Logit disagree"
    fit = {
        "log_likelihood": float(res.llf), "llnull": float(res.llnull), "aic": float(res.aic),
        "bic": float(res.bic),
        "source": f"{SM} Logit.fit(method='newton', tol=1e-12, maxiter=100): llf, llnull, aic, bic",
    }
    covs = {"classical": cov_block(params, np.asarray(res.cov_params()), "normal", None,
                                   f"{SM} Logit nonrobust: (X' diag(mu(1-mu)) X)^-1; z statistics")}
    cells = {"by_se": {"classical": cell_blocks(df, spec, labels, factors, res, "Logit nonrobust (z)",
                                                logistic=True, glm=glm)}}
    return {"n": int(n), "df_residual": int(n - p), "terms": labels, "estimates": fl(params),
            "estimates_source": f"{SM} Logit.fit(method='newton', tol=1e-12, maxiter=100)",
            "fit": fit, "covariances": covs, "cells": cells,
            "checks": {"max_abs_score_at_estimate": grad}}


CASES = [("cells_2x3", sim_cells_2x3, fit_cells_2x3),
         ("cells_logit_2x2", sim_cells_logit_2x2, fit_cells_logit_2x2)]


# --------------------------------------------------------------------------
# output


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
        write_case(args.out, case, make(), fit, source=source, command=COMMAND, base_seed=BASE_SEED,
                   script="make_cells_reference.py", check=all_finite)
    return 0


if __name__ == "__main__":
    sys.exit(main())
