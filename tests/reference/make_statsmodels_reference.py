#!/usr/bin/python3
"""Reference fixtures for Moderato's estimation code, computed with statsmodels.

Usage:
    /usr/bin/python3 tests/reference/make_statsmodels_reference.py [--out DIR]

DIR defaults to tests/reference/fixtures next to this script.  For every case
the script writes CASE.csv (the data, header row, each double in its
shortest round-trip form, Python repr, so the file holds exactly the doubles
that were fitted) and CASE.json (the model specification and the expected
numbers, each block naming where it came from).  Runs in about a second.

What is computed:
  * linear models: statsmodels OLS / WLS on design matrices built here in
    numpy, in Moderato's coefficient order (no formula strings), with
    cov_type 'nonrobust', 'HC0'..'HC3' and 'cluster' (statsmodels defaults:
    use_correction=True, df_correction=True); HC4 (Cribari-Neto 2004) in
    closed form in numpy;
  * logistic models: statsmodels Logit, method='newton', tol=1e-12,
    maxiter=100, with model-based, 'HC0' and 'cluster' covariances;
  * conditional effects of a focal predictor at chosen moderator values
    (statsmodels t_test of the contrast vector, which is stored as well);
  * joint Wald tests of all product terms (statsmodels wald_test).

Every number is checked before it is written:
  * the closed-form sandwich code reproduces statsmodels HC0, HC2 and HC3
    when its exponent is fixed at 0, 1 and 2, and HC1 as n/(n-p) HC0;
  * closed-form classical, cluster and logistic sandwich matrices reproduce
    statsmodels;
  * for linear models, estimates, SSR and every covariance matrix are
    recomputed from the doubles in the CSV in 60-digit decimal arithmetic
    (Python's decimal module).  Where statsmodels is off by more than 1e-10
    (it is, by up to ~3e-8, for HC2/HC3 on the ill-conditioned Longley and
    near-collinear designs, because its leverages come from a pinv-based
    (X'X)^-1) the high-precision matrix is stored instead and its "source"
    says so; the achieved agreement is stored under "checks";
  * the CSV written is read back and must give bit-identical doubles;
  * every number is finite (json is written with allow_nan=False).

Data: simulated cases come from numpy Generators seeded per case (PCG64,
SeedSequence([BASE_SEED, case number])); the other cases use public-domain
datasets shipped with statsmodels (their COPYRIGHT text is copied into the
fixture).
"""

import argparse
import decimal
import itertools
import json
import math
import os
import sys

import numpy as np
import pandas as pd
import scipy
import scipy.stats
import statsmodels
import statsmodels.api as sm

from reference_io import atomic_write, write_csv_roundtrip, fl, library_source

BASE_SEED = 20240917
COMMAND = "/usr/bin/python3 tests/reference/make_statsmodels_reference.py --out DIR"
TIMES = "\u00d7"  # multiplication sign used in product-term labels
# Closed forms vs statsmodels: an algebra check (a wrong formula is off by
# O(1)); the 1e-10 precision check is against the high-precision recomputation.
CLOSED_FORM_RTOL = 1e-8
HP_RTOL = 1e-10


# --------------------------------------------------------------------------
# versions


SM = f"statsmodels {statsmodels.__version__}"


# --------------------------------------------------------------------------
# design matrix in Moderato's term order


def expand_variable(df, var, categorical):
    """List of (label, factors, column) for one variable.

    factors is a tuple of (variable, level) pairs; level is None for a
    numeric column and the category text for a dummy."""
    if var in categorical:
        ref = categorical[var]
        text = df[var].astype(str)
        levels = sorted(set(text))
        if ref not in levels:
            raise ValueError(f"reference level {ref!r} not in {var}")
        return [(f"{var}={lev}", ((var, lev),), (text == lev).to_numpy(float))
                for lev in levels if lev != ref]
    return [(var, ((var, None),), df[var].to_numpy(float))]


def product_terms(df, variables, categorical):
    parts = [expand_variable(df, v, categorical) for v in variables]
    out = []
    for combo in itertools.product(*parts):
        label = TIMES.join(c[0] for c in combo)
        factors = tuple(f for c in combo for f in c[1])
        col = np.ones(len(df))
        for c in combo:
            col = col * c[2]
        out.append((label, factors, col))
    return out


def build_design(df, spec):
    """Columns: intercept; main effects in predictor order, then factors of
    interactions not listed as predictors (first appearance); two-way
    products in the order given (a three-way interaction contributes its
    pairs, itertools.combinations order, at its position); then three-way."""
    categorical = spec.get("categorical") or {}
    mains = list(spec["predictors"])
    for inter in spec.get("interactions") or []:
        for v in inter:
            if v not in mains:
                mains.append(v)
    twoway, threeway = [], []
    for inter in spec.get("interactions") or []:
        inter = list(inter)
        if len(inter) == 2:
            pairs = [inter]
        elif len(inter) == 3:
            pairs = [list(p) for p in itertools.combinations(inter, 2)]
            if not any(set(t) == set(inter) for t in threeway):
                threeway.append(inter)
        else:
            raise ValueError("only two- and three-way interactions")
        for p in pairs:
            if not any(set(t) == set(p) for t in twoway):
                twoway.append(p)
    terms = []
    if spec.get("intercept", True):
        terms.append(("intercept", (), np.ones(len(df))))
    for v in mains:
        terms.extend(expand_variable(df, v, categorical))
    for t in twoway + threeway:
        terms.extend(product_terms(df, t, categorical))
    labels = [t[0] for t in terms]
    factors = [t[1] for t in terms]
    X = np.column_stack([t[2] for t in terms])
    assert len(set(labels)) == len(labels)
    assert np.linalg.matrix_rank(X) == X.shape[1], "design must have full rank"
    return X, labels, factors


