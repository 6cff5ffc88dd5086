#!/usr/bin/python3
"""Whole-process benchmark of moderato-cli against pandas and statsmodels.

Usage (from the project root, after building into BUILD):
    /usr/bin/python3 tests/benchmarks/run_benchmarks.py --build-dir BUILD

What it does, all in one invocation so the ratios compare like with like:
  1. makes the seeded table with BUILD/tests/benchmarks/make_bench_table
     (1,000,000 rows by default) unless the file is already there;
  2. times four programs as whole processes, each --repeats times (default 3),
     interleaved, and keeps the median wall time and the peak resident set
     (ru_maxrss of the child, from os.wait4):
       (a) moderato-cli columns --data F --format json           (our load)
       (b) python: pandas.read_csv(F)                            (reference load)
       (c) moderato-cli fit ... --se hc3 --format json           (our load + fit + HC3)
       (d) python: read_csv, design matrix in numpy,
           sm.OLS(y, X).fit(cov_type="HC3"), .bse                (reference)
  3. checks that our estimates and HC3 standard errors agree with statsmodels';
  4. when the workbench benchmark BUILD/tests/benchmarks/moderato_bench_open
     is built (a Qt build), runs it: opening a --rows project in the
     workbench until it is interactive, against core read_csv of the same
     file in the same process (target: <= 3 s); --skip-open leaves it out;
  5. prints a Markdown table and writes the same numbers as JSON.

Ratios (targets from the benchmark issue):
  load     = median(b) / median(a)                          target >= 2
  fit+HC3  = (median(d) - median(b)) / (median(c) - median(a))   target >= 5
  whole    = median(d) / median(c)                          (secondary, same target)
  RSS      = peak RSS of (a) / (8 bytes x numeric cells)    target <= 2
             (11 numeric columns; region is text: 88 MB for 1,000,000 rows)
MB here is 10^6 bytes.

The reference processes run with OPENBLAS_CORETYPE and OPENBLAS_L2_SIZE
removed from their environment (those variables, set on some machines to work
around old OpenBLAS, can slow numpy); nothing else is changed, and the BLAS
library the reference actually loaded is recorded.

Missed targets do not make the exit status non-zero: this is a report. Exit
status 1 means the benchmark itself failed (a program failed, or our estimates
disagree with statsmodels', so the timings would compare different work).
"""

import argparse
import json
import os
import platform
import statistics
import subprocess
import sys
import tempfile
import time
from pathlib import Path

SOURCE_DIR = Path(__file__).resolve().parent
PROJECT_DIR = SOURCE_DIR.parents[1]

NUMERIC_COLUMNS = ["y", "x1", "x2", "x3", "treated", "c1", "c2", "c3", "c4", "c5", "cluster_id"]
TEXT_COLUMNS = ["region"]
CONTROLS = ["c1", "c2", "c3", "c4", "c5"]
FOCAL = ["x1", "x2", "x3"]
BLAS_VARIABLES = ["OPENBLAS_CORETYPE", "OPENBLAS_L2_SIZE"]

TARGETS = {"load_speed": 2.0, "fit_speed": 5.0, "load_rss": 2.0}
AGREEMENT_LIMIT = 1e-6  # relative; both sides solve the same problem in double

