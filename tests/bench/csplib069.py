#!/usr/bin/python3
# SPDX-License-Identifier: GPL-3.0-or-later
"""keel on the published instances of CSPLib problem 069 (balanced nursing workload).

Run on demand only (never in CI, not a meson test):

  csplib069.py convert OUTDIR [--balance peak|squares|both] [--data DIR]
  csplib069.py reference [--out FILE.md] [--json FILE.json] [--whole NAMES]
                         [--whole-time-limit S] [--no-zone-check] [--data DIR]
  csplib069.py selftest [--count N] [--seed S]
  csplib069.py run KEEL [--time-limit T] [--balance peak|squares|both] [--jobs J]
                        [--only NAMES] [--workdir DIR] [--out FILE.md] [--json FILE.json]
                        [--data DIR]

The data.  Source: CSPLib problem 069 "Balanced Nursing Workload Problem",
Problems/prob069/data/*.zip of github.com/csplib/csplib, snapshot commit
2b13c59 (2025-08-03), unpacked unchanged under
/work/shared/benchmarks/csplib-prob069/ (its NOTE.md carries the
attribution; licence CC BY 4.0).  33 instances in two sets: set1 (10) and
set2 (23), the set folders in name order.  The archives' README gives the format: first line
`zones nurses`; second line `min_patients max_patients max_workload` (one
line for every nurse); then one line per zone, `k` followed by the k
patients' acuities.  The parser holds every file to that exactly (counts,
integers, no extra lines) and stops on anything else.

The problem: every patient gets one nurse; a nurse works in one zone only;
each nurse has from min to max patients and a workload (sum of acuities) of
at most max_workload.  Two objectives, each on its own: the heaviest
workload (keel's `policy.balance: peak`, utilisation = workload /
max_workload) and the sum of squared workloads (keel's `policy.balance:
squares`, sum of load^2 / capacity = that sum / max_workload; with equal
capacities and a fixed total, the same optimum as the published objective,
the variance of the workloads).

convert writes one keel roster per instance and balance: a shift of
max_workload minutes without a break (capacity = max_workload), nurses
N1.. with the patient limits under policy (the format gives one limit for
every nurse), patients P1.. with care_minutes = acuity and zone Z1..Zk,
policy {max_zones: 1, max_utilisation: 1.0, min_patients, max_patients,
balance}.  Nothing is invented: the ids are generated, every number is the
instance's.

reference computes both optima of every instance without keel, by
decomposition (and the optimum of keel's stage 2 after peak, see 5).  Proof
of optimality:

1. Every nurse takes at least min_patients >= 1 patients (checked on every
   instance; min_patients 0 is handled too, with idle nurses), and all her
   patients lie in one zone, so a plan is: a count k_z of nurses per zone
   with sum k_z = nurses, and for each zone a partition of its patients
   into k_z groups of min..max patients, each group's sum at most
   max_workload.  Zones do not interact otherwise, so
     peak optimum    = min over (k_z) of max_z PEAK_z(k_z),
     squares optimum = min over (k_z) of sum_z SQ_z(k_z),
   where PEAK_z(k) (SQ_z(k)) is the least heaviest group sum (least sum of
   squared group sums) over the partitions of zone z into k groups.
2. PEAK_z(k) and SQ_z(k) for every k: an exhaustive dynamic programme over
   subsets of the zone's patients (at most 19 per zone here).  The state is
   the set of patients still to place; the group holding the lowest-indexed
   of them is one of the finitely many allowed groups (size min..max, sum
   <= max_workload) containing it, and the rest is a partition of what
   remains, so the recursion enumerates every partition exactly once.  The
   memo holds, per state, the best value for every number of groups.
   Integer arithmetic throughout; no solver, no tolerance.
3. The combination over zones: a dynamic programme over the zones and the
   number of nurses used so far (min-max for peak, min-sum for squares),
   again exhaustive over every vector (k_z).
4. Every optimum comes with a witness: the plan is rebuilt from the memo and
   checked from scratch (each patient once, counts, one zone per nurse,
   capacity, the objective recomputed).
5. Lift, keel's stage 2 after peak: the greatest lightest workload among the
   plans whose heaviest workload is the peak optimum U*.  The same DP with
   the groups capped at U* gives LIFT_z(k), the greatest lightest group sum,
   and the combination is max over (k_z) of min_z LIFT_z(k_z).

Cross-checks (each a separate computation; a mismatch is printed under
"Disagreements" and makes the command exit 1):
- `selftest`: the reference against brute force (every patient-to-nurse
  map) on random tiny instances, min_patients 0-2, max_patients 1-4;
- per zone and every k, a set-partitioning MILP (one binary per allowed
  group, each patient covered once, k groups) solved by HiGHS (Source:
  HiGHS through Debian 12's python3-scipy 1.10, scipy.optimize.milp;
  presolve off, every column bounded, relative gap 0, the settings of
  tests/reference/highs_model.py).  Squares: its optimum must equal the
  DP's.  Peak: a descent of feasibility problems, the groups above the DP
  value removed (a checked plan), then above the DP value - 1 ("infeasible").
  Lift: the same with the groups capped at U* and the groups below the DP
  value removed (a checked plan), then below the DP value + 1 ("infeasible").
  With the textbook min-T model (a continuous T column, bounded) this HiGHS
  called nine zone/k cases "optimal" 1 to 30 units above the DP value whose
  plan is checked, so its objective verdicts on peak are not used;
- on the instances named by --whole (default: the ten 2-zone instances), a
  plain whole-instance MILP: x[p,n] binary (patient p to nurse n), y[n,z]
  binary (nurse n works zone z), each patient once, x <= y, at most one zone
  per nurse, min..max patients, load <= max_workload; nurses are identical,
  so nurse n's zone index is at most nurse n+1's (symmetry breaking, valid
  for identical nurses).  Peak: the same descent (every load <= the DP
  value: a checked plan; <= the DP value - 1: "infeasible").  Squares:
  minimise sum s_n, s_n integer, s_n >= (2l+1) load_n - l(l+1) for l =
  0..max_workload-1 (the chords of l^2 between consecutive integers, exact
  at every integer load).  Under --whole-time-limit per solve; a check not
  finished in time is reported as not proven, not as a disagreement.
HiGHS's plans are rounded and checked exactly.  The proof is the exhaustive
DP; HiGHS only checks it.

run runs `KEEL assign ROSTER --format json --time-limit T` on every
converted roster (written afresh to a work directory) and compares keel's
stage-1 status and value with the reference optimum: proven optimal and
equal, or the gap left; with balance peak, stage 2 (lift) too.  keel's
plan is checked against the instance's rules and its objective recomputed
from the plan.  A roster keel refuses as bad
input (exit 2: for instance a keel without the keys the rosters use) is
reported with keel's first message, not as a disagreement.
"""

import argparse
import concurrent.futures
import datetime
import itertools
import json
import math
import os
import re
import shlex
import shutil
import subprocess
import sys
import tempfile
import time
from fractions import Fraction

DATA = "/work/shared/benchmarks/csplib-prob069"
def instance_sets(data):
    """The instance folders of the data, in name order, with the prefixes
    set1, set2, ... used for their rosters."""
    dirs = sorted(d for d in os.listdir(data) if os.path.isdir(os.path.join(data, d)))
    return [(d, "set%d" % (i + 1)) for i, d in enumerate(dirs)]
EPS = 1e-9                  # keel prints 12 significant digits


# ------------------------------------------------------------ the data

class FormatError(Exception):
    pass


def require(cond, what):
    """An assertion that python -O keeps: the proof's checks must always run."""
    if not cond:
        raise AssertionError(what)