def interaction_columns(factors):
    return [j for j, f in enumerate(factors) if len(f) >= 2]


def contrast_vector(factors, focal, at):
    """Derivative (or, for a dummy focal, the level-minus-reference change)
    of the linear predictor with respect to the focal term, holding the
    variables in `at` at the given values (numbers, or a category text)."""
    c = []
    for fac in factors:
        if focal not in fac:
            c.append(0.0)
            continue
        prod = 1.0
        for (var, lev) in fac:
            if (var, lev) == focal:
                continue
            if lev is None:
                prod *= float(at[var])
            else:
                prod *= 1.0 if str(at[var]) == lev else 0.0
        c.append(prod)
    return np.array(c)


# --------------------------------------------------------------------------
# closed forms (numpy)


def hc_closed_form(X, y, weights, kind):
    """Sandwich (X~'X~)^-1 X~' diag(e~_i^2 / (1-h_i)^d_i) X~ (X~'X~)^-1 on the
    whitened design X~ = sqrt(w) X, e~ = sqrt(w) e (w = 1 for OLS).
    kind: 'hc4' -> d_i = min(4, n h_i / p) (Cribari-Neto 2004);
    a number -> d_i = that number (0: HC0, 1: HC2, 2: HC3)."""
    sw = np.ones(len(y)) if weights is None else np.sqrt(weights)
    Xw = X * sw[:, None]
    yw = y * sw
    Q, R = np.linalg.qr(Xw)
    beta = np.linalg.solve(R, Q.T @ yw)
    ew = yw - Xw @ beta
    h = np.sum(Q * Q, axis=1)
    n, p = X.shape
    if kind == "hc4":
        delta = np.minimum(4.0, n * h / p)
    else:
        delta = np.full(n, float(kind))
    omega = ew ** 2 / (1.0 - h) ** delta
    Rinv = np.linalg.solve(R, np.eye(p))
    B = Rinv @ Q.T  # (X~'X~)^-1 X~'
    return (B * omega[None, :]) @ B.T


def cluster_closed_form(X, resid_w, Xw, groups, bread):
    n, p = X.shape
    codes, G = pd.factorize(pd.Series(groups))[0], len(set(groups))
    U = np.zeros((G, p))
    np.add.at(U, codes, Xw * resid_w[:, None])
    meat = U.T @ U
    return (G / (G - 1.0)) * ((n - 1.0) / (n - p)) * bread @ meat @ bread


def assert_cov_close(a, b, what, rtol=CLOSED_FORM_RTOL):
    d = np.sqrt(np.outer(np.diag(b), np.diag(b)))
    err = np.max(np.abs(a - b) / d)
    if not err <= rtol:
        raise AssertionError(f"{what}: max scaled difference {err:.3g} > {rtol}")
    return float(err)


# --------------------------------------------------------------------------
# high-precision recomputation of a linear fit (Python decimal)

HP_DIGITS = 60


def d_inverse(A):
    p = len(A)
    one, zero = decimal.Decimal(1), decimal.Decimal(0)
    M = [list(row) + [one if i == j else zero for j in range(p)] for i, row in enumerate(A)]
    for c in range(p):
        piv = max(range(c, p), key=lambda r: abs(M[r][c]))
        M[c], M[piv] = M[piv], M[c]
        inv = one / M[c][c]
        M[c] = [v * inv for v in M[c]]
        for r in range(p):
            if r != c and M[r][c] != 0:
                f = M[r][c]
                M[r] = [a - f * b for a, b in zip(M[r], M[c])]
    return [row[p:] for row in M]


