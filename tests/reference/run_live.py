#!/usr/bin/env python3
"""Runs every reference script into one folder (the build's live reference
run). With Debian's python3-statsmodels missing it says so and exits 0: the
tests then use the committed fixtures in tests/reference/fixtures.

    /usr/bin/python3 tests/reference/run_live.py --out DIR
"""
import argparse
import os
import subprocess
import sys

HERE = os.path.dirname(os.path.abspath(__file__))
# script -> None (its --out takes a folder) or the file name its --out takes
SCRIPTS = {"make_statsmodels_reference.py": None, "make_logit_effects_reference.py": None,
           "make_cells_reference.py": None, "make_power_reference.py": "power_reference.json",
           "make_ui_estimates_reference.py": None, "make_diagnostics_reference.py": None,
           "make_prediction_reference.py": None, "make_contrasts_reference.py": None,
           "make_mixed_reference.py": None, "make_linearity_reference.py": None,
           "make_count_reference.py": None}


def main():
    ap = argparse.ArgumentParser()
    ap.add_argument("--out", required=True)
    args = ap.parse_args()
    try:
        import statsmodels  # noqa: F401
        import scipy  # noqa: F401
    except ImportError:
        print("python3-statsmodels / python3-scipy not installed: the committed fixtures are used")
        return 0
    os.makedirs(args.out, exist_ok=True)
    for script, file_name in SCRIPTS.items():
        path = os.path.join(HERE, script)
        if not os.path.exists(path):
            continue
        out = os.path.join(args.out, file_name) if file_name else args.out
        print("running", script, flush=True)
        subprocess.run([sys.executable, path, "--out", out], check=True)
    return 0


if __name__ == "__main__":
    sys.exit(main())
