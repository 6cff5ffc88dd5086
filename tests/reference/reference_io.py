"""Helpers shared by the reference scripts: files are written atomically, a
CSV is checked to read back as exactly the doubles that were fitted, numbers
become plain Python floats, and each fixture names the libraries it came from."""
import json
import os
import subprocess
import tempfile

import numpy as np
import pandas as pd
import scipy
import statsmodels


def debian_version(package):
    try:
        out = subprocess.run(["dpkg-query", "-W", "-f=${Version}", package],
                             capture_output=True, text=True, check=False)
        return out.stdout.strip() or None
    except OSError:
        return None


def library_source():
    deb = debian_version("python3-statsmodels")
    pkg = f"python3-statsmodels {deb}, Debian" if deb else "python3-statsmodels"
    return (f"statsmodels {statsmodels.__version__} ({pkg}); numpy {np.__version__}, "
            f"scipy {scipy.__version__}, pandas {pd.__version__}")


def fl(a):
    """Python floats (repr = shortest round-trip) from numpy data."""
    if np.ndim(a) == 0:
        return float(a)
    return [fl(v) for v in a]


def atomic_write(path, text):
    d = os.path.dirname(path)
    fd, tmp = tempfile.mkstemp(dir=d, prefix=".tmp-", suffix=os.path.basename(path))
    try:
        with os.fdopen(fd, "w", encoding="utf-8", newline="\n") as f:
            f.write(text)
        os.chmod(tmp, 0o644)
        os.replace(tmp, path)
    except BaseException:
        if os.path.exists(tmp):
            os.unlink(tmp)
        raise


def write_csv_roundtrip(df, path):
    # shortest round-trip representation of each double (Python repr): the
    # same doubles as '%.17g' without its noise digits (317.6, not 317.60000000000002)
    text = df.to_csv(index=False, float_format=lambda v: repr(float(v)), lineterminator="\n")
    atomic_write(path, text)
    back = pd.read_csv(path, float_precision="round_trip")
    assert list(back.columns) == list(df.columns)
    for c in df.columns:
        a, b = df[c].to_numpy(), back[c].to_numpy()
        if a.dtype.kind == "f" or b.dtype.kind == "f":
            assert np.array_equal(a.astype(float), b.astype(float)), f"{path}: column {c} does not round-trip"
        else:
            assert [str(v) for v in a] == [str(v) for v in b], f"{path}: column {c} does not round-trip"
    # fit on what a reader of the CSV sees
    for c in df.columns:
        if df[c].dtype.kind == "O":
            back[c] = back[c].astype(str)
    return back


def write_case(out_dir, case, made, fit, *, source, command, base_seed, script, check=None,
               data_name=None):
    """Writes CASE.csv (the data, read back bit for bit) and CASE.json (how the
    data were made, the spec and what `fit` computed on the data as read
    back); `check(doc, case)` runs before the JSON is written. Returns the
    fitted body. `data_name` names the CSV instead of CASE.csv when cases
    share one data file. A `desc` that is a dict describes a shipped dataset
    and is stored as the "dataset" block (keys starting with "_" left out);
    a text `desc` says how the data were generated."""
    df, desc, spec = made
    data_name = data_name or f"{case}.csv"
    back = write_csv_roundtrip(df, os.path.join(out_dir, data_name))
    body = fit(back, spec)
    if isinstance(desc, dict):
        dataset = {k: v for k, v in desc.items() if not k.startswith("_")}
    else:
        dataset = {"generated": desc, "generator": (
            f"numpy.random.Generator(PCG64(SeedSequence([{base_seed}, case number]))) in {script}")}
    doc = {"case": case, "source": source, "command": command, "data": data_name,
           "dataset": dataset, "spec": spec}
    doc.update(body)
    if check:
        check(doc, case)
    atomic_write(os.path.join(out_dir, f"{case}.json"),
                 json.dumps(doc, indent=1, ensure_ascii=False, allow_nan=False) + "\n")
    print(f"  {case:16s} n={body['n']:4d}  terms: {', '.join(body['terms'])}")
    return body
