#!/usr/bin/python3
"""Reference fixtures for Moderato's linear mixed model criterion: the
profiled REML and ML log-likelihoods of statsmodels MixedLM evaluated at
given random-effects covariances, with the fixed effects and the residual
variance profiled out.

Usage:
    /usr/bin/python3 tests/reference/make_mixed_reference.py [--out DIR]

DIR defaults to tests/reference/fixtures next to this script.  Cases
(invented data, seeded):

  mixed_slope      45 teams of 1 to 14 members (unbalanced, several of one
                   member); score ~ 1 + hours + climate + hours x climate
                   (climate a team-level moderator), random intercept and
                   random slope of hours by team.
  mixed_intercept  the same design with a random intercept only.
  mixed_grunfeld   open data that ships with statsmodels: Grunfeld's
                   investment panel (statsmodels.datasets.grunfeld, 11 US
                   firms, 1935-1954; Grunfeld 1958), written to
                   mixed_grunfeld.csv; invest ~ 1 + value + capital with a
                   random intercept and a random slope of value by firm
                   (REML and ML, full covariance), and a random intercept
                   alone (REML): statsmodels' fits only.

The data go to mixed_teams.csv (doubles in shortest round-trip form, read
back and checked bit for bit); each case writes CASE.json with the spec (outcome, fixed-effects
columns in order, random-effects columns, the group column) and, per
evaluation point, "psi" (the random-effects covariance relative to the
residual variance, in the order of the random-effects columns) with, for
REML and for ML: statsmodels' MixedLM.loglike(params, profile_fe=True)
("criterion"), get_fe_params ("fixed_effects") and get_scale ("scale");
and "fits", statsmodels' own MixedLM.fit (REML and ML, full covariance; for
the random slope also REML with a diagonal covariance): criterion (llf),
fixed_effects, std_errors (bse_fe, from the inverse observed information of
all parameters), std_errors_gls (the usual sqrt(diag(scale (X' V^-1 X)^-1))
at statsmodels' optimum, by numpy), random_covariance (cov_re, absolute),
residual_variance (scale) and whether it converged. For the random intercept
also "profile_maximum": statsmodels' criterion maximised over its one
covariance parameter by scipy.optimize.minimize_scalar (bounded), per REML
and ML.

Before writing, the script checks each criterion against a direct dense
computation with numpy (V = I + Z psi Z' per group; the textbook profiled
log-likelihoods) to 1e-9.
"""

import argparse
import json
import os
import sys
import warnings

import numpy as np
import pandas as pd
import statsmodels
from statsmodels.regression.mixed_linear_model import MixedLM, MixedLMParams

from reference_io import atomic_write, fl, library_source, write_csv_roundtrip

BASE_SEED = 20261205
COMMAND = "/usr/bin/python3 tests/reference/make_mixed_reference.py --out DIR"
SCRIPT = "tests/reference/make_mixed_reference.py"
TIMES = "\u00d7"

# Evaluation points: relative covariances of (intercept, hours), or of the intercept alone.
PSI_SLOPE = [[[0.5, 0.1], [0.1, 0.2]], [[1.3, -0.25], [-0.25, 0.09]], [[0.02, 0.0], [0.0, 0.6]]]
PSI_INTERCEPT = [[[0.5]], [[0.05]], [[2.4]]]


def make_data(k):
    rng = np.random.Generator(np.random.PCG64(np.random.SeedSequence([BASE_SEED, k])))
    groups = 45
    sizes = rng.integers(1, 15, groups)
    sizes[:4] = 1  # teams of one member
    team = np.repeat(np.arange(groups), sizes)
    rng.shuffle(team)  # rows of a team are not together in the file
    n = team.size
    climate = np.round(rng.normal(0, 1, groups), 3)[team]
    hours = np.round(rng.normal(20, 5, n), 2)
    u0 = rng.normal(0, 1.2, groups)[team]
    u1 = rng.normal(0, 0.15, groups)[team]
    score = np.round(40 + (0.6 + u1) * (hours - 20) + 2 * climate + 0.25 * (hours - 20) * climate + u0 +
                     rng.normal(0, 2.5, n), 3)
    df = pd.DataFrame({"score": score, "hours": hours, "climate": climate,
                       "team": [f"t{t:02d}" for t in team]})
    desc = (f"{n} members in {groups} teams (sizes 1 to 14, four of one member); score = 40 + (0.6 + u1)(hours - 20)"
            " + 2 climate + 0.25 (hours - 20) climate + u0 + e, u0 ~ N(0, 1.2^2), u1 ~ N(0, 0.15^2),"
            " e ~ N(0, 2.5^2)")
    return df, desc


def design(df, random):
    X = np.column_stack([np.ones(len(df)), df.hours, df.climate, df.hours * df.climate])
    Z = np.column_stack([np.ones(len(df))] + ([df.hours] if random == 2 else []))
    return X, Z


