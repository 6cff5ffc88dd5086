#!/usr/bin/env python3
"""Lengths of the C++ functions in the given folders, and the house limit.

A function's length is the number of lines from the line holding its opening
brace to the line holding its closing brace. Lambdas inside a function count
towards it; a lambda at namespace scope counts as a function of its own.

Usage: function_lengths.py [--check] [--list N] DIR...
  --check   exit 1 when a function is longer than 120 lines or more than
            three are longer than 80 (the rule in DEVELOPERS.md)
  --list N  print the functions of N lines or more, longest first
"""
import argparse
import os
import re
import sys

HARD_LIMIT = 120
SOFT_LIMIT = 80
SOFT_ALLOWED = 3
FUNCTION_TAIL = {"const", "override", "noexcept", "final", "mutable"}


def strip(text):
    """Comments, string and character literals and preprocessor lines blanked; newlines kept."""
    out = []
    i, n = 0, len(text)
    line_start = True
    while i < n:
        c = text[i]
        if line_start and c == "#":
            j = i
            while j < n and (text[j] != "\n" or text[j - 1] == "\\"):
                j += 1
            out.append("\n" * text.count("\n", i, j))
            i = j
            continue
        if c == "\n":
            line_start = True
            out.append(c)
            i += 1
            continue
        if not c.isspace():
            line_start = False
        if text.startswith("//", i):
            j = text.find("\n", i)
            i = n if j < 0 else j
            continue
        if text.startswith("/*", i):
            j = text.find("*/", i + 2)
            j = n if j < 0 else j + 2
            out.append("\n" * text.count("\n", i, j))
            i = j
            continue
        raw = re.match(r'(?:u8|u|U|L)?R"([^(\s]*)\(', text[i:i + 40])
        if raw and (i == 0 or not (text[i - 1].isalnum() or text[i - 1] == "_")):
            end = text.find(")" + raw.group(1) + '"', i + raw.end())
            j = n if end < 0 else end + len(raw.group(1)) + 2
            out.append('""' + "\n" * text.count("\n", i, j))
            i = j
            continue
        if c in "\"'":
            if c == "'" and i > 0 and text[i - 1].isalnum() and i + 1 < n and text[i + 1].isalnum():
                i += 1  # digit separator: 1'000'000
                continue
            j = i + 1
            while j < n and text[j] != c:
                j += 2 if text[j] == "\\" else 1
            out.append(c + c)
            i = j + 1
            continue
        out.append(c)
        i += 1
    return "".join(out)


TOKEN = re.compile(r"[A-Za-z_][A-Za-z_0-9]*|\d[\w.']*|->|::|\S")


def tokens(code):
    line = 1
    pos = 0
    for m in TOKEN.finditer(code):
        line += code.count("\n", pos, m.start())
        pos = m.start()
        yield m.group(0), line


def name_before(toks, k):
    """The function name: the identifier (with ::) before the parameter list that ends at toks[k]."""
    depth = 0
    while k >= 0:
        t = toks[k][0]
        if t == ")":
            depth += 1
        elif t == "(":
            depth -= 1
            if depth == 0:
                break
        k -= 1
    parts = []
    k -= 1
    while k >= 0 and (re.match(r"[A-Za-z_~]", toks[k][0]) or toks[k][0] in ("::", "~")):
        parts.append(toks[k][0])
        if k > 0 and toks[k - 1][0] == "::":
            parts.append("::")
            k -= 2
            continue
        if toks[k][0] == "~":
            k -= 1
            continue
        break
    name = "".join(reversed(parts))
    return name or "lambda"


def functions(path):
    with open(path, encoding="utf-8", errors="replace") as f:
        toks = list(tokens(strip(f.read())))
    found = []
    scope = []          # stack of "block" (namespace/class/other) or ("function", name, line)
    in_init_list = False
    paren = 0
    for k, (t, line) in enumerate(toks):
        inside_function = any(isinstance(s, tuple) for s in scope)
        if t == "(":
            paren += 1
        elif t == ")":
            paren -= 1
        if inside_function:
            if t == "{":
                scope.append("block")
            elif t == "}":
                top = scope.pop()
                if isinstance(top, tuple):
                    found.append((top[1], top[2], line))
            continue
        if t == ":" and k > 0 and toks[k - 1][0] in ({")"} | FUNCTION_TAIL) and paren == 0:
            in_init_list = True
        if t == "{":
            prev = toks[k - 1][0] if k > 0 else ""
            body = prev == ")" or prev in FUNCTION_TAIL or (in_init_list and prev == "}")
            if in_init_list and not body:
                scope.append("init")       # a member initialiser's braces
                continue
            if body and paren == 0:
                j = k - 1
                while toks[j][0] != ")":
                    j -= 1
                if in_init_list:
                    # the parameter list is the one before the ':'
                    j = k - 1
                    depth = 0
                    while j > 0:
                        if toks[j][0] in ")}":
                            depth += 1
                        elif toks[j][0] in "({":
                            depth -= 1
                        elif toks[j][0] == ":" and depth == 0:
                            break
                        j -= 1
                    while toks[j][0] != ")":
                        j -= 1
                in_init_list = False
                scope.append(("function", name_before(toks, j), line))
            else:
                scope.append("block")
        elif t == "}":
            if scope:
                scope.pop()
        elif t == ";":
            in_init_list = False
    return [(name, start, end - start + 1) for name, start, end in found]


def main():
    parser = argparse.ArgumentParser(description=__doc__, formatter_class=argparse.RawDescriptionHelpFormatter)
    parser.add_argument("--check", action="store_true")
    parser.add_argument("--list", type=int, default=None)
    parser.add_argument("dirs", nargs="+")
    args = parser.parse_args()
    rows = []
    for d in args.dirs:
        for root, _, names in os.walk(d):
            for nm in sorted(names):
                if nm.endswith((".cpp", ".hpp", ".h", ".cc")):
                    p = os.path.join(root, nm)
                    rows += [(length, p, start, name) for name, start, length in functions(p)]
    rows.sort(key=lambda r: (-r[0], r[1], r[2]))
    threshold = args.list if args.list is not None else SOFT_LIMIT + 1
    for length, p, start, name in rows:
        if length >= threshold:
            print(f"{length:5d}  {p}:{start}  {name}")
    over_hard = [r for r in rows if r[0] > HARD_LIMIT]
    over_soft = [r for r in rows if r[0] > SOFT_LIMIT]
    print(f"{len(rows)} functions; {len(over_soft)} over {SOFT_LIMIT} lines, {len(over_hard)} over {HARD_LIMIT}")
    if args.check and (over_hard or len(over_soft) > SOFT_ALLOWED):
        print(f"function_lengths: at most {SOFT_ALLOWED} functions may exceed {SOFT_LIMIT} lines and none "
              f"{HARD_LIMIT}; split the ones above along their steps", file=sys.stderr)
        return 1
    return 0


if __name__ == "__main__":
    sys.exit(main())
