#!/usr/bin/env python3
"""Whole-process benchmark of moderato-cli's binned and smooth estimates
(probe --bins / --smooth) against statsmodels doing the same regressions.

Tables: the seeded benchmark table (make_bench_table, README.md) at
1,000,000 and 10,000 rows, made once in the scratch folder. Model:
y ~ x1 + x3 + c1..c5 + x1×x3; focal x1, moderator x3.

  (a) Binning at 1,000,000 rows: `probe --bins 3` minus `probe` alone
      (same process otherwise: read, fit, probe), so the difference is the
      binning regression and the linearity test. Reference: statsmodels OLS
      of the same two regressions plus wald_test, in-process, the arrays
      made before the clock starts. Goal: our difference under 1 s.
  (b) Smooth at 10,000 rows: `probe --smooth --bootstrap 500` minus
      `probe --bootstrap 500` (the probe's own bootstrap runs in both), so
      the difference is the bandwidth's cross-validation (20 candidates,
      5 folds), the curve (50 points) and 500 bootstrap curves. Reference:
      statsmodels WLS of one 50-point curve, timed, times the number of
      curves the same work fits (20 × 5 + 1 + 500): an estimate, said so.
      Goal: the whole process under 10 s on 2 cores.

Medians of --repeats runs. Our bins must agree with statsmodels' (1e-8
relative), or the timings would compare different work and the script
fails.

    /usr/bin/python3 tests/benchmarks/linearity_benchmark.py --build-dir build
"""
import argparse
import json
import os
import statistics
import subprocess
import sys
import time

MODEL = ["--outcome", "y", "--predictors", "x1,x3,c1,c2,c3,c4,c5", "--interaction", "x1,x3",
         "--focal", "x1", "--moderator", "x3", "--format", "json"]


def time_cli(cli, data, extra, repeats):
    times, out = [], None
    for _ in range(repeats):
        start = time.perf_counter()
        r = subprocess.run([cli, "probe", "--data", data] + MODEL + extra, capture_output=True, text=True)
        times.append(time.perf_counter() - start)
        if r.returncode != 0:
            sys.exit("moderato-cli failed: " + r.stderr)
        out = json.loads(r.stdout)
    return statistics.median(times), out


BINNED_REFERENCE = r"""
import json, sys, time
import numpy as np, pandas as pd
import statsmodels, statsmodels.api as sm
d = pd.read_csv(sys.argv[1])
D, z, y = d.x1.values, d.x3.values, d.y.values
C = [d[c].values for c in ["c1", "c2", "c3", "c4", "c5"]]
k = 3
cuts = np.quantile(z, [1 / 3, 2 / 3])
b = np.searchsorted(cuts, z, side="left")
med = [np.quantile(z[b == j], 0.5) for j in range(k)]
cols = []
for j in range(k):
    g = (b == j).astype(float)
    cols += [g, g * D, g * (z - med[j]), g * D * (z - med[j])]
Xb = np.column_stack(cols + C)
lin = [np.ones(len(y)), D, z, D * z] + C
for j in range(1, k):
    g = (b == j).astype(float)
    lin += [g, g * D, g * z, g * D * z]
Xl = np.column_stack(lin)
R = np.zeros((8, Xl.shape[1])); R[:, -8:] = np.eye(8)
times = []
for _ in range(int(sys.argv[2])):
    start = time.perf_counter()
    rb = sm.OLS(y, Xb).fit()
    rl = sm.OLS(y, Xl).fit()
    w = rl.wald_test(R, use_f=True, scalar=False)
    times.append(time.perf_counter() - start)
print(json.dumps({"seconds": sorted(times)[len(times) // 2], "effects": [float(rb.params[4 * j + 1]) for j in range(k)],
                  "F": float(np.squeeze(w.statistic)), "statsmodels": statsmodels.__version__}))
"""

SMOOTH_REFERENCE = r"""
import json, sys, time
import numpy as np, pandas as pd
import statsmodels.api as sm
d = pd.read_csv(sys.argv[1])
D, z, y = d.x1.values, d.x3.values, d.y.values
C = [d[c].values for c in ["c1", "c2", "c3", "c4", "c5"]]
h = float(sys.argv[2])
grid = np.linspace(z.min(), z.max(), 50)
times = []
for _ in range(int(sys.argv[3])):
    start = time.perf_counter()
    eff = []
    for z0 in grid:
        X = np.column_stack([np.ones(len(y)), D, z - z0, D * (z - z0)] + C)
        eff.append(sm.WLS(y, X, weights=np.exp(-0.5 * ((z - z0) / h) ** 2)).fit().params[1])
    times.append(time.perf_counter() - start)
print(json.dumps({"seconds": sorted(times)[len(times) // 2], "effects": eff}))
"""