# Reference programs, run as `python3 -c SNIPPET FILE`. Each prints one JSON
# object on stdout with its own in-process timings.
COMMON = r"""
import json, os, sys, time
def blas_info():
    info = {}
    try:
        import threadpoolctl
        info["threadpoolctl"] = [
            {k: m.get(k) for k in ("internal_api", "version", "architecture", "num_threads", "filepath")}
            for m in threadpoolctl.threadpool_info()]
    except ImportError:
        info["threadpoolctl"] = None
    libs = set()
    try:
        with open("/proc/self/maps") as f:
            for line in f:
                path = line.split()[-1]
                name = path.rsplit("/", 1)[-1].lower()
                if name.startswith("lib") and any(k in name for k in ("blas", "lapack", "mkl", "blis", "atlas")):
                    libs.add(os.path.realpath(path))
    except OSError:
        pass
    info["loaded_libraries"] = sorted(libs)
    import ctypes
    for path in sorted(libs):
        if "openblas" in path.lower():
            try:
                lib = ctypes.CDLL(path)
                for fn in ("openblas_get_corename", "openblas_get_config"):
                    f = getattr(lib, fn)
                    f.restype = ctypes.c_char_p
                    info[fn] = f().decode()
            except (OSError, AttributeError) as e:
                info["openblas_query_error"] = repr(e)
    if any("openblas" in p.lower() for p in libs):
        info["kind"] = "OpenBLAS, core " + info.get("openblas_get_corename", "unknown")
    elif any("/blas/libblas.so" in p for p in libs):
        info["kind"] = "reference BLAS/LAPACK (Netlib), not OpenBLAS: the OPENBLAS_* variables do not apply"
    else:
        info["kind"] = "unknown"
    info["openblas_env"] = {k: os.environ.get(k) for k in ("OPENBLAS_CORETYPE", "OPENBLAS_L2_SIZE")}
    try:
        import numpy
        cfg = numpy.__config__
        for key in ("blas_opt_info", "blas_ilp64_opt_info", "openblas_info"):
            v = getattr(cfg, key, None)
            if v:
                info["numpy_" + key] = {k: str(x) for k, x in v.items()}
    except Exception as e:  # report, never fail on this
        info["numpy_config_error"] = repr(e)
    return info
"""

LOAD_SNIPPET = COMMON + r"""
t0 = time.perf_counter()
import pandas as pd
t1 = time.perf_counter()
df = pd.read_csv(sys.argv[1])
t2 = time.perf_counter()
json.dump({"rows": len(df), "import_s": t1 - t0, "read_csv_s": t2 - t1,
           "pandas": pd.__version__}, sys.stdout)
"""

FIT_SNIPPET = COMMON + r"""
t0 = time.perf_counter()
import numpy as np
import pandas as pd
import statsmodels
import statsmodels.api as sm
t1 = time.perf_counter()
df = pd.read_csv(sys.argv[1])
t2 = time.perf_counter()
col = lambda name: df[name].to_numpy(dtype=np.float64)
y = col("y")
x1, x2, x3 = col("x1"), col("x2"), col("x3")
names = ["intercept", "x1", "x2", "x3", "x1*x2", "x1*x3", "x2*x3", "x1*x2*x3",
         "c1", "c2", "c3", "c4", "c5"]
X = np.column_stack([np.ones(len(df)), x1, x2, x3, x1 * x2, x1 * x3, x2 * x3, x1 * x2 * x3,
                     col("c1"), col("c2"), col("c3"), col("c4"), col("c5")])
t3 = time.perf_counter()
res = sm.OLS(y, X).fit(cov_type="HC3")
bse = np.asarray(res.bse)
t4 = time.perf_counter()
json.dump({"rows": len(df), "names": names, "params": [float(v) for v in res.params],
           "bse": [float(v) for v in bse],
           "import_s": t1 - t0, "read_csv_s": t2 - t1, "design_s": t3 - t2, "fit_hc3_s": t4 - t3,
           "numpy": np.__version__, "pandas": pd.__version__, "statsmodels": statsmodels.__version__,
           "blas": blas_info()}, sys.stdout)
"""


def die(message):
    print("run_benchmarks: " + message, file=sys.stderr)
    sys.exit(1)


def run_process(argv, env, out_dir, label):
    """Runs argv to completion; returns wall seconds, CPU seconds (user + system),
    peak RSS bytes and its standard output."""
    out_path = Path(out_dir) / (label + ".out")
    err_path = Path(out_dir) / (label + ".err")
    with open(out_path, "wb") as out, open(err_path, "wb") as err:
        start = time.perf_counter()
        proc = subprocess.Popen(argv, stdout=out, stderr=err, stdin=subprocess.DEVNULL, env=env)
        _, status, usage = os.wait4(proc.pid, 0)
        wall = time.perf_counter() - start
    proc.returncode = os.waitstatus_to_exitcode(status)  # reaped here, not by Popen
    if proc.returncode != 0:
        die("{} exited with {}:\n  {}\n{}".format(label, proc.returncode, " ".join(argv),
                                                  err_path.read_text(errors="replace")[-2000:]))
    return wall, usage.ru_utime + usage.ru_stime, usage.ru_maxrss * 1024, out_path.read_text()