def dense_criterion(y, X, Z, groups, psi, reml):
    """The textbook profiled log-likelihoods, with dense per-group matrices."""
    n, p = X.shape
    xvx = np.zeros((p, p))
    xvy = np.zeros(p)
    yvy = 0.0
    logdet = 0.0
    for g in np.unique(groups):
        rows = groups == g
        V = np.eye(rows.sum()) + Z[rows] @ psi @ Z[rows].T
        Vi = np.linalg.inv(V)
        logdet += np.linalg.slogdet(V)[1]
        xvx += X[rows].T @ Vi @ X[rows]
        xvy += X[rows].T @ Vi @ y[rows]
        yvy += y[rows] @ Vi @ y[rows]
    beta = np.linalg.solve(xvx, xvy)
    qf = yvy - beta @ xvy
    m = n - p if reml else n
    value = -0.5 * logdet - 0.5 * m * (np.log(2 * np.pi * qf / m) + 1)
    if reml:
        value -= 0.5 * np.linalg.slogdet(xvx)[1]
    return value, beta, qf / m


def evaluate(df, random, psis):
    X, Z = design(df, random)
    y = df.score.to_numpy()
    groups = df.team.to_numpy()
    points = []
    for psi in psis:
        psi = np.array(psi, dtype=float)
        point = {"psi": fl(psi)}
        for reml in (True, False):
            model = MixedLM(y, X, groups=groups, exog_re=Z)
            model.reml = reml
            model.cov_pen = None  # set by fit(); loglike reads them
            model.fe_pen = None
            params = MixedLMParams.from_components(fe_params=np.zeros(X.shape[1]), cov_re=psi)
            value = model.loglike(params, profile_fe=True)
            fe, _ = model.get_fe_params(psi, np.zeros(0))
            scale = model.get_scale(fe, psi, np.zeros(0))
            check, beta, sigma2 = dense_criterion(y, X, Z, groups, psi, reml)
            assert abs(value - check) < 1e-9 * max(1, abs(value)), (value, check)
            assert np.allclose(fe, beta, rtol=1e-9, atol=1e-12) and abs(scale - sigma2) < 1e-9 * sigma2
            point["reml" if reml else "ml"] = {"criterion": float(value), "fixed_effects": fl(fe),
                                               "scale": float(scale)}
        points.append(point)
    return points


def gls_information(df, X, Z, psi):
    """X' V^-1 X with V = I + Z psi Z' per group (dense numpy)."""
    xvx = np.zeros((X.shape[1], X.shape[1]))
    for g in np.unique(df.team):
        rows = (df.team == g).to_numpy()
        V = np.eye(rows.sum()) + Z[rows] @ psi @ Z[rows].T
        xvx += X[rows].T @ np.linalg.solve(V, X[rows])
    return xvx


def fits(df, random):
    """statsmodels' own fits: REML and ML with a full covariance, and (random
    slope) REML with a diagonal one (MixedLM.fit's `free` pattern)."""
    X, Z = design(df, random)
    wanted = [("reml", "full"), ("ml", "full")] + ([("reml", "diagonal")] if random == 2 else [])
    out = []
    for estimation, covariance in wanted:
        model = MixedLM(df.score.to_numpy(), X, groups=df.team.to_numpy(), exog_re=Z)
        kw = {}
        if covariance == "diagonal":
            kw["free"] = MixedLMParams.from_components(np.ones(X.shape[1]), np.eye(Z.shape[1]))
        with warnings.catch_warnings():
            warnings.simplefilter("ignore")
            r = model.fit(reml=estimation == "reml", **kw)
        # The usual fixed-effect covariance, scale (X' V^-1 X)^-1 at statsmodels' optimum; its
        # bse_fe inverts the observed information of all parameters instead.
        xvx = gls_information(df, X, Z, np.asarray(r.cov_re) / r.scale)
        gls = np.sqrt(np.diag(r.scale * np.linalg.inv(xvx)))
        out.append({"estimation": estimation, "covariance": covariance, "converged": bool(r.converged),
                    "criterion": float(r.llf), "fixed_effects": fl(r.fe_params), "std_errors": fl(r.bse_fe),
                    "std_errors_gls": fl(gls),
                    "random_covariance": fl(np.asarray(r.cov_re)), "residual_variance": float(r.scale)})
    return out


