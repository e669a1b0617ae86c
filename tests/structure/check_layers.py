#!/usr/bin/env python3
# SPDX-License-Identifier: GPL-3.0-or-later
"""Keeps keel's shape: the layers of docs/architecture.md, read from the
object files.

For every object file of the library and the command, `nm` tells which
functions and data it defines and which it uses; a use of a symbol another
file defines is a call (or a read) from that file to the other.  The check
fails when

  * a source file is in no layer (a new file must be placed below),
  * a file uses a file of a higher layer,
  * files of one layer use each other in a loop,
  * a shared internal function's name does not tell its file: a function
    of src/solve/stage_peak.c is keel_stage_peak... (or keelStagePeak...),
    one of src/rule.c keelRule... (public functions, declared KEEL_API in
    include/keel/, keep their documented names; alloc.c keeps the C
    library's),
  * the shared library exports anything but the KEEL_API functions.

--plant FROM:TO adds a use that is not in the code, to show that the
check catches it: with --expect TEXT the run succeeds only when a problem
containing TEXT is reported (tests/structure/meson.build runs it so).

Usage: check_layers.py --nm NM --include DIR --so LIBKEEL.SO
                       [--plant FROM:TO --expect TEXT] OBJDIR...
"""

import argparse
import os
import re
import subprocess
import sys

# The layers, bottom first: a file may use files of its own layer (without
# loops) and of the layers below.  Names are paths under src/; a name that
# ends in '*' covers every file it starts.  docs/architecture.md draws this.
LAYERS = [
    ("foundations", ["alloc.c", "version.c", "textbuf.c", "sort.c", "law.c", "error.c",
                     "finding.c"]),
    ("the roster", ["nas.c", "roster*", "census.c"]),
    ("the model front", ["lp.c"]),
    ("the counts", ["tally.c"]),
    ("rule parts", ["rule_tie.c", "rule_name.c", "rule_finding.c"]),
    ("rule entries", ["rule_*"]),
    ("the rule table", ["rule.c"]),
    ("the workload", ["workload.c", "workload_cover.c"]),
    ("solve: measures and budget", ["solve/measure.c", "solve/budget.c"]),
    ("solve: answerers, heuristics, bounds", ["solve/answer_*", "solve/heur_*",
                                              "solve/bound_*"]),
    ("solve: the answer chain", ["solve/answer.c"]),
    ("solve: feasibility and stages", ["solve/feas_*", "solve/stage_*"]),
    ("solve: zones", ["solve/zone_*"]),
    ("solve: the orchestrators", ["solve/solve.c", "solve/rebalance_at.c", "solve/rebalance.c"]),
    ("after the solve", ["plan.c", "metrics.c", "explain.c", "course.c", "staffing.c",
                         "preview.c", "rebalance_shift.c"]),
    ("the verdict", ["verdict.c"]),
    ("report parts", ["report_out.c", "report_plan.c"]),
    ("writers", ["report_*"]),
    ("writer table and template", ["report.c", "template.c"]),
    ("the audit", ["audit*"]),
    ("the command", ["cli/*"]),
]

# Files whose shared names need not tell the file: the allocation wrapper
# keeps the C library's names (keel_malloc, keel_strdup ...).
NAME_EXEMPT = {"alloc.c"}


def layer_of(path):
    # An exact name wins over a pattern ('answer_*' covers answer_fit.c,
    # not answer.c, which has a layer of its own).
    for index, (_, names) in enumerate(LAYERS):
        if path in names:
            return index
    for index, (_, names) in enumerate(LAYERS):
        for name in names:
            if name.endswith("*") and path.startswith(name[:-1]):
                return index
    return None


def source_of(obj):
    """src/solve/stage_peak.c from meson's object name src_solve_stage_peak.c.o."""
    base = os.path.basename(obj)
    base = base[: -len(".o")] if base.endswith(".o") else base
    for prefix, folder in (("src_solve_", "solve/"), ("src_cli_", "cli/"), ("src_", "")):
        if base.startswith(prefix):
            return folder + base[len(prefix):]
    return None


def read_symbols(nm, obj):
    out = subprocess.run([nm, obj], check=True, capture_output=True, text=True).stdout
    defined, functions, used = set(), set(), set()
    for line in out.splitlines():
        parts = line.split()
        if len(parts) == 3 and parts[1] in "TDRB":
            defined.add(parts[2])
            if parts[1] == "T":
                functions.add(parts[2])
        elif len(parts) == 2 and parts[0] == "U":
            used.add(parts[1])
    return defined, functions, used


