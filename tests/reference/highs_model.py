#!/usr/bin/python3
# SPDX-License-Identifier: GPL-3.0-or-later
"""Reference model of keel's balancing stages 1 and 2, solved with HiGHS.

Source: HiGHS MILP solver through Debian's python3-scipy
(scipy.optimize.milp, scipy 1.10), used as the independent reference solver.
This file is written from keel's documented contract only (roster arithmetic
and the order of objectives), not from keel's C code.

Roster arithmetic (keel's contract):
  care(p)     = care_minutes if given, else acuity_minutes[acuity];
                plus extra_minutes[x] for each x in extras
  capacity(n) = minutes (default shift.minutes)
                - break_minutes (default shift.break_minutes, else 0)
  duty(n)     = duty_minutes or 0
  limit(n)    = min of policy.max_patients and the nurse's max_patients,
                whichever are given; none given = no limit
  eligible    : n holds every skill in p.needs and limit(n) > 0
  counted     : limit(n) > 0
  u(n)        = (duty(n) + sum of care of n's patients) / capacity(n)

Textbook model, stage 1 ("peak"): binaries x[p,n] for eligible pairs and a
continuous U;  minimise U  s.t.  sum_n x[p,n] = 1 for every patient,
sum_p x[p,n] <= limit(n), duty(n) + sum_p care(p) x[p,n] <= capacity(n) U
for every counted nurse.
Stage 2 ("lift"): the same assignment rows, each counted nurse's load held
to U* (the stage-1 value, 1e-9 tolerance), maximise L with
L capacity(n) <= duty(n) + sum_p care(p) x[p,n] for every counted nurse.

When the textbook model stops at its time share unproven, each stage goes
on with a descent over whole-minute loads (see _stage1, _stage2): the same
binaries, load rows with integer right-hand sides that demand a strictly
better value; HiGHS either finds a better incumbent or proves there is none.
This proves optimality of many rosters that the continuous U column leaves
open.  The descent never changes the optimum, only how it is proven; the
brute-force solver below checks both paths on tiny rosters.

Values reported are recomputed exactly (integer minutes, fractions) from the
rounded incumbent, so HiGHS's feasibility and integrality tolerances do not
leak into the comparison; the dual bound is HiGHS's own.  The objective is
scaled by OBJ_SCALE so that HiGHS's absolute gap tolerance (1e-6 by default,
not settable through scipy 1.10's milp) means 1e-9 in utilisation.

Trusting the reference: every incumbent HiGHS returns is rounded and checked
exactly (eligibility, limits, the stage's load rows, strict progress in the
descent); only "optimal" and "infeasible" verdicts are taken on HiGHS's word.
scipy 1.10's HiGHS gave wrong verdicts with presolve on, and with presolve
off when the continuous column had no upper bound, so presolve is off and
the column is bounded.  So configured it agreed with brute force on 600 tiny
rosters (three ways each: textbook model only, half and half, descent only)
and with itself across those three ways on 50 unit-size rosters.

Also here: an exhaustive (brute-force) solver for tiny rosters, to check the
MILP model itself, and a bipartite feasibility test used by the generator.

Usage: highs_model.py ROSTER.yaml [--time-limit SECONDS] [--model-share F]
                      [--brute-force]
prints a JSON object (stage statuses, values, bounds, the assignment).
"""

import argparse
import json
import math
import sys
import time
from fractions import Fraction

import numpy as np
import yaml

OBJ_SCALE = 1000.0
# HiGHS presolve off: the presolve in scipy 1.10's HiGHS declared feasible
# stage models infeasible (102 of 1800 tiny-roster solves) and returned
# descent solutions that break their load rows (found against brute_force());
# without presolve it agreed on all.
PRESOLVE = False
STATUS_NAMES = {0: "optimal", 1: "time_limit", 2: "infeasible", 3: "unbounded", 4: "error"}


class RosterError(Exception):
    pass


def _level_minutes(table, level):
    """acuity_minutes may be keyed by int (YAML 1 -> int) or by string."""
    if level in table:
        return table[level]
    if str(level) in table:
        return table[str(level)]
    raise RosterError("acuity %r has no minutes in policy.acuity_minutes" % (level,))