def high_precision_linear(X, y, weights, groups):
    """Estimates and covariances (classical, HC0-HC4, cluster) recomputed from
    the doubles with normal equations in 60-digit decimal arithmetic: no
    rounding error of double precision is left at the 1e-10 level even for
    condition numbers near 1e10."""
    D = decimal.Decimal
    with decimal.localcontext() as ctx:
        ctx.prec = HP_DIGITS
        n, p = X.shape
        Xf = [[D(v) for v in row] for row in X.tolist()]
        yf = [D(v) for v in y.tolist()]
        wf = [D(1)] * n if weights is None else [D(v) for v in weights.tolist()]
        zero = D(0)
        A = [[zero] * p for _ in range(p)]
        c = [zero] * p
        for xi, yi, wi in zip(Xf, yf, wf):
            wx = [wi * v for v in xi]
            for a in range(p):
                c[a] += wx[a] * yi
                for b in range(a, p):
                    A[a][b] += wx[a] * xi[b]
        for a in range(p):
            for b in range(a):
                A[a][b] = A[b][a]
        Ainv = d_inverse(A)
        beta = [sum((Ainv[a][b] * c[b] for b in range(p)), zero) for a in range(p)]
        e = [yi - sum((v * bb for v, bb in zip(xi, beta)), zero) for xi, yi in zip(Xf, yf)]
        ssr = sum((wi * ei * ei for wi, ei in zip(wf, e)), zero)
        h = []
        for xi, wi in zip(Xf, wf):
            t = [sum((Ainv[a][b] * xi[b] for b in range(p)), zero) for a in range(p)]
            h.append(wi * sum((xa * ta for xa, ta in zip(xi, t)), zero))

        def sandwich_meat(M):
            AM = [[sum((Ainv[a][k] * M[k][b] for k in range(p)), zero) for b in range(p)] for a in range(p)]
            return [[sum((AM[a][k] * Ainv[k][b] for k in range(p)), zero) for b in range(p)] for a in range(p)]

        def sandwich(scale):
            M = [[zero] * p for _ in range(p)]
            for xi, s in zip(Xf, scale):
                sx = [s * v for v in xi]
                for a in range(p):
                    for b in range(a, p):
                        M[a][b] += sx[a] * xi[b]
            for a in range(p):
                for b in range(a):
                    M[a][b] = M[b][a]
            return sandwich_meat(M)

        u2 = [wi * wi * ei * ei for wi, ei in zip(wf, e)]
        out = {"estimates": [float(b) for b in beta], "ssr": float(ssr)}
        cl = ssr / (n - p)
        out["classical"] = [[cl * v for v in row] for row in Ainv]
        hc0 = sandwich(u2)
        out["hc0"] = hc0
        out["hc1"] = [[D(n) / D(n - p) * v for v in row] for row in hc0]
        out["hc2"] = sandwich([u / (1 - hi) for u, hi in zip(u2, h)])
        out["hc3"] = sandwich([u / ((1 - hi) * (1 - hi)) for u, hi in zip(u2, h)])
        four = D(4)
        out["hc4"] = sandwich([u / (1 - hi) ** min(four, n * hi / p) for u, hi in zip(u2, h)])
        if groups is not None:
            labels = sorted(set(groups))
            index = {g: k for k, g in enumerate(labels)}
            G = len(labels)
            U = [[zero] * p for _ in range(G)]
            for xi, wi, ei, g in zip(Xf, wf, e, groups):
                row = U[index[g]]
                for a in range(p):
                    row[a] += wi * ei * xi[a]
            M = [[sum((U[k][a] * U[k][b] for k in range(G)), zero) for b in range(p)] for a in range(p)]
            V = sandwich_meat(M)
            corr = D(G) / D(G - 1) * D(n - 1) / D(n - p)
            out["cluster"] = [[corr * v for v in row] for row in V]
        for k in list(out):
            if k not in ("estimates", "ssr"):
                out[k] = np.array([[float(v) for v in row] for row in out[k]])
    return out


# --------------------------------------------------------------------------
# fixture pieces


def cov_block(params, cov, dist, df, source, extra=None):
    se = np.sqrt(np.diag(cov))
    stat = params / se
    if dist == "t":
        p = 2 * scipy.stats.t.sf(np.abs(stat), df)
        q = scipy.stats.t.ppf(0.975, df)
    else:
        p = 2 * scipy.stats.norm.sf(np.abs(stat))
        q = scipy.stats.norm.ppf(0.975)
    block = {
        "std_errors": fl(se),
        "covariance": fl(cov),
        "statistics": fl(stat),
        "p_values": fl(p),
        "ci_lower_95": fl(params - q * se),
        "ci_upper_95": fl(params + q * se),
        "distribution": dist,
        "df": df,
        "source": source,
    }
    if extra:
        block.update(extra)
    return block


def check_block_against(res, block, what):
    """The statistics/p-values/CIs in a block (scipy from the covariance)
    must agree with what statsmodels reports for the same fit."""
    for key, val in (("std_errors", res.bse), ("statistics", res.tvalues),
                     ("p_values", res.pvalues)):
        got = np.asarray(block[key])
        if not np.allclose(got, np.asarray(val), rtol=1e-10, atol=1e-300):
            raise AssertionError(f"{what}: {key} differs from statsmodels")
    ci = np.asarray(res.conf_int(0.05))
    if not (np.allclose(ci[:, 0], block["ci_lower_95"], rtol=1e-10)
            and np.allclose(ci[:, 1], block["ci_upper_95"], rtol=1e-10)):
        raise AssertionError(f"{what}: confidence interval differs from statsmodels")


def wald_interactions(res, labels, factors, cov_p=None, use_f=True, source=""):
    cols = interaction_columns(factors)
    if not cols:
        return None
    R = np.zeros((len(cols), len(labels)))
    for i, j in enumerate(cols):
        R[i, j] = 1.0
    w = res.wald_test(R, cov_p=cov_p, use_f=use_f, scalar=True)
    out = {"terms": [labels[j] for j in cols],
           "statistic": float(np.squeeze(w.statistic)),
           "p_value": float(np.squeeze(w.pvalue))}
    if use_f:
        out.update({"distribution": "F", "df_num": int(w.df_num), "df_denom": int(w.df_denom)})
    else:
        out.update({"distribution": "chi2", "df": int(w.df_denom)})
    out["source"] = source or (f"{SM} wald_test(R, use_f={use_f}) with this block's covariance; "
                               + ("F = W/q" if use_f else "chi-square W"))
    return out


def moderator_points(df, var, how):
    if how == "meansd":
        col = df[var].to_numpy(float)
        m, s = float(np.mean(col)), float(np.std(col, ddof=1))
        return [("mean-1sd", m - s), ("mean", m), ("mean+1sd", m + s)]
    return [(f"{var}={int(v) if isinstance(v, float) and v.is_integer() else v}", v) for v in how]


