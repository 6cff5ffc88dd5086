#!/usr/bin/env python3
"""Checks that includes run down the layers, never up.

core/CMakeLists.txt and ui/CMakeLists.txt list their folders from the bottom
layer up, each under a comment "# folder: what it holds". A file may include
headers of its own folder and of folders listed before it, never of a folder
listed after it. core includes no Qt header at all.

Usage: check_layers.py [REPO]   (exit 1 and one line per wrong include)
"""
import os
import re
import sys

INCLUDE = re.compile(r'^\s*#\s*include\s+"([^"]+)"', re.M)
QT_INCLUDE = re.compile(r"^\s*#\s*include\s+<Q[A-Za-z]*>", re.M)


def layer_order(cmake_file):
    """Folders in the order their "# folder: ..." comments appear in the source list."""
    text = open(cmake_file, encoding="utf-8").read()
    return re.findall(r"^\s*#\s*([a-z_]+): ", text, re.M)


def check_tree(roots, order, strip_prefix):
    """roots: folders holding one sub-folder per layer. Returns the wrong includes."""
    rank = {name: i for i, name in enumerate(order)}
    problems = []
    for root in roots:
        for layer in sorted(os.listdir(root)):
            folder = os.path.join(root, layer)
            if not os.path.isdir(folder):
                problems.append(f"{folder}: a file directly in {root} (put it in a layer folder)")
                continue
            if layer not in rank:
                problems.append(f"{folder}: folder not listed in the layer order {order}")
                continue
            for name in sorted(os.listdir(folder)):
                path = os.path.join(folder, name)
                text = open(path, encoding="utf-8").read()
                for target in INCLUDE.findall(text):
                    if strip_prefix and target.startswith(strip_prefix):
                        target = target[len(strip_prefix):]
                    elif strip_prefix and target.startswith("moderato/"):
                        continue  # ui includes core: core is below every room
                    other = target.split("/")[0]
                    if other in rank and rank[other] > rank[layer]:
                        problems.append(f"{path}: includes {target} ({other} is above {layer})")
    return problems


def main():
    repo = sys.argv[1] if len(sys.argv) > 1 else os.path.join(os.path.dirname(__file__), "..")
    os.chdir(repo)
    problems = []
    core_order = layer_order("core/CMakeLists.txt")
    problems += check_tree(["core/src", "core/include/moderato"], core_order, "moderato/")
    for root in ("core/src", "core/include"):
        for dirpath, _, names in os.walk(root):
            for name in names:
                path = os.path.join(dirpath, name)
                if QT_INCLUDE.search(open(path, encoding="utf-8").read()):
                    problems.append(f"{path}: core includes a Qt header")
    ui_order = layer_order("ui/CMakeLists.txt")
    problems += check_tree(["ui/src"], ui_order, "")
    for p in problems:
        print(p)
    print(f"core layers: {' < '.join(core_order)}")
    print(f"ui rooms: {' < '.join(ui_order)}")
    if problems:
        print(f"check_layers: {len(problems)} include(s) run up the layers", file=sys.stderr)
        return 1
    return 0


if __name__ == "__main__":
    sys.exit(main())