def derive(doc):
    """Turn a parsed roster (dict) into the numbers the model needs.

    Returns a dict with lists `patients` (id, care, needs), `nurses` (id,
    capacity, duty, limit (None = no limit), counted, skills) and `eligible`
    (for each patient, the indices of its eligible nurses).
    """
    shift = doc.get("shift") or {}
    policy = doc.get("policy") or {}
    acuity = policy.get("acuity_minutes") or {}
    extra = policy.get("extra_minutes") or {}
    policy_limit = policy.get("max_patients")
    nurses = []
    for n in doc.get("nurses") or []:
        minutes = n.get("minutes", shift.get("minutes"))
        brk = n.get("break_minutes", shift.get("break_minutes", 0)) or 0
        if minutes is None:
            raise RosterError("nurse %s: no minutes and no shift.minutes" % n.get("id"))
        limits = [v for v in (policy_limit, n.get("max_patients")) if v is not None]
        limit = min(limits) if limits else None
        cap = int(minutes) - int(brk)
        counted = limit is None or limit > 0
        if counted and cap <= 0:
            raise RosterError("nurse %s: capacity %d is not positive" % (n.get("id"), cap))
        nurses.append({
            "id": str(n["id"]),
            "capacity": cap,
            "duty": int(n.get("duty_minutes", 0) or 0),
            "limit": limit,
            "counted": counted,
            "skills": set(n.get("skills") or []),
        })
    patients = []
    eligible = []
    for p in doc.get("patients") or []:
        if p.get("care_minutes") is not None:
            care = int(p["care_minutes"])
        else:
            care = int(_level_minutes(acuity, p.get("acuity")))
        for x in p.get("extras") or []:
            if x not in extra:
                raise RosterError("patient %s: extra %r has no minutes" % (p.get("id"), x))
            care += int(extra[x])
        needs = set(p.get("needs") or [])
        patients.append({"id": str(p["id"]), "care": care, "needs": needs})
        eligible.append([j for j, n in enumerate(nurses)
                         if n["counted"] and needs <= n["skills"]])
    return {"patients": patients, "nurses": nurses, "eligible": eligible}


def load(path):
    with open(path, encoding="utf-8") as f:
        return derive(yaml.safe_load(f))


def assignment_feasible(r):
    """True when every patient can get an eligible nurse within the limits.

    Bipartite b-matching by augmenting paths (patients <= a few dozen).
    """
    nurses = r["nurses"]
    cap = [len(r["patients"]) if n["limit"] is None else n["limit"] for n in nurses]
    holders = [[] for _ in nurses]   # patients currently held by each nurse

    def augment(p, seen):
        # Kuhn's augmenting path, with a nurse taking up to cap[j] patients.
        for j in r["eligible"][p]:
            if j in seen:
                continue
            seen.add(j)
            if len(holders[j]) < cap[j]:
                holders[j].append(p)
                return True
            for k, q in enumerate(holders[j]):
                if augment(q, seen):
                    holders[j][k] = p
                    return True
        return False

    return all(augment(p, set()) for p in range(len(r["patients"])))


def loads_of(r, assign):
    """Integer loads (minutes) per nurse for assign[p] = nurse index."""
    loads = [n["duty"] for n in r["nurses"]]
    for p, j in enumerate(assign):
        loads[j] += r["patients"][p]["care"]
    return loads


def peak_lift(r, assign):
    """Exact (U, L) as Fractions over the counted nurses."""
    loads = loads_of(r, assign)
    us = [Fraction(loads[j], n["capacity"]) for j, n in enumerate(r["nurses"]) if n["counted"]]
    return max(us), min(us)


def check_assignment(r, assign):
    """Raise if assign breaks eligibility or a limit (guards the reference itself)."""
    counts = [0] * len(r["nurses"])
    for p, j in enumerate(assign):
        if j not in r["eligible"][p]:
            raise AssertionError("reference assigned an ineligible pair")
        counts[j] += 1
    for j, n in enumerate(r["nurses"]):
        if n["limit"] is not None and counts[j] > n["limit"]:
            raise AssertionError("reference broke a patient limit")