def conditional_effects(df, labels, factors, results_by_se, probes):
    """results_by_se: {se_name: (results, cov_p or None, source)}."""
    out = []
    for probe in probes:
        focal = probe["focal"]
        focal_key = tuple(focal.split("=", 1)) if "=" in focal else (focal, None)
        fixed = dict(probe.get("fixed", {}))
        fixed_out = {}
        for var, how in fixed.items():
            if how == "mean":
                fixed_out[var] = float(np.mean(df[var].to_numpy(float)))
            else:
                fixed_out[var] = how
        for at_label, at in moderator_points(df, probe["moderator"], probe["at"]):
            values = dict(fixed_out)
            values[probe["moderator"]] = at
            c = contrast_vector(factors, focal_key, values)
            for se_name, (res, cov_p, src) in results_by_se.items():
                tt = res.t_test(c[None, :], cov_p=cov_p)
                use_t = bool(tt.distribution == "t")
                out.append({
                    "focal": focal,
                    "moderator": probe["moderator"],
                    "at": at if isinstance(at, str) else float(at),
                    "at_label": at_label,
                    "fixed": fixed_out,
                    "se": se_name,
                    "contrast": fl(c),
                    "estimate": float(np.squeeze(tt.effect)),
                    "std_error": float(np.squeeze(tt.sd)),
                    "statistic": float(np.squeeze(tt.tvalue)),
                    "p_value": float(np.squeeze(tt.pvalue)),
                    "distribution": "t" if use_t else "normal",
                    "df": int(tt.df_denom) if use_t else None,
                    "source": (f"{SM} t_test of the linear combination "
                               + " + ".join(f"{v!r}*b[{labels[j]}]" for j, v in enumerate(c) if v != 0)
                               + f" ({src})"),
                })
    return out


def dataset_note(name):
    mod = getattr(sm.datasets, name)
    path = os.path.join(os.path.dirname(mod.__file__), f"{name}.csv")
    return {
        "name": name,
        "shipped_file": f"statsmodels/datasets/{name}/{name}.csv",
        "title": " ".join(str(getattr(mod, "TITLE", "")).split()),
        "copyright": " ".join(str(mod.COPYRIGHT).split()),
        "origin": " ".join(str(getattr(mod.data, "SOURCE", "")).split()) if hasattr(mod, "data") else "",
        "_path": path,
    }


# --------------------------------------------------------------------------
# fitting


