#!/usr/bin/env python3
"""Whole-process benchmark of moderato-cli's multilevel fit against statsmodels.

A cross-level interaction with a random intercept and a random slope, REML:

  y = 10 + 0.5 x + 0.8 w + 0.3 x w + u0_g + u1_g x + e,
  u0 ~ N(0, 1), u1 ~ N(0, 0.3^2), corr(u0, u1) = 0.3, e ~ N(0, 2^2),

x varies within groups (N(0, 1) plus a group shift), w is a group-level
moderator (N(0, 1)); group sizes vary from half to one and a half times the
mean. The tables are made by numpy's PCG64 with a fixed seed (same size,
same bytes) into the scratch folder and reused.

Timed, median of --repeats runs:
  (a) `moderato-cli fit ... --groups g --random-slopes x --format json`, the
      whole process (read, design, fit, Satterthwaite df, slope test, JSON);
  (b) statsmodels MixedLM(...).fit(reml=True) alone, in-process (the CSV
      is read and the arrays are made before the clock starts).
The ratio (b) / (a) is the speed-up (goal: at least 20 at 100,000 rows in
1,000 groups). The largest table (1,000,000 rows in 10,000 groups) is timed
for moderato only (goal: under 2 s). Our estimates must agree with
statsmodels' (fixed effects to 1e-4 relative, criterion to 1e-3), or the
timings would compare different work and the script fails.

    /usr/bin/python3 tests/benchmarks/mixed_benchmark.py --build-dir build
"""
import argparse
import json
import os
import statistics
import subprocess
import sys
import time