def _solve(c, integrality, bounds_lo, bounds_hi, rows, lo, hi, time_limit, presolve=True):
    from scipy.optimize import Bounds, LinearConstraint, milp
    from scipy.sparse import csr_matrix
    data, ri, ci = [], [], []
    for i, row in enumerate(rows):
        for col, val in row:
            ri.append(i)
            ci.append(col)
            data.append(val)
    A = csr_matrix((data, (ri, ci)), shape=(len(rows), len(c)))
    options = {"mip_rel_gap": 0.0, "presolve": bool(presolve)}
    if time_limit is not None:
        options["time_limit"] = float(time_limit)
    t0 = time.monotonic()
    res = milp(c=np.asarray(c, dtype=float), integrality=np.asarray(integrality),
               bounds=Bounds(np.asarray(bounds_lo, float), np.asarray(bounds_hi, float)),
               constraints=LinearConstraint(A, np.asarray(lo, float), np.asarray(hi, float)),
               options=options)
    return res, time.monotonic() - t0


def _dual_bound(res):
    """HiGHS's proven bound on the objective, or None.

    scipy 1.10's milp result has mip_dual_bound; older scipy has no such key
    and some statuses leave it None or infinite.
    """
    v = res.get("mip_dual_bound") if hasattr(res, "get") else None
    if v is None or not math.isfinite(v):
        return None
    return float(v)


def _incumbent(r, pairs, res):
    """The rounded assignment (nurse index per patient) or None; checked."""
    if res.x is None:
        return None
    x = np.asarray(res.x)
    assign = [None] * len(r["patients"])
    for k, (p, j) in enumerate(pairs):
        if x[k] > 0.5:
            if assign[p] is not None:
                raise AssertionError("reference incumbent gives a patient two nurses")
            assign[p] = j
    if any(a is None for a in assign):
        raise AssertionError("reference incumbent leaves a patient without a nurse")
    check_assignment(r, assign)
    return assign


class _Model:
    """Columns x[p,n] for the eligible pairs (then one continuous column when a
    stage needs U or L); rows: one nurse per patient, patient limits."""

    def __init__(self, r):
        self.r = r
        self.pairs = [(p, j) for p, elig in enumerate(r["eligible"]) for j in elig]
        self.nx = len(self.pairs)
        self.by_nurse = [[] for _ in r["nurses"]]
        by_patient = [[] for _ in r["patients"]]
        for k, (p, j) in enumerate(self.pairs):
            by_patient[p].append(k)
            self.by_nurse[j].append(k)
        self.rows, self.lo, self.hi = [], [], []
        for p in range(len(r["patients"])):
            self._row([(k, 1.0) for k in by_patient[p]], 1.0, 1.0)
        for j, n in enumerate(r["nurses"]):
            if n["limit"] is not None and len(self.by_nurse[j]) > n["limit"]:
                self._row([(k, 1.0) for k in self.by_nurse[j]], -np.inf, float(n["limit"]))
        self.counted = [j for j, n in enumerate(r["nurses"]) if n["counted"]]

    def _row(self, row, lo, hi):
        self.rows.append(row)
        self.lo.append(lo)
        self.hi.append(hi)

    def care_row(self, j):
        return [(k, float(self.r["patients"][self.pairs[k][0]]["care"]))
                for k in self.by_nurse[j]]

    def run(self, extra_rows, extra_col_cost, time_limit, col_ub=None):
        """Solve with the common rows plus extra_rows [(row, lo, hi)].

        extra_col_cost None: no continuous column (a feasibility problem);
        otherwise the continuous column (index nx, in [0, col_ub]) has that
        cost.  col_ub must be finite: with an infinite upper bound on that
        column, scipy 1.10's HiGHS (presolve off) has claimed "optimal" at
        the root for values below the optimum (found against the descent).
        """
        rows = self.rows + [e[0] for e in extra_rows]
        lo = self.lo + [e[1] for e in extra_rows]
        hi = self.hi + [e[2] for e in extra_rows]
        n = self.nx
        if extra_col_cost is None:
            c, integ, blo, bhi = [0.0] * n, [1] * n, [0.0] * n, [1.0] * n
        else:
            c = [0.0] * n + [extra_col_cost]
            assert col_ub is not None and math.isfinite(col_ub)
            integ, blo, bhi = [1] * n + [0], [0.0] * (n + 1), [1.0] * n + [float(col_ub)]
        if time_limit is not None:
            time_limit = max(time_limit, 0.01)
        res, secs = _solve(c, integ, blo, bhi, rows, lo, hi, time_limit, PRESOLVE)
        return res, STATUS_NAMES.get(res.status, "error"), _incumbent(self.r, self.pairs, res)

    def peak_ceiling(self):
        """A finite upper bound on U: every patient on the nurse least able to carry them."""
        total = sum(p["care"] for p in self.r["patients"])
        return max((self.r["nurses"][j]["duty"] + total) / self.r["nurses"][j]["capacity"]
                   for j in self.counted) + 1.0

    def load_rows(self, lo_load, hi_load):
        """Rows lo_load[j] <= duty + sum care x <= hi_load[j] for counted j."""
        out = []
        for j in self.counted:
            duty = self.r["nurses"][j]["duty"]
            lo = -np.inf if lo_load[j] is None else float(lo_load[j] - duty)
            hi = np.inf if hi_load[j] is None else float(hi_load[j] - duty)
            out.append((self.care_row(j), lo, hi))
        return out