def parse_instance(path):
    """One instance file as a dict; FormatError on anything off the format."""
    with open(path, encoding="ascii") as f:
        text = f.read()
    lines = text.split("\n")
    while lines and not lines[-1].strip():
        lines.pop()

    def ints(i, what):
        if i >= len(lines):
            raise FormatError("%s: line %d missing (%s)" % (path, i + 1, what))
        try:
            return [int(t) for t in lines[i].split()]
        except ValueError:
            raise FormatError("%s:%d: not all integers (%s)" % (path, i + 1, what))

    head = ints(0, "zones nurses")
    if len(head) != 2:
        raise FormatError("%s:1: expected 2 numbers, found %d" % (path, len(head)))
    nzones, nurses = head
    lim = ints(1, "min max max_workload")
    if len(lim) != 3:
        raise FormatError("%s:2: expected 3 numbers, found %d" % (path, len(lim)))
    lo, hi, cap = lim
    zones = []
    for z in range(nzones):
        row = ints(2 + z, "zone %d" % (z + 1))
        if not row or row[0] != len(row) - 1:
            raise FormatError("%s:%d: zone line says %s patients, lists %d"
                              % (path, 3 + z, row[0] if row else "no", max(0, len(row) - 1)))
        zones.append(row[1:])
    if len(lines) != 2 + nzones:
        raise FormatError("%s: %d lines after the zones" % (path, len(lines) - 2 - nzones))
    if nzones < 1 or nurses < 1 or lo < 0 or hi < max(lo, 1) or cap < 1:
        raise FormatError("%s: header out of range: %s %s" % (path, head, lim))
    for z, acu in enumerate(zones):
        if any(a < 0 for a in acu):
            raise FormatError("%s: zone %d has a negative acuity" % (path, z + 1))
    return {"zones": zones, "nurses": nurses, "min": lo, "max": hi, "cap": cap,
            "patients": sum(len(a) for a in zones)}


def instances(data):
    """[(name, set dir, file name, instance)] of the 33 instances, READMEs skipped."""
    out = []
    for d, prefix in instance_sets(data):
        folder = os.path.join(data, d)
        for fn in sorted(os.listdir(folder), key=natural_key):
            if not fn.endswith(".txt") or fn.lower().startswith("readme"):
                continue
            name = "%s-%s" % (prefix, fn[:-4])
            out.append((name, d, fn, parse_instance(os.path.join(folder, fn))))
    return out


def natural_key(s):
    """Sort key that puts 2zones9 before 15zones."""
    return [(0, int(t), "") if t.isdigit() else (1, 0, t) for t in re.findall(r"\d+|\D+", s)]


