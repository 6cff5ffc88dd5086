#!/usr/bin/env python3
"""Fails when the repository uses something deps.sh does not install.

A fresh Debian 12 machine has only the packages of priority "required"
(what debootstrap --variant=minbase installs); everything else the build and
the tests use must be named in deps.sh. This checks two kinds of use:

* Python modules imported by the repository's scripts (reference scripts,
  benchmarks, the sample generator, these checks): each module's file must
  belong to a package deps.sh lists.
* Programs the tests, scripts and packaging call: absolute /usr/bin paths,
  the first word of each command in shell scripts, the commands given to
  popen-style helpers in the C++ tests, and the programs our tools run for us
  (INDIRECT below). Each must come from a required package or one deps.sh
  lists.

Usage: check_deps.py [REPO]   (exit 1 and one line per problem)
"""
import ast
import importlib.util
import os
import re
import shutil
import subprocess
import sys

# Programs that our tools run on our behalf, so no test names them.
INDIRECT = {
    "file": "CPack's DEB generator tells executables from other files with it",
    "dpkg-shlibdeps": "CPack computes the package's Depends with it",
    "xvfb-run": "scripts/screenshots.sh runs the workbench under Xvfb",
}
# Our own programs (the tests run the built or packaged ones).
OURS = {"moderato", "moderato-cli"}
# Shell words that are not programs.
SHELL_WORDS = {
    "if", "then", "else", "elif", "fi", "for", "while", "until", "do", "done", "case", "esac", "in", "function",
    "return", "local", "export", "set", "unset", "shift", "exit", "trap", "cd", "echo", "printf", "read", "eval",
    "exec", "source", "test", "true", "false", "wait", "declare", "readonly", "shopt", "command", "type", "break",
    "continue", "time", "select", "let", "umask", "kill", "pwd", "builtin", "hash", "ulimit", "mapfile",
}


def tracked(repo, *patterns):
    out = subprocess.run(["git", "-C", repo, "ls-files", *patterns], capture_output=True, text=True, check=True)
    return [os.path.join(repo, p) for p in out.stdout.split()]


def deps_packages(repo):
    text = open(os.path.join(repo, "deps.sh"), encoding="utf-8").read()
    names = set()
    for m in re.finditer(r"_pkgs=\(([^)]*)\)", text, re.S):
        names.update(m.group(1).split())
    return names


def package_of(path):
    """The Debian package that installed `path`, or None."""
    real = os.path.realpath(path)
    for candidate in (path, real):
        r = subprocess.run(["dpkg-query", "-S", candidate], capture_output=True, text=True)
        if r.returncode == 0:
            return r.stdout.split(":")[0].split(",")[0].strip()
    return None


def direct_dependencies(packages):
    """What the listed packages depend on directly (meta packages such as imagemagick)."""
    r = subprocess.run(["apt-cache", "depends", "--no-recommends", "--no-suggests", "--no-conflicts", "--no-breaks",
                        "--no-replaces", "--no-enhances", *sorted(packages)], capture_output=True, text=True)
    out = set()
    for line in r.stdout.splitlines():
        m = re.match(r"\s+\|?(?:Pre)?Depends: <?([\w.+-]+)", line)
        if m:
            out.add(m.group(1).split(":")[0])
    return out


def required_packages():
    r = subprocess.run(["dpkg-query", "-W", "-f=${Package} ${Priority} ${Essential}\n"], capture_output=True,
                       text=True, check=True)
    out = set()
    for line in r.stdout.splitlines():
        parts = line.split()
        if len(parts) >= 2 and (parts[1] == "required" or parts[-1] == "yes"):
            out.add(parts[0])
    return out


def python_imports(paths):
    local = {os.path.splitext(os.path.basename(p))[0] for p in paths}
    found = {}
    for path in paths:
        try:
            tree = ast.parse(open(path, encoding="utf-8").read())
        except SyntaxError as e:
            found.setdefault(f"(unparsable: {e})", path)
            continue
        for node in ast.walk(tree):
            if isinstance(node, ast.Import):
                names = [a.name for a in node.names]
            elif isinstance(node, ast.ImportFrom) and node.module and not node.level:
                names = [node.module]
            else:
                continue
            for n in names:
                top = n.split(".")[0]
                if top not in sys.stdlib_module_names and top not in local:
                    found.setdefault(top, path)
    return found


