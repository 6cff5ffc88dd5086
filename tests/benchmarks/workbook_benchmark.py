#!/usr/bin/env python3
"""Workbook load: moderato-cli reading a 100,000-row x 10-column .xlsx
against openpyxl's read-only load of the same file, in the same run.

Workbook: written here by openpyxl (write-only mode; random.Random(1616)):
sheet "Data" with id (1..n), eight numeric columns x1..x8 (uniform, 6
decimals), and a text column `group` (one of five words); the header row
first. Numbers as numbers, text as inline strings (openpyxl's way).

  ours:     `moderato-cli columns --data FILE --format json`, the whole
            process (open the zip, parse the sheet, build the table,
            summarise each column).
  openpyxl: load_workbook(read_only=True) and every row's values into a
            list (iter_rows(values_only=True)), in-process.

Goal (#16): ours under 1 s. Reported: medians of --repeats runs (wall
time, and our process's CPU time, steadier on a shared machine), and the
ratio openpyxl / ours (wall). The two must agree on the rows and on every numeric
column's mean (1e-12 relative), or the script fails.

    /usr/bin/python3 tests/benchmarks/workbook_benchmark.py --build-dir build
"""
import argparse
import json
import math
import os
import random
import resource
import statistics
import subprocess
import sys
import tempfile
import time

import openpyxl

COLUMNS = ["id"] + ["x%d" % i for i in range(1, 9)] + ["group"]
WORDS = ["alder", "birch", "cedar", "larch", "maple"]


def write_workbook(path, rows):
    rng = random.Random(1616)
    wb = openpyxl.Workbook(write_only=True)
    ws = wb.create_sheet("Data")
    ws.append(COLUMNS)
    for i in range(rows):
        ws.append([i + 1] + [round(rng.uniform(-100, 100), 6) for _ in range(8)] + [rng.choice(WORDS)])
    wb.save(path)


def openpyxl_load(path):
    wb = openpyxl.load_workbook(path, read_only=True)
    rows = [list(r) for r in wb["Data"].iter_rows(values_only=True)]
    wb.close()
    return rows


def main():
    ap = argparse.ArgumentParser(description=__doc__.split("\n")[0])
    ap.add_argument("--build-dir", default="build")
    ap.add_argument("--rows", type=int, default=100_000)
    ap.add_argument("--repeats", type=int, default=5)
    a = ap.parse_args()
    cli = os.path.join(a.build_dir, "app", "moderato-cli")
    with tempfile.TemporaryDirectory(prefix="moderato-xlsx-bench-") as tmp:
        path = os.path.join(tmp, "bench.xlsx")
        write_workbook(path, a.rows)
        ours, ours_cpu, theirs = [], [], []
        out = None
        for _ in range(a.repeats):
            start = time.perf_counter()
            before = resource.getrusage(resource.RUSAGE_CHILDREN)
            r = subprocess.run([cli, "columns", "--data", path, "--format", "json"], capture_output=True, text=True)
            ours.append(time.perf_counter() - start)
            after = resource.getrusage(resource.RUSAGE_CHILDREN)
            ours_cpu.append(after.ru_utime - before.ru_utime + after.ru_stime - before.ru_stime)
            if r.returncode != 0:
                sys.exit("moderato-cli failed: " + r.stderr)
            out = json.loads(r.stdout)
            start = time.perf_counter()
            rows = openpyxl_load(path)
            theirs.append(time.perf_counter() - start)
        check(out, rows)
        t_ours, t_theirs = statistics.median(ours), statistics.median(theirs)
        print(json.dumps({
            "rows": a.rows, "columns": len(COLUMNS), "file_bytes": os.path.getsize(path),
            "moderato_cli_columns_s": round(t_ours, 3), "moderato_cli_cpu_s": round(statistics.median(ours_cpu), 3),
            "openpyxl_read_only_s": round(t_theirs, 3),
            "ratio_openpyxl_over_ours": round(t_theirs / t_ours, 2), "goal_under_1_s": t_ours < 1.0,
            "openpyxl": openpyxl.__version__, "load_average": os.getloadavg()[0],
        }, indent=1))


def check(out, rows):
    header, data = rows[0], rows[1:]
    if out["rows"] != len(data):
        sys.exit("rows differ: %d against openpyxl's %d" % (out["rows"], len(data)))
    for j, name in enumerate(header[:-1]):
        col = next(c for c in out["columns"] if c["name"] == name)
        mean = math.fsum(r[j] for r in data) / len(data)
        if abs(col["mean"] - mean) > 1e-12 * max(1.0, abs(mean)):
            sys.exit("column %s: mean %r against openpyxl's %r" % (name, col["mean"], mean))


if __name__ == "__main__":
    main()