def fit_linear(case, df, spec, covs, probes):
    X, labels, factors = build_design(df, spec)
    y = df[spec["outcome"]].to_numpy(float)
    weights = None if spec.get("weights") is None else df[spec["weights"]].to_numpy(float)
    groups = None if spec.get("cluster") is None else df[spec["cluster"]].tolist()
    model = sm.WLS(y, X, weights=weights) if weights is not None else sm.OLS(y, X)
    kind = "WLS" if weights is not None else "OLS"
    res = model.fit()
    n, p = X.shape
    dfr = int(n - p)
    assert float(res.df_resid) == dfr
    params = np.asarray(res.params)

    fit = {
        "r_squared": float(res.rsquared),
        "adj_r_squared": float(res.rsquared_adj),
        "residual_sd": float(np.sqrt(res.scale)),
        "ssr": float(res.ssr),
        "log_likelihood": float(res.llf),
        "aic": float(res.aic),
        "bic": float(res.bic),
        "f_statistic": float(res.fvalue),
        "f_p_value": float(res.f_pvalue),
        "df_model": float(res.df_model),
        "source": f"{SM} {kind} nonrobust fit (rsquared, rsquared_adj, sqrt(scale), ssr, llf, aic, bic, fvalue, f_pvalue)",
    }
    if weights is not None:
        fit["note"] = ("WLS: ssr = sum w e^2; R^2 = 1 - ssr / sum w (y - ybar_w)^2 with ybar_w the "
                       "weighted mean; llf = -n/2 log(2 pi) - n/2 log(ssr/n) - n/2 + 1/2 sum log w")

    sw = np.ones(n) if weights is None else np.sqrt(weights)
    Xw = X * sw[:, None]
    bread = np.asarray(res.normalized_cov_params)
    covs_out, by_se, checks = {}, {}, {}

    # high-precision recomputation: every stored number is checked against it
    hp = high_precision_linear(X, y, weights, groups)
    hp_checks = {}
    est_err = float(np.max(np.abs(params - hp["estimates"]) / np.abs(hp["estimates"])))
    hp_checks["estimates"] = est_err
    estimates_source = f"{SM} {kind}.fit() (method='pinv') on the design built in numpy"
    if est_err > HP_RTOL:
        # conditional effects and Wald tests below use statsmodels' results
        assert not probes and not interaction_columns(factors), case
        params = np.asarray(hp["estimates"])
        estimates_source = (f"60-digit decimal recomputation from the CSV doubles; replaces "
                            f"{estimates_source}, which differs by {est_err:.2g} relative")
    ssr_err = abs(res.ssr - hp["ssr"]) / hp["ssr"]
    hp_checks["ssr"] = float(ssr_err)
    assert ssr_err <= HP_RTOL, f"{case}: ssr differs from high precision by {ssr_err:.3g}"

    # closed-form checks: the algebra against statsmodels (a wrong formula is
    # off by O(1); statsmodels' own rounding reaches ~1e-8 on near-collinear
    # designs), the precision against the high-precision recomputation
    cf = {}
    cf["classical vs statsmodels"] = assert_cov_close(
        res.scale * bread, np.asarray(res.cov_params()), f"{case} classical")
    for name, d in (("HC0", 0), ("HC2", 1), ("HC3", 2)):
        V = hc_closed_form(X, y, weights, d)
        cf[f"exponent {d} vs statsmodels {name}"] = assert_cov_close(
            V, np.asarray(getattr(res, "cov_" + name)),
            f"{case} closed form with exponent {d} vs statsmodels {name}", rtol=1e-6)
        cf[f"exponent {d} vs high precision {name}"] = assert_cov_close(
            V, hp[name.lower()], f"{case} closed form with exponent {d} vs high precision", rtol=1e-8)
    cf["n/(n-p) exponent 0 vs statsmodels HC1"] = assert_cov_close(
        n / (n - p) * hc_closed_form(X, y, weights, 0), np.asarray(res.cov_HC1), f"{case} HC1", rtol=1e-6)
    cf["hc4 vs high precision"] = assert_cov_close(
        hc_closed_form(X, y, weights, "hc4"), hp["hc4"], f"{case} HC4 closed form vs high precision",
        rtol=1e-8)
    cf["source"] = ("max over (i,j) of |V_closed - V_other| / sqrt(V_ii V_jj); closed forms in numpy "
                    "(QR of the whitened design): exponent d_i fixed at 0, 1, 2 must give HC0, HC2, HC3")
    checks["closed_form"] = cf

    def settle(cv, V, source):
        """Keep V if it agrees with the high-precision matrix to HP_RTOL;
        otherwise store the high-precision matrix and say so."""
        err = assert_cov_close(V, hp[cv], f"{case} {cv} vs high precision", rtol=1e-6)
        hp_checks[cv] = err
        if err <= HP_RTOL:
            return V, source, False
        return hp[cv], (
            f"60-digit decimal recomputation from the CSV doubles (see checks.high_precision). "
            f"Replaces {source}, which differs from it by {err:.2g} (max |V - V_hp| / sqrt(V_ii V_jj)): "
            f"statsmodels' pinv-based (X'X)^-1 (and the leverages taken from it) loses digits on "
            f"this ill-conditioned design"), True

    wsuffix = " (whitened: X~ = sqrt(w) X, e~ = sqrt(w) e)" if weights is not None else ""
    for cv in covs:
        extra = None
        if cv == "classical":
            r, ddf = res, dfr
            src = f"{SM} {kind} cov_type='nonrobust'"
            V = np.asarray(res.cov_params())
            label = f"{kind} nonrobust"
        elif cv in ("hc0", "hc1", "hc2", "hc3"):
            r, ddf = model.fit(cov_type=cv.upper(), use_t=True), dfr
            src = f"{SM} {kind} cov_type='{cv.upper()}', use_t=True{wsuffix}; t with df_residual"
            V = np.asarray(r.cov_params())
            label = f"{kind} cov_type='{cv.upper()}', use_t=True"
        elif cv == "hc4":
            r, ddf = res, dfr
            V = hc_closed_form(X, y, weights, "hc4")
            src = ("closed form in numpy: (X'X)^-1 X' diag(e_i^2/(1-h_i)^delta_i) X (X'X)^-1, "
                   "delta_i = min(4, n h_i/p) (Cribari-Neto 2004)" + wsuffix
                   + "; statistics/p-values/CIs with scipy t(df_residual)")
            label = "HC4 closed form passed to t_test as cov_p"
        elif cv == "cluster":
            codes = pd.factorize(pd.Series(groups), sort=True)[0]
            r = model.fit(cov_type="cluster", cov_kwds={"groups": codes}, use_t=True)
            G = int(len(set(groups)))
            assert r.df_resid_inference == G - 1
            ddf = G - 1
            V = np.asarray(r.cov_params())
            checks["closed_form"]["cluster vs statsmodels"] = assert_cov_close(
                cluster_closed_form(X, np.asarray(r.wresid), Xw, groups, bread), V, f"{case} cluster")
            src = (f"{SM} {kind} cov_type='cluster', use_t=True (use_correction=True, df_correction=True): "
                   f"G/(G-1) * (n-1)/(n-p) * (X'X)^-1 [sum_g u_g u_g'] (X'X)^-1, u_g = sum_(i in g) x_i e_i; "
                   f"t with G-1 df")
            extra = {"n_clusters": G, "correction": (G / (G - 1.0)) * ((n - 1.0) / (n - p))}
            label = f"{kind} cov_type='cluster', use_t=True, t with G-1 = {G - 1} df"
        else:
            raise ValueError(cv)
        V, src, replaced = settle(cv, V, src)
        covs_out[cv] = cov_block(params, V, "t", ddf, src, extra)
        if cv != "hc4" and not replaced:
            check_block_against(r, covs_out[cv], f"{case} {cv}")
        cov_p = V if (cv == "hc4" or replaced) else None
        if replaced:
            label += " (high-precision covariance passed to t_test as cov_p)"
        by_se[cv] = (r, cov_p, label)
        wi = wald_interactions(r, labels, factors, cov_p=cov_p, use_f=True)
        if wi:
            covs_out[cv]["wald_interactions"] = wi

    hp_checks["source"] = ("max relative difference of statsmodels' estimates, and max over (i,j) of "
                           "|V - V_hp| / sqrt(V_ii V_jj) for each covariance before storing, against a "
                           "recomputation from the CSV doubles in 60-digit decimal arithmetic (Python "
                           f"decimal); a matrix off by more than {HP_RTOL:g} is replaced by V_hp")
    checks["high_precision"] = hp_checks

    probe_sets = {k: v for k, v in by_se.items() if k in ("classical", "hc3", "hc4", "cluster")}
    ce = conditional_effects(df, labels, factors, probe_sets, probes) if probes else []
    return X, labels, params, {
        "n": int(n), "df_residual": dfr, "terms": labels,
        "estimates": fl(params),
        "estimates_source": estimates_source,
        "fit": fit, "covariances": covs_out, "conditional_effects": ce, "checks": checks,
    }


