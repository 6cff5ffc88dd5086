#!/usr/bin/python3
"""Reference fixtures for Moderato's count and probit models (Poisson with an
optional exposure, negative binomial NB2, probit), computed with statsmodels.

Usage:
    /usr/bin/python3 tests/reference/make_count_reference.py [--out DIR]

DIR defaults to tests/reference/fixtures next to this script.  Cases:

  poisson_counts    GLM Poisson (log link), y ~ x + w + g + x*w, 40 sites;
                    classical, HC0, HC1, cluster.
  poisson_exposure  GLM Poisson with offset log(months) (exposure), y ~ g +
                    w + x + g*w, 40 sites; the 0/1 focal g on the rate per
                    one month.
  negbin_counts     NegativeBinomial NB2, alpha estimated jointly by maximum
                    likelihood, y ~ x + w + g + x*w, 40 sites.
  probit_binary     Probit, y ~ x + w + g + x*w, 50 sites.
  randhie_poisson,  statsmodels' public-domain `randhie` data (RAND Health
  randhie_negbin    Insurance Experiment): mdvis ~ lncoins + physlm + disea +
                    idp + lncoins*disea, Poisson and NB2 on one shared CSV.
  anes96_probit     statsmodels' public-domain `anes96` data: probit vote ~
                    age + educ + income + selfLR + selfLR*educ.  (Not
                    `spector`: statsmodels ships it with "Used with express
                    permission of the original author, who retains all
                    rights.", so its data are not committed.)

The shipped-data cases have no cluster column: classical, HC0 and HC1 only.

Each case writes CASE.csv (doubles in shortest round-trip form, read back
and checked bit for bit; the randhie cases share randhie_counts.csv) and
CASE.json in the layout of make_statsmodels_reference.py, plus:
`dispersion` (NB: alpha and its SE per covariance, and per covariance the
full (p+1)x(p+1) matrix `covariance_with_alpha`), `overdispersion` (Poisson:
Pearson chi-square and the Cameron & Trivedi (1990) auxiliary regression),
`outcome_effects` and `interaction_effect` (on the outcome's scale, by
numerical differentiation of statsmodels predictions, delta-method SEs from
a numerical Jacobian) and `rate_ratios` (count cases).

Small-sample factors, as statsmodels 0.13.5 applies them (checked below):
fit(cov_type='HC1') on GLM and discrete models returns HC0 unscaled (the
results classes have no cov_HC1, so covtype falls back to
cov_white_simple(use_correction=False)); the `hc1` blocks here are
statsmodels' sandwich_covariance.cov_white_simple(results,
use_correction=True) = n/(n-k) HC0.  cov_type='cluster' multiplies by
G/(G-1) (n-1)/(n-k).  k counts every estimated parameter: p for Poisson and
probit, p + 1 (alpha) for NB2.

Before writing, the script checks: every covariance against a closed form in
numpy (analytic scores and Hessians; NB2's Hessian by differentiating the
analytic score numerically); the log-likelihoods against scipy.stats
logpmf/logcdf sums; the score at the estimate (max |g_j| SE_j < 1e-8); the
exposure fit against GLM(exposure=months); the GLM Poisson fit against
discrete Poisson; every outcome-scale effect and SE against closed-form
derivatives with a complex-step Jacobian (the stored numerical values agree
to about 1e-9 relative or better, recorded under checks); every number is
finite.  Deterministic: two runs give byte-identical files.
"""

import argparse
import os
import sys

import numpy as np
import pandas as pd
import scipy.special
import scipy.stats
import statsmodels
import statsmodels.api as sm
from statsmodels.stats import sandwich_covariance

from make_statsmodels_reference import (all_finite, assert_cov_close, build_design, contrast_vector,
                                        cov_block, dataset_note, interaction_columns, moderator_points)
from reference_io import fl, library_source, write_case

BASE_SEED = 20261210
COMMAND = "/usr/bin/python3 tests/reference/make_count_reference.py --out DIR"
SM = f"statsmodels {statsmodels.__version__}"
Z975 = 1.959963984540054
# GLM by Newton (after statsmodels' 3 IRLS start steps): its nonrobust covariance
# is the inverse Hessian at the final estimate. IRLS (fit(tol=1e-13)) reports
# (X' W X)^-1 with the weights of the step before, 2e-10 to 6e-10 off here.
GLM_KW = dict(method="newton", tol=1e-12, maxiter=100)
NEWTON_KW = dict(method="newton", tol=1e-12, maxiter=300, disp=0)
EFFECT_RTOL = 1e-7  # numerical effects and SEs vs the closed forms


def rng_for(k):
    return np.random.Generator(np.random.PCG64(np.random.SeedSequence([BASE_SEED, k])))


def sites(rng, n, G):
    """Cluster ids 1..G, each used at least once, in random order."""
    site = np.concatenate([np.arange(1, G + 1), rng.integers(1, G + 1, n - G)])
    rng.shuffle(site)
    return site


def base_spec(outcome, predictors, interactions, family, cluster, exposure=None):
    return dict(outcome=outcome, predictors=predictors, interactions=interactions, family=family,
                intercept=True, weights=None, cluster=cluster, categorical={}, exposure=exposure)


# --------------------------------------------------------------------------
# data


def make_poisson_counts():
    rng = rng_for(1)
    n, G = 1200, 40
    site = sites(rng, n, G)
    x = np.round(rng.normal(0.0, 1.0, n), 4)
    w = np.round(rng.normal(1.0, 0.8, n), 4)
    g = (rng.random(n) < 0.4).astype(int)
    u = rng.normal(0.0, 0.2, G)[site - 1]
    y = rng.poisson(np.exp(0.2 + 0.35 * x + 0.25 * w + 0.3 * g + 0.15 * x * w + u))
    df = pd.DataFrame({"y": y, "x": x, "w": w, "g": g, "site": site})
    desc = ("simulated: x ~ N(0,1), w ~ N(1,0.8^2) (both rounded to 4 decimals), g ~ Bernoulli(.4), "
            "site = 40 integer cluster ids with N(0,.2^2) effects; "
            "y ~ Poisson(exp(.2 + .35x + .25w + .3g + .15xw + site effect))")
    spec = base_spec("y", ["x", "w", "g"], [["x", "w"]], "poisson", "site")
    return df, desc, spec