def shell_commands(text):
    words = set()
    for line in text.splitlines():
        line = line.split("#", 1)[0] if not line.lstrip().startswith("#!") else ""
        for piece in re.split(r"\|\||&&|[|;`]|\$\(|\bthen\b|\bdo\b|\belse\b", line):
            tokens = piece.strip().split()
            while tokens and ("=" in tokens[0] or tokens[0] in ("sudo", "!", "{", "}", "(", ")", "exec", "command")):
                tokens = tokens[1:]
            if tokens and re.fullmatch(r"[A-Za-z][\w.+-]*", tokens[0]) and tokens[0] not in SHELL_WORDS:
                words.add(tokens[0])
    return words


def called_programs(repo):
    calls = {}
    sources = tracked(repo, "tests", "scripts", "cmake", "test.sh", "run.sh", "deps.sh", ".ci/run")
    for path in sources:
        if "/fixtures/" in path or "/nist-strd/" in path or "/data/" in path:
            continue
        try:
            text = open(path, encoding="utf-8").read()
        except (UnicodeDecodeError, IsADirectoryError):
            continue
        for m in re.finditer(r'(?<![\w./-])/(?:usr/)?bin/([A-Za-z][\w.+-]*)', text):
            calls.setdefault(m.group(1), (path, "path"))
        if path.endswith((".cpp", ".hpp")):
            for m in re.finditer(r'(?:run_command|popen|run_process)\(\s*"([A-Za-z][\w.+-]*)[ "]', text):
                calls.setdefault(m.group(1), (path, "word"))
        is_shell = path.endswith(".sh") or path.endswith("/.ci/run") or text.startswith("#!/usr/bin/env bash")
        if is_shell:
            for word in shell_commands(text):
                calls.setdefault(word, (path, "word"))
        if path.endswith(".py"):
            for m in re.finditer(r'subprocess\.\w+\(\s*\[\s*"([A-Za-z][\w.+-]*)"', text):
                calls.setdefault(m.group(1), (path, "word"))
    for program, why in INDIRECT.items():
        calls[program] = (why, "indirect")
    return calls


def main():
    repo = os.path.abspath(sys.argv[1] if len(sys.argv) > 1 else os.path.join(os.path.dirname(__file__), ".."))
    listed = deps_packages(repo)
    brought = listed | direct_dependencies(listed)
    required = required_packages()
    problems = []

    scripts = tracked(repo, "*.py")
    for module, path in sorted(python_imports(scripts).items()):
        spec = importlib.util.find_spec(module) if not module.startswith("(") else None
        origin = spec.origin if spec and spec.origin not in (None, "built-in", "frozen") else None
        if spec and spec.submodule_search_locations and not origin:
            origin = list(spec.submodule_search_locations)[0]
        pkg = package_of(origin) if origin else None
        rel = os.path.relpath(path, repo)
        if not origin:
            problems.append(f"python module '{module}' ({rel}) is not installed; add its package to deps.sh")
        elif not pkg:
            problems.append(f"python module '{module}' ({rel}) comes from {origin}, not from a Debian package; "
                            "install it with deps.sh instead")
        elif pkg not in listed and pkg not in required:
            problems.append(f"python module '{module}' ({rel}) is in package {pkg}, which deps.sh does not list")

    for program, (where, how) in sorted(called_programs(repo).items()):
        if program in OURS:
            continue
        where = os.path.relpath(where, repo) if where.startswith(repo) else where
        exe = shutil.which(program, path="/usr/local/sbin:/usr/local/bin:/usr/sbin:/usr/bin:/sbin:/bin")
        if not exe:
            if how != "word":
                problems.append(f"program '{program}' ({where}) is not installed; add its package to deps.sh")
            continue  # a word that is not a program here (a shell function, our own binaries)
        pkg = package_of(exe)
        if pkg is None:
            if exe.startswith("/usr/local") or exe.startswith("/root"):
                problems.append(f"program '{program}' ({where}) is {exe}, installed by hand; deps.sh must install it")
            continue
        if pkg not in brought and pkg not in required:
            problems.append(f"program '{program}' ({where}) is in package {pkg}, which deps.sh does not list")

    for p in problems:
        print(p)
    print(f"check_deps: {len(listed)} packages in deps.sh; {len(problems)} problem(s)")
    return 1 if problems else 0


if __name__ == "__main__":
    sys.exit(main())