def oddities(inst):
    """Things worth saying about one instance (format aside)."""
    out = []
    if inst["min"] < 1:
        out.append("min_patients %d: nurses may stay idle" % inst["min"])
    for z, acu in enumerate(inst["zones"]):
        if not acu:
            out.append("zone %d has no patients" % (z + 1))
        big = [a for a in acu if a > inst["cap"]]
        if big:
            out.append("zone %d: acuity above max_workload %s" % (z + 1, big))
        if acu != sorted(acu, reverse=True):
            out.append("zone %d: acuities not listed in descending order" % (z + 1))
    need = sum(-(-len(a) // inst["max"]) for a in inst["zones"])
    if need > inst["nurses"]:
        out.append("needs %d nurses by max_patients, has %d" % (need, inst["nurses"]))
    elif need == inst["nurses"]:
        out.append("exactly the %d nurses max_patients needs" % need)
    if inst["min"] >= 1 and inst["patients"] < inst["nurses"] * inst["min"]:
        out.append("fewer patients than nurses x min_patients")
    return out


# ------------------------------------------------------------ convert

def roster_text(name, setdir, fn, inst, balance):
    """The keel roster of one instance, as YAML text."""
    out = [
        "# SPDX-License-Identifier: CC-BY-4.0",
        "# Source: CSPLib problem 069 \"Balanced Nursing Workload Problem\", instance",
        "#   %s of %s (authors credited at the source and in the benchmark's NOTE.md)," % (fn, name.split("-")[0]),
        "#   github.com/csplib/csplib Problems/prob069/data, snapshot commit 2b13c59",
        "#   (2025-08-03). Licence: CC BY 4.0 (creativecommons.org/licenses/by/4.0);",
        "#   keep this attribution with any copy.",
        "# Converted by tests/bench/csplib069.py: capacity = max_workload %d (shift minutes,"
        % inst["cap"],
        "#   no break), care_minutes = acuity; ids N*, P*, Z* are generated, every number is",
        "#   the instance's.",
        "version: 1",
        "unit: {name: \"csplib069 %s\", type: other}" % name,
        "shift: {minutes: %d, break_minutes: 0}" % inst["cap"],
        "policy:",
        "  max_zones: 1",
        "  max_utilisation: 1.0",
        "  min_patients: %d" % inst["min"],
        "  max_patients: %d" % inst["max"],
        "  balance: %s" % balance,
        "nurses:",
    ]
    for j in range(inst["nurses"]):
        out.append("  - {id: N%d}" % (j + 1))
    out.append("patients:")
    k = 0
    for z, acu in enumerate(inst["zones"]):
        for a in acu:
            k += 1
            out.append("  - {id: P%d, zone: Z%d, care_minutes: %d}" % (k, z + 1, a))
    return "\n".join(out) + "\n"


def roster_facts(inst):
    """{patient id: (zone, care)} as the roster names them."""
    facts, k = {}, 0
    for z, acu in enumerate(inst["zones"]):
        for a in acu:
            k += 1
            facts["P%d" % k] = (z, a)
    return facts


def write_rosters(data, outdir, balances):
    """Write every roster; [(name, balance, path)]."""
    import yaml
    os.makedirs(outdir, exist_ok=True)
    written = []
    for name, setdir, fn, inst in instances(data):
        for b in balances:
            path = os.path.join(outdir, "%s-%s.yaml" % (name, b))
            text = roster_text(name, setdir, fn, inst, b)
            # The YAML must read back to exactly the instance.
            doc = yaml.safe_load(text)
            back = [[] for _ in inst["zones"]]
            for p in doc["patients"]:
                back[int(p["zone"][1:]) - 1].append(p["care_minutes"])
            require(back == inst["zones"] and len(doc["nurses"]) == inst["nurses"] and
                    doc["shift"]["minutes"] == inst["cap"], "%s: roster does not read back" % name)
            tmp = path + ".tmp"
            with open(tmp, "w", encoding="utf-8") as f:
                f.write(text)
            os.replace(tmp, path)
            written.append((name, b, path))
    return written


# ------------------------------------------------------------ the exact reference

OBJECTIVES = ("peak", "squares", "lift")
NO_GROUP = 10 ** 9          # the lightest group of an empty partition (lift)


def better(which, new, old):
    """True when value `new` beats `old` for the objective (lift maximises)."""
    return new > old if which == "lift" else new < old


def zone_tables(acu, lo, hi, cap):
    """Exhaustive subset DP for one zone.

    Returns {k: {"peak": (value, groups), "squares": (value, groups),
    "lift": (value, groups)}} for every k with at least one partition of the
    zone's patients into k groups of lo..hi patients (at least 1) and sum
    <= cap: the least heaviest group sum, the least sum of squared group
    sums, and the greatest lightest group sum.  Groups are lists of indices
    into acu.  Also the number of DP states.
    """
    n = len(acu)
    if n == 0:
        return {0: {w: (NO_GROUP if w == "lift" else 0, []) for w in OBJECTIVES}}, 0
    # The allowed groups, by their lowest index.
    groups = [[] for _ in range(n)]
    for i in range(n):
        for size in range(max(lo, 1), hi + 1):
            for rest in itertools.combinations(range(i + 1, n), size - 1):
                s = acu[i] + sum(acu[j] for j in rest)
                if s <= cap:
                    gm = 1 << i
                    for j in rest:
                        gm |= 1 << j
                    groups[i].append((gm, s))
    # mask -> one {j: (value, group)} per objective, j the number of groups.
    memo = {0: ({0: (0, 0)}, {0: (0, 0)}, {0: (NO_GROUP, 0)})}

    def best(mask):
        got = memo.get(mask)
        if got is not None:
            return got
        low = (mask & -mask).bit_length() - 1
        pk, sq, lf = {}, {}, {}
        for gm, s in groups[low]:
            if gm & mask != gm:
                continue
            sub_pk, sub_sq, sub_lf = best(mask ^ gm)
            for j, (v, _) in sub_pk.items():
                c = s if s > v else v
                old = pk.get(j + 1)
                if old is None or c < old[0]:
                    pk[j + 1] = (c, gm)
            s2 = s * s
            for j, (v, _) in sub_sq.items():
                c = s2 + v
                old = sq.get(j + 1)
                if old is None or c < old[0]:
                    sq[j + 1] = (c, gm)
            for j, (v, _) in sub_lf.items():
                c = s if s < v else v
                old = lf.get(j + 1)
                if old is None or c > old[0]:
                    lf[j + 1] = (c, gm)
        memo[mask] = (pk, sq, lf)
        return memo[mask]

    full = (1 << n) - 1
    top = best(full)

    def rebuild(o, k):
        out, mask, j = [], full, k
        while mask:
            gm = memo[mask][o][j][1]
            out.append([i for i in range(n) if gm >> i & 1])
            mask ^= gm
            j -= 1
        require(j == 0, "rebuilt partition has the wrong number of groups")
        return out

    table = {}
    for k in sorted(top[0]):
        table[k] = {w: (top[o][k][0], rebuild(o, k)) for o, w in enumerate(OBJECTIVES)}
        # Each witness checked from scratch: a partition into k allowed groups
        # whose objective is the value the DP gives.
        for which, f in (("peak", max), ("squares", lambda xs: sum(x * x for x in xs)),
                         ("lift", min)):
            value, grps = table[k][which]
            require(len(grps) == k and sorted(i for g in grps for i in g) == list(range(n)),
                    "zone witness is not a partition into k groups")
            sums = [sum(acu[i] for i in g) for g in grps]
            require(all(max(lo, 1) <= len(g) <= hi for g in grps) and max(sums) <= cap,
                    "zone witness breaks a limit")
            require(f(sums) == value, "zone witness disagrees with the DP")
    return table, len(memo)


def combine(tables, nurses, idle_ok, which):
    """Best vector (k_z) over the zones: min-max (peak), min-sum (squares) or
    max-min (lift).

    Returns (value, [k_z]) or (None, None) when no vector uses the nurses
    (all of them, or at most all when idle nurses are allowed; an idle
    nurse's load, 0, is then the lightest).
    """
    reach = {0: (NO_GROUP if which == "lift" else 0, [])}
    for tab in tables:
        nxt = {}
        for t, (v, ks) in reach.items():
            for k, row in tab.items():
                if t + k > nurses:
                    continue
                zv = row[which][0]
                c = max(v, zv) if which == "peak" else v + zv if which == "squares" \
                    else min(v, zv)
                old = nxt.get(t + k)
                if old is None or better(which, c, old[0]):
                    nxt[t + k] = (c, ks + [k])
        reach = nxt
    if idle_ok:
        cands = [(0 if which == "lift" and t < nurses else v, ks)
                 for t, (v, ks) in sorted(reach.items())]
        if not cands:
            return None, None
        pick = cands[0]
        for c in cands[1:]:
            if better(which, c[0], pick[0]):
                pick = c
        return pick
    return reach.get(nurses, (None, None))


def check_plan(inst, plan):
    """Check a plan [[(zone, index)...] per nurse] from scratch; (peak, squares, loads).

    Raises AssertionError on any broken rule.
    """
    require(len(plan) == inst["nurses"], "one group per nurse")
    seen = set()
    loads = []
    for g in plan:
        require(inst["min"] <= len(g) <= inst["max"], "patient count %d" % len(g))
        require(len({z for z, _ in g}) <= 1, "one zone per nurse")
        load = 0
        for z, i in g:
            require((z, i) not in seen, "a patient twice")
            seen.add((z, i))
            load += inst["zones"][z][i]
        require(load <= inst["cap"], "capacity")
        loads.append(load)
    require(len(seen) == inst["patients"], "every patient placed")
    return max(loads), sum(x * x for x in loads), loads


def plan_of(inst, tables, ks, which):
    plan = []
    for z, k in enumerate(ks):
        for grp in tables[z][k][which][1]:
            plan.append([(z, i) for i in grp])
    while len(plan) < inst["nurses"]:
        plan.append([])             # idle nurses (min_patients 0 only)
    return plan


def solve_reference(inst, lift=True):
    """The optima of one instance, with checked witness plans.

    peak and squares as in the docstring; lift (keel's stage 2 after peak):
    the greatest lightest load among the plans whose heaviest load is the
    peak optimum, by the same DP with the groups capped at that optimum.
    """
    t0 = time.monotonic()
    tables, states = [], 0
    for acu in inst["zones"]:
        tab, st = zone_tables(acu, inst["min"], inst["max"], inst["cap"])
        tables.append(tab)
        states += st
    idle_ok = inst["min"] == 0
    res = {"states": states, "tables": tables}
    for which in ("peak", "squares"):
        value, ks = combine(tables, inst["nurses"], idle_ok, which)
        if value is None:
            res[which] = None
            continue
        plan = plan_of(inst, tables, ks, which)
        pk, sq, loads = check_plan(inst, plan)
        require((pk if which == "peak" else sq) == value, "witness disagrees with the DP")
        res[which] = {"value": value, "ks": ks, "plan": plan, "loads": sorted(loads)}
    res["lift"] = None
    if lift and res["peak"] is not None:
        top = res["peak"]["value"]
        capped = [zone_tables(acu, inst["min"], inst["max"], top)[0] for acu in inst["zones"]]
        res["lift_tables"] = capped
        value, ks = combine(capped, inst["nurses"], idle_ok, "lift")
        require(value is not None, "the peak optimum's plan has no lift")
        plan = plan_of(inst, capped, ks, "lift")
        pk, _, loads = check_plan(inst, plan)
        require(pk <= top and min(loads) == value, "lift witness disagrees with the DP")
        res["lift"] = {"value": value, "ks": ks, "plan": plan, "loads": sorted(loads)}
    res["seconds"] = time.monotonic() - t0
    return res


# ------------------------------------------------------------ self-test

def brute_force(inst):
    """The optima of a tiny instance by trying every patient-to-nurse map:
    peak, squares, and lift (the greatest lightest load among the plans at
    the peak optimum)."""
    pts = [(z, i) for z, zone in enumerate(inst["zones"]) for i in range(len(zone))]
    best = {"peak": None, "squares": None, "lift": None}
    lift_at = {}                    # heaviest load -> greatest lightest load
    for owner in itertools.product(range(inst["nurses"]), repeat=len(pts)):
        plan = [[] for _ in range(inst["nurses"])]
        for pt, j in zip(pts, owner):
            plan[j].append(pt)
        try:
            pk, sq, loads = check_plan(inst, plan)
        except AssertionError:
            continue
        if best["peak"] is None or pk < best["peak"]:
            best["peak"] = pk
        if best["squares"] is None or sq < best["squares"]:
            best["squares"] = sq
        lift_at[pk] = max(lift_at.get(pk, -1), min(loads))
    if best["peak"] is not None:
        best["lift"] = lift_at[best["peak"]]
    return best


def cmd_selftest(args):
    """The reference against brute force on random tiny instances."""
    import random
    rng = random.Random(args.seed)
    feasible = 0
    for _ in range(args.count):
        lo = rng.choice([0, 1, 1, 2])
        hi = rng.choice([max(lo, 1), 2, 3, 3, 4])
        hi = max(hi, lo, 1)
        nz = rng.randint(1, 3)
        zones = [[rng.randint(1, 60) for _ in range(rng.randint(1, 4))] for _ in range(nz)]
        while sum(map(len, zones)) > 8:
            zones[rng.randrange(nz)].pop()
        zones = [z for z in zones if z] or [[rng.randint(1, 60)]]
        # Mostly a nurse count the patient limits can use, now and then any;
        # at most 300000 maps to try.
        while True:
            npat = sum(map(len, zones))
            fit = max(1, -(-npat // hi))
            if fit ** npat <= 300000:
                break
            zones = [z for z in zones if z]
            zones[rng.randrange(len(zones))].pop()
        zones = [z for z in zones if z]
        nurses = rng.randint(fit, max(fit, min(5, npat))) if rng.random() < 0.8 else \
            rng.randint(1, 5)
        while nurses ** npat > 300000:
            nurses -= 1
        inst = {"zones": zones, "nurses": nurses, "min": lo, "max": hi,
                "cap": rng.randint(40, 130), "patients": npat}
        want = brute_force(inst)
        ref = solve_reference(inst)
        got = {w: None if ref[w] is None else ref[w]["value"] for w in OBJECTIVES}
        if got != want:
            print("selftest: %r: reference %r, brute force %r" % (inst, got, want))
            return 1
        feasible += want["peak"] is not None
    print("selftest: %d tiny instances (%d with a plan): reference = brute force"
          % (args.count, feasible))
    return 0


# ------------------------------------------------------------ HiGHS cross-checks

def highs_solve(c, integrality, lb, ub, rows, rlo, rhi, time_limit=None):
    """scipy.optimize.milp with the trusted settings; (result, seconds)."""
    import numpy as np
    from scipy.optimize import Bounds, LinearConstraint, milp
    from scipy.sparse import csr_matrix
    data, ri, ci = [], [], []
    for r, row in enumerate(rows):
        for col, val in row:
            ri.append(r)
            ci.append(col)
            data.append(val)
    a = csr_matrix((data, (ri, ci)), shape=(len(rows), len(c)))
    options = {"mip_rel_gap": 0.0, "presolve": False}
    if time_limit is not None:
        options["time_limit"] = float(time_limit)
    t0 = time.monotonic()
    res = milp(c=np.asarray(c, float), integrality=np.asarray(integrality),
               bounds=Bounds(np.asarray(lb, float), np.asarray(ub, float)),
               constraints=LinearConstraint(a, np.asarray(rlo, float), np.asarray(rhi, float)),
               options=options)
    return res, time.monotonic() - t0


HIGHS_STATUS = {0: "optimal", 1: "time_limit", 2: "infeasible"}


def zone_milp(acu, lo, hi, cap, k, which, limit=None, floor=0):
    """Set-partitioning MILP for one zone and k groups, all columns binary.

    which "squares": minimise the sum of squared group sums.  which "peak":
    a feasibility problem (no objective) with only the groups of sum from
    `floor` to `limit`.  Returns (status, value): value is the checked plan's
    objective (squares) or (heaviest, lightest) group (peak), None without
    a plan.
    """
    n = len(acu)
    top = cap if limit is None else min(cap, limit)
    cols = []
    for size in range(max(lo, 1), hi + 1):
        for grp in itertools.combinations(range(n), size):
            s = sum(acu[i] for i in grp)
            if floor <= s <= top:
                cols.append((grp, s))
    m = len(cols)
    if m == 0:
        return "infeasible", None
    rows, rlo, rhi = [], [], []
    for i in range(n):
        rows.append([(g, 1.0) for g, (grp, _) in enumerate(cols) if i in grp])
        rlo.append(1.0)
        rhi.append(1.0)
    rows.append([(g, 1.0) for g in range(m)])
    rlo.append(k)
    rhi.append(k)
    c = [float(s * s) for _, s in cols] if which == "squares" else [0.0] * m
    res, _ = highs_solve(c, [1] * m, [0.0] * m, [1.0] * m, rows, rlo, rhi)
    status = HIGHS_STATUS.get(res.status, "status %d" % res.status)
    if res.x is None:
        return status, None
    chosen = [g for g in range(m) if res.x[g] > 0.5]
    covered = sorted(i for g in chosen for i in cols[g][0])
    if covered != list(range(n)) or len(chosen) != k:
        return "plan breaks a row", None
    sums = [cols[g][1] for g in chosen]
    return status, ((max(sums), min(sums)) if which == "peak" else sum(s * s for s in sums))


def zone_check(inst, ref):
    """Every zone, every k from the least to the most groups: HiGHS against the DP.

    Squares: HiGHS's optimum must equal the DP's.  Peak, as a descent of
    feasibility problems (HiGHS's objective verdicts with a continuous
    column are not trusted): with groups of sum <= the DP value a checked
    plan, with sum <= the DP value - 1 "infeasible"; where the DP finds no
    partition, "infeasible" at max_workload.
    Returns (number of MILPs, disagreements, seconds).
    """
    t0 = time.monotonic()
    bad, count = [], 0
    lo, hi, cap = inst["min"], inst["max"], inst["cap"]
    for z, acu in enumerate(inst["zones"]):
        tab = ref["tables"][z]
        n = len(acu)
        kmin, kmax = -(-n // hi), (n if lo <= 1 else n // lo)
        for k in range(kmin, kmax + 1):
            where = "zone %d k=%d" % (z + 1, k)
            if k not in tab:
                count += 1
                status, _ = zone_milp(acu, lo, hi, cap, k, "peak")
                if status != "infeasible":
                    bad.append("%s: DP no partition, HiGHS %s" % (where, status))
                continue
            count += 3
            status, value = zone_milp(acu, lo, hi, cap, k, "squares")
            if status != "optimal" or value != tab[k]["squares"][0]:
                bad.append("%s squares: DP %s, HiGHS %s %s"
                           % (where, tab[k]["squares"][0], status, value))
            v = tab[k]["peak"][0]
            status, value = zone_milp(acu, lo, hi, cap, k, "peak", v)
            if status != "optimal" or value is None or value[0] > v:
                bad.append("%s peak: DP %s, HiGHS at <= %d: %s %s"
                           % (where, v, v, status, value))
            status, value = zone_milp(acu, lo, hi, cap, k, "peak", v - 1)
            if status != "infeasible":
                bad.append("%s peak: DP %s, HiGHS at <= %d: %s %s"
                           % (where, v, v - 1, status, value))
        # Lift: groups capped at the instance's peak optimum, the lightest
        # group at least the DP value (a plan) and above it ("infeasible").
        if ref.get("lift_tables") is None:
            continue
        top, ltab = ref["peak"]["value"], ref["lift_tables"][z]
        for k in range(kmin, kmax + 1):
            where = "zone %d k=%d lift (groups <= %d)" % (z + 1, k, top)
            if k not in ltab:
                count += 1
                status, _ = zone_milp(acu, lo, hi, cap, k, "peak", top)
                if status != "infeasible":
                    bad.append("%s: DP no partition, HiGHS %s" % (where, status))
                continue
            count += 2
            v = ltab[k]["lift"][0]
            status, value = zone_milp(acu, lo, hi, cap, k, "peak", top, v)
            if status != "optimal" or value is None or value[1] < v or value[0] > top:
                bad.append("%s: DP %s, HiGHS at >= %d: %s %s" % (where, v, v, status, value))
            status, value = zone_milp(acu, lo, hi, cap, k, "peak", top, v + 1)
            if status != "infeasible":
                bad.append("%s: DP %s, HiGHS at >= %d: %s %s"
                           % (where, v, v + 1, status, value))
    return count, bad, time.monotonic() - t0


def whole_milp(inst, which, time_limit, limit=None):
    """The plain whole-instance MILP; {status, value, bound, seconds}, plan checked.

    which "squares": minimise sum s_n (s_n integer, chords of l^2).  which
    "peak": a feasibility problem with every load at most `limit`.
    Symmetry breaking for identical nurses: the zone index of nurse n is at
    most that of nurse n+1.
    """
    acu = [a for zone in inst["zones"] for a in zone]
    zone_of = [z for z, zone in enumerate(inst["zones"]) for _ in zone]
    P, N, Z, cap = len(acu), inst["nurses"], len(inst["zones"]), inst["cap"]
    top = cap if limit is None else min(cap, limit)

    def x(p, j):
        return p * N + j

    def y(j, z):
        return P * N + j * Z + z
    nb = P * N + N * Z
    c, integ, lb, ub = [0.0] * nb, [1] * nb, [0.0] * nb, [1.0] * nb
    rows, rlo, rhi = [], [], []

    def add(row, lo_, hi_):
        rows.append(row)
        rlo.append(lo_)
        rhi.append(hi_)
    for p in range(P):
        add([(x(p, j), 1.0) for j in range(N)], 1.0, 1.0)
    for j in range(N):
        for p in range(P):
            add([(x(p, j), 1.0), (y(j, zone_of[p]), -1.0)], -math.inf, 0.0)
        add([(y(j, z), 1.0) for z in range(Z)], 0.0, 1.0)
        add([(x(p, j), 1.0) for p in range(P)], float(inst["min"]), float(inst["max"]))
        add([(x(p, j), float(acu[p])) for p in range(P)], 0.0, float(top))
        if j + 1 < N and inst["min"] >= 1:
            add([(y(j, z), float(z)) for z in range(Z)] +
                [(y(j + 1, z), -float(z)) for z in range(Z)], -math.inf, 0.0)
    if which == "squares":
        for j in range(N):
            col = len(c)
            c.append(1.0)
            integ.append(1)
            lb.append(0.0)
            ub.append(float(cap * cap))
            for l in range(cap):
                add([(col, 1.0)] + [(x(p, j), -float((2 * l + 1) * acu[p])) for p in range(P)],
                    -float(l * (l + 1)), math.inf)
    res, secs = highs_solve(c, integ, lb, ub, rows, rlo, rhi, time_limit)
    out = {"status": HIGHS_STATUS.get(res.status, "status %d" % res.status),
           "seconds": round(secs, 2), "value": None, "bound": None}
    db = getattr(res, "mip_dual_bound", None)
    if which == "squares" and db is not None and math.isfinite(db):
        out["bound"] = float(db)
    if res.x is not None:
        plan = [[] for _ in range(N)]
        offs = [0]
        for zone in inst["zones"]:
            offs.append(offs[-1] + len(zone))
        for p in range(P):
            js = [j for j in range(N) if res.x[x(p, j)] > 0.5]
            if len(js) != 1:
                out["status"] = "plan breaks a row"
                return out
            plan[js[0]].append((zone_of[p], p - offs[zone_of[p]]))
        try:
            pk, sq, _ = check_plan(inst, plan)
        except AssertionError as e:
            out["status"] = "plan breaks a rule: %s" % e
            return out
        out["value"] = pk if which == "peak" else sq
    return out


def whole_check(inst, ref, time_limit):
    """The whole-instance checks of one instance: ({which: summary}, disagreements)."""
    got, bad = {}, []
    v = ref["peak"]["value"]
    at = whole_milp(inst, "peak", time_limit, v)
    below = whole_milp(inst, "peak", time_limit, v - 1)
    if at["status"] == "optimal" and (at["value"] is None or at["value"] > v):
        bad.append("whole peak: a plan at <= %d is %s" % (v, at["value"]))
    if at["status"] == "infeasible":
        bad.append("whole peak: HiGHS infeasible at <= %d, the DP has a plan" % v)
    if below["status"] not in ("infeasible", "time_limit"):
        bad.append("whole peak: HiGHS at <= %d: %s %s" % (v - 1, below["status"],
                                                          below["value"]))
    got["peak"] = {"verdict": "=" if at["status"] == "optimal" and
                   below["status"] == "infeasible" else "not proven",
                   "at": at, "below": below, "seconds": at["seconds"] + below["seconds"]}
    s = ref["squares"]["value"]
    sq = whole_milp(inst, "squares", time_limit)
    if sq["value"] is not None and sq["value"] < s:
        bad.append("whole squares: HiGHS plan %s below the DP's %s" % (sq["value"], s))
    if sq["status"] == "optimal" and sq["value"] != s:
        bad.append("whole squares: HiGHS optimal %s, DP %s" % (sq["value"], s))
    if sq["status"] == "infeasible":
        bad.append("whole squares: HiGHS infeasible, the DP has a plan")
    if sq["bound"] is not None and sq["bound"] > s + 1e-6 * max(1, s):
        bad.append("whole squares: HiGHS bound %s above the DP's %s" % (sq["bound"], s))
    got["squares"] = {"verdict": "=" if sq["status"] == "optimal" and sq["value"] == s
                      else "not proven", "run": sq, "seconds": sq["seconds"]}
    return got, bad


# ------------------------------------------------------------ reference report

def fmt_u(num, den):
    return "%.6f" % (num / den)


def what_binds(inst, ref):
    """Which limits change the optima: the same DP with one limit changed."""
    t0 = time.monotonic()

    def values(**change):
        r = solve_reference(dict(inst, **change), lift=False)
        return tuple(None if r[w] is None else r[w]["value"] for w in ("peak", "squares"))
    base = (ref["peak"]["value"], ref["squares"]["value"])
    no_cap = values(cap=sum(map(sum, inst["zones"])))
    below = values(cap=inst["cap"] - 1)
    out = {"average_bound": -(-sum(map(sum, inst["zones"])) // inst["nurses"]),
           "capacity_binds": [no_cap[0] != base[0], no_cap[1] != base[1]],
           "optimum_needs_full_capacity": [below[0] != base[0], below[1] != base[1]],
           "without_capacity": list(no_cap), "capacity_minus_1": list(below)}
    if inst["min"] >= 1:
        idle = values(min=0)
        out["min_patients_binds"] = [idle[0] != base[0], idle[1] != base[1]]
        out["min_patients_0"] = list(idle)
    out["seconds"] = round(time.monotonic() - t0, 2)
    return out


def reference_rows(args):
    insts = instances(args.data)
    whole = set(args.whole.split(",")) if args.whole else \
        {n for n, *_ in insts if "2zones" in n}
    rows, bad = [], []
    for name, setdir, fn, inst in insts:
        print("  %s" % name, file=sys.stderr, flush=True)
        ref = solve_reference(inst)
        pid_of = {}
        for z, zone in enumerate(inst["zones"]):
            for i in range(len(zone)):
                pid_of[(z, i)] = "P%d" % (len(pid_of) + 1)
        row = {"instance": name, "file": "%s/%s" % (name.split("-")[0], fn), "nurses": inst["nurses"],
               "patients": inst["patients"], "zones": len(inst["zones"]),
               "min_patients": inst["min"], "max_patients": inst["max"],
               "max_workload": inst["cap"], "total_workload": sum(map(sum, inst["zones"])),
               "zone_sizes": [len(z) for z in inst["zones"]], "dp_states": ref["states"],
               "seconds": round(ref["seconds"], 3), "oddities": oddities(inst)}
        for which in OBJECTIVES:
            r = ref[which]
            row[which] = None if r is None else {
                "value": r["value"], "nurses_per_zone": r["ks"], "loads": r["loads"],
                "plan": [[pid_of[(z, i)] for z, i in g] for g in r["plan"]]}
        if ref["peak"] is not None:
            n, tot, sq = inst["nurses"], row["total_workload"], ref["squares"]["value"]
            row["peak"]["utilisation"] = "%d/%d" % (ref["peak"]["value"], inst["cap"])
            row["lift"]["utilisation"] = "%d/%d" % (ref["lift"]["value"], inst["cap"])
            row["squares"]["per_capacity"] = "%d/%d" % (sq, inst["cap"])
            var = Fraction(sq, n) - Fraction(tot, n) ** 2
            row["squares"]["variance"] = "%d/%d" % (var.numerator, var.denominator)
            row["squares"]["std_dev"] = math.sqrt(var)
        if ref["peak"] is not None:
            row["binds"] = what_binds(inst, ref)
        if not args.no_zone_check:
            cnt, zb, secs = zone_check(inst, ref)
            row["zone_check"] = {"milps": cnt, "seconds": round(secs, 2), "agree": not zb}
            bad += ["%s: %s" % (name, b) for b in zb]
        if name in whole:
            print("  %s: whole-instance HiGHS" % name, file=sys.stderr, flush=True)
            row["whole"], wb = whole_check(inst, ref, args.whole_time_limit)
            bad += ["%s: %s" % (name, b) for b in wb]
        rows.append(row)
    return rows, bad


def reference_markdown(rows, bad, command, started, elapsed, args):
    out = ["<!-- SPDX-License-Identifier: GPL-3.0-or-later -->",
           "## CSPLib problem 069: proven optima of the 33 published instances", "",
           "Generated by (from the top of the tree; %s, %.0f s in all):" % (started, elapsed),
           "", "```", command, "```", "",
           "Source of the instances: CSPLib problem 069 \"Balanced Nursing Workload "
           "Problem\" (authors credited at the source and in the benchmark's NOTE.md; set1 and "
           "set2 are its two instance folders in name order), github.com/csplib/csplib "
           "Problems/prob069/data, snapshot commit "
           "2b13c59 (2025-08-03), licence CC BY 4.0. No optimal values are published with the "
           "data; these are computed here.", "",
           "Every nurse takes min..max patients of one zone with workload at most max_workload "
           "(capacity; all instances: 1..3 patients, 105). **Peak**: the least possible "
           "heaviest workload (keel `policy.balance: peak`; utilisation = workload / 105). "
           "**Squares**: the least possible sum of squared workloads S (keel "
           "`policy.balance: squares` minimises S / 105); variance = S/n − (total/n)², the "
           "population variance of the n nurses' workloads (std dev its square root). "
           "**Lift** (keel's stage 2 after peak): the greatest lightest workload among the "
           "plans whose heaviest workload is the peak optimum.", "",
           "How proven: exhaustive subset dynamic programme per zone and nurse count, exact "
           "combination over zones, every optimum rebuilt as a plan and checked from scratch "
           "(see the docstring of tests/bench/csplib069.py). Per-zone check: a "
           "set-partitioning MILP (HiGHS, scipy 1.10, presolve off, gap 0) for every zone, "
           "every nurse count and all three objectives (peak and lift as feasibility "
           "problems just at and just past the DP value). Whole check: a plain whole-instance "
           "HiGHS MILP, time limit %g s per objective (\"–\" not run)."
           % args.whole_time_limit, "",
           "| instance | nurses | patients | zones | peak workload | peak utilisation | "
           "nurses per zone (peak) | lift: lightest workload at the peak | lift utilisation | "
           "S = Σ load² | S / 105 | variance | std dev | "
           "nurses per zone (squares) | DP states | seconds | per-zone check | whole check "
           "(peak; squares) |",
           "|" + "---|" * 18]
    for r in rows:
        if r["peak"] is None:
            out.append("| %s | %d | %d | %d | infeasible | | | | | | | | %d | %.2f | | |"
                       % (r["instance"], r["nurses"], r["patients"], r["zones"],
                          r["dp_states"], r["seconds"]))
            continue
        pk, sq = r["peak"], r["squares"]
        zc = r.get("zone_check")
        zcs = "–" if zc is None else "%s (%d MILPs, %.1f s)" % (
            "agrees" if zc["agree"] else "**DISAGREES**", zc["milps"], zc["seconds"])
        w = r.get("whole")
        if w is None:
            ws = "–"
        else:
            parts = []
            for which in ("peak", "squares"):
                e = w[which]
                if e["verdict"] == "=":
                    parts.append("= (%.1f s)" % e["seconds"])
                elif which == "peak":
                    v = r["peak"]["value"]
                    parts.append("≤ %d: %s, ≤ %d: %s (%.0f s)" % (
                        v, "plan" if e["at"]["status"] == "optimal" else e["at"]["status"],
                        v - 1, e["below"]["status"], e["seconds"]))
                else:
                    parts.append("%s: plan %s, bound %s (%.0f s)" % (
                        e["run"]["status"], e["run"]["value"],
                        "–" if e["run"]["bound"] is None else "%.0f" % e["run"]["bound"],
                        e["seconds"]))
            ws = "; ".join(parts)
        var = Fraction(sq["variance"])
        lf = r["lift"]
        out.append("| %s | %d | %d | %d | %d | %s (%s) | %s | %d | %s (%s) | %d | %.4f | %.4f "
                   "| %.4f | %s | %d | %.2f | %s | %s |" % (
                       r["instance"], r["nurses"], r["patients"], r["zones"], pk["value"],
                       fmt_u(pk["value"], r["max_workload"]), pk["utilisation"],
                       " ".join(map(str, pk["nurses_per_zone"])), lf["value"],
                       fmt_u(lf["value"], r["max_workload"]), lf["utilisation"], sq["value"],
                       sq["value"] / r["max_workload"], float(var), sq["std_dev"],
                       " ".join(map(str, sq["nurses_per_zone"])), r["dp_states"], r["seconds"],
                       zcs, ws))
    out.append("")
    out.append("Reference time: %.2f s for the dynamic programme on all 33 instances "
               "(all three objectives; %.1f s more for the table of what binds); the per-zone "
               "HiGHS checks %.1f s; the whole-instance HiGHS checks %.1f s." % (
                   sum(r["seconds"] for r in rows),
                   sum(r["binds"]["seconds"] for r in rows if r.get("binds")),
                   sum(r["zone_check"]["seconds"] for r in rows if r.get("zone_check")),
                   sum(e["seconds"] for r in rows if r.get("whole")
                       for e in r["whole"].values())))
    out.append("")
    out.append("Disagreements: %s" % ("none" if not bad else ""))
    for b in bad:
        out.append("- %s" % b)
    out.append("")
    out.append("What binds (the same exhaustive DP with one limit changed): the average "
               "bound ⌈total workload / nurses⌉, the peak optimum's distance above it, and "
               "whether an optimum changes without max_workload, with max_workload − 1 (a "
               "change there means every optimal plan has a nurse at exactly max_workload, "
               "utilisation 1.0) or with min_patients 0.")
    out.append("")
    out.append("| instance | average bound | peak optimum | above the bound | "
               "without max_workload (peak, squares) | at max_workload − 1 (peak, squares) | "
               "min_patients 0 (peak, squares) |")
    out.append("|" + "---|" * 7)

    def cmp(new, old):
        return ", ".join("same" if a == b else ("%s" % a if a is not None else "infeasible")
                         for a, b in zip(new, old))
    for r in rows:
        b = r.get("binds")
        if not b:
            continue
        base = (r["peak"]["value"], r["squares"]["value"])
        out.append("| %s | %d | %d | %+d | %s | %s | %s |" % (
            r["instance"], b["average_bound"], base[0], base[0] - b["average_bound"],
            cmp(b["without_capacity"], base), cmp(b["capacity_minus_1"], base),
            cmp(b["min_patients_0"], base) if "min_patients_0" in b else "–"))
    out.append("")
    notes = [(r["instance"], o) for r in rows for o in r["oddities"]]
    out.append("Notes on the data: every file keeps the README's format; %s." % (
        "nothing else to note" if not notes else "; ".join(
            "%s: %s" % (n, o) for n, o in notes)))
    return "\n".join(out) + "\n"


def cmd_reference(args):
    command = " ".join(shlex.quote(a) for a in ["tests/bench/csplib069.py"] + args.argv)
    started = datetime.datetime.now().strftime("%Y-%m-%d %H:%M")
    t0 = time.monotonic()
    rows, bad = reference_rows(args)
    text = reference_markdown(rows, bad, command, started, time.monotonic() - t0, args)
    print(text, end="")
    if args.out:
        write_file(args.out, text)
    if args.json:
        # One instance a line; plans are patient ids (P1.. as in the converted
        # rosters) per nurse.
        head = json.dumps({"command": command, "date": started, "disagreements": bad,
                           "instances": []}, ensure_ascii=False)
        body = ",\n".join(" " + json.dumps(r, ensure_ascii=False) for r in rows)
        write_file(args.json, head[:-2] + "\n" + body + "\n]}\n")
    return 1 if bad else 0


def write_file(path, text):
    tmp = path + ".tmp"
    with open(tmp, "w", encoding="utf-8") as f:
        f.write(text)
    os.replace(tmp, path)


# ------------------------------------------------------------ run keel

SQUARE_SCALES = [("load²/capacity", lambda s, cap: Fraction(s, cap)),
                 ("load²", lambda s, cap: Fraction(s)),
                 ("utilisation²", lambda s, cap: Fraction(s, cap * cap))]


def run_keel(keel, path, seconds):
    cmd = [keel, "assign", path, "--format", "json", "--time-limit", "%g" % seconds]
    t0 = time.monotonic()
    try:
        p = subprocess.run(cmd, capture_output=True, text=True, timeout=seconds * 3 + 60)
        rc, out, err = p.returncode, p.stdout, p.stderr
    except subprocess.TimeoutExpired:
        rc, out, err = "killed", "", "killed after %g s" % (seconds * 3 + 60)
    return {"rc": rc, "stdout": out, "stderr": err, "wall": time.monotonic() - t0}


def judge_keel(inst, balance, ref, res):
    """keel's result on one roster against the reference optimum."""
    cap = inst["cap"]
    row = {"rc": res["rc"], "wall": round(res["wall"], 2), "verdict": None, "status": None,
           "value": None, "bound": None, "stage": None, "plan_value": None,
           "disagree": False}
    err = res["stderr"].strip().splitlines()
    if res["rc"] == 2:
        row["verdict"] = "bad input (exit 2): %s" % (
            re.sub(r"^.*?:\d+:\d+: ", "", err[0]) if err else "no message")
        row["bad_input"] = err
        return row
    if res["rc"] not in (0, 3, 4) or not res["stdout"].strip():
        row["verdict"] = "exit %s: %s" % (res["rc"], err[-1] if err else "no output")
        row["disagree"] = res["rc"] == 3
        return row
    try:
        js = json.loads(res["stdout"])
    except ValueError:
        row["verdict"] = "exit %s: json did not parse" % res["rc"]
        return row
    row["status"] = js.get("status")
    if res["rc"] == 3 or js.get("status") == "infeasible":
        row["verdict"] = "DISAGREE: keel says no valid assignment; the reference has one"
        row["disagree"] = True
        return row
    # keel's plan, checked from scratch against the instance.
    facts = roster_facts(inst)
    seen, problems = set(), []
    for n in js.get("nurses", []):
        for pid in n.get("patients", []):
            if pid not in facts or pid in seen:
                problems.append("patient %s unknown or twice" % pid)
            seen.add(pid)
    loads = [sum(facts[pid][1] for pid in n.get("patients", []) if pid in facts)
             for n in js.get("nurses", [])]
    if len(seen) != inst["patients"]:
        problems.append("%d of %d patients placed" % (len(seen), inst["patients"]))
    for n in js.get("nurses", []):
        pts = n.get("patients", [])
        if not inst["min"] <= len(pts) <= inst["max"]:
            problems.append("%s has %d patients" % (n.get("id"), len(pts)))
        if len({facts[p][0] for p in pts if p in facts}) > 1:
            problems.append("%s works %d zones" % (n.get("id"),
                                                   len({facts[p][0] for p in pts if p in facts})))
    if loads and max(loads) > cap:
        problems.append("a load of %d above capacity %d" % (max(loads), cap))
    if len(js.get("nurses", [])) != inst["nurses"]:
        problems.append("%d nurses in the output" % len(js.get("nurses", [])))
    plan_peak, plan_sq = (max(loads), sum(v * v for v in loads)) if loads else (None, None)
    row["plan_value"] = plan_peak if balance == "peak" else plan_sq
    stages = js.get("stages") or []
    st = next((s for s in stages if s.get("name") in (balance, "peak", "squares")),
              stages[0] if stages else None)
    opt = ref[balance]["value"]
    if st is None:
        row["verdict"] = "no stages in keel's json"
        return row
    row["stage"] = st.get("name")
    row["stage_seconds"] = st.get("seconds")
    row["stages"] = " ".join("%s:%s" % (x.get("name"), {"optimal": "opt", "time_limit": "limit"}
                                        .get(x.get("status"), x.get("status"))) for x in stages)
    row["status"] = st.get("status")
    row["value"], row["bound"] = st.get("value"), st.get("bound")
    if problems:
        row["verdict"] = "DISAGREE: keel's plan breaks the rules: %s" % "; ".join(problems[:3])
        row["disagree"] = True
        return row
    # keel's value in units of the instance: workload for peak, S for squares.
    if balance == "peak":
        scale_name = "utilisation"
        opt_keel = Fraction(opt, cap)
        if row["value"] is not None and abs(row["value"] - float(Fraction(plan_peak, cap))) \
                > EPS * max(1.0, abs(row["value"])):
            problems.append("stage value %.12g is not its plan's %d/%d"
                            % (row["value"], plan_peak, cap))
    else:
        scale_name, opt_keel = None, None
        for nm, f in SQUARE_SCALES:
            if row["value"] is not None and abs(row["value"] - float(f(plan_sq, cap))) <= \
                    EPS * max(1.0, abs(row["value"])):
                scale_name, opt_keel = nm, f(opt, cap)
                break
        if scale_name is None:
            problems.append("check: stage value %s matches its plan's S = %d under no "
                            "known scaling"
                            % (row["value"], plan_sq))
            scale_name, opt_keel = "load²/capacity", Fraction(opt, cap)
    row["scale"] = scale_name
    row["optimum_in_keel_units"] = float(opt_keel)
    v, b = row["value"], row["bound"]
    tol = EPS * max(1.0, abs(float(opt_keel)))
    notes = list(problems)
    if b is not None and b > float(opt_keel) + tol:
        notes.append("bound %.12g above the optimum %.12g" % (b, float(opt_keel)))
        row["disagree"] = True
    if row["plan_value"] < opt:
        notes.append("plan %d below the proven optimum %d: check the reference"
                     % (row["plan_value"], opt))
        row["disagree"] = True
    equal = row["plan_value"] == opt and v is not None and abs(v - float(opt_keel)) <= tol
    if row["status"] == "optimal":
        if equal:
            row["verdict"] = "proven optimal, equal"
        else:
            row["verdict"] = "DISAGREE: keel claims optimal at %s (plan %d), optimum %d" % (
                v, row["plan_value"], opt)
            row["disagree"] = True
    else:
        gap = (row["plan_value"] - opt) / row["plan_value"] if row["plan_value"] else 0.0
        row["gap_to_optimum"] = gap
        if row["plan_value"] == opt:
            what = "plan at the optimum"
        else:
            what = "plan %d against the optimum %d (%.3f %% above)" % (
                row["plan_value"], opt, 100.0 * (row["plan_value"] - opt) / opt)
        row["verdict"] = "%s, not proven: %s%s" % (
            row["status"], what, "" if b is None else
            "; keel's bound %.9g (%.3f %% below the optimum)" % (
                b, 100.0 * (float(opt_keel) - b) / float(opt_keel)))
    if notes:
        row["verdict"] += " [" + "; ".join(notes) + "]"
        if problems:
            row["disagree"] = True
    lift = next((x for x in stages if x.get("name") == "lift"), None)
    if balance == "peak" and lift is not None and ref.get("lift") is not None:
        row["lift_verdict"], lift_bad = judge_lift(lift, Fraction(ref["lift"]["value"], cap))
        row["disagree"] = row["disagree"] or lift_bad
    return row


def judge_lift(st, opt):
    """keel's stage 2 (lift, a utilisation it raises) against the optimum; (text, bad)."""
    v, b, status = st.get("value"), st.get("bound"), st.get("status")
    tol = EPS * max(1.0, float(opt))
    if v is None:
        return "%s, no value" % status, False
    if v > float(opt) + tol:
        return "DISAGREE: %s %.9g above the optimum %.9g" % (status, v, float(opt)), True
    if b is not None and b < float(opt) - tol:
        return "DISAGREE: keel's bound %.9g below the optimum %.9g" % (b, float(opt)), True
    if abs(v - float(opt)) <= tol:
        return ("optimal, equal" if status == "optimal" else
                "%s: at the optimum, not proven" % status), False
    if status == "optimal":
        return "DISAGREE: optimal at %.9g, optimum %.9g" % (v, float(opt)), True
    return "%s: %.9g, optimum %.9g (%.3f points below)" % (
        status, v, float(opt), 100.0 * (float(opt) - v)), False


def cmd_run(args):
    keel = os.path.abspath(args.keel)
    if not os.access(keel, os.X_OK):
        print("csplib069.py: %s is not an executable" % keel, file=sys.stderr)
        return 1
    command = " ".join(shlex.quote(a) for a in ["tests/bench/csplib069.py"] + args.argv)
    started = datetime.datetime.now().strftime("%Y-%m-%d %H:%M")
    t0 = time.monotonic()
    workdir = args.workdir or tempfile.mkdtemp(prefix="keel-csplib069-")
    os.makedirs(workdir, exist_ok=True)
    keel_copy = os.path.join(workdir, "keel-under-test")
    shutil.copy2(keel, keel_copy)
    try:
        identity = subprocess.run([keel_copy, "--version"], capture_output=True, text=True,
                                  timeout=10).stdout.strip() or "(version unknown)"
    except (OSError, subprocess.TimeoutExpired):
        identity = "(version unknown)"
    balances = ["peak", "squares"] if args.balance == "both" else [args.balance]
    only = set(args.only.split(",")) if args.only else None
    written = [w for w in write_rosters(args.data, workdir, balances)
               if only is None or w[0] in only]
    by_name = {name: inst for name, _, _, inst in instances(args.data)}
    print("rosters in %s; reference ..." % workdir, file=sys.stderr, flush=True)
    refs = {name: solve_reference(inst) for name, inst in by_name.items()
            if only is None or name in only}

    def one(item):
        name, b, path = item
        res = run_keel(keel_copy, path, args.time_limit)
        print("  %s %s: exit %s" % (name, b, res["rc"]), file=sys.stderr, flush=True)
        return item, res
    with concurrent.futures.ThreadPoolExecutor(max_workers=max(1, args.jobs)) as pool:
        raw = list(pool.map(one, written))
    rows = []
    for (name, b, path), res in raw:
        inst = by_name[name]
        row = judge_keel(inst, b, refs[name], res)
        row.update({"instance": name, "balance": b, "optimum": refs[name][b]["value"]})
        if b == "peak" and refs[name]["lift"] is not None:
            row["lift_optimum"] = refs[name]["lift"]["value"]
        rows.append(row)
    elapsed = time.monotonic() - t0
    out = ["<!-- SPDX-License-Identifier: GPL-3.0-or-later -->",
           "## keel on CSPLib problem 069 (%s, %.0f s)" % (started, elapsed), "",
           "```", command, "```", "",
           "%s (%s), --time-limit %g s, %d at once. Optimum: peak as the heaviest workload "
           "(keel's value × 105), squares as S = Σ load² (keel's value is compared in its own "
           "scale, found from its plan). Stage 2 (lift, the lightest utilisation given the "
           "peak) against its optimum from the same reference." % (
               identity, keel, args.time_limit, args.jobs), "",
           "| instance | balance | optimum | keel stage 1 | keel value | keel bound | "
           "keel plan | stage 1 s | wall | all stages | verdict | stage 2 (lift) |",
           "|" + "---|" * 12]
    for r in rows:
        out.append("| %s | %s | %s | %s | %s | %s | %s | %s | %.1fs | %s | %s | %s |" % (
            r["instance"], r["balance"], r["optimum"], r["status"] or "–",
            "–" if r["value"] is None else "%.9g" % r["value"],
            "–" if r["bound"] is None else "%.9g" % r["bound"],
            "–" if r["plan_value"] is None else r["plan_value"],
            "–" if r.get("stage_seconds") is None else "%.3f" % r["stage_seconds"],
            r["wall"], r.get("stages") or "–", r["verdict"].replace("|", "\\|"),
            r.get("lift_verdict") or "–"))
    out.append("")
    counts = {}
    for r in rows:
        key = ("proven optimal, equal" if r["verdict"] == "proven optimal, equal" else
               "bad input" if r["rc"] == 2 else "disagree" if r["disagree"] else
               "not proven / other")
        counts[key] = counts.get(key, 0) + 1
    out.append("Summary: " + ", ".join("%s %d" % kv for kv in sorted(counts.items())) + ".")
    lifts = [r["lift_verdict"] for r in rows if r.get("lift_verdict")]
    if lifts:
        kinds = {}
        for t in lifts:
            key = "optimal, equal" if t == "optimal, equal" else "disagree" \
                if t.startswith("DISAGREE") else t.split(":")[0] + " (not proven)"
            kinds[key] = kinds.get(key, 0) + 1
        out.append("Stage 2 (lift): " + ", ".join("%s %d" % kv for kv in sorted(kinds.items()))
                   + ".")
    for b in balances:
        secs = sorted(r["stage_seconds"] for r in rows
                      if r["balance"] == b and r.get("stage_seconds") is not None)
        if secs:
            out.append("Stage 1 (%s): median %.3f s, worst %.3f s over %d rosters; keel's "
                       "whole run: worst %.1f s." % (
                           b, secs[len(secs) // 2], secs[-1], len(secs),
                           max(r["wall"] for r in rows if r["balance"] == b)))
    bad_input = [r for r in rows if r["rc"] == 2]
    if bad_input:
        msgs = sorted({m.split(": ", 1)[-1] for r in bad_input for m in r["bad_input"]
                       if m.strip()})
        out.append("")
        out.append("keel refused %d of %d rosters as bad input (exit 2); the distinct "
                   "messages (file position left off):" % (len(bad_input), len(rows)))
        for m in msgs[:20]:
            out.append("- %s" % m)
    text = "\n".join(out) + "\n"
    print(text, end="")
    if args.out:
        write_file(args.out, text)
    if args.json:
        write_file(args.json, json.dumps({"command": command, "date": started, "rows": rows},
                                         indent=1) + "\n")
    if not args.workdir:
        if any(r["disagree"] for r in rows):
            print("disagreements: rosters kept in %s" % workdir, file=sys.stderr)
        else:
            shutil.rmtree(workdir, ignore_errors=True)
    if any(r["disagree"] for r in rows):
        return 1
    return 2 if bad_input and len(bad_input) == len(rows) else 0


# ------------------------------------------------------------ main

def main(argv=None):
    argv = sys.argv[1:] if argv is None else argv
    ap = argparse.ArgumentParser(description="keel on CSPLib problem 069")
    ap.add_argument("--data", default=DATA, help="the unpacked instances (default %s)" % DATA)
    sub = ap.add_subparsers(dest="cmd", required=True)
    c = sub.add_parser("convert", help="write one keel roster per instance and balance")
    c.add_argument("outdir")
    c.add_argument("--balance", choices=["peak", "squares", "both"], default="both")
    r = sub.add_parser("reference", help="the proven optima, without keel")
    r.add_argument("--out", help="write the markdown here too")
    r.add_argument("--json", help="write the results (with witness plans) here")
    r.add_argument("--whole", help="comma-separated instances for the whole-instance HiGHS "
                   "check (default: the 2-zone instances); 'none' for none")
    r.add_argument("--whole-time-limit", type=float, default=60.0,
                   help="seconds per whole-instance HiGHS solve (60)")
    r.add_argument("--no-zone-check", action="store_true",
                   help="skip the per-zone HiGHS check")
    t = sub.add_parser("selftest", help="the reference against brute force, tiny instances")
    t.add_argument("--count", type=int, default=300)
    t.add_argument("--seed", type=int, default=1)
    k = sub.add_parser("run", help="run keel on every roster against the reference")
    k.add_argument("keel")
    k.add_argument("--time-limit", type=float, default=10.0, help="keel --time-limit (10)")
    k.add_argument("--balance", choices=["peak", "squares", "both"], default="both")
    k.add_argument("--jobs", type=int, default=2, help="keel processes at once (2)")
    k.add_argument("--only", help="comma-separated instances (default all)")
    k.add_argument("--workdir", help="keep the rosters here")
    k.add_argument("--out", help="write the markdown here too")
    k.add_argument("--json", help="write the results here")
    args = ap.parse_args(argv)
    args.argv = argv
    try:
        if args.cmd == "convert":
            balances = ["peak", "squares"] if args.balance == "both" else [args.balance]
            written = write_rosters(args.data, args.outdir, balances)
            print("%d rosters written to %s" % (len(written), args.outdir))
            return 0
        if args.cmd == "reference":
            if args.whole == "none":
                args.whole = ","
            return cmd_reference(args)
        if args.cmd == "selftest":
            return cmd_selftest(args)
        return cmd_run(args)
    except FormatError as e:
        print("csplib069.py: %s" % e, file=sys.stderr)
        return 2


if __name__ == "__main__":
    sys.exit(main())