def fit_logit(case, df, spec, covs, probes):
    X, labels, factors = build_design(df, spec)
    y = df[spec["outcome"]].to_numpy(float)
    groups = None if spec.get("cluster") is None else df[spec["cluster"]].tolist()
    model = sm.Logit(y, X)
    kw = dict(method="newton", tol=1e-12, maxiter=100, disp=0)
    res = model.fit(**kw)
    assert res.mle_retvals["converged"]
    n, p = X.shape
    params = np.asarray(res.params)
    mu = 1.0 / (1.0 + np.exp(-X @ params))
    score = X * (y - mu)[:, None]
    grad = np.abs(score.sum(axis=0)).max()
    assert grad < 1e-8, grad
    H = (X * (mu * (1 - mu))[:, None]).T @ X
    Hinv = np.linalg.inv(H)
    fit = {
        "log_likelihood": float(res.llf),
        "llnull": float(res.llnull),
        "mcfadden_r2": float(res.prsquared),
        "aic": float(res.aic),
        "bic": float(res.bic),
        "deviance": float(-2.0 * res.llf),
        "lr_statistic": float(res.llr),
        "lr_p_value": float(res.llr_pvalue),
        "df_model": float(res.df_model),
        "iterations": int(res.mle_retvals["iterations"]),
        "source": (f"{SM} Logit.fit(method='newton', tol=1e-12, maxiter=100): llf, llnull, prsquared "
                   "(= 1 - llf/llnull), aic (= -2 llf + 2 p), bic (= -2 llf + log(n) p), llr, llr_pvalue; "
                   "deviance = -2 llf"),
    }
    checks = {"max_abs_score_at_estimate": float(grad), "closed_form": {}}
    covs_out, by_se = {}, {}
    dfr = int(n - p)
    assert float(res.df_resid) == dfr
    for cv in covs:
        if cv == "classical":
            r = res
            checks["closed_form"][cv] = assert_cov_close(Hinv, np.asarray(r.cov_params()), f"{case} {cv}")
            covs_out[cv] = cov_block(params, np.asarray(r.cov_params()), "normal", None,
                                     f"{SM} Logit nonrobust: inverse of the negative Hessian "
                                     f"(X' diag(mu(1-mu)) X)^-1; z statistics")
        elif cv == "hc0":
            r = model.fit(cov_type="HC0", **kw)
            V = Hinv @ (score.T @ score) @ Hinv
            checks["closed_form"][cv] = assert_cov_close(V, np.asarray(r.cov_params()), f"{case} {cv}")
            covs_out[cv] = cov_block(params, np.asarray(r.cov_params()), "normal", None,
                                     f"{SM} Logit cov_type='HC0': H^-1 [sum_i (y_i-mu_i)^2 x_i x_i'] H^-1, "
                                     f"no small-sample factor; z statistics")
        elif cv == "cluster":
            codes = pd.factorize(pd.Series(groups), sort=True)[0]
            r = model.fit(cov_type="cluster", cov_kwds={"groups": codes}, **kw)
            G = int(len(set(groups)))
            Vc = np.asarray(r.cov_params())
            U = np.zeros((G, p))
            np.add.at(U, codes, score)
            corr = (G / (G - 1.0)) * ((n - 1.0) / (n - p))
            checks["closed_form"][cv] = assert_cov_close(corr * Hinv @ (U.T @ U) @ Hinv, Vc, f"{case} {cv}")
            covs_out[cv] = cov_block(
                params, Vc, "normal", None,
                f"{SM} Logit cov_type='cluster' (use_correction=True, df_correction=True): "
                f"G/(G-1) * (n-1)/(n-p) * H^-1 [sum_g s_g s_g'] H^-1, s_g = sum_(i in g) (y_i-mu_i) x_i; "
                f"z statistics (Logit has use_t=False, so statsmodels' df_resid_inference = G-1 is not used)",
                {"n_clusters": G, "df_resid_inference": G - 1, "correction": corr})
        else:
            raise ValueError(cv)
        check_block_against(r, covs_out[cv], f"{case} {cv}")
        by_se[cv] = (r, None, f"Logit {cv}")
        wi = wald_interactions(r, labels, factors, use_f=False)
        if wi:
            covs_out[cv]["wald_interactions"] = wi
    ce = conditional_effects(df, labels, factors, by_se, probes) if probes else []
    return X, labels, params, {
        "n": int(n), "df_residual": dfr, "terms": labels,
        "estimates": fl(params),
        "estimates_source": f"{SM} Logit.fit(method='newton', tol=1e-12, maxiter=100)",
        "fit": fit, "covariances": covs_out, "conditional_effects": ce, "checks": checks,
    }


# --------------------------------------------------------------------------
# cases


def rng_for(k):
    return np.random.Generator(np.random.PCG64(np.random.SeedSequence([BASE_SEED, k])))


def sim_ols_binary_continuous():
    rng = rng_for(1)
    n, G = 400, 40
    site = np.concatenate([np.arange(1, G + 1), rng.integers(1, G + 1, n - G)])
    rng.shuffle(site)
    x = rng.normal(0.3, 1.2, n)
    g = (rng.random(n) < 0.45).astype(int)
    u = rng.normal(0.0, 0.5, G)[site - 1]
    e = rng.normal(0.0, 1.0, n) * (0.5 + 0.4 * np.abs(x))
    y = 2 + 1.5 * x + 0.8 * g - 0.9 * x * g + u + e
    df = pd.DataFrame({"y": y, "x": x, "g": g, "site": site})
    desc = ("simulated: y = 2 + 1.5x + 0.8g - 0.9xg + site effect N(0,0.5^2) + N(0,1)*(0.5+0.4|x|); "
            "x ~ N(0.3,1.2^2), g ~ Bernoulli(0.45), site = 40 integer cluster ids")
    spec = dict(outcome="y", predictors=["x", "g"], interactions=[["x", "g"]], family="linear",
                intercept=True, weights=None, cluster="site", categorical={})
    probes = [dict(focal="g", moderator="x", at="meansd"),
              dict(focal="x", moderator="g", at=[0.0, 1.0])]
    return df, desc, spec, ["classical", "hc0", "hc1", "hc2", "hc3", "hc4", "cluster"], probes