def _checked_bound(st, value, sense):
    """The stage's proven bound, sanity-checked against its incumbent.

    A proven optimum is its own bound.  Otherwise HiGHS's dual bound must lie
    on the right side of the incumbent (sense +1: a lower bound, for U;
    -1: an upper bound, for L); HiGHS reports a dummy bound when presolve
    alone settles a model, so one on the wrong side is dropped (None).
    """
    if st["status"] == "optimal":
        return value
    b = st["bound"]
    if b is None or sense * (b - value) > 1e-9:
        return None
    return b


def _remaining(deadline):
    return None if deadline is None else deadline - time.monotonic()


def _stage1(m, time_limit, model_share):
    """Stage 1 (peak): the textbook model, then a descent that proves.

    The textbook model (minimise U) runs for model_share of the time.  If it
    stops unproven, a descent on whole-minute loads follows: with incumbent
    U, ask HiGHS for an assignment with every load < U * capacity, that is
    load <= ceil(U * capacity) - 1 (loads are whole minutes); a solution is a
    better incumbent, "infeasible" proves U optimal.  Integer right-hand sides
    let HiGHS prove what the continuous U column hides.
    """
    r = m.r
    t0 = time.monotonic()
    deadline = None if time_limit is None else t0 + time_limit
    st = {"status": "time_limit", "value": None, "value_fraction": None, "bound": None,
          "proof": None, "steps": 0}
    assign = None
    if model_share > 0:
        rows = []
        for j in m.counted:
            n = r["nurses"][j]
            rows.append((m.care_row(j) + [(m.nx, -float(n["capacity"]))],
                         -np.inf, -float(n["duty"])))
        tl = None if time_limit is None else time_limit * model_share
        res, status, assign = m.run(rows, OBJ_SCALE, tl, m.peak_ceiling())
        st["message"] = res.message
        if status == "infeasible":
            st["status"] = "infeasible"
        elif status == "optimal":
            st["status"], st["proof"] = "optimal", "model"
        elif status != "time_limit":
            st["status"] = "error"
        db = _dual_bound(res)
        if db is not None:
            st["bound"] = db / OBJ_SCALE
    if st["status"] == "time_limit" and assign is None:
        # No incumbent yet: any valid assignment starts the descent.
        res, status, assign = m.run([], None, _remaining(deadline))
        if status == "infeasible":
            st["status"] = "infeasible"
    while st["status"] == "time_limit" and assign is not None:
        left = _remaining(deadline)
        if left is not None and left <= 0.05:
            break
        U, _ = peak_lift(r, assign)
        hi = [None] * len(r["nurses"])
        for j in m.counted:
            hi[j] = math.ceil(U * r["nurses"][j]["capacity"]) - 1
        res, status, better = m.run(m.load_rows([None] * len(hi), hi), None, left)
        st["steps"] += 1
        if status == "infeasible":
            st["status"], st["proof"] = "optimal", "descent"
        elif better is not None:
            if peak_lift(r, better)[0] >= U:
                raise AssertionError("HiGHS returned a descent step that is not better")
            assign = better
        else:
            if status != "time_limit":
                st["status"] = "error"
            break
    if assign is not None:
        U, _ = peak_lift(r, assign)
        st["value"], st["value_fraction"] = float(U), str(U)
        st["bound"] = _checked_bound(st, float(U), +1)
    st["seconds"] = time.monotonic() - t0
    return st, assign