def make_poisson_exposure():
    rng = rng_for(2)
    n, G = 1200, 40
    site = sites(rng, n, G)
    g = (rng.random(n) < 0.45).astype(int)
    w = np.round(rng.normal(2.0, 1.0, n), 4)
    x = np.round(rng.normal(0.0, 1.0, n), 4)
    months = np.round(rng.uniform(0.5, 24.0, n), 3)
    u = rng.normal(0.0, 0.15, G)[site - 1]
    y = rng.poisson(months * np.exp(-1.2 + 0.5 * g + 0.15 * w - 0.25 * g * w + 0.3 * x + u))
    df = pd.DataFrame({"y": y, "g": g, "w": w, "x": x, "months": months, "site": site})
    desc = ("simulated: g ~ Bernoulli(.45), w ~ N(2,1), x ~ N(0,1) (rounded to 4 decimals), "
            "months ~ U(0.5,24) (3 decimals), site = 40 integer cluster ids with N(0,.15^2) effects; "
            "y ~ Poisson(months exp(-1.2 + .5g + .15w - .25gw + .3x + site effect))")
    spec = base_spec("y", ["g", "w", "x"], [["g", "w"]], "poisson", "site", exposure="months")
    return df, desc, spec


def make_negbin_counts():
    rng = rng_for(3)
    n, G, alpha = 1200, 40, 0.6
    site = sites(rng, n, G)
    x = np.round(rng.normal(0.0, 1.0, n), 4)
    w = np.round(rng.uniform(-1.0, 3.0, n), 4)
    g = (rng.random(n) < 0.5).astype(int)
    u = rng.normal(0.0, 0.2, G)[site - 1]
    mu = np.exp(0.5 + 0.35 * x + 0.2 * w + 0.25 * g - 0.15 * x * w + u)
    y = rng.poisson(mu * rng.gamma(1.0 / alpha, alpha, n))
    df = pd.DataFrame({"y": y, "x": x, "w": w, "g": g, "site": site})
    desc = ("simulated: x ~ N(0,1), w ~ U(-1,3) (rounded to 4 decimals), g ~ Bernoulli(.5), site = 40 "
            "integer cluster ids with N(0,.2^2) effects; mu = exp(.5 + .35x + .2w + .25g - .15xw + site "
            "effect); y ~ Poisson(mu v), v ~ Gamma(shape 1/.6, scale .6) (NB2, alpha = .6)")
    spec = base_spec("y", ["x", "w", "g"], [["x", "w"]], "negative-binomial", "site")
    return df, desc, spec


def make_probit_binary():
    rng = rng_for(4)
    n, G = 1500, 50
    site = sites(rng, n, G)
    x = np.round(rng.normal(0.0, 1.0, n), 4)
    w = np.round(rng.normal(0.0, 1.0, n), 4)
    g = (rng.random(n) < 0.5).astype(int)
    u = rng.normal(0.0, 0.2, G)[site - 1]
    eta = -0.2 + 0.6 * x + 0.3 * w + 0.4 * g - 0.35 * x * w + u
    y = (rng.random(n) < scipy.stats.norm.cdf(eta)).astype(int)
    df = pd.DataFrame({"y": y, "x": x, "w": w, "g": g, "site": site})
    desc = ("simulated: x, w ~ N(0,1) (rounded to 4 decimals), g ~ Bernoulli(.5), site = 50 integer "
            "cluster ids with N(0,.2^2) effects; P(y=1) = Phi(-.2 + .6x + .3w + .4g - .35xw + site effect)")
    spec = base_spec("y", ["x", "w", "g"], [["x", "w"]], "probit", "site")
    return df, desc, spec


def shipped_randhie(family):
    note = dataset_note("randhie")
    raw = pd.read_csv(note["_path"], float_precision="round_trip")
    df = raw[["mdvis", "lncoins", "physlm", "disea", "idp"]].copy()
    for c in ("mdvis", "idp"):
        assert np.all(df[c] == np.round(df[c]))
        df[c] = df[c].astype(np.int64)
    note["columns_kept"] = list(df.columns)
    note["interaction_why"] = (
        "lncoins x disea: whether the response of outpatient visits to cost sharing (log coinsurance) "
        "differs with the number of chronic diseases, a moderation question the data can answer")
    spec = base_spec("mdvis", ["lncoins", "physlm", "disea", "idp"], [["lncoins", "disea"]], family, None)
    return df, note, spec


def shipped_anes96():
    note = dataset_note("anes96")
    raw = sm.datasets.anes96.load_pandas().data
    df = raw[["vote", "age", "educ", "income", "selfLR"]].copy()
    for c in df.columns:  # load_pandas() casts to float; these columns hold whole numbers
        assert np.all(df[c] == np.round(df[c]))
        df[c] = df[c].astype(np.int64)
    note["why_not_spector"] = (
        "statsmodels ships `spector` with the COPYRIGHT text 'Used with express permission of the "
        "original author, who retains all rights.', so its data are not committed here; anes96 is "
        "public domain")
    spec = base_spec("vote", ["age", "educ", "income", "selfLR"], [["selfLR", "educ"]], "probit", None)
    return df, note, spec


# --------------------------------------------------------------------------
# the three families: statsmodels fits, closed-form scores and information


