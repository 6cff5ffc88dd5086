#!/usr/bin/python3
"""A fit computed inside PostgreSQL against reading the rows and fitting here.

Starts a throwaway PostgreSQL 15 cluster (initdb in a temporary folder, as
`nobody` when run as root; Unix socket only), loads the seeded benchmark table
(BUILD/tests/benchmarks/make_bench_table --rows N, 10,000,000 by default,
reused when present) with COPY, and runs `moderato-cli fit` on the table
twice per repeat, interleaved, with the benchmark model of run_benchmarks.py
(the three-way interaction of x1, x2, x3 and five controls) and HC3 standard
errors: once with --in-database (aggregate queries in the server, only sums
come back) and once reading the rows through libpq and fitting them here.

Reports for each the median wall time, the client's CPU time and peak RSS
(ru_maxrss of the child, from os.wait4), and the server's CPU time for the
in-database fit (the backends' and parallel workers' user+system time, from
/proc, summed over the server's processes before and after); the ratios
read-and-fit / in-database for time and peak RSS; whether the two agree
(1e-9 relative); and the targets of issue 16 (time ratio >= 5, RSS ratio >=
20, in-database peak RSS < 60 MB). A missed target is reported, not an error;
a failing program or disagreeing numbers are errors.
"""
import argparse
import os
import pwd
import shutil
import statistics
import subprocess
import sys
import tempfile
import time
from pathlib import Path

from process_measure import run

FOCAL = ["x1", "x2", "x3"]
CONTROLS = ["c1", "c2", "c3", "c4", "c5"]
PG_BIN = Path("/usr/lib/postgresql/15/bin")


def as_server_user(argv):
    """argv run as nobody when we are root (initdb and pg_ctl refuse root)."""
    if os.geteuid() == 0:
        return ["/usr/bin/setpriv", "--reuid=nobody", "--regid=nogroup", "--clear-groups", "--"] + argv
    return argv


class Cluster:
    def __init__(self, folder):
        self.folder = Path(folder)
        self.data = self.folder / "data"
        if os.geteuid() == 0:
            pw = pwd.getpwnam("nobody")
            os.chown(self.folder, pw.pw_uid, pw.pw_gid)
        subprocess.run(as_server_user([str(PG_BIN / "initdb"), "-D", str(self.data), "-U", "moderato",
                                       "--auth=trust", "-E", "UTF8", "--locale=C", "--no-sync"]),
                       check=True, stdout=subprocess.DEVNULL)
        with open(self.data / "postgresql.conf", "a") as conf:
            conf.write("listen_addresses = ''\nunix_socket_directories = '{}'\nfsync = off\n"
                       "synchronous_commit = off\nfull_page_writes = off\nshared_buffers = 512MB\n"
                       "max_wal_size = 4GB\nmax_parallel_workers_per_gather = 2\n"
                       "log_min_duration_statement = 1000\njit = off\n".format(self.folder))
        subprocess.run(as_server_user([str(PG_BIN / "pg_ctl"), "-D", str(self.data), "-l",
                                       str(self.folder / "server.log"), "-w", "start"]),
                       check=True, stdout=subprocess.DEVNULL)

    def uri(self, db="postgres"):
        return "postgresql:///{}?host={}&user=moderato".format(db, self.folder)

    def psql(self, sql):
        return subprocess.run([str(PG_BIN / "psql"), "-X", "-q", "-v", "ON_ERROR_STOP=1", "-At", "-d", self.uri(),
                               "-c", sql], check=True, capture_output=True, text=True).stdout

    def server_cpu(self):
        """User + system seconds of the server's processes (postmaster and children, running or reaped)."""
        pid = int((self.data / "postmaster.pid").read_text().split()[0])
        ticks = os.sysconf("SC_CLK_TCK")
        fields = Path("/proc/{}/stat".format(pid)).read_text().rsplit(")", 1)[1].split()
        own = sum(int(f) for f in fields[11:13])       # utime, stime
        reaped = sum(int(f) for f in fields[13:15])    # cutime, cstime: children that ended
        live = 0
        for child in Path("/proc/{}/task/{}/children".format(pid, pid)).read_text().split():
            try:
                cf = Path("/proc/{}/stat".format(child)).read_text().rsplit(")", 1)[1].split()
                live += int(cf[11]) + int(cf[12])
            except FileNotFoundError:
                pass
        return (own + reaped + live) / ticks

    def stop(self):
        subprocess.run(as_server_user([str(PG_BIN / "pg_ctl"), "-D", str(self.data), "-m", "fast", "-w", "stop"]),
                       stdout=subprocess.DEVNULL)