def _stage2(m, U, start, time_limit, model_share):
    """Stage 2 (lift) with every counted load held to U (1e-9 tolerance;
    loads are whole minutes, so the ceiling is a floor).  The textbook model
    maximises L; unproven, a descent asks for every load > L * capacity
    (load >= floor(L * capacity) + 1) until HiGHS says infeasible."""
    r = m.r
    t0 = time.monotonic()
    deadline = None if time_limit is None else t0 + time_limit
    hi = [None] * len(r["nurses"])
    for j in m.counted:
        cap = r["nurses"][j]["capacity"]
        hi[j] = math.floor(U * cap + Fraction(1, 10**9) * cap)
    st = {"status": "time_limit", "value": None, "value_fraction": None, "bound": None,
          "proof": None, "steps": 0}
    assign = start
    if model_share > 0:
        rows = m.load_rows([None] * len(hi), hi)
        for j in m.counted:
            n = r["nurses"][j]
            # L * cap - sum care x <= duty
            rows.append(([(k, -v) for k, v in m.care_row(j)] + [(m.nx, float(n["capacity"]))],
                         -np.inf, float(n["duty"])))
        tl = None if time_limit is None else time_limit * model_share
        # L <= U: a finite bound for the continuous column.
        res, status, found = m.run(rows, -OBJ_SCALE, tl, float(U) + 1.0)
        st["message"] = res.message
        if status == "optimal":
            st["status"], st["proof"] = "optimal", "model"
        elif status != "time_limit":
            # Infeasible cannot happen: the stage-1 incumbent meets every row.
            st["status"] = "error"
        if found is not None:
            if peak_lift(r, found)[1] >= peak_lift(r, assign)[1]:
                assign = found
        db = _dual_bound(res)
        if db is not None:
            st["bound"] = -db / OBJ_SCALE
    while st["status"] == "time_limit":
        left = _remaining(deadline)
        if left is not None and left <= 0.05:
            break
        _, L = peak_lift(r, assign)
        lo = [None] * len(hi)
        for j in m.counted:
            lo[j] = math.floor(L * r["nurses"][j]["capacity"]) + 1
        res, status, better = m.run(m.load_rows(lo, hi), None, left)
        st["steps"] += 1
        if status == "infeasible":
            st["status"], st["proof"] = "optimal", "descent"
        elif better is not None:
            U2, L2 = peak_lift(r, better)
            if L2 <= L or U2 > U:
                raise AssertionError("HiGHS returned a descent step that is not better")
            assign = better
        else:
            if status != "time_limit":
                st["status"] = "error"
            break
    U2, L = peak_lift(r, assign)
    if U2 > U:
        raise AssertionError("reference stage 2 raised the peak")
    st["value"], st["value_fraction"] = float(L), str(L)
    st["bound"] = _checked_bound(st, float(L), -1)
    st["seconds"] = time.monotonic() - t0
    return st, assign


def solve(r, time_limit=None, stage2_time_limit=None, model_share=0.1):
    """Solve stage 1 then stage 2 with HiGHS.

    time_limit / stage2_time_limit: seconds for each stage (None = none).
    model_share: the part of a stage's time given to the textbook model
    before the descent (0 = descent only; 1 = textbook model only).

    Returns {"stage1": {...}, "stage2": {...} or None, "assign": [...]}.
    Each stage has status (optimal / time_limit / infeasible / error), value
    (exact, from the incumbent; None without one), value_fraction (str),
    bound (proven: a lower bound on U* for stage 1, an upper bound on L* for
    stage 2; None when HiGHS gave none), proof (model / descent), seconds.
    """
    if stage2_time_limit is None:
        stage2_time_limit = time_limit
    out = {"stage1": None, "stage2": None, "assign": None}
    if any(not e for e in r["eligible"]):
        out["stage1"] = {"status": "infeasible", "value": None, "bound": None,
                         "proof": "no eligible nurse", "seconds": 0.0}
        return out
    m = _Model(r)
    if not m.counted:
        # No patients and no counted nurse: nothing to balance.
        out["stage1"] = {"status": "optimal", "value": None, "bound": None,
                         "proof": "empty", "seconds": 0.0}
        return out
    st1, assign = _stage1(m, time_limit, model_share)
    out["stage1"], out["assign"] = st1, assign
    if assign is None:
        return out
    st2, assign2 = _stage2(m, Fraction(st1["value_fraction"]), assign,
                           stage2_time_limit, model_share)
    out["stage2"], out["assign"] = st2, assign2
    return out