def machine_info():
    info = {"platform": platform.platform(), "python": sys.version.split()[0], "cpus": os.cpu_count()}
    try:
        for line in Path("/proc/cpuinfo").read_text().splitlines():
            if line.startswith("model name"):
                info["cpu"] = line.split(":", 1)[1].strip()
                break
        for line in Path("/proc/meminfo").read_text().splitlines():
            if line.startswith("MemTotal"):
                info["memory"] = line.split(":", 1)[1].strip()
                break
    except OSError:
        pass
    info["openblas_env_inherited"] = {k: os.environ.get(k) for k in BLAS_VARIABLES}
    info["load_average_at_end"] = os.getloadavg()
    return info


def fmt(value, digits=3):
    return "—" if value is None else "{:.{}f}".format(value, digits)


def main():
    parser = argparse.ArgumentParser(description=__doc__.split("\n\n")[0])
    parser.add_argument("--build-dir", default=str(PROJECT_DIR / "build"),
                        help="build folder holding app/moderato-cli and tests/benchmarks/make_bench_table "
                             "(default: PROJECT/build)")
    parser.add_argument("--cli", help="moderato-cli to time (default: BUILD/app/moderato-cli)")
    parser.add_argument("--generator", help="make_bench_table (default: BUILD/tests/benchmarks/make_bench_table)")
    parser.add_argument("--scratch", help="folder for the table and outputs (default: BUILD/tests/benchmarks/scratch)")
    parser.add_argument("--data", help="use this CSV instead of the generated table (same columns)")
    parser.add_argument("--rows", type=int, default=1_000_000, help="rows of the generated table (default 1000000)")
    parser.add_argument("--seed", type=int, default=20240917, help="seed of the generated table")
    parser.add_argument("--repeats", type=int, default=3, help="runs of each program; the median is kept (default 3)")
    parser.add_argument("--python", default="/usr/bin/python3", help="Python with pandas and statsmodels")
    parser.add_argument("--json", help="write the results here (default: SCRATCH/benchmark_results.json)")
    parser.add_argument("--skip-open", action="store_true",
                        help="do not run moderato_bench_open (opening a project in the workbench)")
    parser.add_argument("--extras", action="store_true",
                        help="also time moderato-cli with --threads 1, and statsmodels with the inherited "
                             "OPENBLAS_* variables (information only)")
    parser.add_argument("--drag", action="store_true",
                        help="also run BUILD/tests/benchmarks/moderato_bench_drag (frame time of a moderator drag "
                             "in the Probe section, buffered layer against a full replot) and add it to the report")
    args = parser.parse_args()
    if args.repeats < 1:
        die("--repeats must be at least 1")

    build = Path(args.build_dir).resolve()
    cli = Path(args.cli) if args.cli else build / "app" / "moderato-cli"
    generator = Path(args.generator) if args.generator else build / "tests" / "benchmarks" / "make_bench_table"
    scratch = Path(args.scratch) if args.scratch else build / "tests" / "benchmarks" / "scratch"
    scratch.mkdir(parents=True, exist_ok=True)
    if not cli.is_file():
        die("no moderato-cli at {} (build first, or pass --build-dir/--cli)".format(cli))

    # 1. The table.
    if args.data:
        data = Path(args.data).resolve()
        if not data.is_file():
            die("no data file " + str(data))
        rows = None
    else:
        data = scratch / "bench_table_{}_{}.csv".format(args.rows, args.seed)
        rows = args.rows
        if not data.is_file():
            if not generator.is_file():
                die("no make_bench_table at {} (build first, or pass --generator)".format(generator))
            print("generating {} ({} rows) ...".format(data, rows), flush=True)
            subprocess.run([str(generator), "--rows", str(rows), "--seed", str(args.seed), "--out", str(data)],
                           check=True)
    with open(data, "rb") as f:  # warm the page cache so no program pays for the disk
        while f.read(1 << 24):
            pass
        f.seek(0)
        header = f.readline().decode().strip().split(",")
    expected = NUMERIC_COLUMNS + TEXT_COLUMNS
    if header != expected:
        die("{} has columns {}, expected {}".format(data, header, expected))

    # 2. The programs.
    ref_env = {k: v for k, v in os.environ.items() if k not in BLAS_VARIABLES}
    our_env = dict(os.environ)
    fit_args = ["fit", "--data", str(data), "--outcome", "y", "--interaction", ",".join(FOCAL),
                "--predictors", ",".join(CONTROLS), "--se", "hc3", "--format", "json"]
    cases = [
        ("our_load", "moderato-cli columns (load)",
         [str(cli), "columns", "--data", str(data), "--format", "json"], our_env),
        ("ref_load", "pandas.read_csv (load)", [args.python, "-c", LOAD_SNIPPET, str(data)], ref_env),
        ("our_fit", "moderato-cli fit, HC3 (load + fit)", [str(cli)] + fit_args, our_env),
        ("ref_fit", "statsmodels OLS, HC3 (read_csv + design + fit)",
         [args.python, "-c", FIT_SNIPPET, str(data)], ref_env),
    ]
    if args.extras:
        cases += [
            ("our_load_1t", "moderato-cli columns --threads 1",
             [str(cli), "columns", "--data", str(data), "--format", "json", "--threads", "1"], our_env),
            ("our_fit_1t", "moderato-cli fit --threads 1", [str(cli)] + fit_args + ["--threads", "1"], our_env),
            ("ref_fit_env", "statsmodels, inherited OPENBLAS_* env",
             [args.python, "-c", FIT_SNIPPET, str(data)], our_env),
        ]

    load_average_at_start = os.getloadavg()
    runs = {key: [] for key, *_ in cases}
    outputs = {}
    with tempfile.TemporaryDirectory(dir=scratch) as tmp:
        for r in range(args.repeats):
            for key, label, argv, env in cases:
                print("run {}/{}: {} ...".format(r + 1, args.repeats, label), end=" ", flush=True)
                wall, cpu, rss, out = run_process(argv, env, tmp, key)
                print("{:.3f} s (CPU {:.3f} s), {:.0f} MB".format(wall, cpu, rss / 1e6), flush=True)
                runs[key].append({"wall_s": wall, "cpu_s": cpu, "peak_rss_bytes": rss})
                outputs.setdefault(key, []).append(out)

    summary = {}
    for key, label, argv, _ in cases:
        walls = [x["wall_s"] for x in runs[key]]
        rsss = [x["peak_rss_bytes"] for x in runs[key]]
        summary[key] = {"label": label, "command": argv if "-c" not in argv else argv[:2] + ["<snippet>"] + argv[3:],
                        "wall_s_median": statistics.median(walls), "wall_s_runs": walls,
                        "cpu_s_median": statistics.median(x["cpu_s"] for x in runs[key]),
                        "peak_rss_mb_median": statistics.median(rsss) / 1e6,
                        "peak_rss_mb_max": max(rsss) / 1e6}

    # 3. Agreement with statsmodels.
    try:
        ours = json.loads(outputs["our_fit"][-1])
        ref_runs = [json.loads(o) for o in outputs["ref_fit"]]
        ref_load_runs = [json.loads(o) for o in outputs["ref_load"]]
        described = json.loads(outputs["our_load"][-1])
    except (KeyError, ValueError) as e:
        die("could not read a program's JSON output: {}".format(e))
    ref, ref_load = ref_runs[-1], ref_load_runs[-1]
    n_rows = described["rows"]
    if rows is not None and n_rows != rows:
        die("moderato-cli columns read {} rows, the table has {}".format(n_rows, rows))
    if not (ours["rows_used"] == ref["rows"] == ref_load["rows"] == n_rows):
        die("row counts differ: moderato fit rows_used={}, statsmodels {}, read_csv {}, columns {}".format(
            ours["rows_used"], ref["rows"], ref_load["rows"], n_rows))
    by_factors = {frozenset(c["name"].split("×")): c for c in ours["terms"]}
    worst = {"value": (0.0, None), "se": (0.0, None)}
    for name, b, se in zip(ref["names"], ref["params"], ref["bse"]):
        c = by_factors.get(frozenset(name.split("*")))
        if c is None:
            die("moderato-cli fit has no term for statsmodels' " + name)
        for field, value in (("value", b), ("se", se)):
            ours_value = c[field]
            if ours_value is None:
                die("moderato-cli fit gave no {} for {}".format(field, c["name"]))
            rel = abs(ours_value - value) / abs(value) if value != 0 else abs(ours_value)
            if rel != rel:  # NaN on either side
                rel = float("inf")
            if rel >= worst[field][0]:
                worst[field] = (rel, c["name"])
    if len(by_factors) != len(ref["names"]):
        die("moderato-cli fit has {} terms, statsmodels {}".format(len(by_factors), len(ref["names"])))
    agreement = {"max_rel_diff_coefficients": worst["value"][0], "worst_coefficient": worst["value"][1],
                 "max_rel_diff_hc3_se": worst["se"][0], "worst_se": worst["se"][1],
                 "limit": AGREEMENT_LIMIT}
    agreement["agree"] = max(worst["value"][0], worst["se"][0]) <= AGREEMENT_LIMIT

    # 4. Ratios.
    m = {k: v["wall_s_median"] for k, v in summary.items()}
    numeric_bytes = 8 * len(NUMERIC_COLUMNS) * n_rows
    our_fit_only = m["our_fit"] - m["our_load"]
    ref_fit_only = m["ref_fit"] - m["ref_load"]
    ratios = {
        "load_speed": {"label": "load speed: pandas / ours", "value": m["ref_load"] / m["our_load"],
                       "target": ">= 2", "threshold": TARGETS["load_speed"], "higher_is_better": True},
        "fit_speed": {"label": "fit + HC3 speed, load subtracted: (d - b) / (c - a)",
                      "value": ref_fit_only / our_fit_only if our_fit_only > 0 else None,
                      "target": ">= 5", "threshold": TARGETS["fit_speed"], "higher_is_better": True},
        "fit_speed_whole": {"label": "whole process (secondary): d / c", "value": m["ref_fit"] / m["our_fit"],
                            "target": ">= 5", "threshold": TARGETS["fit_speed"], "higher_is_better": True},
        "load_rss": {"label": "load peak RSS / numeric size ({:.0f} MB)".format(numeric_bytes / 1e6),
                     "value": summary["our_load"]["peak_rss_mb_median"] * 1e6 / numeric_bytes,
                     "target": "<= 2", "threshold": TARGETS["load_rss"], "higher_is_better": False},
    }
    for r in ratios.values():
        v = r["value"]
        r["met"] = None if v is None else (v >= r["threshold"] if r["higher_is_better"] else v <= r["threshold"])
    # In-process reference timings (the reference's own clock), for the breakdown.
    ref_inproc = {k: statistics.median(x[k] for x in ref_runs)
                  for k in ("import_s", "read_csv_s", "design_s", "fit_hc3_s")}
    load_inproc = {k: statistics.median(x[k] for x in ref_load_runs) for k in ("import_s", "read_csv_s")}
    ratios_info = {
        "statsmodels_fit_hc3_inprocess_vs_ours": {
            "label": "statsmodels OLS+HC3 in-process (no import, no design) / (c - a)",
            "value": ref_inproc["fit_hc3_s"] / our_fit_only if our_fit_only > 0 else None},
        "read_csv_inprocess_vs_ours": {
            "label": "pandas.read_csv in-process (no import) / a",
            "value": load_inproc["read_csv_s"] / m["our_load"]},
    }

    # 5. Report.
    lines = []
    lines.append("Benchmark: {:,} rows x {} columns ({} numeric), {}, {:.1f} MB on disk; median of {} runs".format(
        n_rows, len(header), len(NUMERIC_COLUMNS), data.name, data.stat().st_size / 1e6, args.repeats))
    lines.append("")
    lines.append("| measurement | wall time s | CPU s | peak RSS MB | ratio | target | met? |")
    lines.append("| --- | ---: | ---: | ---: | ---: | --- | --- |")
    for key, label, *_ in cases:
        s = summary[key]
        lines.append("| {} | {} | {} | {:.0f} | | | |".format(label, fmt(s["wall_s_median"]), fmt(s["cpu_s_median"]),
                                                          s["peak_rss_mb_median"]))
    for key in ("load_speed", "fit_speed", "fit_speed_whole", "load_rss"):
        r = ratios[key]
        met = "n/a" if r["met"] is None else ("yes" if r["met"] else "**NO**")
        lines.append("| {} | | | | {} | {} | {} |".format(r["label"], fmt(r["value"], 2), r["target"], met))
    lines.append("")
    lines.append("Ratios are of median wall times. CPU s (user + system of the process, all threads) is shown "
                 "because it is less sensitive to other load on the machine.")
    lines.append("")
    lines.append("Agreement with statsmodels (relative): coefficients max {:.2e} ({}), HC3 SEs max {:.2e} ({})"
                 " — {}".format(agreement["max_rel_diff_coefficients"], agreement["worst_coefficient"],
                                agreement["max_rel_diff_hc3_se"], agreement["worst_se"],
                                "agree" if agreement["agree"] else "DISAGREE"))
    lines.append("statsmodels process, its own clock (medians): import {:.3f} s, read_csv {:.3f} s, "
                 "design {:.3f} s, OLS+HC3 {:.3f} s".format(*[ref_inproc[k] for k in
                                                              ("import_s", "read_csv_s", "design_s", "fit_hc3_s")]))
    lines.append("pandas-only process, its own clock (medians): import {:.3f} s, read_csv {:.3f} s".format(
        load_inproc["import_s"], load_inproc["read_csv_s"]))
    for r in ratios_info.values():
        lines.append("{}: {}".format(r["label"], fmt(r["value"], 2)))
    blas = ref["blas"]
    lines.append("reference BLAS (OPENBLAS_CORETYPE/OPENBLAS_L2_SIZE removed): {}; loaded {}; threadpoolctl: {}".format(
        blas["kind"], ", ".join(blas["loaded_libraries"]) or "none found",
        "not installed" if blas["threadpoolctl"] is None else json.dumps(blas["threadpoolctl"])))
    load_end = os.getloadavg()
    busy = max(load_average_at_start[0], load_end[0]) > 0.5 * (os.cpu_count() or 1)
    lines.append("machine: {} CPUs; load average (1 min) {:.2f} at start, {:.2f} at end{}".format(
        os.cpu_count(), load_average_at_start[0], load_end[0],
        " — other work was running: wall times are noisy, compare CPU s too" if busy else ""))
    lines.append("versions: numpy {}, pandas {}, statsmodels {}; moderato {}".format(
        ref["numpy"], ref["pandas"], ref["statsmodels"], ours.get("moderato_version")))
    met = [k for k in ("load_speed", "fit_speed", "load_rss") if ratios[k]["met"]]
    missed = [k for k in ("load_speed", "fit_speed", "load_rss") if ratios[k]["met"] is False]
    lines.append("")
    lines.append("Targets met: {}; missed: {}".format(", ".join(met) or "none", ", ".join(missed) or "none"))

    # 6. The workbench: opening a project until it is interactive (its own process and table).
    workbench_open = None
    bench_open = build / "tests" / "benchmarks" / "moderato_bench_open"
    if not args.skip_open and bench_open.is_file():
        print("\nrunning {} ...".format(bench_open), flush=True)
        with tempfile.TemporaryDirectory(dir=scratch) as tmp:
            out_json = Path(tmp) / "open.json"
            env = dict(os.environ)
            env.setdefault("QT_QPA_PLATFORM", "offscreen")
            done = subprocess.run([str(bench_open), "--rows", str(rows or 1_000_000), "--repeats", str(args.repeats),
                                   "--dir", str(Path(tmp) / "data"), "--json", str(out_json)],
                                  env=env, stdout=subprocess.PIPE, stderr=subprocess.STDOUT, text=True)
            print(done.stdout)
            if done.returncode != 0:
                die("moderato_bench_open failed (exit status {})".format(done.returncode))
            workbench_open = json.loads(out_json.read_text())
        lines.append("")
        lines.append("Workbench: opening a {:,}-row project until interactive (open + first result + paint), "
                     "median of {} runs: {:.3f} s (load {:.3f}, first result {:.3f}, paint {:.3f}); core read_csv "
                     "of the same file {:.3f} s, sha256_file {:.3f} s; open / read_csv = {:.2f}; target <= 3 s: {}"
                     .format(workbench_open["rows"], workbench_open["repeats"], workbench_open["open_s_median"],
                             workbench_open["load_s_median"], workbench_open["first_result_s_median"],
                             workbench_open["paint_s_median"], workbench_open["read_csv_s_median"],
                             workbench_open["sha256_s_median"], workbench_open["ratio_open_read"],
                             "yes" if workbench_open["met"] else "**NO**"))
    elif not args.skip_open:
        lines.append("")
        lines.append("Workbench open benchmark not run: {} is not built (a Qt build with benchmarks)".format(bench_open))

    drag = None
    if args.drag:
        drag_bin = build / "tests" / "benchmarks" / "moderato_bench_drag"
        if not drag_bin.is_file():
            die("no moderato_bench_drag at {} (configure with MODERATO_BUILD_GUI=ON and build it)".format(drag_bin))
        drag_json = scratch / "drag_results.json"
        out = subprocess.run([str(drag_bin), "--json", str(drag_json)], capture_output=True, text=True)
        if out.returncode != 0:
            die("moderato_bench_drag failed:\n" + out.stdout + out.stderr)
        drag = json.loads(drag_json.read_text())
        lines.append("")
        lines.append("Probe section drag ({} rows, {} frames): layered frame median {:.2f} ms, p95 {:.2f} ms "
                     "(targets 8 and 16); full replot of both plots median {:.2f} ms; ratio full / layered {:.2f}"
                     .format(drag["rows"], drag["frames"], drag["layered_ms"]["median"], drag["layered_ms"]["p95"],
                             drag["full_ms"]["median"], drag["ratio_median"]))
    report = "\n".join(lines)
    print()
    print(report)

    result = {"data": str(data), "rows": n_rows, "file_bytes": data.stat().st_size, "repeats": args.repeats,
              "numeric_bytes": numeric_bytes,
              "machine": dict(machine_info(), load_average_at_start=load_average_at_start), "processes": summary, "ratios": ratios,
              "ratios_info": ratios_info, "agreement": agreement, "statsmodels_inprocess": ref_inproc,
              "pandas_inprocess": load_inproc, "workbench_open": workbench_open,
              "reference_blas": blas, "versions": {k: ref[k] for k in ("numpy", "pandas", "statsmodels")},
              "drag": drag, "markdown": report}
    json_path = Path(args.json) if args.json else scratch / "benchmark_results.json"
    tmp_json = json_path.with_name(json_path.name + ".tmp")
    tmp_json.write_text(json.dumps(result, indent=2) + "\n")
    os.replace(tmp_json, json_path)
    print("\nJSON written to {}".format(json_path))

    if not agreement["agree"]:
        die("our estimates disagree with statsmodels' by more than {:g} (relative): the timings compare "
            "different computations".format(AGREEMENT_LIMIT))
    return 0


if __name__ == "__main__":
    sys.exit(main())