class Family:
    """One fitted model: statsmodels' model and results, the parameter
    vector (beta, then alpha for NB2), and the closed forms used to check
    statsmodels: per-observation scores and the information (negative
    Hessian) at given parameters, and the inverse link F with its first two
    derivatives (they accept complex linear predictors, for complex-step
    Jacobians)."""

    def __init__(self, kind, y, X, offset):
        self.kind, self.y, self.X, self.p = kind, y, X, X.shape[1]
        self.offset = np.zeros(len(y)) if offset is None else offset
        if kind == "poisson":
            self.model = sm.GLM(y, X, family=sm.families.Poisson(), offset=offset)
            self.kw = dict(GLM_KW)
            self.res = self.model.fit(**self.kw)
            assert self.res.mle_retvals["converged"]
            off = "" if offset is None else ", offset=log(exposure)"
            self.call = (f"{SM} GLM(y, X, family=Poisson(){off}).fit(method='newton', tol=1e-12, "
                         f"maxiter=100)")
        elif kind == "negative-binomial":
            self.model = sm.NegativeBinomial(y, X, loglike_method="nb2", offset=offset)
            self.kw = dict(NEWTON_KW)
            self.res = self.model.fit(**self.kw)
            assert self.res.mle_retvals["converged"]
            self.call = (f"{SM} NegativeBinomial(y, X, loglike_method='nb2').fit(method='newton', "
                         f"tol=1e-12, maxiter=300) (start: statsmodels' own Poisson fit)")
        else:
            self.model = sm.Probit(y, X)
            self.kw = dict(NEWTON_KW)
            self.res = self.model.fit(**self.kw)
            assert self.res.mle_retvals["converged"]
            self.call = f"{SM} Probit(y, X).fit(method='newton', tol=1e-12, maxiter=300)"
        self.full = np.asarray(self.res.params, dtype=float)
        self.beta = self.full[:self.p]
        self.k = len(self.full)

    def refit(self, cov_type, groups=None):
        kw = dict(self.kw, cov_type=cov_type)
        if groups is not None:
            kw["cov_kwds"] = {"groups": groups}
        r = self.model.fit(**kw)
        assert np.array_equal(np.asarray(r.params), self.full), f"refit with {cov_type} moved the estimates"
        return r

    def predict(self, b, Xn):
        """statsmodels' prediction on the outcome scale at parameters b (the
        regression coefficients) with a zero offset: the expected count
        (rate per one unit of exposure) or the probability."""
        if self.kind == "probit":
            return self.model.predict(b, exog=Xn)
        full = b if self.kind == "poisson" else np.append(b, self.full[-1])
        return self.model.predict(full, exog=Xn, offset=np.zeros(len(Xn)))

    def inverse_link(self, eta, order):
        if self.kind != "probit":
            return np.exp(eta)
        pdf = np.exp(-0.5 * eta * eta) / np.sqrt(2.0 * np.pi)
        return (scipy.special.ndtr(eta), pdf, -eta * pdf)[order]

    def scores(self, full):
        eta = self.X @ full[:self.p] + self.offset
        y = self.y
        if self.kind == "poisson":
            return self.X * (y - np.exp(eta))[:, None]
        if self.kind == "probit":
            q = 2.0 * y - 1.0
            lam = q * np.exp(scipy.stats.norm.logpdf(q * eta) - scipy.stats.norm.logcdf(q * eta))
            return self.X * lam[:, None]
        a, mu = full[-1], np.exp(eta)
        sb = self.X * ((y - mu) / (1.0 + a * mu))[:, None]
        sa = ((y - mu) / (a * (1.0 + a * mu)) + np.log1p(a * mu) / a ** 2
              - (scipy.special.digamma(y + 1.0 / a) - scipy.special.digamma(1.0 / a)) / a ** 2)
        return np.column_stack([sb, sa])

    def information(self, full):
        """Negative Hessian of the log-likelihood: closed forms for Poisson
        (X' diag(mu) X) and probit (X' diag(L (L + XB)) X, L = q phi(q XB) /
        Phi(q XB), q = 2y - 1); for NB2 the Richardson-extrapolated central
        difference of the closed-form score sum."""
        eta = self.X @ full[:self.p] + self.offset
        if self.kind == "poisson":
            return (self.X * np.exp(eta)[:, None]).T @ self.X
        if self.kind == "probit":
            q = 2.0 * self.y - 1.0
            lam = q * np.exp(scipy.stats.norm.logpdf(q * eta) - scipy.stats.norm.logcdf(q * eta))
            return (self.X * (lam * (lam + eta))[:, None]).T @ self.X
        cols = []
        for j in range(self.k):
            h = 1e-3 * max(1.0, abs(full[j]))
            e = np.zeros(self.k)
            e[j] = 1.0
            cols.append(-richardson(lambda t: self.scores(full + t * e).sum(axis=0), h))
        H = np.column_stack(cols)
        return 0.5 * (H + H.T)

    def loglik_closed(self):
        """The log-likelihood from scipy.stats at the estimate."""
        eta = self.X @ self.beta + self.offset
        if self.kind == "poisson":
            return float(np.sum(scipy.stats.poisson.logpmf(self.y, np.exp(eta))))
        if self.kind == "probit":
            return float(np.sum(scipy.stats.norm.logcdf((2.0 * self.y - 1.0) * eta)))
        a = self.full[-1]
        return float(np.sum(scipy.stats.nbinom.logpmf(self.y, 1.0 / a, 1.0 / (1.0 + a * np.exp(eta)))))


def richardson(f, h, levels=3):
    """Central differences (f(h) - f(-h)) / 2h at h, h/2, h/4, extrapolated
    in h^2 (Neville): error O(h^6) for smooth f."""
    est = [(f(h / 2 ** k) - f(-h / 2 ** k)) / (2.0 * h / 2 ** k) for k in range(levels)]
    for m in range(1, levels):
        est = [(4 ** m * est[k + 1] - est[k]) / (4 ** m - 1) for k in range(len(est) - 1)]
    return est[0]


# --------------------------------------------------------------------------
# covariances


