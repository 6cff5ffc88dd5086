#!/usr/bin/python3
"""Reference values for Moderato's power planning (core/src/probing/power.cpp).

Usage:
    /usr/bin/python3 tests/reference/make_power_reference.py [--out FILE]

FILE defaults to tests/reference/fixtures/power_reference.json next to this
script.  Deterministic: running it twice gives byte-identical files.  Needs
Debian's python3-scipy (scipy.stats.ncf, scipy.stats.f, scipy.optimize) and
python3-mpmath.

The test of u tested terms among k predictors (plus an intercept) at effect
size f2 is the F test with df1 = u, df2 = v = n - k - 1 and noncentrality
    "cohen":  lambda = f2 * (u + v + 1)      (Cohen 1988, ch. 9)
    "n":      lambda = f2 * n
power = P(F'(u, v, lambda) > F_crit), F_crit the upper-alpha point of F(u, v).

What is written:
  * power_cases: df1, df2, noncentrality, critical_f (scipy.stats.f.isf) and
    power (scipy.stats.ncf.sf); each power is recomputed in mpmath at 40
    digits from the Poisson mixture of regularized incomplete beta functions,
        P(F' > F_crit) = sum_j e^{-lambda/2} (lambda/2)^j / j!
                          * I_{1-x}(v/2, u/2 + j),   x = u F_crit / (u F_crit + v),
    with F_crit itself solved in mpmath, and scipy must agree to 1e-11
    relative (the agreement is stored per case as "mpmath_rel_diff");
  * sample_size_cases: the smallest n with power >= target, found by
    evaluating scipy.stats.ncf.sf at EVERY n from k + 2 upwards (a scan, not
    a search, so it does not share the C++ bracketing and bisection logic),
    with the power at n and at n - 1 (both rechecked in mpmath to 1e-11
    relative); each case must clear the target by more
    than 1e-9 on both sides so that a 1e-8 error cannot flip it;
  * detectable_cases: the f2 at which the power equals the target for a given
    n (scipy.optimize.brentq, xtol 1e-300, rtol 1e-15), checked to give the
    target power within 1e-12.
Every number is finite (json is written with allow_nan=False).
"""

import argparse
import json
import os
import sys
import warnings

import mpmath
import numpy as np
import scipy
import scipy.optimize
import scipy.stats

COMMAND = "/usr/bin/python3 tests/reference/make_power_reference.py --out tests/reference/fixtures/power_reference.json"

mpmath.mp.dps = 40

# scipy 1.10's ncf (Boost inside) raises spurious "divide by zero" / "invalid
# value" floating point flags for some arguments (scipy issue #17101,
# boostorg/math #1049) while returning the right values; every power stored
# below is finite and checked against mpmath, so the flags are silenced.
warnings.filterwarnings("ignore", message="(divide by zero|invalid value) encountered in _ncf_",
                        category=RuntimeWarning)


def lam(f2, n, u, k, convention):
    v = n - k - 1
    if convention == "cohen":
        return f2 * (u + v + 1)
    if convention == "n":
        return f2 * n
    raise ValueError(convention)


def scipy_power(f2, n, u, k, alpha, convention):
    v = n - k - 1
    crit = scipy.stats.f.isf(alpha, u, v)
    return float(crit), float(scipy.stats.ncf.sf(crit, u, v, lam(f2, n, u, k, convention)))


def mp_power(f2, n, u, k, alpha, convention):
    """Power in 40-digit arithmetic, independent of Boost/scipy."""
    v = n - k - 1
    a, b = mpmath.mpf(u) / 2, mpmath.mpf(v) / 2
    target = 1 - mpmath.mpf(alpha)
    # F_crit: I_x(u/2, v/2) = 1 - alpha, x in (0, 1); bisection then secant polish.
    g = lambda x: mpmath.betainc(a, b, 0, x, regularized=True) - target
    lo, hi = mpmath.mpf(0), mpmath.mpf(1)
    for _ in range(60):
        mid = (lo + hi) / 2
        if g(mid) < 0:
            lo = mid
        else:
            hi = mid
    x = mpmath.findroot(g, (lo, hi), solver="anderson", tol=mpmath.mpf(10) ** -35)
    crit = v * x / (u * (1 - x))
    half = mpmath.mpf(lam(f2, n, u, k, convention)) / 2
    total = mpmath.mpf(0)
    weight = mpmath.exp(-half)
    j = 0
    while True:
        term = weight * mpmath.betainc(b, a + j, 0, 1 - x, regularized=True)
        total += term
        if j > half and term < mpmath.mpf(10) ** -45:
            break
        j += 1
        weight = weight * half / j
    return crit, total


