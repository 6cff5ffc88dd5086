#!/usr/bin/python3
"""Streamed against in-memory fits of the seeded benchmark table.

Makes the table with BUILD/tests/benchmarks/make_bench_table --rows N (reused
when present), then runs `moderato-cli fit` on it twice per repeat, interleaved:
in memory and with --stream, the benchmark model of run_benchmarks.py (the
three-way interaction of x1, x2, x3 and five controls) with HC3 standard
errors (3 passes). Reports the median wall time, CPU time and peak RSS
(ru_maxrss of the child, from os.wait4) of each, the ratio stream / in-memory
time, whether the numbers agree (1e-9 relative), and the targets of issue 17
(10M rows: time ratio <= 1.5 and stream peak RSS <= 300 MB; 30M rows: stream
peak RSS <= 500 MB). A missed target is reported, not an error; a failing
program or disagreeing numbers are errors. --skip-memory runs only the
streamed fit (for tables whose in-memory fit would not fit the machine).
"""
import argparse
import os
import statistics
import subprocess
import sys
import tempfile
from pathlib import Path

from process_measure import run

FOCAL = ["x1", "x2", "x3"]
CONTROLS = ["c1", "c2", "c3", "c4", "c5"]


def agree(a, b):
    worst = 0.0
    for ta, tb in zip(a["terms"], b["terms"]):
        for f in ("value", "se"):
            worst = max(worst, abs(ta[f] - tb[f]) / max(abs(tb[f]), 1e-300))
    return worst


def main():
    p = argparse.ArgumentParser(description=__doc__, formatter_class=argparse.RawDescriptionHelpFormatter)
    p.add_argument("--build-dir", default="build")
    p.add_argument("--rows", type=int, default=10_000_000)
    p.add_argument("--repeats", type=int, default=1)
    p.add_argument("--scratch", help="folder for the table (default BUILD/tests/benchmarks/scratch)")
    p.add_argument("--skip-memory", action="store_true", help="only the streamed fit")
    args = p.parse_args()
    build = Path(args.build_dir)
    cli = build / "app" / "moderato-cli"
    scratch = Path(args.scratch) if args.scratch else build / "tests" / "benchmarks" / "scratch"
    scratch.mkdir(parents=True, exist_ok=True)
    data = scratch / "bench_{}.csv".format(args.rows)
    if not data.exists():
        print("writing {} rows to {} ...".format(args.rows, data), flush=True)
        gen = build / "tests" / "benchmarks" / "make_bench_table"
        subprocess.run([str(gen), "--rows", str(args.rows), "--out", str(data)], check=True)
    fit = [str(cli), "fit", "--data", str(data), "--outcome", "y", "--interaction", ",".join(FOCAL),
           "--predictors", ",".join(CONTROLS), "--se", "hc3", "--format", "json"]
    kinds = [("stream", fit + ["--stream"])] + ([] if args.skip_memory else [("memory", fit)])
    runs = {k: [] for k, _ in kinds}
    outputs = {}
    with tempfile.TemporaryDirectory() as tmp:
        for r in range(args.repeats):
            for key, argv in kinds:
                wall, cpu, rss, out = run(argv, tmp, key)
                print("{} #{}: {:.2f} s (CPU {:.2f} s), peak RSS {:.0f} MB".format(key, r + 1, wall, cpu, rss / 1e6),
                      flush=True)
                runs[key].append((wall, cpu, rss))
                outputs[key] = out
    med = {k: [statistics.median(x[i] for x in v) for i in range(3)] for k, v in runs.items()}
    size_gb = data.stat().st_size / 1e9
    print("\n{:,} rows ({:.2f} GB CSV), load average {:.2f}".format(args.rows, size_gb, os.getloadavg()[0]))
    print("| fit | wall s | CPU s | peak RSS MB |\n| --- | --- | --- | --- |")
    for k, (w, c, rss) in med.items():
        print("| {} | {:.2f} | {:.2f} | {:.0f} |".format(k, w, c, rss / 1e6))
    print("passes: {}".format(outputs["stream"]["streamed"]))
    rss_target = 300 if args.rows <= 10_000_000 else 500
    print("stream peak RSS {:.0f} MB (target <= {} MB): {}".format(
        med["stream"][2] / 1e6, rss_target, "met" if med["stream"][2] / 1e6 <= rss_target else "missed"))
    if "memory" in med:
        ratio = med["stream"][0] / med["memory"][0]
        print("time stream / in memory: {:.2f} (target <= 1.5): {}".format(ratio, "met" if ratio <= 1.5 else "missed"))
        worst = agree(outputs["stream"], outputs["memory"])
        print("largest relative difference of estimates and SEs: {:.2e}".format(worst))
        if worst > 1e-9:
            sys.exit("the streamed and in-memory fits disagree")


if __name__ == "__main__":
    main()