def sandwich_sources(fam, kind, n_clusters=None):
    k = "p + 1 (alpha counted)" if fam.kind == "negative-binomial" else "p"
    bread = ("H^-1 with H the observed information of (beta, alpha)" if fam.kind == "negative-binomial"
             else "H^-1 with H the information (negative Hessian)")
    if kind == "classical":
        what = {"poisson": "nonrobust: (X' diag(mu) X)^-1 from IRLS (scale 1)",
                "probit": "nonrobust: inverse of the negative observed Hessian X' diag(L(L+XB)) X, "
                          "L = q phi(q XB)/Phi(q XB), q = 2y-1",
                "negative-binomial": "nonrobust: inverse of the negative observed Hessian of "
                                     "(beta, alpha)"}[fam.kind]
        return f"{fam.call} {what}; z statistics"
    if kind == "hc0":
        return (f"{fam.call[:fam.call.rindex('.fit(')]}.fit(..., cov_type='HC0'): {bread}, "
                f"H^-1 [sum_i s_i s_i'] H^-1 with s_i the score of observation i, no small-sample factor; "
                f"z statistics")
    if kind == "hc1":
        return (f"{SM} statsmodels.stats.sandwich_covariance.cov_white_simple(results, "
                f"use_correction=True) = n/(n-k) HC0, k = {k}. Not fit(cov_type='HC1'): in {SM} that "
                f"returns HC0 unscaled for GLM and discrete models (no cov_HC1 attribute, so covtype "
                f"falls back to cov_white_simple(use_correction=False)); z statistics")
    return (f"{fam.call[:fam.call.rindex('.fit(')]}.fit(..., cov_type='cluster', cov_kwds={{'groups': "
            f"codes}}) (defaults use_correction=True, df_correction=True): G/(G-1) * (n-1)/(n-k) * "
            f"H^-1 [sum_g s_g s_g'] H^-1, s_g = sum of the scores in cluster g, k = {k}, G = {n_clusters}; "
            f"z statistics (use_t=False, so df_resid_inference = G-1 is not used)")


def covariance_of(fam, kind, groups, closed):
    """statsmodels' covariance of one kind, checked against the closed form;
    returns (results to test with, matrix, cov_p for t_test/wald_test,
    extra block keys, check)."""
    n, k = len(fam.y), fam.k
    Hinv, S = closed
    what = f"{fam.kind} {kind}"
    rtol = 1e-7 if fam.kind == "negative-binomial" else 1e-8
    if kind == "classical":
        V = np.asarray(fam.res.cov_params())
        return fam.res, V, None, {}, assert_cov_close(Hinv, V, what, rtol)
    if kind == "hc0":
        r = fam.refit("HC0")
        V = np.asarray(r.cov_params())
        return r, V, None, {"correction": 1.0}, assert_cov_close(Hinv @ (S.T @ S) @ Hinv, V, what, rtol)
    if kind == "hc1":
        r1 = fam.refit("HC1")
        hc0 = np.asarray(fam.refit("HC0").cov_params())
        assert np.array_equal(np.asarray(r1.cov_params()), hc0), "statsmodels' HC1 is no longer HC0"
        V = sandwich_covariance.cov_white_simple(fam.res, use_correction=True)
        corr = n / (n - k)
        check = assert_cov_close(corr * Hinv @ (S.T @ S) @ Hinv, V, what, rtol)
        return fam.res, V, V, {"correction": corr, "k_in_correction": k}, check
    codes = pd.factorize(pd.Series(groups), sort=True)[0]
    r = fam.refit("cluster", codes)
    V = np.asarray(r.cov_params())
    G = int(codes.max() + 1)
    U = np.zeros((G, k))
    np.add.at(U, codes, S)
    corr = (G / (G - 1.0)) * ((n - 1.0) / (n - k))
    check = assert_cov_close(corr * Hinv @ (U.T @ U) @ Hinv, V, what, rtol)
    return r, V, None, {"n_clusters": G, "df_resid_inference": G - 1, "correction": corr,
                        "k_in_correction": k}, check


def check_block(r, block, p, what):
    """A block's SEs, z statistics, p-values and intervals (scipy from the
    covariance) agree with statsmodels' own for the regression coefficients."""
    for key, val in (("std_errors", r.bse), ("statistics", r.tvalues), ("p_values", r.pvalues)):
        if not np.allclose(block[key], np.asarray(val)[:p], rtol=1e-10, atol=1e-300):
            raise AssertionError(f"{what}: {key} differs from statsmodels")
    ci = np.asarray(r.conf_int(0.05))[:p]
    if not (np.allclose(ci[:, 0], block["ci_lower_95"], rtol=1e-10)
            and np.allclose(ci[:, 1], block["ci_upper_95"], rtol=1e-10)):
        raise AssertionError(f"{what}: confidence interval differs from statsmodels")


def wald_block(fam, r, cov_p, labels, factors):
    cols = interaction_columns(factors)
    R = np.zeros((len(cols), fam.k))
    for i, j in enumerate(cols):
        R[i, j] = 1.0
    wt = r.wald_test(R, cov_p=cov_p, use_f=False, scalar=True)
    stat = float(np.squeeze(wt.statistic))
    b = fam.full[cols]
    V = (cov_p if cov_p is not None else np.asarray(r.cov_params()))[np.ix_(cols, cols)]
    direct = float(b @ np.linalg.solve(V, b))
    assert abs(stat - direct) <= 1e-10 * direct, "wald_test differs from b' V^-1 b"
    return {"terms": [labels[j] for j in cols], "statistic": stat, "p_value": float(np.squeeze(wt.pvalue)),
            "distribution": "chi2", "df": len(cols),
            "source": f"{SM} wald_test(R, use_f=False) with this block's covariance; chi-square W"}


def covariances(fam, kinds, groups, labels, factors):
    """Per kind: the coefficient block (cov_block layout), the full matrix
    with alpha for NB2, the joint Wald test of the product terms. Returns
    (blocks, {kind: (results, V, cov_p)}, closed-form checks)."""
    info = fam.information(fam.full)
    Hinv = np.linalg.inv(info)
    S = fam.scores(fam.full)
    blocks, used, checks = {}, {}, {}
    for kind in kinds:
        r, V, cov_p, extra, checks[kind] = covariance_of(fam, kind, groups, (Hinv, S))
        G = extra.get("n_clusters")
        block = cov_block(fam.beta, V[:fam.p, :fam.p], "normal", None, sandwich_sources(fam, kind, G), extra)
        if kind != "hc1":
            check_block(r, block, fam.p, f"{fam.kind} {kind}")
        if fam.kind == "negative-binomial":
            block["covariance_with_alpha"] = fl(V)
            block["covariance_with_alpha_order"] = labels + ["alpha"]
        block["wald_interactions"] = wald_block(fam, r, cov_p, labels, factors)
        blocks[kind] = block
        used[kind] = (r, V, cov_p)
    checks["source"] = ("max over (i,j) of |V_closed - V_statsmodels| / sqrt(V_ii V_jj); closed forms in numpy "
                        "from the analytic scores and information (NB2: information by differentiating the "
                        "analytic score numerically)")
    return blocks, used, checks, Hinv


