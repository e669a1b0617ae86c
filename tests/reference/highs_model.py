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
                - break_minutes (default shift.break_minutes when the nurse is
                  on for at least half the shift, else 0)
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
to her level (U*, or her rank's level: floor(level * capacity) minutes),
maximise L with
L capacity(n) <= duty(n) + sum_p care(p) x[p,n] for every counted nurse.
Stage ranks (between them, only on a proven peak; see ranks() below,
written from docs/model.md "Stage ranks"): the nurses pinned at U* are
held there, the heaviest of the others goes as low as it can, and so on;
stage 2 then holds each counted nurse within her level instead of U*, and
the windows of stages 3 and 4 start from the levels.

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

The second half of the file (from "The roster rules and the later stages")
models the roster rules (ratio table, patient ratios, high acuity,
isolation, zones, previous nurse) and stages 1-4, with its own brute force;
check_rules.py uses it.  check_clock.py builds its clock model on the same
MILP class and count rows (_Milp.count_rows, count_breaks) and solves its
stages 1 and 2 with the same descent (run_balance, feasible_model).

Usage: highs_model.py ROSTER.yaml [--time-limit SECONDS] [--model-share F]
                      [--brute-force] [--rules]
prints a JSON object (stage statuses, values, bounds, the assignment);
--rules solves with the roster rules and all four stages.
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
        if minutes is None:
            raise RosterError("nurse %s: no minutes and no shift.minutes" % n.get("id"))
        brk = n.get("break_minutes")
        if brk is None:
            # The shift's break, for a nurse on for at least half the shift
            # (docs/roster-format.md, "break_minutes").
            brk = shift.get("break_minutes", 0) or 0
            if 2 * int(minutes) < int(shift.get("minutes") or 0):
                brk = 0
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


def loads_of(r, assign, key="patients"):
    """Integer loads (minutes) per nurse for assign[p] = nurse index of
    r[key][p] (patients; the clock's parts)."""
    loads = [n["duty"] for n in r["nurses"]]
    for p, j in enumerate(assign):
        loads[j] += r[key][p]["care"]
    return loads


def peak_lift(r, assign, key="patients"):
    """Exact (U, L) as Fractions over the counted nurses."""
    loads = loads_of(r, assign, key)
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


def _stage2(m, U, start, time_limit, model_share, levels=None):
    """Stage 2 (lift) with every counted load held to its level: U for
    everyone, or levels[j] after the ranks (loads are whole minutes, so the
    ceiling is floor(level * capacity)).  The textbook model maximises L;
    unproven, a descent asks for every load > L * capacity (load >=
    floor(L * capacity) + 1) until HiGHS says infeasible."""
    r = m.r
    t0 = time.monotonic()
    deadline = None if time_limit is None else t0 + time_limit
    hi = [None] * len(r["nurses"])
    for j in m.counted:
        cap = r["nurses"][j]["capacity"]
        hi[j] = math.floor((U if levels is None else levels[j]) * cap)
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
            if any(x > h for x, h in zip(loads_of(r, found), hi) if h is not None):
                raise AssertionError("reference stage 2 incumbent breaks a level")
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
            _, L2 = peak_lift(r, better)
            if L2 <= L or any(x > h for x, h in zip(loads_of(r, better), hi) if h is not None):
                raise AssertionError("HiGHS returned a descent step that is not better")
            assign = better
        else:
            if status != "time_limit":
                st["status"] = "error"
            break
    _, L = peak_lift(r, assign)
    if any(x > h for x, h in zip(loads_of(r, assign), hi) if h is not None):
        raise AssertionError("reference stage 2 broke a level")
    st["value"], st["value_fraction"] = float(L), str(L)
    st["bound"] = _checked_bound(st, float(L), -1)
    st["seconds"] = time.monotonic() - t0
    return st, assign


def solve(r, time_limit=None, stage2_time_limit=None, model_share=0.1):
    """Solve stage 1 then stage 2 with HiGHS.

    time_limit / stage2_time_limit: seconds for each stage (None = none).
    model_share: the part of a stage's time given to the textbook model
    before the descent (0 = descent only; 1 = textbook model only).

    Returns {"stage1": {...}, "ranks": {...} (see ranks(); only with stage 1
    proven), "stage2": {...} or None, "assign": [...]}.
    Each stage has status (optimal / time_limit / infeasible / error), value
    (exact, from the incumbent; None without one), value_fraction (str),
    bound (proven: a lower bound on U* for stage 1, an upper bound on L* for
    stage 2; None when HiGHS gave none), proof (model / descent), seconds.
    """
    if stage2_time_limit is None:
        stage2_time_limit = time_limit
    out = {"stage1": None, "ranks": None, "stage2": None, "assign": None}
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
    U = Fraction(st1["value_fraction"])
    levels = None
    if st1["status"] == "optimal":
        # Stage ranks (docs/model.md): only on a proven peak.
        def ask(hi, seconds):
            res, status, a = m.run(m.load_rows([None] * len(r["nurses"]),
                                               [hi.get(j) for j in range(len(r["nurses"]))]),
                                   None, seconds)
            return status, a
        def minmax(hi, free, seconds):
            rows = m.load_rows([None] * len(r["nurses"]),
                               [hi.get(j) for j in range(len(r["nurses"]))])
            for j in free:
                n = r["nurses"][j]
                rows.append((m.care_row(j) + [(m.nx, -float(n["capacity"]))],
                             -np.inf, -float(n["duty"])))
            return m.run(rows, OBJ_SCALE, seconds, float(U) + 1.0)[2]
        rk = ranks(r, ask, U, assign, time_limit, minmax=minmax)
        out["ranks"] = rk
        levels, assign = rk["levels"], rk["assign"]
    st2, assign2 = _stage2(m, U, assign, stage2_time_limit, model_share, levels)
    out["stage2"], out["assign"] = st2, assign2
    return out


# ======================================================================
# Stage ranks: balance beyond a pinned peak
# ======================================================================
#
# Source: keel's docs/model.md, "Objectives, in order" and "Stage ranks:
# balance beyond a pinned peak" (the contract; not keel's C code).  With U*
# proven:
#   V = U*; every counted nurse free, each held at most V.
#   while two or more nurses are free:
#     a free nurse at V in the plan is pinned when no valid plan with every
#     held nurse at most her level, every free one at most V, has her
#     strictly below V (a feasibility question HiGHS answers "infeasible");
#     none pinned: stop; pinned ones are held at V for good; none free: stop;
#     V' = the least heaviest utilisation of the free nurses over the plans
#     that keep the levels (a descent: a plan with every free load
#     <= ceil(v cap) - 1 until HiGHS says infeasible); V' = V: stop; V = V'.
#   Afterwards level(n) = her pinned level, else the last V; the "rest" (the
#   heaviest of the free nurses) is reported when some nurse is pinned and
#   some are free.
# Loads are whole minutes, so "u(n) <= V" is load <= floor(V cap(n)) and
# "u(n) < V" is load <= ceil(V cap(n)) - 1, exactly.  Only HiGHS's
# "infeasible" verdicts are taken as proofs; every plan it returns is
# checked exactly against the rows asked for.


def ranks(r, ask, U, start, time_limit, key="patients", minmax=None):
    """The ranks of roster r from the proven U* and a plan start with
    every counted nurse at most U*.

    ask(hi, seconds) -> (HiGHS status, plan or None): a valid plan with
    every counted nurse j's load (duty + care) at most hi[j], the plan
    already checked against the hard rules.  minmax(hi, free, seconds) ->
    plan or None (optional): HiGHS's textbook model of V' (minimise t with
    every free load <= t cap, the same rows hi), run for half of the time
    left before the descent; its plan is only a better start for the
    descent, which alone proves V'.  Returns {"status": optimal /
    time_limit (a question or the descent ran out of time: nothing after
    it is proven), "pinned": [(nurse index, level)] in rank order, "rest":
    the last V or None, "levels": {counted j: level}, "assign": a plan that
    keeps the levels, "questions", "steps", "seconds"}.
    """
    t0 = time.monotonic()
    deadline = None if time_limit is None else t0 + time_limit
    nurses = r["nurses"]
    counted = [j for j, n in enumerate(nurses) if n["counted"]]
    level, free = {}, set(counted)
    V, plan = U, start
    out = {"status": "optimal", "pinned": [], "rest": None, "levels": None,
           "questions": 0, "steps": 0}

    def u(a, j):
        return Fraction(loads_of(r, a, key)[j], nurses[j]["capacity"])

    def rows(v_free, fn):
        hi = {j: math.floor(lv * nurses[j]["capacity"]) for j, lv in level.items()}
        for j in free:
            hi[j] = fn(v_free, nurses[j]["capacity"])
        return hi

    def at_most(v, cap):
        return math.floor(v * cap)

    def below(v, cap):
        return math.ceil(v * cap) - 1

    def checked(a, hi):
        loads = loads_of(r, a, key)
        if any(loads[j] > h for j, h in hi.items()):
            raise AssertionError("reference ranks plan breaks its load rows")
        return a

    def left():
        return None if deadline is None else deadline - time.monotonic()

    if any(u(plan, j) > U for j in counted):
        raise AssertionError("reference ranks: the start plan is above U*")
    while len(free) >= 2 and out["status"] == "optimal":
        new = []
        for j in sorted(free):
            if u(plan, j) != V:
                continue            # below V in a plan that keeps the levels
            hi = rows(V, at_most)
            hi[j] = below(V, nurses[j]["capacity"])
            out["questions"] += 1
            if hi[j] < nurses[j]["duty"]:
                new.append(j)       # her duty alone keeps her at V or above
                continue
            if left() is not None and left() <= 0.05:
                out["status"] = "time_limit"
                break
            status, a = ask(hi, left())
            if a is not None:
                checked(a, hi)      # a plan has her below V: not pinned
            elif status == "infeasible":
                new.append(j)
            else:
                out["status"] = "time_limit"
                break
        if out["status"] != "optimal" or not new:
            break
        for j in new:
            level[j] = V
            free.discard(j)
            out["pinned"].append((j, V))
        if not free:
            break
        # V': the least heaviest of the free nurses, held ones at their levels.
        if minmax is not None:
            hi = rows(V, at_most)
            a = minmax(hi, sorted(free), None if left() is None else left() / 2)
            if a is not None and max(u(checked(a, hi), j) for j in free) \
                    < max(u(plan, j) for j in free):
                plan = a
        while True:
            v = max(u(plan, j) for j in free)
            if left() is not None and left() <= 0.05:
                out["status"] = "time_limit"
                break
            hi = rows(v, below)
            status, a = ask(hi, left())
            out["steps"] += 1
            if a is not None:
                plan = checked(a, hi)
            elif status == "infeasible":
                break
            else:
                out["status"] = "time_limit"
                break
        if v == V:
            break
        V = v
    if out["pinned"] and free:
        out["rest"] = V
    out["levels"] = {j: level.get(j, V) for j in counted}
    out["assign"] = plan
    out["seconds"] = time.monotonic() - t0
    return out


def level_ceilings(r, levels):
    """Whole-minute load ceilings floor(level(n) cap(n)) of the counted
    nurses (every u(n) <= level(n))."""
    return {j: math.floor(lv * r["nurses"][j]["capacity"]) for j, lv in levels.items()}


def ranks_by_enumeration(loads, caps, counted):
    """The peak, the ranks and the lift over every valid plan, by their
    definitions (docs/model.md, "Stage ranks"), exactly.

    loads: an integer array, one row of loads (duty + care) per valid plan
    (at least one); caps: capacities; counted: a bool per nurse.  Returns
    {"U", "pinned": [(j, level)] (nurse order within a level), "rest",
    "levels", "L"} (Fractions).
    """
    loads = np.asarray(loads, dtype=np.int64)
    caps = [int(c) for c in caps]
    cols = [j for j in range(len(caps)) if counted[j]]

    def within(mask, who, v):
        # every nurse of `who` at most v, exactly: load * den <= num * cap
        ok = mask.copy()
        for j in who:
            ok &= loads[:, j] * v.denominator <= v.numerator * caps[j]
        return ok

    def least_top(mask, who):
        # min over the plans of mask of max over who of load / cap, exact:
        # floats pick the candidates (distinct fractions with capacities up
        # to 1440 differ by more than 4e-7), fractions decide.
        f = np.max(loads[:, who] / np.array([caps[j] for j in who], float), axis=1)
        f = np.where(mask, f, np.inf)
        cand = np.nonzero(f <= f.min() + 1e-9)[0]
        return min(max(Fraction(int(loads[i, j]), caps[j]) for j in who) for i in cand)

    everyone = np.ones(loads.shape[0], dtype=bool)
    U = least_top(everyone, cols)
    kept = within(everyone, cols, U)
    V, free, level, pinned = U, list(cols), {}, []
    while len(free) >= 2:
        new = [j for j in free
               if np.all(loads[kept, j] * V.denominator == V.numerator * caps[j])]
        if not new:
            break
        for j in new:
            level[j] = V
            pinned.append((j, V))
        free = [j for j in free if j not in new]
        if not free:
            break
        V = least_top(kept, free)
        kept = within(kept, free, V)
    levels = {j: level.get(j, V) for j in cols}
    # The lift: the most lightest over the plans that keep every level
    # (kept is exactly those).
    f = np.min(loads[:, cols] / np.array([caps[j] for j in cols], float), axis=1)
    f = np.where(kept, f, -np.inf)
    cand = np.nonzero(f >= f.max() - 1e-9)[0]
    L = max(min(Fraction(int(loads[i, j]), caps[j]) for j in cols) for i in cand)
    return {"U": U, "pinned": pinned, "rest": V if pinned and free else None,
            "levels": levels, "L": L}


def brute_force(r, max_combinations=2_000_000):
    """Exhaustive optimum (U*, L*, ranks) by enumeration, or None if
    infeasible: U* and the lift L* (every nurse within her level) as
    Fractions, ranks as ranks_by_enumeration() gives them.

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
    rk = ranks_by_enumeration(loads[ok], caps, counted)
    return rk["U"], rk["L"], rk


# ======================================================================
# The roster rules and the later stages (docs: keel's rules spec)
# ======================================================================
#
# Everything below is written from the specification of keel's roster rules
# (ratio table, patient ratios, high acuity, isolation, zones, previous
# nurse) and its four lexicographic stages, not from keel's C code.
#
# Hard rules of an assignment (each patient to one nurse):
#   eligible(p, n): limit(n) > 0; n holds p's needs plus the isolation_needs
#                   of p's isolation; n not in p's avoid; a locked p only to
#                   its nurse
#   1 one eligible nurse per patient      2 count(n) <= limit(n)
#   3 count(n) <= N for each "1:N" patient of n
#   4 high-acuity patients of n <= K      5 no nurse with a protective and a
#                                           contact/droplet/airborne patient
#   6 distinct zones of n <= max_zones
# Stages: 1 peak U* = min max u; ranks (ranks() above) give each counted
#   nurse a level (U* without a pinned nurse); 2 lift L* = max min u with
#   u(n) <= level(n);
#   3 continuity: max kept within the windows
#       load(n) <= floor((level(n) + tol) cap(n)), load(n) >= ceil((L* - tol) cap(n));
#   4 proximity: same windows, kept >= count*; min Z (sum over nurses of
#       distinct zones), then min R (distinct rooms).
#
# The MILP (HiGHS through scipy.optimize.milp, presolve off, every column
# bounded; see the notes at the top of this file) uses binaries x[p,n] for
# eligible pairs and, where a rule needs them, binaries y[n] (n has a
# protective patient), z[n,zone] >= x[p,n] and w[n,room] >= x[p,n].  Each
# stage runs the textbook objective for part of its time and then a descent
# on the stage's whole-number measure (whole-minute loads, kept, Z, R): HiGHS
# must find a strictly better assignment or prove there is none.  Only
# HiGHS's "infeasible" verdicts on such feasibility problems count as proofs
# (the textbook model's "optimal" is a claim the descent confirms; see
# _run_stage).  Every incumbent is rounded and checked against the hard
# rules and the stage's holds by violations() and the stage's own test,
# exactly.
#
# brute_force_rules() enumerates every assignment of a tiny roster and keeps
# those violations() passes: no MILP rows at all, only the eligibility test
# (pair_violations) is shared with the MILP's columns.

# Per-nurse maximum patients by unit type under ratio_table: california.
# Source: California Code of Regulations, Title 22, §70217(a) (critical care
# 1:2, step-down 1:3, telemetry 1:4, medical-surgical 1:5).
CALIFORNIA_TABLE = {"icu": 2, "step-down": 3, "telemetry": 4, "med-surg": 5}
INFECTIOUS = ("contact", "droplet", "airborne")
ISOLATION_KINDS = INFECTIOUS + ("protective",)
RULE_NAMES = ("skill", "patient_limit", "patient_ratio", "law_limit", "high_acuity",
              "isolation", "zones", "lock", "avoid")


def _ratio_n(text, pid):
    """'1:N' -> N (1-99)."""
    if not isinstance(text, str) or not text.startswith("1:") or not text[2:].isdigit():
        raise RosterError("patient %s: ratio %r is not '1:N'" % (pid, text))
    n = int(text[2:])
    if not 1 <= n <= 99:
        raise RosterError("patient %s: ratio %r out of range" % (pid, text))
    return n


def _decimal(value):
    """The decimal the roster gives, as an exact Fraction (0.05 -> 1/20)."""
    if isinstance(value, bool) or not isinstance(value, (int, float)):
        raise RosterError("balance_tolerance %r is not a number" % (value,))
    return Fraction(str(value))


def ratio_table(policy, unit):
    """(the table's per-nurse number or None, looser(value, what)): looser
    raises RosterError for a limit above the table's number.  Checks the
    unit's and the roles' limits; raises for a table keel does not know."""
    table = None
    if policy.get("ratio_table") is not None:
        if policy["ratio_table"] != "california":
            raise RosterError("unknown ratio_table %r" % policy["ratio_table"])
        if unit.get("type") not in CALIFORNIA_TABLE:
            raise RosterError("ratio_table california needs unit.type in %s, not %r"
                              % (sorted(CALIFORNIA_TABLE), unit.get("type")))
        table = CALIFORNIA_TABLE[unit["type"]]

    def looser(value, what):
        if table is not None and value is not None and value > table:
            raise RosterError("%s %d is looser than the table's %d" % (what, value, table))

    looser(policy.get("max_patients"), "policy.max_patients")
    for role, spec in (policy.get("roles") or {}).items():
        looser((spec or {}).get("max_patients"), "policy.roles.%s.max_patients" % role)
    return table, looser


def derive_rules(doc, relax=()):
    """The numbers of a roster with the new rules.

    relax: rule names (RULE_NAMES) to switch off, for the generator's test
    that one rule alone makes a roster infeasible ("skill" drops needs and
    isolation needs; "patient_limit" drops policy, role and own limits;
    "law_limit" drops the table; "isolation" turns separation off).
    Raises RosterError for what the spec calls an input error (a limit
    looser than the table, ratio_table without a table unit type, ...).
    """
    relax = set(relax)
    shift = doc.get("shift") or {}
    policy = doc.get("policy") or {}
    unit = doc.get("unit") or {}
    acuity = policy.get("acuity_minutes") or {}
    extra = policy.get("extra_minutes") or {}
    roles = policy.get("roles") or {}
    table, looser = ratio_table(policy, unit)

    nurses = []
    index = {}
    for n in doc.get("nurses") or []:
        nid = str(n["id"])
        role = n.get("role", "staff")
        rspec = roles.get(role) or {}
        minutes = n.get("minutes", shift.get("minutes"))
        brk = n.get("break_minutes", shift.get("break_minutes", 0)) or 0
        looser(n.get("max_patients"), "nurse %s max_patients" % nid)
        limits = []
        if "patient_limit" not in relax:
            limits += [v for v in (policy.get("max_patients"), rspec.get("max_patients"),
                                   n.get("max_patients")) if v is not None]
        if role == "orientee":
            limits.append(0)
        # The rule a count above the limit breaks (for messages): the law
        # when the table's number is below every other limit.
        limit_rule = "patient_limit"
        if table is not None and "law_limit" not in relax:
            if all(v > table for v in limits):
                limit_rule = "law_limit"
            limits.append(table)
        limit = min(limits) if limits else None
        duty = n.get("duty_minutes")
        if duty is None:
            duty = rspec.get("duty_minutes", 0) or 0
        cap = int(minutes) - int(brk)
        counted = limit is None or limit > 0
        if counted and cap <= 0:
            raise RosterError("nurse %s: capacity %d is not positive" % (nid, cap))
        index[nid] = len(nurses)
        nurses.append({"id": nid, "role": role, "capacity": cap, "duty": int(duty),
                       "limit": limit, "limit_rule": limit_rule, "counted": counted,
                       "skills": set(n.get("skills") or [])})

    iso_needs = policy.get("isolation_needs") or {}
    ha = policy.get("high_acuity")
    tol = _decimal(policy.get("balance_tolerance", 0.05))
    if not 0 <= tol <= 1:
        raise RosterError("balance_tolerance %s out of range" % tol)
    max_zones = policy.get("max_zones")
    patients = []
    for p in doc.get("patients") or []:
        pid = str(p["id"])
        if p.get("care_minutes") is not None:
            care = int(p["care_minutes"])
        else:
            care = int(_level_minutes(acuity, p.get("acuity")))
        for x in p.get("extras") or []:
            if x not in extra:
                raise RosterError("patient %s: extra %r has no minutes" % (pid, x))
            care += int(extra[x])
        iso = p.get("isolation")
        if iso is not None and iso not in ISOLATION_KINDS:
            raise RosterError("patient %s: isolation %r" % (pid, iso))
        needs = set(p.get("needs") or [])
        if iso is not None:
            needs |= set(iso_needs.get(iso) or [])
        ratio = None
        if p.get("ratio") is not None:
            ratio = _ratio_n(p["ratio"], pid)
            looser(ratio, "patient %s ratio" % pid)
        lock = None
        if p.get("lock"):
            if p.get("nurse") not in index:
                raise RosterError("patient %s: locked without a nurse on the roster" % pid)
            lock = index[p["nurse"]]
        avoid = set()
        for a in p.get("avoid") or []:
            if a not in index:
                raise RosterError("patient %s: avoid names no nurse %r" % (pid, a))
            avoid.add(index[a])
        if lock is not None and lock in avoid:
            raise RosterError("patient %s: locked to a nurse it avoids" % pid)
        prev_id = p.get("previous_nurse")
        patients.append({
            "id": pid, "care": care, "needs": needs, "isolation": iso,
            "ratio": ratio,
            "high": ha is not None and p.get("acuity") is not None
            and int(p["acuity"]) >= int(ha["level"]),
            "zone": None if p.get("zone") is None else str(p["zone"]),
            "room": None if p.get("room") is None else str(p["room"]),
            "prev_id": None if prev_id is None else str(prev_id),
            "prev": index.get(None if prev_id is None else str(prev_id)),
            "lock": lock, "avoid": avoid,
        })
    r = {
        "nurses": nurses, "patients": patients, "table": table,
        "ratios": "patient_ratio" not in relax,
        "high_max": None if ha is None or "high_acuity" in relax else int(ha["max_per_nurse"]),
        "separation": bool(policy.get("isolation_separation", True))
        and "isolation" not in relax,
        "max_zones": None if max_zones is None or "zones" in relax else int(max_zones),
        "use_needs": "skill" not in relax, "use_avoid": "avoid" not in relax,
        "use_lock": "lock" not in relax,
        "tol": tol,
    }
    r["stage3"] = any(p["prev"] is not None for p in patients)
    r["stage4"] = any(p["zone"] is not None or p["room"] is not None for p in patients)
    r["candidates"] = sum(1 for p in patients if p["prev"] is not None)
    r["eligible"] = [[j for j in range(len(nurses)) if not pair_violations(r, i, j)]
                     for i in range(len(patients))]
    return r


def load_rules(path, relax=()):
    with open(path, encoding="utf-8") as f:
        return derive_rules(yaml.safe_load(f), relax)


def pair_violations(r, p, j):
    """Rule names that forbid patient p with nurse j on their own (eligibility)."""
    pat, n = r["patients"][p], r["nurses"][j]
    out = []
    if not n["counted"]:
        out.append("patient_limit")
    if r["use_needs"] and not pat["needs"] <= n["skills"]:
        out.append("skill")
    if r["use_avoid"] and j in pat["avoid"]:
        out.append("avoid")
    if r["use_lock"] and pat["lock"] is not None and pat["lock"] != j:
        out.append("lock")
    return out


def violations(r, assign):
    """Every hard rule assign (nurse index per patient) breaks: [(rule, text)]."""
    out = []
    nn = len(r["nurses"])
    mine = [[] for _ in range(nn)]
    for p, j in enumerate(assign):
        if j is None or not 0 <= j < nn:
            out.append(("assignment", "patient %s has no nurse" % r["patients"][p]["id"]))
            continue
        mine[j].append(p)
        for rule in pair_violations(r, p, j):
            out.append((rule, "patient %s with nurse %s" % (r["patients"][p]["id"],
                                                             r["nurses"][j]["id"])))
    for j, n in enumerate(r["nurses"]):
        if mine[j]:
            out += [(rule, "nurse %s %s" % (n["id"], text))
                    for rule, text in count_breaks(r, n, [r["patients"][p] for p in mine[j]])]
    return out


def count_breaks(r, n, held):
    """The count rules (2-6) nurse n breaks holding the patients `held`
    together: [(rule, text after the nurse's id)]."""
    out = []
    c = len(held)
    if n["limit"] is not None and c > n["limit"]:
        out.append((n.get("limit_rule", "patient_limit"),
                    "has %d patients, limit %d" % (c, n["limit"])))
    if r.get("ratios", True):
        for pat in held:
            if pat["ratio"] is not None and c > pat["ratio"]:
                out.append(("patient_ratio", "has %d patients, %s is 1:%d"
                            % (c, pat["id"], pat["ratio"])))
    if r["high_max"] is not None:
        h = sum(1 for pat in held if pat["high"])
        if h > r["high_max"]:
            out.append(("high_acuity", "has %d high-acuity patients, at most %d"
                        % (h, r["high_max"])))
    if r["separation"]:
        kinds = {pat["isolation"] for pat in held}
        if "protective" in kinds and kinds & set(INFECTIOUS):
            out.append(("isolation", "has protective and infectious patients"))
    if r["max_zones"] is not None:
        zones = {pat["zone"] for pat in held} - {None}
        if len(zones) > r["max_zones"]:
            out.append(("zones", "covers %d zones, at most %d" % (len(zones), r["max_zones"])))
    return out


def windows(r, U, L, tol, levels=None):
    """Per counted nurse (lo, hi) load windows of stages 3 and 4, exact:
    hi from her level (levels[j] after the ranks, else U), lo from L.
    Source: docs/model.md, "Objectives, in order": care(n) <=
    floor((level(n) + t) capacity(n)) - duty(n), care(n) >=
    ceil((L* - t) capacity(n)) - duty(n) (here as loads, duty included)."""
    out = {}
    for j, n in enumerate(r["nurses"]):
        if n["counted"]:
            top = U if levels is None else levels[j]
            out[j] = (math.ceil((L - tol) * n["capacity"]),
                      math.floor((top + tol) * n["capacity"]))
    return out


def outside_windows(r, assign, win):
    loads = loads_of(r, assign)
    return [j for j, (lo, hi) in win.items() if not lo <= loads[j] <= hi]


def kept_of(r, assign):
    return sum(1 for p, j in enumerate(assign)
               if r["patients"][p]["prev"] is not None and r["patients"][p]["prev"] == j)


def proximity_of(r, assign):
    """(Z, R): sums over nurses of distinct zones and distinct rooms."""
    zones, rooms = set(), set()
    for p, j in enumerate(assign):
        pat = r["patients"][p]
        if pat["zone"] is not None:
            zones.add((j, pat["zone"]))
        if pat["room"] is not None:
            rooms.add((j, pat["room"]))
    return len(zones), len(rooms)


class _Milp:
    """Columns (bounded, binary or continuous) and rows for scipy's milp."""

    def __init__(self):
        self.clo, self.chi, self.cint = [], [], []
        self.rows, self.rlo, self.rhi = [], [], []

    def col(self, lo=0.0, hi=1.0, integer=True):
        assert math.isfinite(lo) and math.isfinite(hi)   # every column bounded
        self.clo.append(float(lo))
        self.chi.append(float(hi))
        self.cint.append(1 if integer else 0)
        return len(self.clo) - 1

    def row(self, terms, lo=-np.inf, hi=np.inf):
        self.rows.append(list(terms))
        self.rlo.append(float(lo))
        self.rhi.append(float(hi))

    def solve(self, cost, time_limit):
        c = [0.0] * len(self.clo)
        for k, v in cost.items():
            c[k] += v
        if time_limit is not None:
            time_limit = max(time_limit, 0.01)
        res, _ = _solve(c, self.cint, self.clo, self.chi, self.rows, self.rlo, self.rhi,
                        time_limit, PRESOLVE)
        return res, STATUS_NAMES.get(res.status, "error")

    def assignment(self, res):
        """The rounded assignment of a HiGHS result (nurse index per item of
        self.r[self.items], given by the columns self.xof[(item, nurse)]),
        or None."""
        if res.x is None:
            return None
        x = np.asarray(res.x)
        assign = [None] * len(self.r[self.items])
        for (p, j), k in self.xof.items():
            if x[k] > 0.5:
                if assign[p] is not None:
                    raise AssertionError("reference incumbent gives a %s two nurses"
                                         % self.items[:-1])
                assign[p] = j
        return assign

    def count_rows(self, ks, held, limit):
        """Rules 2-5 on columns ks that one nurse may hold together;
        held[i] is the patient of ks[i] (ratio, high, isolation), self.r
        the roster (high_max, separation, ratios).  Returns the count cap."""
        r = self.r
        cmax = len(ks) if limit is None else min(limit, len(ks))
        if cmax < len(ks):
            self.row([(k, 1.0) for k in ks], hi=cmax)                          # rule 2
        for kp, pat in zip(ks, held):
            q = pat["ratio"] if r.get("ratios", True) else None
            if q is not None and q < cmax:
                # count(j) + (cmax - q) x[p,j] <= cmax                         # rule 3
                self.row([(k, 1.0) for k in ks if k != kp] + [(kp, 1.0 + cmax - q)], hi=cmax)
        if r["high_max"] is not None:
            hk = [k for k, pat in zip(ks, held) if pat["high"]]
            if len(hk) > r["high_max"]:
                self.row([(k, 1.0) for k in hk], hi=r["high_max"])            # rule 4
        if r["separation"]:
            prot = [k for k, pat in zip(ks, held) if pat["isolation"] == "protective"]
            inf = [k for k, pat in zip(ks, held) if pat["isolation"] in INFECTIOUS]
            if prot and inf:
                y = self.col()                                                 # rule 5
                for k in prot:
                    self.row([(k, 1.0), (y, -1.0)], hi=0.0)
                for k in inf:
                    self.row([(k, 1.0), (y, 1.0)], hi=1.0)
        return cmax


class RulesModel(_Milp):
    """The hard rules as a MILP; zone / room indicator columns on request."""

    items = "patients"

    def __init__(self, r, zone_cols=False, room_cols=False):
        super().__init__()
        self.r = r
        nn = len(r["nurses"])
        self.pairs = [(p, j) for p, elig in enumerate(r["eligible"]) for j in elig]
        self.xof = {}
        self.by_nurse = [[] for _ in range(nn)]
        by_patient = [[] for _ in r["patients"]]
        for p, j in self.pairs:
            k = self.col()
            self.xof[(p, j)] = k
            by_patient[p].append(k)
            self.by_nurse[j].append(k)
        self.counted = [j for j, n in enumerate(r["nurses"]) if n["counted"]]
        for p in range(len(r["patients"])):
            self.row([(k, 1.0) for k in by_patient[p]], 1.0, 1.0)          # rule 1
        for j, n in enumerate(r["nurses"]):
            held = [r["patients"][p] for p, jj in self.pairs if jj == j]
            self.count_rows(self.by_nurse[j], held, n["limit"])
        self.zof = {}
        if zone_cols or r["max_zones"] is not None:
            self.zof = self._indicators("zone")
            if r["max_zones"] is not None:
                for j in range(nn):
                    zs = [k for (jj, _), k in self.zof.items() if jj == j]
                    if len(zs) > r["max_zones"]:
                        self.row([(k, 1.0) for k in zs], hi=r["max_zones"])   # rule 6
        self.wof = self._indicators("room") if room_cols else {}
        self.keep = [self.xof[(p, pat["prev"])] for p, pat in enumerate(r["patients"])
                     if pat["prev"] is not None and (p, pat["prev"]) in self.xof]

    def _indicators(self, key):
        """Binary v[j, place] >= x[p, j] for every patient p at that place."""
        out = {}
        for (p, j), k in self.xof.items():
            place = self.r["patients"][p][key]
            if place is None:
                continue
            if (j, place) not in out:
                out[(j, place)] = self.col()
            self.row([(k, 1.0), (out[(j, place)], -1.0)], hi=0.0)
        return out

    def care_terms(self, j):
        return [(self.xof[(p, jj)], float(self.r["patients"][p]["care"]))
                for p, jj in self.pairs if jj == j]

    def load_rows(self, lo_load, hi_load):
        """lo_load[j] <= duty + care of j <= hi_load[j] (None = open) for counted j."""
        for j in self.counted:
            duty = self.r["nurses"][j]["duty"]
            lo = lo_load.get(j)
            hi = hi_load.get(j)
            self.row(self.care_terms(j), -np.inf if lo is None else float(lo - duty),
                     np.inf if hi is None else float(hi - duty))

    def window_rows(self, win):
        self.load_rows({j: w[0] for j, w in win.items()}, {j: w[1] for j, w in win.items()})



class _Stage:
    """One lexicographic stage: what it holds, its measure, its objective.

    build(): a RulesModel with the earlier stages' holds;  holds(a): exact
    test of those holds;  value(a): the stage's exact measure;  sense +1
    minimises, -1 maximises;  objective(m): cost dict (it may add a column
    and rows);  dual(db): HiGHS's dual bound in the measure's terms;
    better(m, v): add rows that ask for strictly better than v;
    trivial(v): True when v is proven best by counting alone.
    """

    def __init__(self, name, build, holds, value, sense, objective, dual, better,
                 trivial=lambda v: False):
        self.name, self.build, self.holds, self.value = name, build, holds, value
        self.sense, self.objective, self.dual, self.better = sense, objective, dual, better
        self.trivial = trivial


def _run_stage(r, sg, time_limit, model_share, start, breaks=None):
    """Textbook objective for model_share of the time, then a descent.

    Only HiGHS's "infeasible" verdicts on feasibility problems (no
    objective) are taken as proofs: scipy 1.10's HiGHS (presolve off) has
    called the textbook stage-1 model optimal above the true optimum (a
    tiny roster, found against brute force; with the objective scaled by
    OBJ_SCALE, not unscaled).  So a model "optimal" is only a claim: the
    descent then asks for strictly better, and the stage is proven when
    HiGHS finds that infeasible ("model+descent"); an answer that beats the
    claim counts as refuted ("refuted" in the result).  A model
    "infeasible" (stage 1) is asked again without the objective.  The bound
    is the proven value, or None: HiGHS's dual bound, which the same bug
    spoils, is kept only as "dual_bound" for the record.

    Returns (status dict, best assignment or None).  status: optimal /
    time_limit / infeasible / error; value: exact measure; bound; proof:
    descent / model+descent / count (proven by counting) / feasibility.
    breaks(a): the hard rules a breaks (default violations(r, a)).
    """
    if breaks is None:
        breaks = lambda a: violations(r, a)  # noqa: E731
    t0 = time.monotonic()
    deadline = None if time_limit is None else t0 + time_limit
    st = {"status": "time_limit", "value": None, "bound": None, "proof": None, "steps": 0,
          "claim": None, "refuted": False, "dual_bound": None}
    best = start

    def accept(a, need_better):
        nonlocal best
        bad = breaks(a) if None not in a else [("assignment", "patient without nurse")]
        if bad:
            raise AssertionError("reference %s incumbent breaks %s" % (sg.name, bad[0]))
        if not sg.holds(a):
            raise AssertionError("reference %s incumbent breaks the stage's holds" % sg.name)
        if best is not None:
            gain = sg.sense * (sg.value(best) - sg.value(a))
            if need_better and gain <= 0:
                raise AssertionError("HiGHS returned a %s descent step that is not better"
                                     % sg.name)
            if gain < 0:
                return
        best = a

    if model_share > 0:
        m = sg.build()
        cost = sg.objective(m)
        tl = None if time_limit is None else time_limit * model_share
        res, status = m.solve(cost, tl)
        a = m.assignment(res)
        if a is not None:
            accept(a, False)
        if status == "infeasible":
            if start is not None:
                if not sg.holds(start):
                    raise AssertionError("reference %s start breaks the stage's holds"
                                         % sg.name)
                # A wrong verdict: scipy 1.10's HiGHS (presolve off) has called
                # the lift's textbook model infeasible while its start keeps
                # every row (a unit-size roster with ranks; the same rows
                # without the L column solved).  The descent decides.
                st["refuted"] = True
            else:
                st["status"], st["claim"] = "infeasible", "model"
        elif status == "optimal":
            st["claim"] = "model"
            if a is not None and sg.value(a) != sg.value(best):
                st["refuted"] = True      # a known answer beats the claimed optimum
        elif status != "time_limit":
            st["status"] = "error"
        db = _dual_bound(res)
        st["dual_bound"] = None if db is None else sg.dual(db)
    if st["status"] == "infeasible" or (st["status"] == "time_limit" and best is None):
        # Any assignment at all?  A feasibility problem, no objective.
        m = sg.build()
        res, status = m.solve({}, _remaining(deadline))
        a = m.assignment(res)
        if a is not None:
            if st["status"] == "infeasible":
                st["status"], st["refuted"] = "time_limit", True
            accept(a, False)
        elif status == "infeasible":
            st["status"], st["proof"] = "infeasible", "feasibility"
        elif st["status"] == "infeasible":
            st["status"] = "time_limit"       # the claim stays unconfirmed
    while st["status"] == "time_limit" and best is not None:
        v = sg.value(best)
        if sg.trivial(v):
            st["status"], st["proof"] = "optimal", "count"
            break
        left = _remaining(deadline)
        if left is not None and left <= 0.05:
            break
        m = sg.build()
        sg.better(m, v)
        res, status = m.solve({}, left)
        st["steps"] += 1
        if status == "infeasible":
            st["status"] = "optimal"
            st["proof"] = "descent" if st["claim"] is None else "model+descent"
        elif m.assignment(res) is not None:
            accept(m.assignment(res), True)
            if st["claim"] is not None:
                st["refuted"] = True
        else:
            if status != "time_limit":
                st["status"] = "error"
            break
    if best is not None:
        v = sg.value(best)
        st["value"] = v
        if st["status"] == "optimal":
            st["bound"] = v
    st["seconds"] = time.monotonic() - t0
    return st, best


def _balance_stages(r, model, key):
    """Factories for stages 1 (peak) and 2 (lift) of roster r: model(r) is
    a fresh model (col, row, counted, care_terms, load_rows, assignment);
    r[key] the items it assigns, each with its care minutes."""
    n = r["nurses"]

    def peak():
        def objective(m):
            total = sum(p["care"] for p in r[key])
            ceiling = max((n[j]["duty"] + total) / n[j]["capacity"] for j in m.counted) + 1.0
            u = m.col(0.0, ceiling, integer=False)
            for j in m.counted:
                m.row(m.care_terms(j) + [(u, -float(n[j]["capacity"]))], hi=-float(n[j]["duty"]))
            return {u: OBJ_SCALE}

        def better(m, U):
            m.load_rows({}, {j: math.ceil(U * n[j]["capacity"]) - 1 for j in m.counted})
        return _Stage("peak", lambda: model(r), lambda a: True,
                      lambda a: peak_lift(r, a, key)[0], +1, objective,
                      lambda db: db / OBJ_SCALE, better)

    def lift(U, levels=None):
        # Every counted nurse within her level (docs/model.md, stage 2 lift:
        # u(n) <= level(n); U for everyone without the ranks).
        if levels is None:
            levels = {j: U for j, x in enumerate(n) if x["counted"]}
        hi = level_ceilings(r, levels)

        def build():
            m = model(r)
            m.load_rows({}, hi)
            return m

        def holds(a):
            loads = loads_of(r, a, key)
            return all(loads[j] <= h for j, h in hi.items())

        def objective(m):
            lc = m.col(0.0, float(U) + 1.0, integer=False)
            for j in m.counted:
                m.row([(k, -v) for k, v in m.care_terms(j)] + [(lc, float(n[j]["capacity"]))],
                      hi=float(n[j]["duty"]))
            return {lc: -OBJ_SCALE}

        def better(m, L):
            m.load_rows({j: math.floor(L * n[j]["capacity"]) + 1 for j in m.counted}, {})
        return _Stage("lift", build, holds, lambda a: peak_lift(r, a, key)[1], -1, objective,
                      lambda db: -db / OBJ_SCALE, better)
    return peak, lift


def run_balance(r, model, key, time_limit, model_share, breaks=None):
    """Stages 1 and 2 of roster r (see _balance_stages, _run_stage), without
    the ranks (keel rebalance's options; docs/model.md).

    Returns (feasible: True / False / None (unknown), peak status, lift
    status or None, the assignment or None).
    """
    feasible, st, _, st2, a = run_balance_ranks(r, model, key, time_limit, model_share,
                                                breaks, with_ranks=False)
    return feasible, st, st2, a


def milp_ask(r, model, key, breaks=None):
    """ranks()'s question on model(r): a plan with every counted load at
    most hi[j], checked against the hard rules (breaks(a), default
    violations)."""
    if breaks is None:
        breaks = lambda a: violations(r, a)  # noqa: E731

    def ask(hi, seconds):
        m = model(r)
        m.load_rows({}, hi)
        res, status = m.solve({}, seconds)
        a = m.assignment(res)
        if a is not None:
            bad = breaks(a) if None not in a else [("assignment", "an item without a nurse")]
            if bad:
                raise AssertionError("reference ranks plan breaks %s" % (bad[0],))
        return status, a
    return ask


def milp_minmax(r, model, key, U, breaks=None):
    """ranks()'s textbook model on model(r): minimise t, every free load
    <= t capacity, every load within hi; the plan checked as in milp_ask."""
    if breaks is None:
        breaks = lambda a: violations(r, a)  # noqa: E731

    def minmax(hi, free, seconds):
        m = model(r)
        m.load_rows({}, hi)
        t = m.col(0.0, float(U) + 1.0, integer=False)
        for j in free:
            n = r["nurses"][j]
            m.row(m.care_terms(j) + [(t, -float(n["capacity"]))], hi=-float(n["duty"]))
        res, status = m.solve({t: OBJ_SCALE}, seconds)
        a = m.assignment(res)
        if a is not None:
            bad = breaks(a) if None not in a else [("assignment", "an item without a nurse")]
            if bad:
                raise AssertionError("reference ranks plan breaks %s" % (bad[0],))
        return a
    return minmax


def run_balance_ranks(r, model, key, time_limit, model_share, breaks=None, with_ranks=True):
    """Stages 1, ranks (with_ranks, and only on a proven peak) and 2 of
    roster r.  Returns (feasible, peak status, ranks (see ranks()) or None,
    lift status or None, the assignment or None)."""
    if any(not e for e in r["eligible"]):
        return False, {"status": "infeasible", "value": None, "bound": None,
                       "proof": "no eligible nurse", "seconds": 0.0}, None, None, None
    peak, lift = _balance_stages(r, model, key)
    st, a = _run_stage(r, peak(), time_limit, model_share, None, breaks)
    if st["status"] == "infeasible":
        return False, st, None, None, None
    if a is None:
        return None, st, None, None, None
    rk, levels = None, None
    if with_ranks and st["status"] == "optimal":
        rk = ranks(r, milp_ask(r, model, key, breaks), st["value"], a, time_limit, key,
                   milp_minmax(r, model, key, st["value"], breaks) if model_share > 0 else None)
        levels, a = rk["levels"], rk["assign"]
    st2, a = _run_stage(r, lift(st["value"], levels), time_limit, model_share, a, breaks)
    return True, st, rk, st2, a


def _stage_specs(r):
    """Factories for stages 3 and 4 of roster r (closures over r)."""

    def continuity(win):
        def build():
            m = RulesModel(r)
            m.window_rows(win)
            return m

        def objective(m):
            return {k: -1.0 for k in m.keep}

        def better(m, k):
            m.row([(c, 1.0) for c in m.keep], lo=k + 1)
        limit = sum(1 for p, pat in enumerate(r["patients"])
                    if pat["prev"] is not None and pat["prev"] in r["eligible"][p])
        return _Stage("continuity", build, lambda a: not outside_windows(r, a, win),
                      lambda a: kept_of(r, a), -1, objective,
                      lambda db: math.floor(-db + 1e-6), better, lambda k: k >= limit)

    def zones(win, kept):
        def build():
            m = RulesModel(r, zone_cols=True)
            m.window_rows(win)
            if kept:
                m.row([(c, 1.0) for c in m.keep], lo=kept)
            return m

        def better(m, z):
            m.row([(k, 1.0) for k in m.zof.values()], hi=z - 1)
        floor_z = len({p["zone"] for p in r["patients"]} - {None})
        return _Stage("proximity", build,
                      lambda a: not outside_windows(r, a, win) and kept_of(r, a) >= kept,
                      lambda a: proximity_of(r, a)[0], +1,
                      lambda m: {k: 1.0 for k in m.zof.values()},
                      lambda db: math.ceil(db - 1e-6), better, lambda z: z <= floor_z)

    def rooms(win, kept, zmax):
        def build():
            m = RulesModel(r, zone_cols=True, room_cols=True)
            m.window_rows(win)
            if kept:
                m.row([(c, 1.0) for c in m.keep], lo=kept)
            if m.zof:
                m.row([(k, 1.0) for k in m.zof.values()], hi=zmax)
            return m

        def better(m, w):
            m.row([(k, 1.0) for k in m.wof.values()], hi=w - 1)
        floor_r = len({p["room"] for p in r["patients"]} - {None})
        return _Stage("rooms", build,
                      lambda a: (not outside_windows(r, a, win) and kept_of(r, a) >= kept
                                 and proximity_of(r, a)[0] <= zmax),
                      lambda a: proximity_of(r, a)[1], +1,
                      lambda m: {k: 1.0 for k in m.wof.values()},
                      lambda db: math.ceil(db - 1e-6), better, lambda w: w <= floor_r)
    return continuity, zones, rooms


def solve_rules(r, time_limit=None, model_share=0.1, zero_tolerance=True):
    """All stages of roster r with HiGHS, lexicographically.

    time_limit: seconds for each stage (None = none); model_share as in
    solve().  Returns {"feasible": True / False / None (unknown),
    "stages": {"peak", "lift", "continuity", "proximity", "rooms",
    "continuity0"}: status dicts (None when the stage does not apply),
    "U", "L": the values the later stages hold (exact), "ranks" (see
    ranks(); None when the peak is not proven), "levels": each counted
    nurse's level (None without the ranks), "proven": True when every
    earlier stage a later one depends on is proven (the ranks too),
    "assign"}.
    continuity0 is stage 3 with tol = 0 (kept_at_zero_tolerance).
    """
    out = {"feasible": None, "stages": dict.fromkeys(
        ("peak", "lift", "continuity", "proximity", "rooms", "continuity0")),
        "U": None, "L": None, "ranks": None, "levels": None, "assign": None, "proven": False}
    out["feasible"], st, rk, st2, a = run_balance_ranks(r, RulesModel, "patients", time_limit,
                                                        model_share)
    out["stages"]["peak"] = st
    out["ranks"] = rk
    if st2 is None:
        return out
    continuity, zones, rooms = _stage_specs(r)
    U = st["value"]
    out["stages"]["lift"] = st2
    L = st2["value"]
    levels = None if rk is None else rk["levels"]
    out["U"], out["L"], out["levels"], out["assign"] = U, L, levels, a
    proven = st["status"] == "optimal" and st2["status"] == "optimal" \
        and rk is not None and rk["status"] == "optimal"
    win = windows(r, U, L, r["tol"], levels)
    kept = 0
    if r["stage3"]:
        st3, a = _run_stage(r, continuity(win), time_limit, model_share, a)
        out["stages"]["continuity"] = st3
        kept = st3["value"]
        if zero_tolerance:
            if r["tol"] == 0:
                out["stages"]["continuity0"] = st3
            else:
                st0, _ = _run_stage(r, continuity(windows(r, U, L, Fraction(0), levels)),
                                    time_limit,
                                    model_share, out["assign"])
                out["stages"]["continuity0"] = st0
    proven3 = proven and (not r["stage3"] or out["stages"]["continuity"]["status"] == "optimal")
    if r["stage4"]:
        st4, a = _run_stage(r, zones(win, kept), time_limit, model_share, a)
        out["stages"]["proximity"] = st4
        st5, a = _run_stage(r, rooms(win, kept, st4["value"]), time_limit, model_share, a)
        out["stages"]["rooms"] = st5
    out["assign"] = a
    out["proven"] = proven3
    return out


def feasible_rules(r, time_limit=30.0):
    """True / False / None (HiGHS ran out of time): is there any assignment
    that keeps the hard rules?"""
    return feasible_model(r, RulesModel, lambda a: violations(r, a) if None not in a
                          else [("assignment", "")], time_limit)


def feasible_model(r, model, breaks, time_limit):
    """True / False / None (HiGHS ran out of time): has model(r), with no
    objective, a solution?  One found must break nothing (breaks(a) empty)."""
    if any(not e for e in r["eligible"]):
        return False
    m = model(r)
    res, status = m.solve({}, time_limit)
    a = m.assignment(res)
    if a is not None:
        bad = breaks(a)
        if bad:
            raise AssertionError("reference feasibility incumbent breaks %s" % (bad[0],))
        return True
    if status == "infeasible":
        return False
    return None


def brute_force_rules(r, max_combinations=300_000):
    """Exhaustive lexicographic optimum of every stage, for tiny rosters.

    Enumerates every nurse for every patient (eligibility is tested by
    violations() itself, not taken from r["eligible"]).  Returns None when
    no assignment keeps the hard rules, else a dict with U, L (Fractions),
    ranks (ranks_by_enumeration()),
    kept, kept0 (tol = 0) (None when stage 3 does not apply), Z, R (None when
    stage 4 does not apply) and one optimal assignment.
    """
    import itertools
    nn, npat = len(r["nurses"]), len(r["patients"])
    allowed = [[j for j in range(nn) if not pair_violations(r, p, j)] for p in range(npat)]
    total = 1
    for a in allowed:
        total *= len(a)
    if total > max_combinations:
        raise ValueError("roster too large for brute force (%d combinations)" % total)
    caps = [n["capacity"] for n in r["nurses"]]
    counted = [j for j, n in enumerate(r["nurses"]) if n["counted"]]
    feas = []
    for combo in itertools.product(*allowed):
        if not violations(r, combo):
            loads = loads_of(r, combo)
            us = [Fraction(loads[j], caps[j]) for j in counted]
            feas.append((combo, loads, max(us), min(us)))
    if not feas:
        return None
    rk = ranks_by_enumeration([f[1] for f in feas], caps,
                              [n["counted"] for n in r["nurses"]])
    U, L, levels = rk["U"], rk["L"], rk["levels"]
    out = {"U": U, "L": L, "ranks": rk, "kept": None, "kept0": None, "Z": None, "R": None}

    def within(f, tol):
        # The windows of stages 3 and 4 from each nurse's level (docs/model.md).
        return all(math.ceil((L - tol) * caps[j]) <= f[1][j]
                   <= math.floor((levels[j] + tol) * caps[j]) for j in counted)
    inside = [f for f in feas if within(f, r["tol"])]
    kept = 0
    if r["stage3"]:
        kept = out["kept"] = max(kept_of(r, f[0]) for f in inside)
        out["kept0"] = max(kept_of(r, f[0]) for f in feas if within(f, Fraction(0)))
    best = [f for f in inside if kept_of(r, f[0]) >= kept]
    if r["stage4"]:
        zr = [proximity_of(r, f[0]) for f in best]
        out["Z"] = min(z for z, _ in zr)
        out["R"] = min(w for z, w in zr if z == out["Z"])
        best = [f for f, (z, w) in zip(best, zr) if (z, w) == (out["Z"], out["R"])]
    out["assign"] = list(best[0][0])
    return out


def main(argv=None):
    ap = argparse.ArgumentParser(description="Solve keel's stages 1-2 with HiGHS")
    ap.add_argument("roster")
    ap.add_argument("--time-limit", type=float, default=None,
                    help="seconds per stage (default: none)")
    ap.add_argument("--model-share", type=float, default=0.1,
                    help="part of each stage's time for the textbook model (default 0.1)")
    ap.add_argument("--brute-force", action="store_true",
                    help="also solve by enumeration (tiny rosters only)")
    ap.add_argument("--rules", action="store_true",
                    help="the roster rules and stages 1-4 (solve_rules)")
    args = ap.parse_args(argv)
    if args.rules:
        r = load_rules(args.roster)
        res = solve_rules(r, args.time_limit, args.model_share)
        if res["assign"] is not None:
            res["assign"] = {r["patients"][p]["id"]: r["nurses"][j]["id"]
                             for p, j in enumerate(res["assign"])}
        if args.brute_force:
            bf = brute_force_rules(r)
            if bf is not None:
                bf["assign"] = {r["patients"][p]["id"]: r["nurses"][j]["id"]
                                for p, j in enumerate(bf["assign"])}
            res["brute_force"] = bf
        json.dump(res, sys.stdout, indent=1, default=str)
        print()
        return 0
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
