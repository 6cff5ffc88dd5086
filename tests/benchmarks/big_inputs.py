#!/usr/bin/python3
"""Big and odd inputs through moderato-cli at full size, with peak memory.

Usage (from the project root, after building into BUILD):
    /usr/bin/python3 tests/benchmarks/big_inputs.py --build-dir BUILD [--scratch DIR] [--gb 2]

Not a ctest: the files are large (a 2 GB CSV among them). The normal suite
runs scaled-down versions of every case (tests/core/test_csv_limits.cpp,
tests/core/test_design.cpp DesignLimits.*, tests/cli/test_big_input_cli.cpp).

Each file is generated here from a seeded recipe (random.Random(20261204))
into --scratch (default: a new folder under /tmp, removed afterwards unless
--keep) and never committed. Each case runs `moderato-cli` as a whole process
under /usr/bin/time -v (Debian package `time`) and records the exit code,
the first line of stderr, the peak resident set and the wall time:

  2gb-columns      a --gb GB CSV (y, x, m numeric; g text with 5 levels): columns
  2gb-fit          the same file: fit y ~ x + m + x*m
  wide-10k         10,000 columns x 2,000 rows: columns, then a fit of 3 of them
  cell-50mb        one 50 MB cell in a text column: a fit of the other columns
  line-50mb        one 50 MB header line of fields: refused by the column limit
  levels-100k-columns  a column with 100,000 levels on 100,000 rows: columns
  levels-100k      the same column as the moderator of a probe: refused
  changing         a 300 MB file appended to while it is read: refused
  2gb-fit-bounded  the 2 GB fit again under `prlimit --as` (an address-space
                   limit of --bound GB): it must end by itself, not be killed

"Handled" means exit 0; "refused" means exit 2 with the message shown. Any
other ending (a signal, exit 1) is a failure and makes the exit status 1.
MB and GB here are 10^6 and 10^9 bytes.
"""

import argparse
import os
import random
import shutil
import subprocess
import sys
import tempfile
import threading
import time
from pathlib import Path

SEED = 20261204


def write_tall(path, target_bytes, rng):
    """y,x,m,g rows: a 4 MB block of seeded rows written again and again."""
    lines = []
    for _ in range(100_000):
        x = rng.gauss(0, 1)
        m = rng.uniform(0, 10)
        y = 1 + 0.5 * x + 0.2 * m + 0.1 * x * m + rng.gauss(0, 1)
        lines.append(f"{y:.6f},{x:.6f},{m:.5f},{rng.choice('ABCDE')}\n")
    block = "".join(lines).encode()
    with open(path, "wb") as f:
        f.write(b"y,x,m,g\n")
        written = 0
        while written < target_bytes:
            f.write(block)
            written += len(block)


def write_wide(path, cols, rows, rng):
    with open(path, "w") as f:
        f.write(",".join(f"c{j}" for j in range(1, cols + 1)) + "\n")
        for _ in range(rows):
            f.write(",".join(str(rng.randrange(10)) for _ in range(cols)) + "\n")


def write_cell(path, cell_bytes, rng):
    with open(path, "w") as f:
        f.write("y,x,note\n")
        for i in range(1000):
            note = "w" * cell_bytes if i == 500 else "short"
            f.write(f"{rng.randrange(10)},{rng.randrange(10)},{note}\n")


def write_fields_line(path, line_bytes):
    with open(path, "w") as f:
        n = line_bytes // 2
        f.write(",".join(["a"] * n) + "\n1\n")


def write_levels(path, levels, rng):
    with open(path, "w") as f:
        f.write("y,x,shop\n")
        for i in range(levels):
            f.write(f"{rng.randrange(10)},{rng.randrange(10)},shop{i}\n")


def timed(cmd, during=None):
    """Runs cmd under /usr/bin/time -v; returns (exit, first stderr line, peak RSS MB, wall s)."""
    with tempfile.NamedTemporaryFile("r", suffix=".time") as t:
        full = ["/usr/bin/time", "-v", "-o", t.name] + cmd
        start = time.monotonic()
        proc = subprocess.Popen(full, stdout=subprocess.DEVNULL, stderr=subprocess.PIPE, text=True)
        stop = threading.Event()
        worker = threading.Thread(target=during, args=(stop,)) if during else None
        if worker:
            worker.start()
        _, err = proc.communicate()
        wall = time.monotonic() - start
        stop.set()
        if worker:
            worker.join()
        report = t.read()
    rss_kb = 0
    signal = ""
    for line in report.splitlines():
        line = line.strip()
        if line.startswith("Maximum resident set size"):
            rss_kb = int(line.split(":")[1])
        if line.startswith("Command terminated by signal"):
            signal = line
    first = err.strip().splitlines()[0] if err.strip() else ""
    return proc.returncode, signal or first, rss_kb * 1024 / 1e6, wall


