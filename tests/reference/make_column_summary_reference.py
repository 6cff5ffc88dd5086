#!/usr/bin/python3
"""Reference values for tests/core/test_column_summary.cpp.

Prints the numbers the C++ test compares against, computed with Python's
`statistics` module (mean and sample SD in exact rational arithmetic, then
rounded) and numpy (percentiles with the default "linear" method, and
numpy.histogram with bins="auto" or a fixed bin count). Run with
/usr/bin/python3 (Debian's python3-numpy); the test comments name the
versions used (numpy 1.24.2, Python 3.11).

    /usr/bin/python3 tests/reference/make_column_summary_reference.py
"""
import statistics
import sys

import numpy as np

NAN = float("nan")

# Case "amounts": invented values with two missing cells (NaN).
AMOUNTS = [12.5, 7.25, NAN, 3, 18.75, 9.5, 11, NAN, 14.25, 6.5, 21, 8.75, 10,
           13.5, 4.25, 16, 9, 12, 7.75, 15.5, 5.5, 19.25, 11.75]

# Case "spike": the middle half is one value, so the IQR is 0 and the
# Sturges width is used alone.
SPIKE = [5.0] * 20 + [1.0, 9.0, 12.0, 2.5]

# Case "grid": 100000 values on a 1/64 grid (exact in binary), many on bin
# edges. Same formula in the C++ test.
GRID = [((i * 7919) % 10007) / 64.0 for i in range(100000)]


def show(name, values, bins_list):
    x = np.array([v for v in values if v == v], dtype=float)
    print(f"== {name}: n={x.size} missing={len(values) - x.size}")
    print(f"mean   {statistics.fmean(x.tolist())!r}  (statistics.fmean)")
    print(f"mean   {float(statistics.mean(x.tolist()))!r}  (statistics.mean, exact)")
    print(f"sd     {statistics.stdev(x.tolist())!r}  (statistics.stdev)")
    print(f"min    {x.min()!r}  max {x.max()!r}")
    q = np.percentile(x, [25, 50, 75])
    print(f"q1     {q[0]!r}  median {q[1]!r}  q3 {q[2]!r}  (numpy.percentile, linear)")
    for bins in bins_list:
        counts, edges = np.histogram(x, bins=bins)
        print(f"histogram bins={bins!r}: {len(counts)} bins")
        print("  edges  " + ", ".join(repr(float(e)) for e in edges))
        print("  counts " + ", ".join(str(int(c)) for c in counts))


def main():
    print(f"numpy {np.__version__}, Python {sys.version.split()[0]}")
    show("amounts", AMOUNTS, ["auto"])
    show("spike", SPIKE, ["auto"])
    show("grid", GRID, ["auto", 40])
    show("constant", [2.5, 2.5, 2.5], ["auto"])


if __name__ == "__main__":
    main()
