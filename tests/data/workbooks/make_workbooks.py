#!/usr/bin/env python3
"""Writes the test workbooks with openpyxl (an independent writer) and, beside
each, the values it was given (expected.json), so the C++ tests check the
reader against the writer's inputs rather than against its own output.

Dates are written as Python datetimes; the expected number is the days since
1970-01-01 computed here by Python's own calendar (date.toordinal), not by any
spreadsheet serial arithmetic. Seeded: the same files every run (the
document properties carry a fixed time).

Usage: make_workbooks.py OUT_DIR
"""
import datetime as dt
import json
import os
import random
import sys

import openpyxl
from openpyxl.utils.datetime import CALENDAR_MAC_1904

EPOCH = dt.date(1970, 1, 1).toordinal()
FIXED = dt.datetime(2024, 1, 1)


def days(value):
    """Days since 1970-01-01 of a date or datetime, time of day as the fraction."""
    if isinstance(value, dt.datetime):
        seconds = value.hour * 3600 + value.minute * 60 + value.second
        return value.date().toordinal() - EPOCH + seconds / 86400.0
    return value.toordinal() - EPOCH


def fixed_properties(wb):
    wb.properties.created = FIXED
    wb.properties.modified = FIXED


def mixed(out):
    """Sheet Data: numbers, text, booleans, dates, empty and NA cells; sheet
    'Other rows' small; a chart sheet; a hidden sheet."""
    rng = random.Random(1616)
    wb = openpyxl.Workbook()
    fixed_properties(wb)
    ws = wb.active
    ws.title = "Data"
    header = ["id", "x", "group", "flag", "when", "stamp"]
    ws.append(header)
    rows = []
    for i in range(40):
        x = round(rng.uniform(-5, 5), 6)
        group = rng.choice(["north", "south", "east"])
        flag = rng.random() < 0.5
        when = dt.date(1999, 12, 25) + dt.timedelta(days=rng.randint(0, 9000))
        stamp = dt.datetime(2020, 2, 28, 6, 30, 0) + dt.timedelta(minutes=15 * rng.randint(0, 5000))
        if i == 3:
            x = None          # an empty cell
        if i == 7:
            group = "NA"      # a missing token written as text
        rows.append([i + 1, x, group, flag, when, stamp])
        ws.append(rows[-1])
    other = wb.create_sheet("Other rows")
    other.append(["a", "b"])
    other.append([1, "one"])
    other.append([2, "two"])
    wb.create_chartsheet("Chart1")
    hidden = wb.create_sheet("Hidden")
    hidden.sheet_state = "hidden"
    hidden.append(["h"])
    hidden.append([1])
    wb.save(os.path.join(out, "mixed.xlsx"))
    expected = {
        "sheets": ["Data", "Other rows", "Chart1", "Hidden"],
        "columns": header,
        "id": [r[0] for r in rows],
        "x": [r[1] for r in rows],
        "group": [None if r[2] == "NA" else r[2] for r in rows],
        "flag": [1.0 if r[3] else 0.0 for r in rows],
        "when": [days(r[4]) for r in rows],
        "stamp": [days(r[5]) for r in rows],
    }
    return expected


def formats(out):
    """Custom and built-in number formats on the same kinds of values."""
    wb = openpyxl.Workbook()
    fixed_properties(wb)
    ws = wb.active
    ws.title = "Formats"
    cases = [
        ("dmy", dt.datetime(2023, 7, 14), "dd/mm/yyyy", "date"),
        ("month", dt.datetime(2021, 3, 1), "mmm-yy", "date"),
        ("clock", 0.75, "h:mm", "time"),
        ("elapsed", 1.5, "[h]:mm:ss", "time"),
        ("percent", 0.125, "0.00%", "number"),
        ("quoted", 42, '"day "0', "number"),
        ("builtin14", dt.datetime(1900, 3, 1), "mm-dd-yy", "date"),
        ("early", dt.datetime(1900, 1, 5), "yyyy-mm-dd", "date"),
    ]
    ws.append([c[0] for c in cases])
    for _ in range(2):
        row = ws.max_row + 1
        for j, (name, value, fmt, kind) in enumerate(cases, start=1):
            cell = ws.cell(row=row, column=j, value=value)
            cell.number_format = fmt
    wb.save(os.path.join(out, "formats.xlsx"))
    expect = {}
    for name, value, fmt, kind in cases:
        expect[name] = days(value) if kind == "date" else value
    return expect


def epoch1904(out):
    wb = openpyxl.Workbook()
    fixed_properties(wb)
    wb.epoch = CALENDAR_MAC_1904
    ws = wb.active
    ws.append(["d"])
    values = [dt.datetime(1904, 1, 1), dt.datetime(2000, 1, 1), dt.datetime(2024, 2, 29, 12, 0, 0)]
    for v in values:
        ws.append([v])
    wb.save(os.path.join(out, "epoch1904.xlsx"))
    return {"d": [days(v) for v in values]}


def errors(out):
    wb = openpyxl.Workbook()
    fixed_properties(wb)
    ws = wb.active
    ws.title = "E"
    ws.append(["y", "z"])
    ws.append([1.5, 2])
    ws.append(["#N/A", 3])
    ws.append([2.5, "#DIV/0!"])
    wb.save(os.path.join(out, "errors.xlsx"))
    return {"y": [1.5, None, 2.5]}


def main():
    out = sys.argv[1]
    os.makedirs(out, exist_ok=True)
    expected = {
        "writer": "openpyxl " + openpyxl.__version__,
        "mixed": mixed(out),
        "formats": formats(out),
        "epoch1904": epoch1904(out),
        "errors": errors(out),
    }
    with open(os.path.join(out, "expected.json"), "w", encoding="utf-8") as f:
        json.dump(expected, f, indent=1, sort_keys=True)
        f.write("\n")


if __name__ == "__main__":
    main()
