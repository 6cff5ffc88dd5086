#!/usr/bin/python3
"""Reference fixtures for Moderato's pairwise slope contrasts of a categorical
moderator and the joint test of its interaction, computed with statsmodels.

Usage:
    /usr/bin/python3 tests/reference/make_contrasts_reference.py [--out DIR]

DIR defaults to tests/reference/fixtures next to this script.  Cases:

  contrasts_ols4    OLS, wait ~ tenure + channel (4 levels, reference 'phone',
                    not the first in text order) + backlog + channel x tenure;
                    classical, HC3 and cluster-robust (40 teams) covariances.
  contrasts_logit3  Logit, resolved ~ tenure + channel (3 levels, reference
                    'chat') + channel x tenure; model-based covariance.

Each case writes CASE.csv (doubles in shortest round-trip form, read back and
checked bit for bit) and CASE.json with spec, terms, estimates and, per
covariance, a "contrasts" block:

  levels              the moderator's levels, reference first, others as text
  slopes              per level: the focal predictor's effect (t_test of the
                      vector e_focal + e_(level x focal))
  pairs               for every i < j: the effect at level j minus at level i,
                      statsmodels t_test of that contrast vector: estimate,
                      std_error, statistic, p_value, ci_lower, ci_upper (95 %)
  holm, bonferroni    statsmodels.stats.multitest.multipletests of the pairs'
                      p-values (method 'holm' / 'bonferroni'), in pair order
  wald                statsmodels wald_test of all product columns (F form
                      for OLS with the covariance's df; chi-square for Logit)

Before writing, the script checks that each t_test sd equals sqrt(c'Vc) from
numpy and that Holm's adjusted p-values equal a direct computation (sorted
step-down with the running maximum).
"""

import argparse
import math
import os
import sys

import numpy as np
import pandas as pd
import statsmodels
import statsmodels.api as sm
from statsmodels.stats.multitest import multipletests

from make_cells_reference import factor_levels
from reference_io import write_case, fl, library_source

BASE_SEED = 20261204
COMMAND = "/usr/bin/python3 tests/reference/make_contrasts_reference.py --out DIR"
TIMES = "\u00d7"
SM = f"statsmodels {statsmodels.__version__}"


def rng_for(k):
    return np.random.Generator(np.random.PCG64(np.random.SeedSequence([BASE_SEED, k])))


def build_design(df, spec):
    """intercept, focal, moderator dummies, other predictors in order, then
    the products moderator=level x focal."""
    focal, mod = spec["focal"], spec["moderator"]
    levels = factor_levels(df, mod, spec["categorical"][mod])
    cols, labels = [np.ones(len(df))], ["intercept"]
    for v in spec["predictors"]:
        if v == mod:
            for lev in levels[1:]:
                cols.append((df[mod].astype(str) == lev).to_numpy(float))
                labels.append(f"{mod}={lev}")
        else:
            cols.append(df[v].to_numpy(float))
            labels.append(v)
    x = df[focal].to_numpy(float)
    for lev in levels[1:]:
        cols.append((df[mod].astype(str) == lev).to_numpy(float) * x)
        labels.append(f"{mod}={lev}{TIMES}{focal}")
    X = np.column_stack(cols)
    assert np.linalg.matrix_rank(X) == X.shape[1]
    return X, labels, levels


def slope_vector(labels, spec, level, levels):
    c = np.zeros(len(labels))
    c[labels.index(spec["focal"])] = 1.0
    if level != levels[0]:
        c[labels.index(f"{spec['moderator']}={level}{TIMES}{spec['focal']}")] = 1.0
    return c


def t_block(res, c, what):
    tt = res.t_test(c[None, :])
    ci = np.asarray(tt.conf_int(alpha=0.05))[0]
    sd = float(np.squeeze(tt.sd))
    closed = math.sqrt(float(c @ np.asarray(res.cov_params()) @ c))
    if not abs(sd - closed) <= 1e-12 * closed:
        raise AssertionError(f"{what}: t_test sd {sd} vs sqrt(c'Vc) {closed}")
    return {"contrast": fl(c), "estimate": float(np.squeeze(tt.effect)), "std_error": sd,
            "statistic": float(np.squeeze(tt.tvalue)), "p_value": float(np.squeeze(tt.pvalue)),
            "ci_lower": float(ci[0]), "ci_upper": float(ci[1]),
            "distribution": tt.distribution, "df": int(tt.df_denom) if tt.distribution == "t" else None}


def holm_direct(p):
    order = np.argsort(p, kind="stable")
    m, out, running = len(p), np.empty(len(p)), 0.0
    for rank, i in enumerate(order):
        running = max(running, min(1.0, (m - rank) * p[i]))
        out[i] = running
    return out