def power_case(u, k, n, f2, alpha, convention):
    crit, p = scipy_power(f2, n, u, k, alpha, convention)
    crit_mp, p_mp = mp_power(f2, n, u, k, alpha, convention)
    rel = abs(p - float(p_mp)) / float(p_mp)
    rel_crit = abs(crit - float(crit_mp)) / float(crit_mp)
    assert rel < 1e-11, (u, k, n, f2, alpha, convention, p, p_mp, rel)
    assert rel_crit < 1e-11, (u, k, n, f2, alpha, convention, crit, crit_mp)
    return {
        "tested_terms": u, "total_predictors": k, "n": n, "f2": f2, "alpha": alpha,
        "convention": convention,
        "df1": u, "df2": n - k - 1, "noncentrality": lam(f2, n, u, k, convention),
        "critical_f": crit, "power": p,
        "power_mpmath": float(p_mp),
        "mpmath_rel_diff": float(rel),
        "source": "scipy.stats.f.isf / scipy.stats.ncf.sf; power recomputed in mpmath (40 digits)",
    }


def sample_size_case(u, k, f2, alpha, target, convention, n_max=20000):
    ns = np.arange(k + 2, n_max + 1)
    v = ns - k - 1
    crit = scipy.stats.f.isf(alpha, u, v)
    lams = f2 * (u + v + 1) if convention == "cohen" else f2 * ns
    powers = scipy.stats.ncf.sf(crit, u, v, lams)
    assert np.all(np.isfinite(powers)), (u, k, f2, alpha, target, convention)
    hit = np.nonzero(powers >= target)[0]
    assert hit.size > 0, (u, k, f2, alpha, target, convention)
    i = int(hit[0])
    n = int(ns[i])
    # power rises with n: every n after the first hit reaches the target too
    assert np.all(powers[i:] >= target)
    p_at = float(powers[i])
    p_before = float(powers[i - 1]) if i > 0 else None
    assert p_at - target > 1e-9, (u, k, f2, target, p_at)
    assert p_before is None or target - p_before > 1e-9, (u, k, f2, target, p_before)
    for m, p in ((n, p_at), (n - 1, p_before)):
        if p is not None:
            p_mp = float(mp_power(f2, m, u, k, alpha, convention)[1])
            assert abs(p - p_mp) < 1e-11 * p_mp, (u, k, f2, m, p, p_mp)
    return {
        "tested_terms": u, "total_predictors": k, "f2": f2, "alpha": alpha,
        "target_power": target, "convention": convention,
        "n": n, "power_at_n": p_at, "power_one_fewer": p_before,
        "source": "scan of scipy.stats.ncf.sf over every n from k + 2",
    }


def detectable_case(u, k, n, alpha, target, convention):
    def gap(f2):
        return scipy_power(f2, n, u, k, alpha, convention)[1] - target
    hi = 0.01
    while gap(hi) < 0:
        hi *= 4
    assert gap(1e-12) < 0
    f2 = scipy.optimize.brentq(gap, 1e-12, hi, xtol=1e-300, rtol=1e-15, maxiter=500)
    achieved = scipy_power(f2, n, u, k, alpha, convention)[1]
    assert abs(achieved - target) < 1e-12, (u, k, n, target, achieved)
    return {
        "tested_terms": u, "total_predictors": k, "n": n, "alpha": alpha,
        "target_power": target, "convention": convention,
        "f2": f2, "power_at_f2": achieved,
        "source": "scipy.optimize.brentq on scipy.stats.ncf.sf",
    }