# --------------------------------------------------------------------------
# fit statistics, overdispersion, dispersion


def glm_null_closed(fam):
    """Intercept-only Poisson with the same offset: mu0_i = exp(off_i) sum y /
    sum exp(off)."""
    e = np.exp(fam.offset)
    mu0 = e * fam.y.sum() / e.sum()
    return float(np.sum(scipy.stats.poisson.logpmf(fam.y, mu0)))


def fit_statistics(fam, checks):
    res = fam.res
    llf = float(res.llf)
    checks["log_likelihood_vs_scipy"] = abs(llf - fam.loglik_closed()) / abs(llf)
    assert checks["log_likelihood_vs_scipy"] < 1e-12
    if fam.kind == "poisson":
        llnull = float(res.llnull)
        checks["llnull_vs_closed_form"] = abs(llnull - glm_null_closed(fam)) / abs(llnull)
        assert checks["llnull_vs_closed_form"] < 1e-12
        lr = 2.0 * (llf - llnull)
        fit = {"log_likelihood": llf, "llnull": llnull, "mcfadden_r2": 1.0 - llf / llnull,
               "deviance": float(res.deviance), "aic": float(res.aic), "bic": float(res.bic_llf),
               "bic_deviance": float(res.bic_deviance), "lr_statistic": lr,
               "lr_p_value": float(scipy.stats.chi2.sf(lr, res.df_model)), "df_model": float(res.df_model),
               "iterations": int(res.mle_retvals["iterations"]),
               "source": (f"{fam.call}: llf, llnull (statsmodels refits the intercept-only model with the "
                          f"same offset), deviance, aic (= -2 llf + 2 p), bic = bic_llf (= -2 llf + log(n) p); "
                          f"bic_deviance = statsmodels' deprecated default bic (deviance - df_resid log(n)); "
                          f"mcfadden_r2 = 1 - llf/llnull, lr_statistic = 2 (llf - llnull), lr_p_value = "
                          f"scipy chi2.sf(lr, df_model); iterations = mle_retvals['iterations'] (Newton steps after "
                          f"statsmodels' 3 IRLS steps for start values)")}
        return fit
    default_llnull = float(res.llnull)
    res.set_null_options(method="newton", tol=1e-12, maxiter=300, disp=0)
    llnull = float(res.llnull)
    assert res.res_null.mle_retvals["converged"]
    checks["llnull_default_minus_newton"] = default_llnull - llnull
    fit = {"log_likelihood": llf, "llnull": llnull, "mcfadden_r2": float(res.prsquared),
           "aic": float(res.aic), "bic": float(res.bic), "lr_statistic": float(res.llr),
           "lr_p_value": float(res.llr_pvalue), "df_model": float(res.df_model),
           "iterations": int(res.mle_retvals["iterations"])}
    if fam.kind == "probit":
        fit["deviance"] = -2.0 * llf
        counted = "p"
    else:
        counted = "p + 1: alpha counts as a parameter"
        assert abs(fit["aic"] - (-2.0 * llf + 2.0 * fam.k)) < 1e-9 * abs(fit["aic"])
    fit["source"] = (f"{fam.call}: llf; llnull from the intercept-only model refitted by statsmodels with "
                     f"set_null_options(method='newton', tol=1e-12, maxiter=300)"
                     + (" (alpha re-estimated)" if fam.kind == "negative-binomial" else "")
                     + f"; prsquared (= 1 - llf/llnull), aic (= -2 llf + 2 k), bic (= -2 llf + log(n) k), "
                       f"k = {counted}; llr (= 2 (llf - llnull)), llr_pvalue (chi-square with df_model = p - 1 "
                       f"df); iterations = mle_retvals['iterations']"
                     + ("; deviance = -2 llf" if fam.kind == "probit" else ""))
    return fit


def score_check(fam, V):
    """max_j |sum_i s_ij| sqrt(V_jj): the size of the remaining Newton step in
    standard errors, from the closed-form scores."""
    g = fam.scores(fam.full).sum(axis=0)
    val = float(np.max(np.abs(g) * np.sqrt(np.diag(V))))
    assert val < 1e-8, f"{fam.kind}: score at the estimate {val:.3g}"
    return val


def overdispersion(fam):
    res, y, n = fam.res, fam.y, len(fam.y)
    mu = np.asarray(res.mu)
    pearson = float(res.pearson_chi2)
    assert abs(pearson - np.sum((y - mu) ** 2 / mu)) <= 1e-12 * pearson
    aux = ((y - mu) ** 2 - y) / mu
    ols = sm.OLS(aux, mu).fit()
    coef, se, t = float(ols.params[0]), float(ols.bse[0]), float(ols.tvalues[0])
    c_np = np.sum(aux * mu) / np.sum(mu * mu)
    se_np = np.sqrt(np.sum((aux - c_np * mu) ** 2) / (n - 1) / np.sum(mu * mu))
    assert abs(coef - c_np) <= 1e-10 * abs(c_np) and abs(se - se_np) <= 1e-10 * se_np
    return {"pearson_chi2": pearson, "df_residual": int(res.df_resid), "pearson_ratio": pearson / res.df_resid,
            "pearson_source": (f"{fam.call}: pearson_chi2 = sum (y - mu)^2 / mu; pearson_ratio = "
                               f"pearson_chi2 / df_resid (n - p)"),
            "coefficient": coef, "std_error": se, "test_value": t,
            "p": float(scipy.stats.norm.sf(t)), "p_two_sided_t": float(ols.pvalues[0]), "df_t": n - 1,
            "source": (f"Cameron & Trivedi (1990) auxiliary regression, {SM} OLS(((y - mu)^2 - y) / mu, mu)"
                       f".fit() without intercept, mu = the fitted means (with the exposure where there is "
                       f"one): coefficient (an estimate of alpha in var = mu + alpha mu^2), its classical "
                       f"std_error and t statistic (test_value); p = ONE-sided upper p-value from the "
                       f"standard normal, scipy norm.sf(test_value); p_two_sided_t = statsmodels' two-sided "
                       f"t p-value with n - 1 df, for information")}


