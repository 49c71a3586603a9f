#!/usr/bin/env python3
"""Prints the module import graph (every `crate::` path, in `use` lines or inline) and the
line counts of the largest source files and functions. Run from the repository root:

    python3 scripts/structure.py            # graph, cycles, 15 largest files and functions
    python3 scripts/structure.py graph      # the graph only, one `from -> to` per line
"""
import os
import re
import sys

SRC = "src"


def module_of(path):
    rel = os.path.relpath(path, SRC)
    parts = rel[:-3].split(os.sep)  # drop .rs
    if parts[-1] in ("mod", "lib"):
        parts = parts[:-1]
    if not parts:
        return "lib"
    return parts[0]


def rust_files():
    for root, _, files in os.walk(SRC):
        for f in sorted(files):
            if f.endswith(".rs"):
                yield os.path.join(root, f)


def strip_comments(text):
    return "\n".join(l for l in text.splitlines() if not l.lstrip().startswith("//"))


def graph():
    edges = set()
    for p in rust_files():
        src = module_of(p)
        text = strip_comments(open(p, encoding="utf-8").read())
        if p.endswith("main.rs"):
            src = "main"
            names = re.findall(r"netmargin::([a-z_]+)", text)
        else:
            names = re.findall(r"crate::([a-z_]+)", text)
            # `use crate::{a, b::c}`
            for group in re.findall(r"crate::\{([^}]*)\}", text):
                names += re.findall(r"(?:^|,)\s*([a-z_]+)", group)
        for n in names:
            if n != src and os.path.exists(os.path.join(SRC, n + ".rs")) or os.path.isdir(os.path.join(SRC, n)):
                if n != src:
                    edges.add((src, n))
    return sorted(edges)


def cycles(edges):
    adj = {}
    for a, b in edges:
        adj.setdefault(a, set()).add(b)
    found = set()

    def reach(a, b, seen):
        if a == b:
            return True
        for n in adj.get(a, ()):
            if n not in seen:
                seen.add(n)
                if reach(n, b, seen):
                    return True
        return False

    for a, b in edges:
        if reach(b, a, {b}):
            found.add(tuple(sorted((a, b))))
    return sorted(found)


def functions(path):
    lines = open(path, encoding="utf-8").read().splitlines()
    out = []
    i = 0
    pat = re.compile(r"^\s*(pub(\([^)]*\))?\s+)?(const\s+)?(unsafe\s+)?fn\s+([A-Za-z0-9_]+)")
    while i < len(lines):
        m = pat.match(lines[i])
        if not m:
            i += 1
            continue
        depth, started, j = 0, False, i
        while j < len(lines):
            code = re.sub(r'"(\\.|[^"\\])*"', '""', lines[j])
            code = re.sub(r"'(\\.|[^'\\])'", "''", code).split("//")[0]
            if not started and ";" in code and "{" not in code:
                break
            depth += code.count("{") - code.count("}")
            started = started or "{" in code
            if started and depth <= 0:
                break
            j += 1
        if started:
            out.append((j - i + 1, f"{path}:{i + 1} {m.group(5)}"))
        i += 1
    return out


def main():
    edges = graph()
    if len(sys.argv) > 1 and sys.argv[1] == "graph":
        for a, b in edges:
            print(f"{a} -> {b}")
        return
    print(f"== import graph ({len(edges)} edges, `from -> to`)")
    by = {}
    for a, b in edges:
        by.setdefault(a, []).append(b)
    for a in sorted(by):
        print(f"{a} -> {', '.join(by[a])}")
    cyc = cycles(edges)
    print(f"== module pairs on a cycle: {len(cyc)}")
    for a, b in cyc:
        print(f"  {a} <-> {b}")
    files = []
    fns = []
    for p in rust_files():
        files.append((sum(1 for _ in open(p, encoding="utf-8")), p))
        fns += functions(p)
    print("== largest files (lines)")
    for n, p in sorted(files, reverse=True)[:15]:
        print(f"{n:6} {p}")
    print("== largest functions (lines)")
    for n, p in sorted(fns, reverse=True)[:15]:
        print(f"{n:6} {p}")


main()