def appender(path):
    def run(stop):
        time.sleep(0.3)  # the reader has opened the file and is in its first blocks
        with open(path, "a") as f:
            while not stop.is_set():
                f.write("1.0,2.0,3.0,A\n")
                f.flush()
                time.sleep(0.01)

    return run


def main():
    ap = argparse.ArgumentParser(description=__doc__, formatter_class=argparse.RawDescriptionHelpFormatter)
    ap.add_argument("--build-dir", default="build")
    ap.add_argument("--scratch", default="")
    ap.add_argument("--keep", action="store_true")
    ap.add_argument("--gb", type=float, default=2.0)
    ap.add_argument("--bound", type=float, default=12.0, help="address-space limit (GB) of the bounded run")
    ap.add_argument("--only", default="", help="comma-separated case names")
    args = ap.parse_args()
    cli = str(Path(args.build_dir).resolve() / "app" / "moderato-cli")
    if not os.access(cli, os.X_OK):
        sys.exit(f"{cli}: not built")
    scratch = Path(args.scratch or tempfile.mkdtemp(prefix="moderato-big-"))
    scratch.mkdir(parents=True, exist_ok=True)
    rng = random.Random(SEED)
    only = set(filter(None, args.only.split(",")))
    want = lambda name: not only or name in only  # noqa: E731

    tall = scratch / "tall.csv"
    files = {
        "tall": (tall, lambda p: write_tall(p, int(args.gb * 1e9), rng)),
        "wide": (scratch / "wide.csv", lambda p: write_wide(p, 10_000, 2_000, rng)),
        "cell": (scratch / "cell.csv", lambda p: write_cell(p, 50_000_000, rng)),
        "line": (scratch / "line.csv", lambda p: write_fields_line(p, 50_000_000)),
        "levels": (scratch / "levels.csv", lambda p: write_levels(p, 100_000, rng)),
        "live": (scratch / "live.csv", lambda p: write_tall(p, 300_000_000, rng)),
    }
    model = ["--outcome", "y", "--predictors", "x,m", "--interaction", "x,m"]
    cases = [
        ("2gb-columns", "tall", ["columns", "--data", str(tall)], None, []),
        ("2gb-fit", "tall", ["fit", "--data", str(tall)] + model, None, []),
        ("wide-10k", "wide", ["columns", "--data", str(files["wide"][0])], None, []),
        ("wide-10k-fit", "wide",
         ["fit", "--data", str(files["wide"][0]), "--outcome", "c1", "--predictors", "c2,c9999,c10000"], None, []),
        ("cell-50mb", "cell", ["fit", "--data", str(files["cell"][0]), "--outcome", "y", "--predictors", "x"],
         None, []),
        ("line-50mb", "line", ["columns", "--data", str(files["line"][0])], None, []),
        ("levels-100k-columns", "levels", ["columns", "--data", str(files["levels"][0])], None, []),
        ("levels-100k", "levels",
         ["probe", "--data", str(files["levels"][0]), "--outcome", "y", "--predictors", "x,shop",
          "--interaction", "x,shop", "--focal", "x", "--moderator", "shop"], None, []),
        ("changing", "live", ["columns", "--data", str(files["live"][0])], appender(files["live"][0]), []),
        ("2gb-fit-bounded", "tall", ["fit", "--data", str(tall)] + model, None,
         ["prlimit", f"--as={int(args.bound * 1e9)}"]),
    ]
    made = set()
    rows = []
    failed = False
    for name, key, cmd, during, prefix in cases:
        if not want(name):
            continue
        path, make = files[key]
        if key not in made and not path.exists():
            t0 = time.monotonic()
            make(path)
            print(f"made {path.name}: {path.stat().st_size / 1e6:.0f} MB in {time.monotonic() - t0:.0f} s",
                  file=sys.stderr)
        made.add(key)
        code, msg, rss, wall = timed(prefix + [cli] + cmd, during)
        outcome = {0: "handled", 2: "refused"}.get(code, f"FAILED (exit {code})")
        failed |= code not in (0, 2)
        rows.append((name, f"{path.stat().st_size / 1e6:.0f} MB", outcome, msg, rss, wall))
        print(f"{name}: {outcome}, {rss:.0f} MB peak, {wall:.1f} s", file=sys.stderr)
    print("| case | input | outcome | message | peak RSS (MB) | wall (s) |")
    print("| --- | --- | --- | --- | ---: | ---: |")
    for name, size, outcome, msg, rss, wall in rows:
        print(f"| {name} | {size} | {outcome} | {msg.replace('|', '/')} | {rss:.0f} | {wall:.1f} |")
    load = os.getloadavg()
    print(f"\nload average {load[0]:.1f} {load[1]:.1f} {load[2]:.1f}; {os.cpu_count()} CPUs")
    if not args.keep and not args.scratch:
        shutil.rmtree(scratch, ignore_errors=True)
    return 1 if failed else 0


if __name__ == "__main__":
    sys.exit(main())