def dispersion(fam, used):
    return {"alpha": float(fam.full[-1]),
            "std_errors": {kind: float(np.sqrt(V[-1, -1])) for kind, (_, V, _) in used.items()},
            "source": (f"{fam.call}: alpha = params[-1] (var = mu + alpha mu^2, estimated jointly with beta; "
                       f"newton steps in alpha itself, no log transform); std_errors = sqrt of the last "
                       f"diagonal entry of each covariance_with_alpha")}


# --------------------------------------------------------------------------
# link-scale effects and rate ratios (statsmodels t_test)


def padded(fam, c):
    return np.concatenate([c, np.zeros(fam.k - fam.p)])


def link_effect(fam, r, V, cov_p, c):
    tt = r.t_test(padded(fam, c)[None, :], cov_p=cov_p)
    est, sd = float(np.squeeze(tt.effect)), float(np.squeeze(tt.sd))
    cf = padded(fam, c)
    assert abs(sd - np.sqrt(cf @ V @ cf)) <= 1e-10 * sd and tt.distribution != "t"
    return tt, est, sd


def conditional_effects(fam, df, labels, factors, used, focal, moderator):
    out = []
    for at_label, at in moderator_points(df, moderator, "meansd"):
        c = contrast_vector(factors, (focal, None), {moderator: at})
        for kind, (r, V, cov_p) in used.items():
            tt, est, sd = link_effect(fam, r, V, cov_p, c)
            out.append({"focal": focal, "moderator": moderator, "at": float(at), "at_label": at_label,
                        "fixed": {}, "se": kind, "contrast": fl(c), "estimate": est, "std_error": sd,
                        "statistic": float(np.squeeze(tt.tvalue)), "p_value": float(np.squeeze(tt.pvalue)),
                        "distribution": "normal", "df": None,
                        "source": (f"{SM} t_test of the linear combination "
                                   + " + ".join(f"{v!r}*b[{labels[j]}]" for j, v in enumerate(c) if v != 0)
                                   + f" ({fam.kind} {kind}"
                                   + (", cov_p = the hc1 matrix" if cov_p is not None else "")
                                   + "; link scale)")})
    return out


def rate_ratios(fam, df, labels, factors, used, focal, moderator):
    r, V, cov_p = used["classical"]
    rows = []
    for at_label, at in moderator_points(df, moderator, "meansd"):
        c = contrast_vector(factors, (focal, None), {moderator: at})
        _, est, sd = link_effect(fam, r, V, cov_p, c)
        rows.append({"at": float(at), "at_label": at_label, "contrast": fl(c), "log_rate_ratio": est,
                     "std_error": sd, "rate_ratio": float(np.exp(est)),
                     "ci_lower_95": float(np.exp(est - Z975 * sd)), "ci_upper_95": float(np.exp(est + Z975 * sd))})
    return {"focal": focal, "moderator": moderator, "se": "classical", "rows": rows,
            "source": (f"{SM} t_test of c'b (c = the contrast: b[{focal}] + b[product] * moderator value) "
                       f"under the classical covariance ({fam.call}); rate_ratio = exp(c'b), interval "
                       f"exp(c'b -/+ 1.959963984540054 se) (normal quantile); the multiplicative change "
                       f"of the expected count (the rate, with an exposure) per one-unit increase of "
                       f"{focal}" + (" (here 1 against 0)" if set(np.unique(df[focal])) <= {0, 1} else ""))}


# --------------------------------------------------------------------------
# effects on the outcome's scale (numerical, from statsmodels predictions)

X_STEP = 0.1  # central-difference step in a variable, times its SD
B_STEP = 0.005  # step in a coefficient, divided by the RMS of its design column
B_LEVELS = 3  # Richardson levels in the coefficients