def contrast_block(res, labels, spec, levels, use_f):
    slopes, pairs = [], []
    vec = {lev: slope_vector(labels, spec, lev, levels) for lev in levels}
    for lev in levels:
        slopes.append({"level": lev, **t_block(res, vec[lev], f"slope at {lev}")})
    for i in range(len(levels)):
        for j in range(i + 1, len(levels)):
            blk = {"pair": [levels[i], levels[j]]}
            blk.update(t_block(res, vec[levels[j]] - vec[levels[i]], f"{levels[j]} - {levels[i]}"))
            pairs.append(blk)
    p = np.array([b["p_value"] for b in pairs])
    holm = multipletests(p, method="holm")[1]
    bonf = multipletests(p, method="bonferroni")[1]
    if not np.allclose(holm, holm_direct(p), rtol=1e-14, atol=0):
        raise AssertionError("multipletests holm differs from the direct step-down computation")
    prod = [k for k, lab in enumerate(labels) if TIMES in lab]
    R = np.zeros((len(prod), len(labels)))
    for r, k in enumerate(prod):
        R[r, k] = 1.0
    w = res.wald_test(R, use_f=use_f, scalar=True)
    wald = {"terms": [labels[k] for k in prod], "statistic": float(np.squeeze(w.statistic)),
            "p_value": float(np.squeeze(w.pvalue)), "df_num": int(R.shape[0]),
            "df_denom": float(w.df_denom) if use_f else None}
    return {"levels": levels, "slopes": slopes, "pairs": pairs, "holm": fl(holm), "bonferroni": fl(bonf),
            "wald": wald}


# --------------------------------------------------------------------------
# cases


def make_ols4():
    rng = rng_for(1)
    n = 1200
    channel = rng.choice(["chat", "email", "phone", "visit"], size=n, p=[.3, .25, .3, .15])
    tenure = np.round(rng.uniform(0, 12, n), 2)
    backlog = rng.normal(0, 1, n)
    team = rng.integers(1, 41, n)
    a = {"chat": 20.0, "email": 35.0, "phone": 24.0, "visit": 18.0}
    b = {"chat": -0.6, "email": -1.0, "phone": -0.9, "visit": -0.55}
    team_shift = rng.normal(0, 2.0, 41)
    y = (np.array([a[c] for c in channel]) + np.array([b[c] for c in channel]) * tenure + 1.5 * backlog
         + team_shift[team] + rng.normal(0, 4, n))
    df = pd.DataFrame({"wait": np.round(y, 3), "tenure": tenure, "channel": channel,
                       "backlog": np.round(backlog, 4), "team": [f"T{t:02d}" for t in team]})
    desc = ("simulated support queue: channel in {chat, email, phone, visit} (p = .30/.25/.30/.15); "
            "tenure ~ U(0,12) years; backlog ~ N(0,1); team = 40 clusters with N(0,2^2) shifts; "
            "wait = a_channel + b_channel tenure + 1.5 backlog + team + N(0,4^2)")
    spec = dict(outcome="wait", predictors=["tenure", "channel", "backlog"], interactions=[["channel", "tenure"]],
                family="linear", focal="tenure", moderator="channel", cluster="team",
                categorical={"channel": "phone"})
    return df, desc, spec


def make_logit3():
    rng = rng_for(2)
    n = 900
    channel = rng.choice(["chat", "email", "visit"], size=n, p=[.4, .35, .25])
    tenure = np.round(rng.uniform(0, 10, n), 2)
    a = {"chat": -0.8, "email": -1.5, "visit": 0.2}
    b = {"chat": 0.25, "email": 0.35, "visit": 0.05}
    eta = np.array([a[c] for c in channel]) + np.array([b[c] for c in channel]) * tenure
    y = (rng.uniform(0, 1, n) < 1 / (1 + np.exp(-eta))).astype(int)
    df = pd.DataFrame({"resolved": y, "tenure": tenure, "channel": channel})
    desc = ("simulated first-contact resolution: channel in {chat, email, visit} (p = .40/.35/.25); "
            "tenure ~ U(0,10); logit P(resolved) = a_channel + b_channel tenure")
    spec = dict(outcome="resolved", predictors=["tenure", "channel"], interactions=[["channel", "tenure"]],
                family="logistic", focal="tenure", moderator="channel", cluster=None,
                categorical={"channel": "chat"})
    return df, desc, spec


def fit_case(df, spec):
    X, labels, levels = build_design(df, spec)
    y = df[spec["outcome"]].to_numpy(float)
    by_se = {}
    if spec["family"] == "linear":
        model = sm.OLS(y, X)
        fits = {"classical": (model.fit(), f"{SM} OLS cov_type='nonrobust'"),
                "hc3": (model.fit(cov_type="HC3", use_t=True), f"{SM} OLS cov_type='HC3', use_t=True")}
        codes = pd.factorize(df[spec["cluster"]])[0]
        fits["cluster"] = (model.fit(cov_type="cluster", cov_kwds={"groups": codes}, use_t=True),
                           f"{SM} OLS cov_type='cluster', use_t=True (t and F with G-1 df)")
        use_f = True
    else:
        model = sm.Logit(y, X)
        fits = {"classical": (model.fit(disp=0, tol=1e-12, maxiter=100), f"{SM} Logit, model-based covariance")}
        use_f = False
    for name, (res, src) in fits.items():
        blk = contrast_block(res, labels, spec, levels, use_f)
        blk["source"] = src + "; t_test, wald_test, stats.multitest.multipletests"
        by_se[name] = blk
    first = next(iter(fits.values()))[0]
    return {"n": int(len(df)), "terms": labels, "estimates": fl(first.params), "contrasts": by_se}


CASES = [("contrasts_ols4", make_ols4), ("contrasts_logit3", make_logit3)]


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
                   script="make_contrasts_reference.py")
    return 0


if __name__ == "__main__":
    sys.exit(main())
