#!/usr/bin/python3
"""Reference numbers for the workbench's Estimates table, computed with
statsmodels on the orchard-nitrogen sample data.

Usage:
    /usr/bin/python3 tests/reference/make_ui_estimates_reference.py [--out DIR]

DIR defaults to tests/reference/fixtures next to this script; the script
writes ui_estimates_orchard.json there. It reads
sample-projects/orchard-nitrogen/plots.csv (the invented sample data, not
copied: the JSON records its SHA-256) and fits, with statsmodels OLS on a
design matrix built here in numpy (no formula strings), in Moderato's
coefficient order:

  sample_analysis   yield_t_ha ~ intercept, nitrogen_kg_ha, soil_moisture_pct,
                    slope_pct, nitrogen_kg_ha x soil_moisture_pct
                    (the analysis the sample project ships with)
  moderator_slope   yield_t_ha ~ intercept, nitrogen_kg_ha, slope_pct,
                    nitrogen_kg_ha x slope_pct
                    (slope_pct moved from Controls to Moderator)

each with cov_type='HC3' and use_t=True (p-values and intervals from the t
distribution on n - p df, as Moderato reports them; statsmodels' robust
default would use the normal distribution). Stored
per case: estimates, HC3 standard errors, t statistics, p-values, 95 %
intervals, VIF (statsmodels variance_inflation_factor on the design with its
intercept), R-squared, adjusted R-squared, residual SD, the overall F test
(statsmodels' fvalue, a Wald test with the HC3 covariance), the Wald test of
the product term with HC3 (wald_test), and the classical R-squared change F
test against the model without the product (compare_f_test of the two
non-robust fits).

Checked before writing: the HC3 matrix equals the closed-form sandwich
(X'X)^-1 X' diag(e_i^2 / (1 - h_i)^2) X (X'X)^-1; every number is finite.
"""

import argparse
import hashlib
import json
import os
import sys

import numpy as np
import pandas as pd
import statsmodels
import statsmodels.api as sm
from statsmodels.stats.outliers_influence import variance_inflation_factor

from reference_io import atomic_write, library_source

HERE = os.path.dirname(os.path.abspath(__file__))
ROOT = os.path.dirname(os.path.dirname(HERE))
DATA = os.path.join(ROOT, "sample-projects", "orchard-nitrogen", "plots.csv")
COMMAND = "/usr/bin/python3 tests/reference/make_ui_estimates_reference.py --out DIR"
TIMES = "\u00d7"

CASES = {
    "sample_analysis": {"outcome": "yield_t_ha",
                        "predictors": ["nitrogen_kg_ha", "soil_moisture_pct", "slope_pct"],
                        "interaction": ["nitrogen_kg_ha", "soil_moisture_pct"]},
    "moderator_slope": {"outcome": "yield_t_ha",
                        "predictors": ["nitrogen_kg_ha", "slope_pct"],
                        "interaction": ["nitrogen_kg_ha", "slope_pct"]},
}


def design(df, spec):
    labels = ["intercept"] + spec["predictors"] + [TIMES.join(spec["interaction"])]
    cols = [np.ones(len(df))] + [df[p].to_numpy(float) for p in spec["predictors"]]
    a, b = spec["interaction"]
    cols.append(df[a].to_numpy(float) * df[b].to_numpy(float))
    return np.column_stack(cols), labels


def hc3_closed_form(X, e):
    xtx_inv = np.linalg.inv(X.T @ X)
    h = np.einsum("ij,jk,ik->i", X, xtx_inv, X)
    meat = X.T @ (X * (e ** 2 / (1 - h) ** 2)[:, None])
    return xtx_inv @ meat @ xtx_inv