class OutcomeEffects:
    """The focal predictor's effect on the outcome's scale: numerically from
    statsmodels predictions (`predict`), and in closed form from the inverse
    link's derivatives as a check. Every quantity is a function of the
    coefficient vector b, so its delta-method SE comes from a Jacobian:
    Richardson central differences for the numerical one, the complex step
    for the closed form."""

    def __init__(self, fam, df, factors, focal, moderator):
        self.fam, self.factors, self.focal, self.mod = fam, factors, focal, moderator
        names = list(dict.fromkeys(v for fac in factors for v, _ in fac))
        self.sample = {v: df[v].to_numpy(float) for v in names}
        self.means = {v: np.array([float(np.mean(self.sample[v]))]) for v in names}
        self.binary = set(np.unique(self.sample[focal])) <= {0.0, 1.0}
        self.hx = X_STEP * float(np.std(self.sample[focal], ddof=1))
        self.hw = X_STEP * float(np.std(self.sample[moderator], ddof=1))
        self.hb = B_STEP / np.sqrt(np.mean(fam.X ** 2, axis=0))

    def design(self, vals, drop=()):
        """Design columns at vals; with `drop`, the derivative of each column
        with respect to those variables (terms are products of distinct
        variables, so this is the product of the remaining factors)."""
        n = len(next(iter(vals.values())))
        cols = []
        for fac in self.factors:
            names = [v for v, _ in fac]
            col = np.ones(n) if all(d in names for d in drop) else np.zeros(n)
            for v in names:
                if v not in drop:
                    col = col * vals[v]
            cols.append(col)
        return np.column_stack(cols)

    def put(self, vals, **changes):
        out = dict(vals)
        n = len(next(iter(vals.values())))
        for v, val in changes.items():
            out[v] = np.broadcast_to(np.asarray(val, dtype=float), (n,)).copy()
        return out

    def mean_pred(self, b, vals):
        return float(np.mean(self.fam.predict(b, self.design(vals))))

    def numeric(self, b, vals, interaction):
        f, m = self.focal, self.mod
        if self.binary:
            def change(v):
                return self.mean_pred(b, self.put(v, **{f: 1.0})) - self.mean_pred(b, self.put(v, **{f: 0.0}))
            if not interaction:
                return change(vals)
            return richardson(lambda s: change(self.put(vals, **{m: vals[m] + s})), self.hw)

        def slope(v):
            return richardson(lambda t: self.mean_pred(b, self.put(v, **{f: v[f] + t})), self.hx)
        if not interaction:
            return slope(vals)
        return richardson(lambda s: slope(self.put(vals, **{m: vals[m] + s})), self.hw)

    def closed(self, b, vals, interaction):
        F, f, m = self.fam.inverse_link, self.focal, self.mod
        if self.binary:
            v1, v0 = self.put(vals, **{f: 1.0}), self.put(vals, **{f: 0.0})
            if not interaction:
                return np.mean(F(self.design(v1) @ b, 0) - F(self.design(v0) @ b, 0))
            return np.mean(F(self.design(v1) @ b, 1) * (self.design(v1, (m,)) @ b)
                           - F(self.design(v0) @ b, 1) * (self.design(v0, (m,)) @ b))
        eta, ex = self.design(vals) @ b, self.design(vals, (f,)) @ b
        if not interaction:
            return np.mean(F(eta, 1) * ex)
        ew, exw = self.design(vals, (m,)) @ b, self.design(vals, (f, m)) @ b
        return np.mean(F(eta, 2) * ex * ew + F(eta, 1) * exw)

    def jacobians(self, vals, interaction):
        """(numerical estimate, its Jacobian, closed-form estimate, its
        complex-step Jacobian)."""
        b, p = self.fam.beta, self.fam.p
        num = self.numeric(b, vals, interaction)
        cf = float(np.real(self.closed(b.astype(complex), vals, interaction)))
        Jn, Jc = np.empty(p), np.empty(p)
        for j in range(p):
            e = np.zeros(p)
            e[j] = 1.0
            Jn[j] = richardson(lambda t: self.numeric(b + t * e, vals, interaction), self.hb[j], B_LEVELS)
            Jc[j] = np.imag(self.closed(b + 1e-30j * e, vals, interaction)) / 1e-30
        return num, Jn, cf, Jc


def effect_entry(oe, vals, interaction, used, kinds, errs):
    num, Jn, cf, Jc = oe.jacobians(vals, interaction)
    out = {}
    for kind in kinds:
        V = used[kind][1][:oe.fam.p, :oe.fam.p]
        se, se_cf = float(np.sqrt(Jn @ V @ Jn)), float(np.sqrt(Jc @ V @ Jc))
        errs.append(max(abs(num - cf) / max(abs(cf), se_cf), abs(se - se_cf) / se_cf))
        z = num / se
        out[kind] = {"estimate": float(num), "std_error": se, "statistic": z,
                     "p_value": float(2.0 * scipy.stats.norm.sf(abs(z)))}
    return out


def scale_text(fam, exposure):
    if fam.kind == "probit":
        return "probability P(y = 1) = Phi(X b)"
    if exposure:
        return f"expected count per one unit of exposure ({exposure}): exp(X b), offset 0"
    return "expected count exp(X b)"


def outcome_blocks(oe, df, spec, used, kinds, checks):
    fam, f, m = oe.fam, oe.focal, oe.mod
    scale = scale_text(fam, spec["exposure"])
    errs = []
    pts = moderator_points(df, m, "meansd")
    rows = []
    for averaging, base in (("sample", oe.sample), ("at_means", oe.means)):
        for at_label, at in pts:
            vals = oe.put(base, **{m: at})
            for kind, e in effect_entry(oe, vals, False, used, kinds, errs).items():
                rows.append(dict({"averaging": averaging, "at": float(at), "at_label": at_label, "se": kind}, **e))
    call = fam.call[:fam.call.rindex(".fit(")]
    pred = (f"{call}.predict(params, exog=X*"
            + (")" if fam.kind == "probit" else ", offset=0)"))
    what = (f"discrete change {f} 0 -> 1" if oe.binary
            else f"derivative d/d{f} by Richardson-extrapolated central differences (steps {X_STEP} SD({f}), "
                 f"/2, /4)")
    delta = (f"delta-method SE sqrt(J V J') with J the Jacobian in the coefficients by Richardson-extrapolated "
             f"central differences (step {B_STEP}/RMS of the design column, /2, /4) and V the coefficient block "
             f"of the named covariance; statistic = estimate/SE, p_value two-sided standard normal")
    effects = {
        "focal": f, "moderator": m, "focal_kind": "binary (0/1)" if oe.binary else "continuous",
        "scale": scale, "at": [float(a) for _, a in pts], "at_label": [lab for lab, _ in pts],
        "profile_at_means": {v: float(a[0]) for v, a in oe.means.items()
                             if v != m and not (v == f and oe.binary)},
        "rows": rows,
        "source": (f"{pred} on the design X* built from the variables, {what}. averaging 'sample': every row "
                   f"at its own covariates with {m} set to the value, then averaged over the rows; "
                   f"'at_means': one profile, every variable at its sample mean (0/1 columns too, so a "
                   f"0/1 control enters as its proportion) and {m} at the value; product columns are "
                   f"formed from the profile's values. {delta}")}
    inter = {"focal": f, "moderator": m, "averaging": "sample", "scale": scale,
             "kind": (f"d/d{m} of [E({f}=1) - E({f}=0)]" if oe.binary else f"cross-partial d2E/d{f} d{m}"),
             "by_se": effect_entry(oe, oe.sample, True, used, kinds, errs),
             "source": (f"{pred}, every row at its own covariates, "
                        + (f"discrete change of {f} 0 -> 1, differentiated in {m}" if oe.binary
                           else f"mixed second derivative in {f} and {m}")
                        + " by Richardson-extrapolated central differences (nested), averaged over the rows. "
                        + delta)}
    checks["outcome_effects_vs_closed_form"] = max(errs)
    checks["outcome_effects_source"] = (
        "max over effects of |numerical - closed form| / max(|closed form|, its SE) and of the SEs' relative "
        "difference; closed form: inverse-link derivatives (exp; Phi, phi, -eta phi) times derivatives of "
        "the linear predictor, Jacobian by complex step")
    assert max(errs) < EFFECT_RTOL, f"outcome effects off the closed form by {max(errs):.3g}"
    return effects, inter