def reference(python, script, args):
    r = subprocess.run([python, "-c", script] + [str(a) for a in args], capture_output=True, text=True)
    if r.returncode != 0:
        sys.exit("statsmodels failed: " + r.stderr)
    return json.loads(r.stdout.strip().splitlines()[-1])


def table(build, scratch, rows):
    path = os.path.join(scratch, "linearity_%d.csv" % rows)
    if not os.path.exists(path):
        maker = os.path.join(build, "tests", "benchmarks", "make_bench_table")
        subprocess.run([maker, "--rows", str(rows), "--out", path], check=True)
    return path


def rel(a, b):
    return abs(a - b) / max(abs(b), 1e-300)


def binning(cli, python, data, repeats):
    plain, _ = time_cli(cli, data, [], repeats)
    binned, out = time_cli(cli, data, ["--bins", "3"], repeats)
    ref = reference(python, BINNED_REFERENCE, [data, repeats])
    worst = max(rel(b["effect"], e) for b, e in zip(out["binned"]["bins"], ref["effects"]))
    worst = max(worst, rel(out["binned"]["linearity_test"]["value"], ref["F"]))
    if worst > 1e-8:
        sys.exit("binned estimates disagree with statsmodels: %.2e" % worst)
    own = binned - plain
    return {"rows": out["rows_used"], "probe_s": plain, "probe_bins_s": binned, "binning_s": own,
            "statsmodels_s": ref["seconds"], "speedup": ref["seconds"] / own, "max_rel_diff": worst}


def smooth(cli, python, data, repeats):
    plain, _ = time_cli(cli, data, ["--bootstrap", "500"], repeats)
    whole, out = time_cli(cli, data, ["--smooth", "--bootstrap", "500"], repeats)
    h = out["smooth"]["bandwidth"]
    ref = reference(python, SMOOTH_REFERENCE, [data, h, repeats])
    worst = max(rel(p["effect"], e) for p, e in zip(out["smooth"]["points"], ref["effects"]))
    if worst > 1e-8:
        sys.exit("smooth estimates disagree with statsmodels: %.2e" % worst)
    curves = 20 * 5 + 1 + 500
    own = whole - plain
    return {"rows": out["rows_used"], "whole_s": whole, "smooth_s": own, "bandwidth": h,
            "statsmodels_curve_s": ref["seconds"], "statsmodels_estimate_s": ref["seconds"] * curves,
            "speedup": ref["seconds"] * curves / own, "max_rel_diff": worst}


def main():
    p = argparse.ArgumentParser(description=__doc__, formatter_class=argparse.RawDescriptionHelpFormatter)
    p.add_argument("--build-dir", default="build")
    p.add_argument("--scratch", default=None)
    p.add_argument("--python", default="/usr/bin/python3")
    p.add_argument("--repeats", type=int, default=3)
    p.add_argument("--json", default=None)
    a = p.parse_args()
    cli = os.path.join(a.build_dir, "app", "moderato-cli")
    scratch = a.scratch or os.path.join(a.build_dir, "tests", "benchmarks", "scratch")
    os.makedirs(scratch, exist_ok=True)
    b = binning(cli, a.python, table(a.build_dir, scratch, 1_000_000), a.repeats)
    s = smooth(cli, a.python, table(a.build_dir, scratch, 10_000), a.repeats)
    print("| work | rows | moderato | statsmodels | speed-up | goal |")
    print("| --- | ---: | ---: | ---: | ---: | --- |")
    print("| bins (K = 3) + linearity test | {:,} | {:.3f} s (probe {:.3f} s, with --bins {:.3f} s) | {:.3f} s "
          "(two OLS fits + wald_test) | {:.1f}× | under 1 s |".format(
              b["rows"], b["binning_s"], b["probe_s"], b["probe_bins_s"], b["statsmodels_s"], b["speedup"]))
    print("| smooth: CV + curve + 500 bootstrap curves | {:,} | {:.2f} s (whole process {:.2f} s) | ≈ {:.0f} s "
          "(one curve {:.3f} s × 601, estimated) | {:.0f}× | whole process under 10 s |".format(
              s["rows"], s["smooth_s"], s["whole_s"], s["statsmodels_estimate_s"], s["statsmodels_curve_s"],
              s["speedup"]))
    print("agreement: bins {:.1e}, smooth curve {:.1e} (relative, against statsmodels)".format(
        b["max_rel_diff"], s["max_rel_diff"]))
    out = a.json or os.path.join(scratch, "linearity_benchmark.json")
    with open(out + ".tmp", "w") as f:
        json.dump({"binning": b, "smooth": s, "cpus": os.cpu_count()}, f, indent=1)
    os.replace(out + ".tmp", out)
    return 0


if __name__ == "__main__":
    sys.exit(main())