def fit_case(df, spec):
    used = df[[spec["outcome"]] + spec["predictors"]].dropna()
    X, labels = design(used, spec)
    y = used[spec["outcome"]].to_numpy(float)
    res = sm.OLS(y, X).fit(cov_type="HC3", use_t=True)
    classical = sm.OLS(y, X).fit()
    reduced = sm.OLS(y, X[:, :-1]).fit()

    V = np.asarray(res.cov_params())
    V_cf = hc3_closed_form(X, y - X @ res.params)
    scale = np.sqrt(np.outer(np.diag(V), np.diag(V)))
    assert np.max(np.abs(V - V_cf) / scale) < 1e-8, "HC3 closed form disagrees with statsmodels"

    ci = np.asarray(res.conf_int(alpha=0.05))
    vif = [None] + [float(variance_inflation_factor(X, j)) for j in range(1, X.shape[1])]
    r = np.zeros((1, X.shape[1]))
    r[0, -1] = 1.0
    wald = res.wald_test(r, use_f=True, scalar=True)
    f_change, p_change, df_change = classical.compare_f_test(reduced)
    out = {
        "spec": {"outcome": spec["outcome"], "focal": spec["interaction"][0], "moderator": spec["interaction"][1],
                 "controls": [p for p in spec["predictors"] if p not in spec["interaction"]], "se": "hc3",
                 "level": 0.95},
        "n": int(res.nobs),
        "df_residual": float(res.df_resid),
        "terms": labels,
        "estimates": [float(v) for v in res.params],
        "std_errors": [float(v) for v in res.bse],
        "statistics": [float(v) for v in res.tvalues],
        "p_values": [float(v) for v in res.pvalues],
        "ci_lower_95": [float(v) for v in ci[:, 0]],
        "ci_upper_95": [float(v) for v in ci[:, 1]],
        "vif": vif,
        "vif_source": f"statsmodels {statsmodels.__version__} variance_inflation_factor on the design with its intercept",
        "r_squared": float(res.rsquared),
        "adj_r_squared": float(res.rsquared_adj),
        "residual_sd": float(np.sqrt(res.scale)),
        "f_statistic": float(res.fvalue),
        "f_df": [float(res.df_model), float(res.df_resid)],
        "f_p_value": float(res.f_pvalue),
        "f_source": "statsmodels fvalue with cov_type='HC3' (Wald F of all non-intercept terms)",
        "wald_product": {"statistic": float(wald.statistic), "df1": float(wald.df_num), "df2": float(wald.df_denom),
                         "p_value": float(wald.pvalue), "source": "statsmodels wald_test, HC3 covariance, use_f=True"},
        "r_squared_change": {"r_squared_reduced": float(reduced.rsquared), "f_statistic": float(f_change),
                             "df1": float(df_change), "df2": float(classical.df_resid), "p_value": float(p_change),
                             "source": "statsmodels compare_f_test of the non-robust fits with and without the product"},
    }
    return out


def all_finite(obj):
    if isinstance(obj, float):
        return np.isfinite(obj)
    if isinstance(obj, dict):
        return all(all_finite(v) for v in obj.values())
    if isinstance(obj, list):
        return all(all_finite(v) for v in obj)
    return True


def main():
    ap = argparse.ArgumentParser()
    ap.add_argument("--out", default=os.path.join(HERE, "fixtures"))
    args = ap.parse_args()
    df = pd.read_csv(DATA, float_precision="round_trip")
    with open(DATA, "rb") as f:
        sha = hashlib.sha256(f.read()).hexdigest()
    doc = {
        "source": library_source(),
        "command": COMMAND,
        "data": "sample-projects/orchard-nitrogen/plots.csv",
        "data_sha256": sha,
        "dataset": "invented sample data written by sample-projects/generate.py",
        "cases": {name: fit_case(df, spec) for name, spec in CASES.items()},
    }
    assert all_finite(doc), "a number is not finite"
    os.makedirs(args.out, exist_ok=True)
    atomic_write(os.path.join(args.out, "ui_estimates_orchard.json"),
                 json.dumps(doc, indent=2, allow_nan=False) + "\n")
    return 0


if __name__ == "__main__":
    sys.exit(main())