def sim_ols_continuous_3way():
    rng = rng_for(2)
    n, G = 600, 30
    cov = np.array([[1.0, 0.3, 0.2], [0.3, 1.0, -0.1], [0.2, -0.1, 1.0]])
    xzw = rng.multivariate_normal([1.0, -0.5, 2.0], cov, size=n, method="cholesky")
    x, z, w = xzw.T
    c1 = rng.normal(10.0, 3.0, n)
    c2 = rng.gamma(2.0, 1.5, n)
    site_idx = np.concatenate([np.arange(G), rng.integers(0, G, n - G)])
    rng.shuffle(site_idx)
    site = np.array([f"S{k + 1:02d}" for k in site_idx])
    u = rng.normal(0.0, 0.4, G)[site_idx]
    e = rng.normal(0.0, 1.0, n) * np.exp(0.2 * z)
    y = (1 + 0.5 * x + 0.3 * z - 0.2 * w + 0.4 * x * z - 0.25 * x * w + 0.15 * z * w
         + 0.2 * x * z * w + 0.6 * c1 - 0.3 * c2 + u + e)
    df = pd.DataFrame({"y": y, "x": x, "z": z, "w": w, "c1": c1, "c2": c2, "site": site})
    desc = ("simulated: correlated normal x, z, w; controls c1 ~ N(10,9), c2 ~ Gamma(2,1.5); "
            "y = 1 + .5x + .3z - .2w + .4xz - .25xw + .15zw + .2xzw + .6c1 - .3c2 + site effect + "
            "N(0,1)exp(.2z); site = 30 string cluster ids")
    spec = dict(outcome="y", predictors=["x", "z", "w", "c1", "c2"], interactions=[["x", "z", "w"]],
                family="linear", intercept=True, weights=None, cluster="site", categorical={})
    probes = [dict(focal="x", moderator="z", at="meansd", fixed={"w": "mean"}),
              dict(focal="x", moderator="w", at="meansd", fixed={"z": "mean"})]
    return df, desc, spec, ["classical", "hc3", "hc4", "cluster"], probes


def sim_ols_categorical():
    rng = rng_for(3)
    n = 450
    region = rng.choice(np.array(["Plains", "Coast", "Hills"]), size=n, p=[0.4, 0.35, 0.25])
    x = rng.normal(5.0, 2.0, n)
    c1 = rng.uniform(0.0, 1.0, n)
    inter = {"Coast": 10.0, "Hills": 11.5, "Plains": 9.0}
    slope = {"Coast": 1.2, "Hills": 0.6, "Plains": 1.5}
    a = np.array([inter[r] for r in region])
    b = np.array([slope[r] for r in region])
    y = a + b * x + 0.5 * c1 + rng.normal(0.0, 1.5, n) * (1 + 0.15 * x)
    df = pd.DataFrame({"y": y, "x": x, "region": region, "c1": c1})
    desc = ("simulated: region in {Plains, Coast, Hills} (p = .40/.35/.25); x ~ N(5,4); c1 ~ U(0,1); "
            "y = a_region + b_region x + .5c1 + N(0,1.5^2)(1 + .15x)")
    spec = dict(outcome="y", predictors=["x", "region", "c1"], interactions=[["region", "x"]],
                family="linear", intercept=True, weights=None, cluster=None,
                categorical={"region": "Coast"})
    probes = [dict(focal="x", moderator="region", at=["Coast", "Hills", "Plains"]),
              dict(focal="region=Plains", moderator="x", at="meansd")]
    return df, desc, spec, ["classical", "hc1", "hc3"], probes


def sim_wls_weights():
    rng = rng_for(4)
    n = 350
    x = rng.normal(0.0, 1.0, n)
    z = rng.normal(2.0, 1.0, n)
    w = rng.uniform(0.5, 3.0, n)
    y = 0.5 + x - 0.7 * z + 0.45 * x * z + rng.normal(0.0, 1.0, n) / np.sqrt(w) * (1 + 0.3 * np.abs(z))
    df = pd.DataFrame({"y": y, "x": x, "z": z, "w": w})
    desc = ("simulated: x ~ N(0,1), z ~ N(2,1), w ~ U(0.5,3); y = .5 + x - .7z + .45xz + "
            "N(0,1)(1+.3|z|)/sqrt(w); WLS with weights w (inverse-variance style)")
    spec = dict(outcome="y", predictors=["x", "z"], interactions=[["x", "z"]], family="linear",
                intercept=True, weights="w", cluster=None, categorical={})
    probes = [dict(focal="x", moderator="z", at="meansd")]
    return df, desc, spec, ["classical", "hc0", "hc1", "hc2", "hc3", "hc4"], probes


def sim_logit_interaction():
    rng = rng_for(5)
    n, G = 1500, 50
    site = np.concatenate([np.arange(1, G + 1), rng.integers(1, G + 1, n - G)])
    rng.shuffle(site)
    x = rng.normal(0.0, 1.0, n)
    g = (rng.random(n) < 0.5).astype(int)
    u = rng.normal(0.0, 0.3, G)[site - 1]
    eta = -0.4 + 0.9 * x + 0.5 * g - 0.6 * x * g + u
    y = (rng.random(n) < 1 / (1 + np.exp(-eta))).astype(int)
    df = pd.DataFrame({"y": y, "x": x, "g": g, "site": site})
    desc = ("simulated: x ~ N(0,1), g ~ Bernoulli(.5), site = 50 integer cluster ids with N(0,.3^2) "
            "effects; P(y=1) = logistic(-.4 + .9x + .5g - .6xg + site effect)")
    spec = dict(outcome="y", predictors=["x", "g"], interactions=[["x", "g"]], family="logistic",
                intercept=True, weights=None, cluster="site", categorical={})
    probes = [dict(focal="g", moderator="x", at="meansd"),
              dict(focal="x", moderator="g", at=[0.0, 1.0])]
    return df, desc, spec, ["classical", "hc0", "cluster"], probes


