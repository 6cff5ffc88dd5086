"""Runs one command for a benchmark and measures it as a whole process: wall
time, CPU time (user + system) and peak RSS from wait4, with its standard
output (JSON) kept in a file of `out_dir`. Shared by the benchmark scripts."""
import json
import os
import subprocess
import sys
import time
from pathlib import Path


def run(argv, out_dir, label):
    out_path = Path(out_dir) / (label + ".json")
    with open(out_path, "w") as out:
        start = time.perf_counter()
        proc = subprocess.Popen(argv, stdout=out, stderr=subprocess.PIPE)
        _, status, usage = os.wait4(proc.pid, 0)
        wall = time.perf_counter() - start
        err = proc.stderr.read().decode()
    if os.waitstatus_to_exitcode(status) != 0:
        sys.exit("{} failed: {}".format(" ".join(argv), err))
    return wall, usage.ru_utime + usage.ru_stime, usage.ru_maxrss * 1024, json.loads(out_path.read_text())