def agree(a, b):
    worst = 0.0
    for ta, tb in zip(a["terms"], b["terms"]):
        scale = max(abs(tb["value"]), tb["se"])
        worst = max(worst, abs(ta["value"] - tb["value"]) / scale, abs(ta["se"] - tb["se"]) / tb["se"])
    return worst


def load(cluster, csv):
    cluster.psql("CREATE TABLE bench (y float8, x1 float8, x2 float8, x3 float8, treated float8, c1 float8, "
                 "c2 float8, c3 float8, c4 float8, c5 float8, cluster_id integer, region text)")
    start = time.perf_counter()
    cluster.psql("\\copy bench FROM '{}' WITH (FORMAT csv, HEADER true)".format(csv))
    cluster.psql("VACUUM ANALYZE bench")
    return time.perf_counter() - start


def main():
    p = argparse.ArgumentParser(description=__doc__, formatter_class=argparse.RawDescriptionHelpFormatter)
    p.add_argument("--build-dir", default="build")
    p.add_argument("--rows", type=int, default=10_000_000)
    p.add_argument("--repeats", type=int, default=1)
    p.add_argument("--slow-statements", action="store_true", help="print the server's statements over 1 s")
    p.add_argument("--scratch", help="folder for the table (default BUILD/tests/benchmarks/scratch)")
    args = p.parse_args()
    build = Path(args.build_dir)
    cli = build / "app" / "moderato-cli"
    scratch = Path(args.scratch or build / "tests" / "benchmarks" / "scratch")
    scratch.mkdir(parents=True, exist_ok=True)
    csv = scratch / "bench_{}.csv".format(args.rows)
    if not csv.exists():
        subprocess.run([str(build / "tests" / "benchmarks" / "make_bench_table"), "--rows", str(args.rows), "--out",
                        str(csv)], check=True)
    folder = tempfile.mkdtemp(prefix="moderato-pg-bench-")
    cluster = Cluster(folder)
    try:
        load_s = load(cluster, csv)
        model = ["--outcome", "y", "--predictors", ",".join(FOCAL + CONTROLS), "--interaction", ",".join(FOCAL),
                 "--se", "hc3", "--format", "json"]
        base = [str(cli), "fit", "--data", cluster.uri(), "--table", "bench"] + model
        results = {"inside": [], "rows": []}
        server = []
        for r in range(args.repeats):
            before = cluster.server_cpu()
            results["inside"].append(run(base + ["--in-database"], folder, "inside{}".format(r)))
            server.append(cluster.server_cpu() - before)
            results["rows"].append(run(base, folder, "rows{}".format(r)))
        report(args, load_s, results, server)
        if args.slow_statements:  # the statements over a second, with their durations
            for line in (Path(folder) / "server.log").read_text().splitlines():
                if "duration:" in line:
                    print(line[line.find("duration:"):][:160])
    finally:
        cluster.stop()
        shutil.rmtree(folder, ignore_errors=True)


def report(args, load_s, results, server):
    med = {k: [statistics.median(x[i] for x in v) for i in range(3)] for k, v in results.items()}
    worst = agree(results["inside"][0][3], results["rows"][0][3])
    t_ratio = med["rows"][0] / med["inside"][0]
    m_ratio = med["rows"][2] / med["inside"][2]
    mb = 1024.0 * 1024.0
    print("| fit ({:,} rows, HC3) | wall s | client CPU s | peak RSS MB |".format(args.rows))
    print("| --- | --- | --- | --- |")
    print("| --in-database | {:.2f} | {:.2f} | {:.1f} |".format(med["inside"][0], med["inside"][1],
                                                                 med["inside"][2] / mb))
    print("| read rows, fit here | {:.2f} | {:.2f} | {:.1f} |".format(med["rows"][0], med["rows"][1],
                                                                       med["rows"][2] / mb))
    print()
    print("load (COPY + VACUUM ANALYZE): {:.1f} s; server CPU of the in-database fit: {:.1f} s".format(
        load_s, statistics.median(server)))
    print("time ratio read-and-fit / in-database: {:.2f} (target >= 5: {})".format(t_ratio, "met" if t_ratio >= 5
                                                                                     else "missed"))
    print("peak RSS ratio: {:.1f} (target >= 20: {})".format(m_ratio, "met" if m_ratio >= 20 else "missed"))
    print("in-database peak RSS: {:.1f} MB (target < 60: {})".format(med["inside"][2] / mb,
                                                                      "met" if med["inside"][2] < 60 * mb
                                                                      else "missed"))
    print("largest difference (relative to max(|value|, SE), and SE relative): {:.2e}".format(worst))
    print("load average: {}".format(" ".join(Path("/proc/loadavg").read_text().split()[:3])))
    if not worst < 1e-9:
        sys.exit("the two fits disagree")


if __name__ == "__main__":
    main()