def intercept_maxima(df):
    """A random intercept has one covariance parameter: statsmodels' profiled criterion
    maximised over it by scipy's bounded scalar search (MixedLM.fit can stop short here)."""
    from scipy.optimize import minimize_scalar
    X, Z = design(df, 1)
    out = {}
    for reml in (True, False):
        model = MixedLM(df.score.to_numpy(), X, groups=df.team.to_numpy(), exog_re=Z)
        model.reml, model.cov_pen, model.fe_pen = reml, None, None

        def minus(log_psi):
            params = MixedLMParams.from_components(np.zeros(X.shape[1]), np.array([[np.exp(log_psi)]]))
            return -model.loglike(params, profile_fe=True)

        r = minimize_scalar(minus, bounds=(-12, 4), method="bounded", options={"xatol": 1e-10})
        out["reml" if reml else "ml"] = {"criterion": float(-r.fun), "psi": float(np.exp(r.x))}
    return out


def grunfeld_case(out_dir):
    """statsmodels' fits of the Grunfeld panel (open data shipped with statsmodels)."""
    from statsmodels.datasets import grunfeld
    raw = grunfeld.load_pandas().data
    df = pd.DataFrame({"invest": raw.invest, "value": raw.value, "capital": raw.capital, "firm": raw.firm})
    back = write_csv_roundtrip(df, os.path.join(out_dir, "mixed_grunfeld.csv"))
    X = np.column_stack([np.ones(len(back)), back.value, back.capital])
    fits_out = []
    for estimation, random in (("reml", 2), ("ml", 2), ("reml", 1)):
        Z = np.column_stack([np.ones(len(back))] + ([back.value] if random == 2 else []))
        model = MixedLM(back.invest.to_numpy(), X, groups=back.firm.to_numpy(), exog_re=Z)
        with warnings.catch_warnings():
            warnings.simplefilter("ignore")
            r = model.fit(reml=estimation == "reml")
        psi = np.asarray(r.cov_re) / r.scale
        xvx = np.zeros((3, 3))
        for g in np.unique(back.firm):
            rows = (back.firm == g).to_numpy()
            V = np.eye(rows.sum()) + Z[rows] @ psi @ Z[rows].T
            xvx += X[rows].T @ np.linalg.solve(V, X[rows])
        fits_out.append({"estimation": estimation, "random": ["intercept", "value"][:random],
                         "converged": bool(r.converged), "criterion": float(r.llf),
                         "fixed_effects": fl(r.fe_params),
                         "std_errors_gls": fl(np.sqrt(np.diag(r.scale * np.linalg.inv(xvx)))),
                         "random_covariance": fl(np.asarray(r.cov_re)), "residual_variance": float(r.scale)})
    doc = {"case": "mixed_grunfeld", "source": f"{library_source()}; MixedLM.fit", "command": COMMAND,
           "data": "mixed_grunfeld.csv",
           "dataset": {"file": "statsmodels/datasets/grunfeld (grunfeld.csv, shipped with statsmodels)",
                       "origin": "Grunfeld (1958), investment of 11 US firms 1935-1954"},
           "spec": {"outcome": "invest", "fixed": ["intercept", "value", "capital"], "groups": "firm"},
           "n": int(len(back)), "groups_count": int(back.firm.nunique()), "fits": fits_out}
    atomic_write(os.path.join(out_dir, "mixed_grunfeld.json"),
                 json.dumps(doc, indent=1, ensure_ascii=False, allow_nan=False) + "\n")
    print(f"  mixed_grunfeld   n={len(back)}  groups={back.firm.nunique()}")


def main():
    ap = argparse.ArgumentParser()
    ap.add_argument("--out", default=os.path.join(os.path.dirname(os.path.abspath(__file__)), "fixtures"))
    args = ap.parse_args()
    os.makedirs(args.out, exist_ok=True)
    df, desc = make_data(1)
    back = write_csv_roundtrip(df, os.path.join(args.out, "mixed_teams.csv"))
    for case, random, psis in (("mixed_slope", 2, PSI_SLOPE), ("mixed_intercept", 1, PSI_INTERCEPT)):
        doc = {"case": case,
               "source": f"{library_source()}; MixedLM.loglike(profile_fe=True), get_fe_params, get_scale",
               "command": COMMAND, "data": "mixed_teams.csv",
               "dataset": {"generated": desc, "generator": (
                   f"numpy.random.Generator(PCG64(SeedSequence([{BASE_SEED}, 1]))) in {SCRIPT}")},
               "spec": {"outcome": "score", "fixed": ["intercept", "hours", "climate", f"hours{TIMES}climate"],
                        "random": ["intercept", "hours"][:random], "groups": "team"},
               "n": int(len(back)), "groups_count": int(back.team.nunique()),
               "points": evaluate(back, random, psis), "fits": fits(back, random)}
        if random == 1:
            doc["profile_maximum"] = intercept_maxima(back)
        atomic_write(os.path.join(args.out, f"{case}.json"),
                     json.dumps(doc, indent=1, ensure_ascii=False, allow_nan=False) + "\n")
        print(f"  {case:16s} n={len(back)}  groups={back.team.nunique()}  points={len(psis)}")
    grunfeld_case(args.out)
    return 0


if __name__ == "__main__":
    sys.exit(main())