# --------------------------------------------------------------------------
# extra checks of the Poisson fits


def poisson_checks(fam, df, spec, checks):
    """GLM against discrete Poisson (Newton), and for an exposure the offset
    fit against GLM(exposure=...) and its predictions."""
    n = len(fam.y)
    off = None if spec["exposure"] is None else fam.offset
    dp = sm.Poisson(fam.y, fam.X, offset=off).fit(**NEWTON_KW)
    checks["glm_vs_discrete_poisson"] = {
        "estimates": float(np.max(np.abs(dp.params - fam.beta) / np.abs(fam.beta))),
        "classical": assert_cov_close(np.asarray(dp.cov_params()), np.asarray(fam.res.cov_params()),
                                      "discrete Poisson", 1e-8),
        "source": f"{SM} Poisson(y, X, offset).fit(method='newton', tol=1e-12) against the GLM fit"}
    if spec["exposure"] is None:
        return
    months = df[spec["exposure"]].to_numpy(float)
    alt = sm.GLM(fam.y, fam.X, family=sm.families.Poisson(), exposure=months).fit(**GLM_KW)
    p_off = fam.res.predict(exog=fam.X, offset=np.zeros(n))
    p_exp = alt.predict(exog=fam.X, exposure=np.ones(n))
    entry = {"estimates": float(np.max(np.abs(alt.params - fam.beta) / np.abs(fam.beta))),
             "std_errors": float(np.max(np.abs(alt.bse - fam.res.bse) / fam.res.bse)),
             "predict_offset0_vs_exposure1": float(np.max(np.abs(p_off - p_exp) / p_exp)),
             "mu_vs_months_times_rate": float(np.max(np.abs(fam.res.mu - months * p_off) / fam.res.mu)),
             "source": (f"{SM} GLM(..., exposure=months) gives the same fit as offset=log(months): max "
                        f"relative differences of estimates and SEs; predict(exog=X, offset=0) against "
                        f"predict(exog=X, exposure=1); fitted mu against months * rate")}
    assert max(v for k, v in entry.items() if k != "source") < 1e-10, entry
    checks["exposure_vs_offset"] = entry


# --------------------------------------------------------------------------
# a case


def fit_case(df, spec, settings):
    X, labels, factors = build_design(df, spec)
    y = df[spec["outcome"]].to_numpy(float)
    offset = None if spec["exposure"] is None else np.log(df[spec["exposure"]].to_numpy(float))
    fam = Family(spec["family"], y, X, offset)
    groups = None if spec["cluster"] is None else df[spec["cluster"]].tolist()
    kinds = ["classical", "hc0", "hc1"] + (["cluster"] if groups is not None else [])
    blocks, used, cov_checks, _ = covariances(fam, kinds, groups, labels, factors)
    checks = {"closed_form": cov_checks, "max_score_times_se": score_check(fam, used["classical"][1])}
    n, p = X.shape
    assert int(fam.res.df_resid) == n - p
    body = {"n": int(n), "df_residual": int(n - p), "terms": labels, "estimates": fl(fam.beta),
            "estimates_source": fam.call, "fit": fit_statistics(fam, checks), "covariances": blocks}
    focal, mod = settings["focal"], settings["moderator"]
    body["conditional_effects"] = conditional_effects(fam, df, labels, factors, used, focal, mod)
    if fam.kind == "poisson":
        body["overdispersion"] = overdispersion(fam)
        poisson_checks(fam, df, spec, checks)
    if fam.kind == "negative-binomial":
        body["dispersion"] = dispersion(fam, used)
    if fam.kind != "probit":
        body["rate_ratios"] = rate_ratios(fam, df, labels, factors, used, focal, mod)
    oe = OutcomeEffects(fam, df, factors, focal, mod)
    effect_kinds = ["classical"] + (["cluster"] if groups is not None else [])
    body["outcome_effects"], body["interaction_effect"] = outcome_blocks(oe, df, spec, used, effect_kinds, checks)
    body["checks"] = checks
    return body


def check(doc, case):
    all_finite(doc, case)
    assert doc["n"] == doc["df_residual"] + len(doc["terms"])


CASES = [
    ("poisson_counts", make_poisson_counts, dict(focal="x", moderator="w"), None),
    ("poisson_exposure", make_poisson_exposure, dict(focal="g", moderator="w"), None),
    ("negbin_counts", make_negbin_counts, dict(focal="x", moderator="w"), None),
    ("probit_binary", make_probit_binary, dict(focal="x", moderator="w"), None),
    ("randhie_poisson", lambda: shipped_randhie("poisson"), dict(focal="lncoins", moderator="disea"),
     "randhie_counts.csv"),
    ("randhie_negbin", lambda: shipped_randhie("negative-binomial"), dict(focal="lncoins", moderator="disea"),
     "randhie_counts.csv"),
    ("anes96_probit", shipped_anes96, dict(focal="selfLR", moderator="educ"), None),
]


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
    for case, make, settings, data_name in CASES:
        if args.only and case not in args.only:
            continue
        write_case(args.out, case, make(), lambda d, s, st=settings: fit_case(d, s, st), source=source,
                   command=COMMAND, base_seed=BASE_SEED, script="make_count_reference.py", check=check,
                   data_name=data_name)
    return 0


if __name__ == "__main__":
    sys.exit(main())