def public_functions(include_dir):
    names = set()
    for name in sorted(os.listdir(include_dir)):
        if name.endswith(".h"):
            with open(os.path.join(include_dir, name), encoding="utf-8") as f:
                for line in f:
                    m = re.match(r"KEEL_API\b.*?\b(keel_\w+)\s*\(", line)
                    if m:
                        names.add(m.group(1))
    return names


def snake(name):
    """keelRuleMinMayGive -> rule_min_may_give; keel_stage_peak -> stage_peak."""
    if name.startswith("keel_"):
        return name[len("keel_"):]
    if name.startswith("keel") and name[4:5].isupper():
        return re.sub(r"(?<!^)([A-Z])", r"_\1", name[4:]).lower()
    return name


def find_loop(files, edges):
    """A loop among files (each edge inside the set), as a list, or None."""
    state = {}

    def visit(f, stack):
        state[f] = 1
        stack.append(f)
        for g in sorted(edges.get(f, ())):
            if g not in files:
                continue
            if state.get(g) == 1:
                return stack[stack.index(g):] + [g]
            if g not in state:
                loop = visit(g, stack)
                if loop:
                    return loop
        stack.pop()
        state[f] = 2
        return None

    for f in sorted(files):
        if f not in state:
            loop = visit(f, [])
            if loop:
                return loop
    return None


def main():
    ap = argparse.ArgumentParser()
    ap.add_argument("--nm", default="nm")
    ap.add_argument("--include", required=True)
    ap.add_argument("--so", required=True)
    ap.add_argument("--plant", action="append", default=[])
    ap.add_argument("--expect")
    ap.add_argument("objdirs", nargs="+")
    args = ap.parse_args()

    owner, functions, uses = {}, {}, {}
    for objdir in args.objdirs:
        for name in sorted(os.listdir(objdir)):
            src = source_of(name) if name.endswith(".o") else None
            if not src:
                continue
            defined, funcs, used = read_symbols(args.nm, os.path.join(objdir, name))
            for sym in defined:
                owner[sym] = src
            functions[src] = funcs
            uses[src] = used

    problems = []
    for src in sorted(uses):
        if layer_of(src) is None:
            problems.append(f"src/{src} is in no layer: place it in LAYERS "
                            f"(tests/structure/check_layers.py) and docs/architecture.md")

    edges = {src: {owner[s] for s in used if s in owner and owner[s] != src}
             for src, used in uses.items()}
    for plant in args.plant:
        a, b = plant.split(":")
        if a not in uses or b not in uses:
            sys.exit(f"--plant {plant}: no such files")
        edges[a].add(b)

    for a in sorted(edges):
        for b in sorted(edges[a]):
            la, lb = layer_of(a), layer_of(b)
            if la is not None and lb is not None and lb > la:
                problems.append(f"src/{a} ({LAYERS[la][0]}) uses src/{b}, "
                                f"a layer above it ({LAYERS[lb][0]})")
    for index, (title, _) in enumerate(LAYERS):
        files = {f for f in edges if layer_of(f) == index}
        loop = find_loop(files, edges)
        if loop:
            problems.append(f"files of layer '{title}' use each other in a loop: "
                            + " -> ".join("src/" + f for f in loop))

    public = public_functions(args.include)
    for src in sorted(functions):
        if src in NAME_EXEMPT or src.startswith("cli/"):
            continue
        stem = os.path.basename(src)[: -len(".c")]
        for fn in sorted(functions[src] - public):
            if not snake(fn).startswith(stem):
                problems.append(f"src/{src} defines {fn}: a shared name starts with "
                                f"keel_{stem} (or its camelCase), so that it tells its file")

    out = subprocess.run([args.nm, "-D", "--defined-only", args.so], check=True,
                         capture_output=True, text=True).stdout
    exported = {line.split()[-1] for line in out.splitlines() if line.strip()}
    for sym in sorted(exported - public):
        problems.append(f"{os.path.basename(args.so)} exports {sym}, which is not KEEL_API")
    for sym in sorted(public - exported):
        problems.append(f"{sym} is KEEL_API but {os.path.basename(args.so)} does not export it")

    nedges = sum(len(v) for v in edges.values())
    print(f"# {len(uses)} files, {nedges} uses between files, {len(LAYERS)} layers, "
          f"{len(exported)} exported functions")
    for p in problems:
        print("layers: " + p)
    if args.expect is not None:
        caught = any(args.expect in p for p in problems)
        print(f"# planted {', '.join(args.plant)}: " + ("caught" if caught else "NOT caught"))
        return 0 if caught else 1
    return 1 if problems else 0


if __name__ == "__main__":
    sys.exit(main())
