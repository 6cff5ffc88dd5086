#!/usr/bin/env python3
"""Whole-process benchmark of a Poisson fit with a three-way interaction by
moderato-cli against statsmodels' GLM fit alone.

Table: the seeded benchmark table (make_bench_table, README.md) at
1,000,000 rows, with a count column `visits` added by this script
(numpy PCG64, seed 20261205): visits ~ Poisson(exp(eta)),

  eta = 0.4 + 0.10 x1 - 0.05 x2 + 0.03 x3 + 0.02 x1x2 - 0.01 x1x3 + 0.01 x2x3
        + 0.005 x1x2x3 + 0.10 c1 - 0.02 c2 + 0.05 c3 + 0.005 c4 - 0.10 c5.

Model: visits ~ x1 + x2 + x3 + c1..c5 + x1×x2×x3 (with every lower product),
13 coefficients, HC0 standard errors.

  ours:        `moderato-cli fit --family poisson --se hc0 --format json`,
               the whole process (read the CSV, fit, covariance, the nested
               model without the products, report).
  statsmodels: GLM(visits, X, family=Poisson()).fit(cov_type='HC0') alone,
               in-process, the arrays made before the clock starts.

Goal: ours at least 10 times faster. Medians of --repeats runs. Estimates
and SEs must agree (1e-8 relative), or the timings compare different work
and the script fails.

    /usr/bin/python3 tests/benchmarks/count_benchmark.py --build-dir build
"""
import argparse
import json
import os
import statistics
import subprocess
import sys
import time

REFERENCE = r"""
import json, sys, time
import numpy as np, pandas as pd
import statsmodels, statsmodels.api as sm
d = pd.read_csv(sys.argv[1])
x1, x2, x3 = d.x1.values, d.x2.values, d.x3.values
C = [d[c].values for c in ["c1", "c2", "c3", "c4", "c5"]]
X = np.column_stack([np.ones(len(d)), x1, x2, x3] + C + [x1 * x2, x1 * x3, x2 * x3, x1 * x2 * x3])
y = d.visits.values.astype(float)
times = []
for _ in range(int(sys.argv[2])):
    start = time.perf_counter()
    r = sm.GLM(y, X, family=sm.families.Poisson()).fit(cov_type="HC0")
    times.append(time.perf_counter() - start)
print(json.dumps({"seconds": sorted(times)[len(times) // 2], "params": [float(v) for v in r.params],
                  "bse": [float(v) for v in r.bse], "statsmodels": statsmodels.__version__}))
"""

MAKE_COUNTS = r"""
import sys
import numpy as np, pandas as pd
d = pd.read_csv(sys.argv[1])
rng = np.random.Generator(np.random.PCG64(20261205))
eta = (0.4 + 0.10 * d.x1 - 0.05 * d.x2 + 0.03 * d.x3 + 0.02 * d.x1 * d.x2 - 0.01 * d.x1 * d.x3
       + 0.01 * d.x2 * d.x3 + 0.005 * d.x1 * d.x2 * d.x3 + 0.10 * d.c1 - 0.02 * d.c2 + 0.05 * d.c3
       + 0.005 * d.c4 - 0.10 * d.c5)
d["visits"] = rng.poisson(np.exp(eta.values))
tmp = sys.argv[2] + ".tmp"
d.to_csv(tmp, index=False)
import os; os.replace(tmp, sys.argv[2])
"""

# our term labels, in statsmodels' column order
TERMS = ["intercept", "x1", "x2", "x3", "c1", "c2", "c3", "c4", "c5", "x1×x2", "x1×x3", "x2×x3", "x1×x2×x3"]


def count_table(build, python, scratch, rows):
    path = os.path.join(scratch, "counts_%d.csv" % rows)
    if os.path.exists(path):
        return path
    base = os.path.join(scratch, "counts_base_%d.csv" % rows)
    maker = os.path.join(build, "tests", "benchmarks", "make_bench_table")
    subprocess.run([maker, "--rows", str(rows), "--out", base], check=True)
    subprocess.run([python, "-c", MAKE_COUNTS, base, path], check=True)
    os.unlink(base)
    return path


def time_cli(cli, data, repeats):
    args = [cli, "fit", "--data", data, "--outcome", "visits", "--predictors", "x1,x2,x3,c1,c2,c3,c4,c5",
            "--interaction", "x1,x2,x3", "--family", "poisson", "--se", "hc0", "--format", "json"]
    times, out = [], None
    for _ in range(repeats):
        start = time.perf_counter()
        r = subprocess.run(args, capture_output=True, text=True)
        times.append(time.perf_counter() - start)
        if r.returncode != 0:
            sys.exit("moderato-cli failed: " + r.stderr)
        out = json.loads(r.stdout)
    return statistics.median(times), out


def rel(a, b):
    return abs(a - b) / max(abs(b), 1e-300)


def main():
    ap = argparse.ArgumentParser()
    ap.add_argument("--build-dir", default="build")
    ap.add_argument("--rows", type=int, default=1_000_000)
    ap.add_argument("--repeats", type=int, default=3)
    ap.add_argument("--python", default="/usr/bin/python3")
    ap.add_argument("--scratch", default=None)
    args = ap.parse_args()
    scratch = args.scratch or os.path.join(args.build_dir, "tests", "benchmarks", "scratch")
    os.makedirs(scratch, exist_ok=True)
    data = count_table(args.build_dir, args.python, scratch, args.rows)
    cli = os.path.join(args.build_dir, "app", "moderato-cli")
    ours, out = time_cli(cli, data, args.repeats)
    r = subprocess.run([args.python, "-c", REFERENCE, data, str(args.repeats)], capture_output=True, text=True)
    if r.returncode != 0:
        sys.exit("statsmodels failed: " + r.stderr)
    ref = json.loads(r.stdout.strip().splitlines()[-1])
    terms = {t["name"]: t for t in out["terms"]}
    worst = max(max(rel(terms[n]["value"], p), rel(terms[n]["se"], s))
                for n, p, s in zip(TERMS, ref["params"], ref["bse"]))
    if worst > 1e-8:
        sys.exit("estimates disagree with statsmodels: %.2e" % worst)
    result = {"rows": out["rows_used"], "moderato_whole_process_s": ours, "statsmodels_fit_s": ref["seconds"],
              "speedup": ref["seconds"] / ours, "goal": 10, "max_rel_diff": worst,
              "statsmodels": ref["statsmodels"]}
    print("| rows | moderato-cli fit (whole process) | statsmodels GLM.fit alone | speed-up | agreement |")
    print("| ---: | ---: | ---: | ---: | ---: |")
    print("| {:,} | {:.3f} s | {:.3f} s | {:.1f}× | {:.1e} |".format(result["rows"], ours, ref["seconds"],
                                                                    result["speedup"], worst))
    path = os.path.join(scratch, "count_benchmark.json")
    with open(path + ".tmp", "w") as f:
        json.dump(result, f, indent=1)
    os.replace(path + ".tmp", path)
    return 0


if __name__ == "__main__":
    sys.exit(main())