def sim_near_collinear():
    rng = rng_for(9)
    n = 250
    x = rng.normal(2.0, 1.0, n)
    x_near = x + 1e-5 * rng.normal(0.0, 1.0, n)
    z = rng.normal(0.0, 1.0, n)
    y = 1 + 0.7 * x + 0.3 * x_near + 0.5 * z + rng.normal(0.0, 0.2, n)
    df = pd.DataFrame({"y": y, "x": x, "x_near": x_near, "z": z})
    desc = ("simulated: x ~ N(2,1), x_near = x + 1e-5 N(0,1) (near collinear, full rank), z ~ N(0,1); "
            "y = 1 + .7x + .3x_near + .5z + N(0,.2^2)")
    spec = dict(outcome="y", predictors=["x", "x_near", "z"], interactions=[], family="linear",
                intercept=True, weights=None, cluster=None, categorical={})
    return df, desc, spec, ["classical", "hc0", "hc1", "hc2", "hc3", "hc4"], []


def shipped_longley():
    note = dataset_note("longley")
    raw = pd.read_csv(note["_path"])
    cols = ["TOTEMP", "GNPDEFL", "GNP", "UNEMP", "ARMED", "POP", "YEAR"]
    df = raw[cols].copy()
    spec = dict(outcome="TOTEMP", predictors=cols[1:], interactions=[], family="linear",
                intercept=True, weights=None, cluster=None, categorical={})
    return df, note, spec, ["classical", "hc0", "hc1", "hc2", "hc3", "hc4"], []


def shipped_grunfeld():
    note = dataset_note("grunfeld")
    raw = pd.read_csv(note["_path"])
    df = raw[["invest", "value", "capital", "firm", "year"]].copy()
    spec = dict(outcome="invest", predictors=["value", "capital"], interactions=[["value", "capital"]],
                family="linear", intercept=True, weights=None, cluster="firm", categorical={})
    probes = [dict(focal="value", moderator="capital", at="meansd")]
    return df, note, spec, ["classical", "cluster"], probes


def shipped_anes96():
    note = dataset_note("anes96")
    raw = sm.datasets.anes96.load_pandas().data
    df = raw[["vote", "age", "educ", "income", "selfLR"]].copy()
    for c in df.columns:  # load_pandas() casts to float; these columns hold whole numbers
        assert np.all(df[c] == np.round(df[c]))
        df[c] = df[c].astype(np.int64)
    spec = dict(outcome="vote", predictors=["age", "educ", "income", "selfLR"],
                interactions=[["selfLR", "educ"]], family="logistic", intercept=True,
                weights=None, cluster=None, categorical={})
    probes = [dict(focal="selfLR", moderator="educ", at="meansd")]
    return df, note, spec, ["classical", "hc0"], probes


CASES = [
    ("ols_binary_continuous", sim_ols_binary_continuous),
    ("ols_continuous_3way", sim_ols_continuous_3way),
    ("ols_categorical", sim_ols_categorical),
    ("wls_weights", sim_wls_weights),
    ("logit_interaction", sim_logit_interaction),
    ("anes96_logit", shipped_anes96),
    ("longley_ols", shipped_longley),
    ("grunfeld_cluster", shipped_grunfeld),
    ("near_collinear", sim_near_collinear),
]


# --------------------------------------------------------------------------
# output


def all_finite(obj, where="fixture"):
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
    ap.add_argument("--only", nargs="*", help="case names to write (default: all)")
    args = ap.parse_args()
    os.makedirs(args.out, exist_ok=True)
    source = library_source()
    print(f"statsmodels {statsmodels.__version__}  ({source})")
    for case, make in CASES:
        if args.only and case not in args.only:
            continue
        df, desc, spec, covs, probes = make()
        back = write_csv_roundtrip(df, os.path.join(args.out, f"{case}.csv"))
        if spec["family"] == "linear":
            _, labels, _, body = fit_linear(case, back, spec, covs, probes)
        else:
            _, labels, _, body = fit_logit(case, back, spec, covs, probes)
        doc = {"case": case, "source": source, "command": COMMAND, "data": f"{case}.csv"}
        if isinstance(desc, dict):
            doc["dataset"] = {k: v for k, v in desc.items() if not k.startswith("_")}
        else:
            doc["dataset"] = {"generated": desc, "generator": (
                f"numpy.random.Generator(PCG64(SeedSequence([{BASE_SEED}, case number]))) "
                f"in make_statsmodels_reference.py")}
        doc["spec"] = spec
        doc.update(body)
        all_finite(doc, case)
        text = json.dumps(doc, indent=1, ensure_ascii=False, allow_nan=False) + "\n"
        atomic_write(os.path.join(args.out, f"{case}.json"), text)
        replaced = [k for k, b in body["covariances"].items() if b["source"].startswith("60-digit")]
        if body["estimates_source"].startswith("60-digit"):
            replaced.insert(0, "estimates")
        print(f"  {case:22s} n={body['n']:5d} p={len(labels):2d}  terms: {', '.join(labels)}"
              + (f"\n      high-precision values stored for: {', '.join(replaced)}" if replaced else ""))
    return 0


if __name__ == "__main__":
    sys.exit(main())