def brute_force(r, max_combinations=2_000_000):
    """Exhaustive lexicographic optimum (U*, L*) as Fractions, or None if infeasible.

    Enumerates every eligible assignment with numpy; for tiny rosters only.
    """
    elig = r["eligible"]
    if any(not e for e in elig):
        return None
    total = 1
    for e in elig:
        total *= len(e)
    if total > max_combinations:
        raise ValueError("roster too large for brute force (%d combinations)" % total)
    nn = len(r["nurses"])
    caps = np.array([n["capacity"] for n in r["nurses"]], dtype=np.int64)
    counted = np.array([n["counted"] for n in r["nurses"]])
    limits = np.array([n["limit"] if n["limit"] is not None else 10**6 for n in r["nurses"]])
    # choice[c, p] = nurse index of patient p in combination c
    grids = np.meshgrid(*[np.array(e) for e in elig], indexing="ij") if elig else []
    choice = np.stack([g.ravel() for g in grids], axis=1) if elig else np.zeros((1, 0), int)
    C = choice.shape[0]
    loads = np.tile(np.array([n["duty"] for n in r["nurses"]], dtype=np.int64), (C, 1))
    counts = np.zeros((C, nn), dtype=np.int64)
    rows = np.arange(C)
    for p, pat in enumerate(r["patients"]):
        loads[rows, choice[:, p]] += pat["care"]
        counts[rows, choice[:, p]] += 1
    ok = np.all(counts <= limits, axis=1)
    if not ok.any():
        return None
    loads, choice = loads[ok], choice[ok]
    util = loads[:, counted] / caps[counted]
    peak = util.max(axis=1)
    best = peak.min()
    # Exact tie handling: candidates within float noise, then exact fractions.
    cand = np.nonzero(peak <= best + 1e-12)[0]
    idx = np.nonzero(counted)[0]

    def exact(ci):
        return max(Fraction(int(loads[ci, j]), int(caps[j])) for j in idx), \
            min(Fraction(int(loads[ci, j]), int(caps[j])) for j in idx)

    U = min(exact(ci)[0] for ci in cand)
    mins = util.min(axis=1)
    lift_cand = np.nonzero(peak <= float(U) + 1e-12)[0]
    top = mins[lift_cand].max()
    L = max(exact(ci)[1] for ci in lift_cand[mins[lift_cand] >= top - 1e-12]
            if exact(ci)[0] <= U)
    return U, L


def main(argv=None):
    ap = argparse.ArgumentParser(description="Solve keel's stages 1-2 with HiGHS")
    ap.add_argument("roster")
    ap.add_argument("--time-limit", type=float, default=None,
                    help="seconds per stage (default: none)")
    ap.add_argument("--model-share", type=float, default=0.1,
                    help="part of each stage's time for the textbook model (default 0.1)")
    ap.add_argument("--brute-force", action="store_true",
                    help="also solve by enumeration (tiny rosters only)")
    args = ap.parse_args(argv)
    r = load(args.roster)
    res = solve(r, args.time_limit, model_share=args.model_share)
    if res["assign"] is not None:
        res["assign"] = {r["patients"][p]["id"]: r["nurses"][j]["id"]
                         for p, j in enumerate(res["assign"])}
    if args.brute_force:
        bf = brute_force(r)
        res["brute_force"] = None if bf is None else {"U": str(bf[0]), "L": str(bf[1]),
                                                      "U_float": float(bf[0]),
                                                      "L_float": float(bf[1])}
    json.dump(res, sys.stdout, indent=1, default=str)
    print()
    return 0


if __name__ == "__main__":
    sys.exit(main())
