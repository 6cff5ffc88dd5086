#!/usr/bin/env python3
"""Writes the seed corpus of the fuzz targets (tests/fuzz/corpus/<target>/)
from the sample projects and the test data (tests/data/ok, tests/data/bad,
tests/data/v1-projects), plus a few hand-written seeds. Run it again after
those files change; the corpus stays small (each seed at most 4 KB) so the
committed corpus stays well under 2 MB. Reproducers of fixed bugs live in
the same folders (named regress-*) and are kept."""
import json
import pathlib
import shutil

ROOT = pathlib.Path(__file__).resolve().parents[2]
OUT = ROOT / "tests" / "fuzz" / "corpus"
MAX = 4096


def cut(data: bytes) -> bytes:
    """At most MAX bytes, cut after a whole line where possible."""
    if len(data) <= MAX:
        return data
    end = data.rfind(b"\n", 0, MAX)
    return data[: end + 1 if end > 0 else MAX]


def write(target: str, name: str, data: bytes) -> None:
    folder = OUT / target
    folder.mkdir(parents=True, exist_ok=True)
    (folder / name).write_bytes(data)


def clear(target: str) -> None:
    folder = OUT / target
    if folder.exists():
        for f in folder.iterdir():
            if not f.name.startswith("regress-"):
                f.unlink()


def csv_seeds() -> None:
    # Three option bytes (fuzz_csv.cpp): 0 = sniff, header, default tokens, UTF-8.
    files = sorted((ROOT / "tests" / "data").glob("*/*.csv")) + sorted(ROOT.glob("sample-projects/*/*.csv"))
    for f in files:
        write("fuzz_csv", f"{f.parent.name}-{f.name}", b"\x00\x00\x07" + cut(f.read_bytes()))
    write("fuzz_csv", "semicolon-decimal-comma.csv", b"\x12\x00\x05a;b;g\n1,5;2;x\n-3,25;NA;\"y;z\"\n")
    write("fuzz_csv", "tab-no-header-bom.csv", b"\x0b\x02\x03" + b"1\t2\t\"q\"\"x\"\n3\t4\tz\r\n")
    write("fuzz_csv", "forced-kinds.csv", b"\x61\x00\x09x,y,z\n1,2,n/a\n-,999,3\n")


def project_seeds() -> None:
    projects = sorted(ROOT.glob("sample-projects/*/*.moderato")) + sorted(
        (ROOT / "tests" / "data" / "v1-projects").glob("*.moderato")) + sorted(
        (ROOT / "tests" / "data" / "bad").glob("*.moderato"))
    for f in projects:
        write("fuzz_project", f"{f.parent.name}-{f.name}", cut(f.read_bytes()))
    # A schema-2 project with every field the reader knows.
    doc = json.loads((ROOT / "tests" / "data" / "v1-projects" / "coffee-discount.moderato").read_text())
    doc["schema_version"] = 2
    a = doc["analyses"][0]
    a["standard_errors"] = "hc3"
    a.pop("se", None)
    a["probe"] = {"current": 1.5, "pinned": [0, 2.5], "second_value": None, "scale": "model",
                  "averaging": "values", "simultaneous_band": True, "show_points": False, "show_gaps": True}
    a["figure"] = {"preset": "custom", "width_in": 7, "height_in": 3.5, "dpi": 600, "font_family": "DejaVu Serif",
                   "font_pt": 10, "greyscale": True, "caption": False}
    a["memo_notes"] = "Notes <b>&amp;</b>\nsecond line"
    a["centring"] = "mean"
    doc["derived_columns"] = [{"dataset": "spend", "name": "d2", "kind": "centre-value", "source": "discount_pct",
                               "value": 10}]
    write("fuzz_project", "schema2-every-field.moderato", json.dumps(doc, ensure_ascii=False, indent=1).encode())


def recipe_seeds() -> None:
    # The "derived_columns" value of a project over the table x, z, k, w, g (fuzz_recipe.cpp).
    lists = [
        [{"dataset": "d", "name": "xc", "kind": "centre-mean", "source": "x"}],
        [{"dataset": "d", "name": "xm", "kind": "centre-median", "source": "x"},
         {"dataset": "d", "name": "xv", "kind": "centre-value", "source": "z", "value": -2.5}],
        [{"dataset": "d", "name": "s", "kind": "standardise", "source": "z"},
         {"dataset": "d", "name": "ks", "kind": "standardise", "source": "k"}],
        [{"dataset": "d", "name": "l", "kind": "log", "source": "x"}],
        [{"dataset": "d", "name": "l1", "kind": "log1p", "source": "w"},
         {"dataset": "d", "name": "q", "kind": "square", "source": "z"}],
        [{"dataset": "d", "name": "ga", "kind": "dummy", "source": "g", "level": "a"},
         {"dataset": "d", "name": "p", "kind": "product", "source": "ga", "other": "x"}],
        [{"dataset": "d", "name": "p2", "kind": "product", "source": "x", "other": "g"}],
    ]
    for i, value in enumerate(lists):
        write("fuzz_recipe", f"recipes-{i}.json", json.dumps(value).encode())


def writer_seeds() -> None:
    # FuzzedDataProvider takes the sizes from the end of the input and strings from the front.
    texts = [b"estimate,<b>x</b> & 'y'\\\n\"-1.5\",=SUM(A1)\x00|_#%{}$\r\n\xe2\x88\x92 0.5 \xff\xfe",
             b"discount \xc3\x97 loyalty\n\nnotes: **bold** [link](x) <script>\\\\ \t tab",
             b"# heading\n- item\n1. first\n~~~\n`code`\n&amp; &#39;"]
    for i, t in enumerate(texts):
        write("fuzz_writers", f"strings-{i}.bin", t + bytes([i, 3, 3]))


WORKBOOK_PARTS = ("xl/workbook.xml", "xl/_rels/workbook.xml.rels", "xl/worksheets/sheet1.xml",
                  "xl/sharedStrings.xml", "xl/styles.xml")


def workbook_seeds() -> None:
    """The parts fuzz_workbook zips, from the test workbooks (tests/data/workbooks):
    each workbook's parts in fuzz_workbook.cpp's order, a part that is missing
    left empty, a sheet cut to MAX bytes at a row's end."""
    import zipfile
    for book in sorted((ROOT / "tests" / "data" / "workbooks").glob("*.xlsx")):
        with zipfile.ZipFile(book) as z:
            names = set(z.namelist())
            parts = []
            for name in WORKBOOK_PARTS:
                data = z.read(name) if name in names else b""
                if name.endswith("sheet1.xml") and len(data) > MAX:
                    end = data.rfind(b"</row>", 0, MAX)
                    data = data[: end + 6] + b"</sheetData></worksheet>" if end > 0 else data[:MAX]
                parts.append(data)
        write("fuzz_workbook", book.stem + ".parts", b"\n@@part@@\n".join(parts))


def main() -> None:
    for target in ("fuzz_csv", "fuzz_project", "fuzz_recipe", "fuzz_writers", "fuzz_workbook"):
        clear(target)
    csv_seeds()
    project_seeds()
    recipe_seeds()
    writer_seeds()
    workbook_seeds()
    total = sum(f.stat().st_size for f in OUT.rglob("*") if f.is_file())
    print(f"seed corpus: {sum(1 for f in OUT.rglob('*') if f.is_file())} files, {total} bytes")


if __name__ == "__main__":
    main()