def main():
    here = os.path.dirname(os.path.abspath(__file__))
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--out", default=os.path.join(here, "fixtures", "power_reference.json"))
    args = ap.parse_args()

    power_specs = [
        # u, k, n, f2, alpha, convention
        (1, 1, 55, 0.15, 0.05, "cohen"),
        (1, 1, 395, 0.02, 0.05, "cohen"),
        (1, 1, 25, 0.35, 0.05, "cohen"),
        (1, 3, 120, 0.05, 0.05, "cohen"),
        (1, 3, 120, 0.05, 0.05, "n"),
        (2, 2, 68, 0.15, 0.05, "cohen"),
        (2, 5, 200, 0.03, 0.01, "cohen"),
        (2, 5, 200, 0.03, 0.01, "n"),
        (3, 3, 77, 0.15, 0.05, "cohen"),
        (3, 7, 40, 0.35, 0.10, "cohen"),
        (3, 7, 40, 0.35, 0.10, "n"),
        (4, 9, 1000, 0.01, 0.05, "cohen"),
        (5, 8, 30, 1.0, 0.05, "n"),
        (1, 1, 3, 2.0, 0.05, "cohen"),        # df2 = 1, the smallest allowed
        (1, 2, 500, 0.001, 0.05, "cohen"),    # power barely above alpha
        (2, 4, 300, 0.25, 0.001, "cohen"),    # power close to 1
        (6, 6, 150, 0.08, 0.05, "n"),
        (1, 4, 60, 0.1, 0.2, "cohen"),
    ]
    sample_specs = [
        # u, k, f2, alpha, target, convention
        (1, 1, 0.02, 0.05, 0.80, "cohen"),
        (1, 1, 0.15, 0.05, 0.80, "cohen"),
        (1, 1, 0.35, 0.05, 0.80, "cohen"),
        (2, 2, 0.02, 0.05, 0.80, "cohen"),
        (2, 2, 0.15, 0.05, 0.80, "cohen"),
        (2, 2, 0.35, 0.05, 0.80, "cohen"),
        (3, 3, 0.02, 0.05, 0.80, "cohen"),
        (3, 3, 0.15, 0.05, 0.80, "cohen"),
        (3, 3, 0.35, 0.05, 0.80, "cohen"),
        (1, 3, 0.02, 0.05, 0.80, "cohen"),
        (1, 3, 0.02, 0.05, 0.80, "n"),
        (2, 6, 0.05, 0.01, 0.90, "cohen"),
        (2, 6, 0.05, 0.01, 0.90, "n"),
        (1, 2, 0.10, 0.05, 0.95, "cohen"),
        (4, 10, 0.30, 0.10, 0.50, "n"),
    ]
    detectable_specs = [
        # u, k, n, alpha, target, convention
        (1, 3, 100, 0.05, 0.80, "cohen"),
        (1, 3, 100, 0.05, 0.80, "n"),
        (2, 5, 250, 0.05, 0.90, "cohen"),
        (3, 3, 40, 0.01, 0.80, "cohen"),
        (1, 1, 1000, 0.05, 0.50, "n"),
        (2, 8, 12, 0.05, 0.80, "cohen"),     # df2 = 3
    ]

    doc = {
        "source": "scipy %s (Debian python3-scipy), numpy %s, mpmath %s, Python %s"
                  % (scipy.__version__, np.__version__, mpmath.__version__, sys.version.split()[0]),
        "command": COMMAND,
        "definitions": {
            "df1": "u (tested_terms)",
            "df2": "n - k - 1 (k = total_predictors, excluding the intercept)",
            "noncentrality": {"cohen": "f2 * (df1 + df2 + 1)", "n": "f2 * n"},
            "power": "P(F'(df1, df2, noncentrality) > critical_f), critical_f = upper-alpha point of F(df1, df2)",
        },
        "power_cases": [power_case(*s) for s in power_specs],
        "sample_size_cases": [sample_size_case(*s) for s in sample_specs],
        "detectable_cases": [detectable_case(*s) for s in detectable_specs],
    }
    text = json.dumps(doc, indent=2, allow_nan=False) + "\n"
    os.makedirs(os.path.dirname(os.path.abspath(args.out)), exist_ok=True)
    tmp = args.out + ".tmp"
    with open(tmp, "w", encoding="utf-8") as fh:
        fh.write(text)
    os.replace(tmp, args.out)
    print("wrote", args.out)


if __name__ == "__main__":
    main()