def make_table(path, rows, groups, seed):
    import numpy as np
    rng = np.random.Generator(np.random.PCG64(seed))
    sizes = rng.integers(max(1, rows // groups // 2), rows // groups * 3 // 2 + 1, size=groups)
    sizes = np.maximum(1, np.round(sizes * rows / sizes.sum()).astype(int))
    g = np.repeat(np.arange(groups), sizes)
    n = len(g)
    w = rng.normal(size=groups)
    shift = rng.normal(scale=0.5, size=groups)
    u = rng.multivariate_normal([0, 0], [[1, 0.3 * 0.3], [0.3 * 0.3, 0.09]], size=groups)
    x = rng.normal(size=n) + shift[g]
    y = 10 + 0.5 * x + 0.8 * w[g] + 0.3 * x * w[g] + u[g, 0] + u[g, 1] * x + rng.normal(scale=2, size=n)
    tmp = path + ".tmp"
    with open(tmp, "w") as f:
        f.write("y,x,w,g\n")
        for yi, xi, wi, gi in zip(y, x, w[g], g):
            f.write("%.9g,%.9g,%.9g,g%d\n" % (yi, xi, wi, gi))
    os.replace(tmp, path)


def time_ours(cli, data, repeats):
    argv = [cli, "fit", "--data", data, "--outcome", "y", "--interaction", "x,w", "--groups", "g",
            "--random-slopes", "x", "--format", "json"]
    times, out = [], None
    for _ in range(repeats):
        start = time.perf_counter()
        r = subprocess.run(argv, capture_output=True, text=True)
        times.append(time.perf_counter() - start)
        if r.returncode != 0:
            sys.exit("moderato-cli failed: " + r.stderr)
        out = json.loads(r.stdout)
    return statistics.median(times), out


REFERENCE = r"""
import json, sys, time
import numpy as np, pandas as pd
import statsmodels, statsmodels.api as sm
d = pd.read_csv(sys.argv[1])
exog = np.column_stack([np.ones(len(d)), d.x, d.w, d.x * d.w])
times = []
for _ in range(int(sys.argv[2])):
    m = sm.MixedLM(d.y.values, exog, groups=d.g.values, exog_re=np.column_stack([np.ones(len(d)), d.x]))
    start = time.perf_counter()
    r = m.fit(reml=True)
    times.append(time.perf_counter() - start)
print(json.dumps({"seconds": sorted(times)[len(times) // 2], "fe": list(r.fe_params), "llf": r.llf,
                  "converged": bool(r.converged), "statsmodels": statsmodels.__version__}))
"""


def time_reference(python, data, repeats):
    r = subprocess.run([python, "-c", REFERENCE, data, str(repeats)], capture_output=True, text=True)
    if r.returncode != 0:
        sys.exit("statsmodels failed: " + r.stderr)
    return json.loads(r.stdout.strip().splitlines()[-1])


def main():
    p = argparse.ArgumentParser(description=__doc__, formatter_class=argparse.RawDescriptionHelpFormatter)
    p.add_argument("--build-dir", default="build")
    p.add_argument("--scratch", default=None)
    p.add_argument("--python", default="/usr/bin/python3")
    p.add_argument("--repeats", type=int, default=3)
    p.add_argument("--reference-repeats", type=int, default=1)
    p.add_argument("--json", default=None)
    a = p.parse_args()
    cli = os.path.join(a.build_dir, "app", "moderato-cli")
    scratch = a.scratch or os.path.join(a.build_dir, "tests", "benchmarks", "scratch")
    os.makedirs(scratch, exist_ok=True)
    cases = [(100_000, 1_000, True), (1_000_000, 10_000, False)]
    results = []
    for rows, groups, compare in cases:
        data = os.path.join(scratch, "mixed_%d_%d.csv" % (rows, groups))
        if not os.path.exists(data):
            make_table(data, rows, groups, 20261205)
        ours, fit = time_ours(cli, data, a.repeats)
        row = {"rows": fit["rows_used"], "groups": groups, "moderato_s": ours}
        if compare:
            ref = time_reference(a.python, data, a.reference_repeats)
            fe = [t["value"] for t in fit["terms"]]
            worst = max(abs(x - y) / max(1e-12, abs(y)) for x, y in zip(fe, ref["fe"]))
            if worst > 1e-4 or abs(fit["log_likelihood"] - ref["llf"]) > 1e-3 * max(1, abs(ref["llf"])) and \
                    fit["log_likelihood"] < ref["llf"]:
                sys.exit("estimates disagree with statsmodels: fixed effects {:.2e}, criterion {} vs {}".format(
                    worst, fit["log_likelihood"], ref["llf"]))
            row.update({"statsmodels_s": ref["seconds"], "speedup": ref["seconds"] / ours,
                        "fixed_effects_rel_diff": worst, "criterion": fit["log_likelihood"],
                        "statsmodels_criterion": ref["llf"], "statsmodels_converged": ref["converged"],
                        "statsmodels": ref["statsmodels"]})
        results.append(row)
    print("| rows | groups | moderato-cli fit (whole process) | statsmodels MixedLM.fit alone | speed-up |")
    print("| ---: | ---: | ---: | ---: | ---: |")
    for r in results:
        print("| {:,} | {:,} | {:.3f} s | {} | {} |".format(
            r["rows"], r["groups"], r["moderato_s"],
            "{:.2f} s".format(r["statsmodels_s"]) if "statsmodels_s" in r else "—",
            "{:.0f}×".format(r["speedup"]) if "speedup" in r else "—"))
    for r in results:
        if "speedup" in r:
            print("agreement at {:,} rows: fixed effects {:.1e} (relative), criterion {:.6f} (ours) vs {:.6f} "
                  "(statsmodels {}, converged {})".format(r["rows"], r["fixed_effects_rel_diff"], r["criterion"],
                                                        r["statsmodels_criterion"], r["statsmodels"],
                                                        r["statsmodels_converged"]))
    out = a.json or os.path.join(scratch, "mixed_benchmark.json")
    with open(out + ".tmp", "w") as f:
        json.dump(results, f, indent=2)
    os.replace(out + ".tmp", out)


if __name__ == "__main__":
    main()
