#!/usr/bin/python3
# SPDX-License-Identifier: GPL-3.0-or-later
"""Check keel's shift clock (arrivals, departures, part shifts) against HiGHS.

Source: HiGHS MILP solver through Debian's python3-scipy
(scipy.optimize.milp, scipy 1.10) as the independent reference solver, on a
model written from the specification of keel's clock (roster keys, parts and
moments, care of a part, capacity; "The shift's clock"), not from keel's C
code; on tiny rosters also exhaustive enumeration.  The ratio table's
numbers are from California Code of Regulations, Title 22, §70217(a)
(highs_model.CALIFORNIA_TABLE).

The clock, as this file reads the specification (minutes after the shift's
start; every interval half-open):
  offset(t)   = (t - shift.start) mod 1440, in [0, shift.minutes]; for an
                end-like time (nurses[].end, patients[].leaves_at) offset 0
                is 1440 on a 24-hour shift
  presence    patient [a, b): a = arrives_at (expected admission: at) or 0,
                b = leaves_at or shift.minutes
  on duty     nurse [s, e): s = start or 0, e = end or shift.minutes
  parts       the presence cut at every nurse's end time strictly inside
                (a, b); each part goes to one nurse who is on throughout it
                and eligible (counted, skills with isolation needs, not
                avoided; a lock binds the first part)
  keeping     a part keeps the nurse of the part before it whenever she is
                on throughout it (hand-offs only at the end time of the nurse
                handing off)
  moments     the shift cut at every arrival, departure, start and end; at
                each moment each nurse's parts covering it keep every count
                rule (patient limit with the table, "1:N", high acuity,
                isolation separation, max_zones)
  break cover each timed break gets a cover from the break plan
                (break_plan below, as docs/model.md states it); during a
                kept cover the nurse on break and her cover hold at most
                the limit together at every moment (nobody: she holds none);
                the moments are also cut at the kept covers' edges
  care        C_present = ceil(C (b - a) / shift.minutes); the part [s, e)
                of [a, b) carries ceil(C_present (e - a) / (b - a))
                - ceil(C_present (s - a) / (b - a)); extras in full on the
                first part
  capacity    (e - s) - break minutes (timed breaks' total, else the
                nurse's break_minutes, else shift.break_minutes when she is on
                for at least half the shift, else 0)
  stages      1: min U = max over counted nurses of (duty + care) / capacity;
              ranks: the nurses pinned at U* held there, the heaviest of
              the others as low as it goes, and so on while nurses are
              pinned (docs/model.md, "Stage ranks"; highs_model.ranks);
              2: max L = min of the same, with every u(n) <= her level

Three kinds of check, one line each:
  * edge: fixed rosters under data/clock/ with hand-computed figures (the
    expectations in EDGE_CASES below, each with its arithmetic): crossing
    midnight, a patient leaving exactly when her nurse leaves, a discharge
    at 11:00 then an admission at 14:00 under 1:5, the ceiling arithmetic of
    a part, a 24-hour shift ending at 07:00, a nurse coming on at 11:00, a
    skill leaving mid-shift, a time outside the shift;
  * regression: the rosters data/clock/regress_*.yaml (each says what it
    once caught), checked as the generated ones;
  * generated: seeded rosters with churn (below); keel's JSON against the
    roster and against the reference optimum;
  * the reference against brute force on the generated rosters small enough
    to enumerate (every feasible one up to --brute-max combinations).

For every roster keel runs as `keel assign ROSTER -f json --time-limit S`:
exit 3 exactly when the reference finds no plan; otherwise exit 0 and
keel's plan (patients[].nurse, the first nurse, plus patients[].handoffs,
[{"at", "from", "to"}]) is rebuilt part by part and must keep every rule at
every moment, hand off only at the end time of the nurse handing off and
only where the patient's presence is cut; loads, capacities,
utilisations, each patient's care minutes (its parts' total), each
nurse's start, end and timeline (the count at every change, "off" when she
leaves) recomputed here; the stage values equal to the reference's when
both prove them, and never better than a proven optimum; keel's "ranks"
(the nurses pinned at the peak, their levels, the last rank) equal to the
reference's when both prove them, the lift compared only when both hold
the same levels, and the windows of the later stages taken from keel's
levels.  Every fourth feasible generated roster gets a nurse pinned at the
peak (pin_nurse: a heavy patient locked to her, here only while she is
on); the rosters with a pinned nurse are counted and must reach
--min-pinned of them.

Generated rosters: day (07:00) and night (19:00, crossing midnight) shifts
of 720 minutes, 2-5 nurses (at least one on the whole shift; others
07:00-15:00, 11:00-19:00, 09:00-17:00, 07:00-13:00, 13:00-19:00 and the
night equivalents such as 19:00-03:00), sometimes with timed breaks, a
charge nurse with duty minutes, a relief nurse (with or without a limit
that lets her take patients) or a break buddy (`covers`); 4-12 patients,
some discharged (at 09:00, 11:00, 13:00, 15:00 or exactly when a nurse
leaves), some transferred in (at 10:00, 12:00, 14:00, 16:00 or when a nurse
comes or goes), some expected admissions with `at`; a unit limit and/or
the California table (med-surg, telemetry, now and then icu), skills and
needs, now and then high acuity, isolation, zones and "1:N" ratios.  Every
fifth roster is made infeasible by the clock: a patient needs a skill only
a nurse leaving mid-shift holds, or admissions arrive when every nurse on
is full.  All ids and figures are invented.  A nurse given `minutes`
without `start`/`end` is never generated: the specification does not say
when such a nurse is on under the clock.

Usage: check_clock.py KEEL_EXE [--count 60] [--seed S] [--keel-seconds 5]
                      [--highs-seconds 10] [--jobs 2] [--keep DIR]
       check_clock.py --reference-only [--count 60]   (HiGHS vs brute force)
The last line is "N passed, M failed"; exit status 1 if M > 0, 77 when this
Python lacks numpy, scipy's milp or PyYAML.
"""

import argparse
import copy
import itertools
import os
import random
import re
import sys
import time
from fractions import Fraction


sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))
import requirements  # noqa: E402

requirements.require_modules()

import numpy as np  # noqa: E402
import yaml  # noqa: E402

import gen_rosters  # noqa: E402
import highs_model  # noqa: E402
import keel_run  # noqa: E402
from gen_rosters import flow_map  # noqa: E402
from highs_model import CALIFORNIA_TABLE, RosterError  # noqa: E402
from keel_run import EXIT_NAMES, PRINT_TOL, fmt6, is_num, run_keel, stderr_head  # noqa: E402

HERE = os.path.dirname(os.path.abspath(__file__))
EDGE_DIR = os.path.join(HERE, "data", "clock")
TOL = 1e-6          # agreement of printed stage values (the contract's 1e-6)
DAY_MINUTES = 1440


# ================================================================ the roster

def clock_of(value, what):
    """Minutes after midnight of an "HH:MM" time.  PyYAML reads a plain
    19:00 as the base-60 integer 1140 (YAML 1.1), which is the same number."""
    if isinstance(value, bool):
        raise RosterError("%s: %r is not a time" % (what, value))
    if isinstance(value, int):
        if 0 <= value < DAY_MINUTES:
            return value
        raise RosterError("%s: %r is not a time" % (what, value))
    m = re.fullmatch(r"(\d{1,2}):(\d\d)", str(value))
    if not m or int(m.group(1)) > 23 or int(m.group(2)) > 59:
        raise RosterError("%s: %r is not a time HH:MM" % (what, value))
    return int(m.group(1)) * 60 + int(m.group(2))


def hhmm(minute_of_day):
    minute_of_day %= DAY_MINUTES
    return "%02d:%02d" % (minute_of_day // 60, minute_of_day % 60)


def ceil_div(a, b):
    return -(-a // b)


def derive_clock(doc):
    """The numbers of a roster under the clock (see the module comment).

    Returns r with: L (shift minutes), start (minute of day), nurses (id,
    s, e, capacity, duty, limit, counted, skills, role), people (id, a, b,
    care C, extras E, present, needs, ratio, high, isolation, zone, avoid,
    lock, expected, parts [part indices]), parts (person, s, e, care),
    eligible (per part, nurse indices), moments [(t0, t1)], cover (per moment,
    part indices), clock (bool), table, high_max, separation, max_zones,
    tol, stage4.  Raises RosterError for what keel must reject.
    """
    shift = doc.get("shift") or {}
    policy = doc.get("policy") or {}
    unit = doc.get("unit") or {}
    L = int(shift["minutes"])
    has_start = shift.get("start") is not None
    start = clock_of(shift["start"], "shift.start") if has_start else None
    clock = False

    def offset(value, what, endlike):
        if start is None:
            raise RosterError("%s: a time needs shift.start" % what)
        off = (clock_of(value, what) - start) % DAY_MINUTES
        if endlike and off == 0 and L == DAY_MINUTES:
            off = DAY_MINUTES
        if not 0 <= off <= L:
            raise RosterError("%s: %s is outside the shift (%s to %s)"
                              % (what, value, hhmm(start), hhmm(start + L)))
        return off

    acuity = policy.get("acuity_minutes") or {}
    extra = policy.get("extra_minutes") or {}
    roles = policy.get("roles") or {}
    table, looser = highs_model.ratio_table(policy, unit)

    nurses, index = [], {}
    for k, n in enumerate(doc.get("nurses") or []):
        nid = str(n["id"])
        what = "nurses[%d]" % k
        role = n.get("role", "staff")
        rspec = roles.get(role) or {}
        timed = any(key in n for key in ("start", "end", "breaks"))
        clock = clock or timed
        s = offset(n["start"], what + ".start", False) if "start" in n else 0
        e = offset(n["end"], what + ".end", True) if "end" in n else L
        if not s < e:
            raise RosterError("%s: start %d is not before end %d" % (what, s, e))
        minutes = n.get("minutes")
        if minutes is not None and ("start" in n or "end" in n) and minutes != e - s:
            raise RosterError("%s.minutes %d is not end - start %d" % (what, minutes, e - s))
        if minutes is not None and "start" not in n and "end" not in n and minutes != L:
            # A part shift given only by minutes: the specification does not
            # say when such a nurse is on; this script never writes one.
            raise RosterError("%s: minutes without start/end (not modelled)" % what)
        breaks = n.get("breaks")
        if breaks:
            total, last = 0, s
            for b in breaks:
                at = offset(b["at"], what + ".breaks.at", False)
                if not (at >= last and b["minutes"] > 0 and at + b["minutes"] <= e):
                    raise RosterError("%s: break at %s out of order or outside" % (what, b["at"]))
                last = at + b["minutes"]
                total += b["minutes"]
            if n.get("break_minutes") is not None and n["break_minutes"] != total:
                raise RosterError("%s: break_minutes is not the breaks' total" % what)
            brk = total
        elif n.get("break_minutes") is not None:
            brk = n["break_minutes"]
        else:
            # The shift's break, for a nurse on for at least half the shift
            # (docs/roster-format.md, "break_minutes").
            brk = shift.get("break_minutes", 0) or 0
            if 2 * (e - s) < L:
                brk = 0
        looser(n.get("max_patients"), "nurse %s max_patients" % nid)
        limits = [v for v in (policy.get("max_patients"), rspec.get("max_patients"),
                              n.get("max_patients")) if v is not None]
        if role == "orientee":
            limits.append(0)
        if role == "relief" and n.get("max_patients") is None \
                and rspec.get("max_patients") is None:
            limits.append(0)
        if table is not None:
            limits.append(table)
        limit = min(limits) if limits else None
        duty = n.get("duty_minutes")
        if duty is None:
            duty = rspec.get("duty_minutes", 0) or 0
        cap = (e - s) - brk
        counted = limit is None or limit > 0
        if counted and cap <= 0:
            raise RosterError("nurse %s: capacity %d" % (nid, cap))
        index[nid] = len(nurses)
        nurses.append({"id": nid, "role": role, "s": s, "e": e, "capacity": cap,
                       "duty": int(duty), "limit": limit, "counted": counted,
                       "skills": set(n.get("skills") or []),
                       "breaks": [(offset(b["at"], what + ".breaks.at", False),
                                   offset(b["at"], what + ".breaks.at", False) + b["minutes"])
                                  for b in breaks or []],
                       "covers": None if n.get("covers") is None else str(n["covers"])})

    iso_needs = policy.get("isolation_needs") or {}
    ha = policy.get("high_acuity")
    people = []
    listed = [(p, False, "patients[%d]" % k) for k, p in enumerate(doc.get("patients") or [])]
    listed += [(p, True, "expected_admissions[%d]" % k)
               for k, p in enumerate(doc.get("expected_admissions") or [])]
    if "expected_admissions" in doc:
        clock = True
    for p, expected, what in listed:
        pid = str(p["id"])
        if expected:
            if "arrives_at" in p or "at" not in p:
                raise RosterError("%s: an expected admission has `at`, not arrives_at" % what)
            a = offset(p["at"], what + ".at", False)
        else:
            a = offset(p["arrives_at"], what + ".arrives_at", False) if "arrives_at" in p else 0
        b = offset(p["leaves_at"], what + ".leaves_at", True) if "leaves_at" in p else L
        clock = clock or "arrives_at" in p or "leaves_at" in p or "handoffs" in p
        if not a < b:
            raise RosterError("%s: arrives %d not before leaves %d" % (what, a, b))
        if p.get("care_minutes") is not None:
            C = int(p["care_minutes"])
        else:
            C = int(highs_model._level_minutes(acuity, p.get("acuity")))
        E = sum(int(extra[x]) for x in p.get("extras") or [])
        iso = p.get("isolation")
        needs = set(p.get("needs") or [])
        if iso is not None:
            needs |= set(iso_needs.get(iso) or [])
        ratio = highs_model._ratio_n(p["ratio"], pid) if p.get("ratio") is not None else None
        looser(ratio, "patient %s ratio" % pid)
        lock = index[p["nurse"]] if p.get("lock") else None
        people.append({
            "id": pid, "a": a, "b": b, "C": C, "E": E,
            "present": ceil_div(C * (b - a), L),
            "needs": needs, "ratio": ratio, "isolation": iso,
            "high": ha is not None and p.get("acuity") is not None
            and int(p["acuity"]) >= int(ha["level"]),
            "zone": None if p.get("zone") is None else str(p["zone"]),
            "room": None if p.get("room") is None else str(p["room"]),
            "avoid": {index[x] for x in p.get("avoid") or []},
            "lock": lock, "expected": expected, "parts": []})
    ids = [x["id"] for x in people]
    if len(set(ids)) != len(ids):
        raise RosterError("patient ids repeat across patients and expected admissions")

    # Parts: each presence cut at every nurse's end strictly inside it.
    ends = sorted({n["e"] for n in nurses})
    parts = []
    for i, pat in enumerate(people):
        a, b = pat["a"], pat["b"]
        cuts = [a] + [t for t in ends if a < t < b] + [b]
        for k in range(len(cuts) - 1):
            s, e = cuts[k], cuts[k + 1]
            care = part_care(pat["present"], a, b, s, e) + (pat["E"] if k == 0 else 0)
            pat["parts"].append(len(parts))
            parts.append({"person": i, "s": s, "e": e, "care": care, "k": k})
    elig = [[j for j in range(len(nurses)) if not part_pair_violations_r(
        nurses, people, parts, q, j)] for q in range(len(parts))]
    covers = break_plan(nurses, table, len(people))
    # Moments: the shift cut at every arrival, departure, start and end, and
    # at the edges of every kept break cover.
    points = sorted({0, L} | {x["a"] for x in people} | {x["b"] for x in people}
                    | {n["s"] for n in nurses} | {n["e"] for n in nurses}
                    | {t for c in covers if c["kept"] for t in (c["a"], c["b"])})
    moments = list(zip(points, points[1:]))
    cover = [[q for q, pt in enumerate(parts) if pt["s"] <= t0 and t1 <= pt["e"]]
             for t0, t1 in moments]
    return {
        "L": L, "start": start, "nurses": nurses, "people": people, "parts": parts,
        "eligible": elig, "moments": moments, "cover": cover, "clock": clock, "table": table,
        "covers": covers,
        "high_max": None if ha is None else int(ha["max_per_nurse"]),
        "separation": bool(policy.get("isolation_separation", True)),
        "max_zones": policy.get("max_zones"),
        "tol": highs_model._decimal(policy.get("balance_tolerance", 0.05)),
        "stage3": any(p.get("previous_nurse") is not None for p, _, _ in listed),
        "stage4": any(x["zone"] is not None or x["room"] is not None for x in people),
    }


def break_plan(nurses, table, census):
    """The break plan, as docs/model.md ("Break cover") states it: every
    timed break in time order (ties by nurse, then break); first the breaks
    of nurses with no free buddy get the first free relief nurse not
    already covering an overlapping break (else nobody), then the others
    get such a relief nurse, else the first free buddy.  A nurse is free
    when on throughout the break and on no overlapping break of her own.
    The limit is the table's, else the cover's patient limit (a relief
    nurse's at least the breaking nurse's); a cover is kept when the roster
    names a buddy or a relief nurse, the nurse takes patients, and either
    nobody covers or the two limits add up to more than a limit below the
    census.  Returns [{"j", "a", "b", "cover", "relief", "limit", "kept"}]."""
    def eff(n):
        return census if n["limit"] is None else min(n["limit"], census)

    def overlap(a, b, s, e):
        return a < e and s < b

    def free(i, a, b):
        n = nurses[i]
        return n["s"] <= a and b <= n["e"] and not any(overlap(a, b, s, e)
                                                       for s, e in n["breaks"])

    out = [{"j": j, "a": a, "b": b, "cover": None, "relief": False}
           for j, n in enumerate(nurses) for a, b in n["breaks"]]
    order = sorted(range(len(out)), key=lambda k: (out[k]["a"], out[k]["j"], k))

    def buddy(c):
        for i, n in enumerate(nurses):
            if i != c["j"] and n["covers"] == nurses[c["j"]]["id"] and free(i, c["a"], c["b"]):
                return i
        return None

    def relief(c):
        for i, n in enumerate(nurses):
            if n["role"] != "relief" or not free(i, c["a"], c["b"]):
                continue
            if not any(o["relief"] and o["cover"] == i and overlap(c["a"], c["b"], o["a"], o["b"])
                       for o in out):
                return i
        return None

    for first in (True, False):
        for k in order:
            c = out[k]
            b = buddy(c)
            if (b is None) != first:
                continue
            c["cover"] = relief(c)
            c["relief"] = c["cover"] is not None
            if c["cover"] is None:
                c["cover"] = b
    planned = any(n["covers"] is not None or n["role"] == "relief" for n in nurses)
    for c in out:
        mine = eff(nurses[c["j"]])
        if table is not None:
            c["limit"] = table
        elif c["cover"] is None:
            c["limit"] = mine
        else:
            c["limit"] = eff(nurses[c["cover"]])
            if c["relief"]:
                c["limit"] = max(c["limit"], mine)
        theirs = 0 if c["cover"] is None else eff(nurses[c["cover"]])
        c["kept"] = planned and mine > 0 and (
            c["cover"] is None or (mine + theirs > c["limit"] and c["limit"] < census))
    return out


def cover_bound(c):
    """The most a nurse on break and her cover hold together: 0 without one."""
    return 0 if c["cover"] is None else c["limit"]


def part_care(present, a, b, s, e):
    """The care minutes of part [s, e) of a presence [a, b) carrying
    `present` minutes: the parts of one presence add up to `present`."""
    return ceil_div(present * (e - a), b - a) - ceil_div(present * (s - a), b - a)


def part_pair_violations_r(nurses, people, parts, q, j):
    """Rule names that forbid part q with nurse j on their own."""
    pt, n = parts[q], nurses[j]
    pat = people[pt["person"]]
    out = []
    if not n["counted"]:
        out.append("patient_limit")
    if not pat["needs"] <= n["skills"]:
        out.append("skill")
    if j in pat["avoid"]:
        out.append("avoid")
    if pt["k"] == 0 and pat["lock"] is not None and pat["lock"] != j:
        out.append("lock")
    if not (n["s"] <= pt["s"] and pt["e"] <= n["e"]):
        out.append("on_duty")
    return out


def load_clock(path):
    with open(path, encoding="utf-8") as f:
        return derive_clock(yaml.safe_load(f))


# ============================================================ plans and rules

def violations(r, plan):
    """Every rule a plan (nurse index per part) breaks: [(rule, text)]."""
    out = []
    nurses, people, parts = r["nurses"], r["people"], r["parts"]
    for q, j in enumerate(plan):
        pt = parts[q]
        pid = people[pt["person"]]["id"]
        if j is None or not 0 <= j < len(nurses):
            out.append(("assignment", "%s part %d has no nurse" % (pid, pt["k"])))
            continue
        for rule in part_pair_violations_r(nurses, people, parts, q, j):
            out.append((rule, "%s from %s to %s with nurse %s"
                        % (pid, at_text(r, pt["s"]), at_text(r, pt["e"]), nurses[j]["id"])))
        if pt["k"] > 0:
            before = plan[q - 1]
            if before is not None and before != j and nurses[before]["s"] <= pt["s"] \
                    and pt["e"] <= nurses[before]["e"]:
                out.append(("keep", "%s changes nurse %s -> %s at %s, but %s is still on"
                            % (pid, nurses[before]["id"], nurses[j]["id"],
                               at_text(r, pt["s"]), nurses[before]["id"])))
    if any(j is None for j in plan):
        return out
    for m, (t0, t1) in enumerate(r["moments"]):
        held = {}
        for q in r["cover"][m]:
            held.setdefault(plan[q], []).append(parts[q]["person"])
        for j, ps in held.items():
            n = nurses[j]
            # The count rules hold at every moment: one rule name for them all.
            for _, text in highs_model.count_breaks(r, n, [people[i] for i in ps]):
                out.append(("moment_limit", "nurse %s %s at %s" % (n["id"], text,
                                                                    at_text(r, t0))))
        for c in r["covers"]:
            if not (c["kept"] and c["a"] <= t0 and t1 <= c["b"]):
                continue
            together = len(held.get(c["j"], [])) + (
                0 if c["cover"] is None else len(held.get(c["cover"], [])))
            if together > cover_bound(c):
                out.append(("break_cover", "nurse %s on break at %s: %d patients with her "
                            "cover, at most %d" % (nurses[c["j"]]["id"], at_text(r, t0),
                                                   together, cover_bound(c))))
    return out


def at_text(r, offset):
    return hhmm(r["start"] + offset) if r["start"] is not None else "+%d" % offset


def loads_of(r, plan):
    return highs_model.loads_of(r, plan, "parts")


def peak_lift(r, plan):
    return highs_model.peak_lift(r, plan, "parts")


def counts_over_time(r, plan, j):
    """[(moment start, patients nurse j holds)] over the moments she is on."""
    out = []
    n = r["nurses"][j]
    for m, (t0, t1) in enumerate(r["moments"]):
        if n["s"] <= t0 and t1 <= n["e"]:
            out.append((t0, sum(1 for q in r["cover"][m] if plan[q] == j)))
    return out


# ================================================================ the MILP

class ClockModel(highs_model._Milp):
    """x[part, nurse] for eligible pairs; one nurse per part; keeping rows;
    every count rule at every moment (the maximal sets of parts a nurse may
    hold together suffice: each rule only tightens on a superset)."""

    items = "parts"

    def __init__(self, r):
        super().__init__()
        self.r = r
        nurses, people, parts = r["nurses"], r["people"], r["parts"]
        self.xof = {}
        for q, el in enumerate(r["eligible"]):
            for j in el:
                self.xof[(q, j)] = self.col()
        for q in range(len(parts)):
            self.row([(self.xof[(q, j)], 1.0) for j in r["eligible"][q]], 1.0, 1.0)
        for q, pt in enumerate(parts):
            if pt["k"] > 0:
                for j in r["eligible"][q]:
                    if (q - 1, j) in self.xof:
                        # she is on throughout q: q keeps her if q - 1 had her
                        self.row([(self.xof[(q, j)], 1.0), (self.xof[(q - 1, j)], -1.0)], lo=0.0)
        self.counted = [j for j, n in enumerate(nurses) if n["counted"]]
        for j in self.counted:
            n = nurses[j]
            sets = {frozenset(q for q in cov if (q, j) in self.xof) for cov in r["cover"]}
            sets = [s for s in sets if len(s) > 1]
            maximal = [s for s in sets if not any(s < t for t in sets)]
            for g in maximal:
                self.count_rows([self.xof[(q, j)] for q in sorted(g)],
                                [people[parts[q]["person"]] for q in sorted(g)], n["limit"])
                if r["max_zones"] is not None:
                    zones = {}
                    for q in g:
                        z = people[parts[q]["person"]]["zone"]
                        if z is not None:
                            zones.setdefault(z, []).append(self.xof[(q, j)])
                    if len(zones) > r["max_zones"]:
                        zcols = []
                        for z, ks_z in sorted(zones.items()):
                            v = self.col()
                            zcols.append(v)
                            for k in ks_z:
                                self.row([(k, 1.0), (v, -1.0)], hi=0.0)
                        self.row([(v, 1.0) for v in zcols], hi=r["max_zones"])

        # Break cover: the nurse on break and her cover within the limit at
        # every moment of the break.
        for c in r["covers"]:
            if not c["kept"]:
                continue
            for m, (t0, t1) in enumerate(r["moments"]):
                if not (c["a"] <= t0 and t1 <= c["b"]):
                    continue
                who = [c["j"]] + ([] if c["cover"] is None else [c["cover"]])
                terms = [(self.xof[(q, j)], 1.0) for q in r["cover"][m] for j in who
                         if (q, j) in self.xof]
                if terms:
                    self.row(terms, hi=float(cover_bound(c)))

    def care_terms(self, j):
        return [(k, float(self.r["parts"][q]["care"])) for (q, jj), k in self.xof.items()
                if jj == j]

    def load_rows(self, lo_load, hi_load):
        for j in self.counted:
            duty = self.r["nurses"][j]["duty"]
            lo, hi = lo_load.get(j), hi_load.get(j)
            if lo is None and hi is None:
                continue
            self.row(self.care_terms(j), -np.inf if lo is None else float(lo - duty),
                     np.inf if hi is None else float(hi - duty))

    def assignment(self, res):
        """The rounded plan (nurse index per part) of a HiGHS result, or None."""
        plan = super().assignment(res)
        if plan is not None and None in plan:
            raise AssertionError("reference incumbent leaves a part without a nurse")
        return plan


def solve_clock(r, time_limit=None, model_share=0.0):
    """Stages 1 and 2 with HiGHS (highs_model.run_balance on ClockModel:
    a textbook objective for model_share of the time, then a descent; only
    HiGHS's "infeasible" verdict on a feasibility problem proves a stage;
    every incumbent is checked exactly by violations()).  Returns
    {"feasible": True / False / None, "peak", "lift": stage dicts (status,
    value as a Fraction), "ranks" (highs_model.ranks; None unless the peak
    is proven), "levels" (each counted nurse's ceiling), "plan"}.

    model_share: the part of each stage's time for the textbook model (min U
    with a continuous U column; max L) before the descent.  The descent alone
    (0, the default) proved these rosters fastest: measured on 60 generated
    rosters, 18 s in all against 27 s with 0.1."""
    feasible, peak, rk, lift, plan = highs_model.run_balance_ranks(
        r, ClockModel, "parts", time_limit, model_share, lambda p: violations(r, p))
    levels = None if rk is None else rk["levels"]
    if levels is None and peak is not None and peak.get("value") is not None:
        levels = {j: peak["value"] for j, n in enumerate(r["nurses"]) if n["counted"]}
    return {"feasible": feasible, "peak": peak, "ranks": rk, "levels": levels, "lift": lift,
            "plan": plan}


def feasible(r, time_limit=15.0):
    """True / False / None: is there any plan that keeps every rule?"""
    return highs_model.feasible_model(r, ClockModel, lambda p: violations(r, p), time_limit)


# ============================================================== brute force

def person_options(r, i):
    """Every nurse sequence for person i's parts that keeps eligibility and
    the keeping rule (a patient changes nurse only when the nurse leaves)."""
    qs = r["people"][i]["parts"]
    nurses = r["nurses"]
    out = []

    def go(k, seq):
        if k == len(qs):
            out.append(tuple(seq))
            return
        q = qs[k]
        if k > 0:
            before = seq[-1]
            n = nurses[before]
            if n["s"] <= r["parts"][q]["s"] and r["parts"][q]["e"] <= n["e"]:
                go(k + 1, seq + [before])        # she is on: the part keeps her
                return
        for j in range(len(nurses)):
            if not part_pair_violations_r(nurses, r["people"], r["parts"], q, j):
                go(k + 1, seq + [j])
    go(0, [])
    return out


def brute_force(r, max_combinations, full=False):
    """(U*, L*) as Fractions by enumeration (L* with every nurse within
    her level, highs_model.ranks_by_enumeration), or with full the whole
    ranks_by_enumeration() result; None when no plan keeps the rules;
    raises ValueError when there are too many plans."""
    options = [person_options(r, i) for i in range(len(r["people"]))]
    total = 1
    for o in options:
        total *= len(o)
    if total > max_combinations:
        raise ValueError("%d plans" % total)
    feas = []
    for combo in itertools.product(*options):
        plan = [None] * len(r["parts"])
        for i, seq in enumerate(combo):
            for q, j in zip(r["people"][i]["parts"], seq):
                plan[q] = j
        if not violations(r, plan):
            feas.append(loads_of(r, plan))
    if not feas:
        return None
    rk = highs_model.ranks_by_enumeration(feas, [n["capacity"] for n in r["nurses"]],
                                          [n["counted"] for n in r["nurses"]])
    return rk if full else (rk["U"], rk["L"])


def plan_count(r):
    total = 1
    for i in range(len(r["people"])):
        total *= max(1, len(person_options(r, i)))
    return total


# ============================================================ the generator

SKILLS = ["tele", "chemo", "wound", "iv_insulin"]
# gen_rosters' invented acuity scales, extra minutes and shifts (test shapes,
# not check values): the twelve-hour ones.
ACUITY_SCALES = [gen_rosters.ACUITY_SCALES[k] for k in (0, 1, 3)]
EXTRA_SCALES = gen_rosters.EXTRA_SCALES
SHIFTS = [s for s in gen_rosters.SHIFTS if s["minutes"] == 720]
# Part shifts as [start, end) offsets in a 720-minute shift: 07:00-15:00,
# 11:00-19:00, 09:00-17:00, 07:00-13:00, 13:00-19:00 on a day shift;
# 19:00-03:00, 23:00-07:00, ... on a night shift.
PART_SHIFTS = [(0, 480), (240, 720), (120, 600), (0, 360), (360, 720)]
LEAVE_TIMES = [120, 240, 360, 480]        # 09:00, 11:00, 13:00, 15:00 (day)
ARRIVE_TIMES = [180, 300, 420, 540]       # 10:00, 12:00, 14:00, 16:00 (day)
ADMIT_TIMES = [120, 300, 420, 540, 600]
ISOLATION = ["contact", "droplet", "airborne", "protective"]
ZONES = ["east", "west", "north"]
INFEASIBLE_KINDS = ["skill_leaves", "moment_count"]
NURSES = (2, 5)         # nurses per roster, inclusive
PATIENTS = (4, 12)      # patients (before expected admissions), inclusive


def _at(doc, offset):
    return hhmm(clock_of(doc["shift"]["start"], "shift.start") + offset)


def _nurses(rng, doc, count):
    holding = {s: rng.uniform(0.5, 0.9) for s in SKILLS}
    nurses = []
    for i in range(count):
        n = {"id": "RN%d" % (i + 1)}
        if i > 0 and rng.random() < 0.55:
            s, e = rng.choice(PART_SHIFTS)
        else:
            s, e = 0, 720
        if s != 0 or rng.random() < 0.15:
            n["start"] = _at(doc, s)
        if e != 720 or rng.random() < 0.15:
            n["end"] = _at(doc, e)
        if (s, e) != (0, 720) and rng.random() < 0.3:
            n["minutes"] = e - s
        r = rng.random()
        if r < 0.2:
            # Timed breaks inside [s, e): thirty minutes about every three hours.
            n["breaks"] = [{"at": _at(doc, t), "minutes": 30}
                           for t in range(s + 180, e - 30, 240)]
        elif r < 0.45 and (s, e) != (0, 720):
            n["break_minutes"] = 30
        skills = [k for k in SKILLS if rng.random() < holding[k]]
        if skills:
            n["skills"] = skills
        if rng.random() < 0.25:
            n["max_patients"] = rng.randint(2, 5)
        if i > 0 and rng.random() < 0.12:
            # A relief nurse: no patients of her own unless a limit allows some.
            n["role"] = "relief"
            n.pop("max_patients", None)
            if rng.random() < 0.4:
                n["max_patients"] = rng.choice([1, 2])
        if i > 0 and rng.random() < 0.15:
            n["covers"] = "RN%d" % rng.randint(1, i)
        nurses.append(n)
    if count > 1 and rng.random() < 0.35:
        # Break cover planned: a timed break for every nurse, staggered by
        # half an hour, each covering the nurse before her in a ring.
        for i, n in enumerate(nurses):
            s = clock_of(n.get("start", doc["shift"]["start"]), "start")
            s = (s - clock_of(doc["shift"]["start"], "shift.start")) % DAY_MINUTES
            n["breaks"] = [{"at": _at(doc, s + 150 + 30 * (i % 4)), "minutes": 30}]
            n.pop("break_minutes", None)
            n.pop("minutes", None)
            n["covers"] = nurses[i - 1]["id"]
    return nurses


def _patients(rng, doc, count, nurse_spans):
    scale = doc["policy"]["acuity_minutes"]
    need_rate = {s: rng.uniform(0.03, 0.2) for s in SKILLS}
    partial_ends = sorted({e for s, e in nurse_spans if e < 720})
    starts_ends = sorted({t for s, e in nurse_spans for t in (s, e) if 0 < t < 720})
    first = rng.randint(100, 800)
    out = []
    for i in range(count):
        p = {"id": "P-%04d" % (first + 13 * i)}
        kind = rng.random()
        a, b = 0, 720
        if kind < 0.2:
            b = rng.choice(LEAVE_TIMES + partial_ends * 2)
        elif kind < 0.33:
            a = rng.choice(ARRIVE_TIMES + starts_ends)
        elif kind < 0.42:
            a = rng.choice([60, 120, 180])
            b = rng.choice([t for t in [360, 480, 600] + partial_ends if t > a])
        if a:
            p["arrives_at"] = _at(doc, a)
        if b != 720:
            p["leaves_at"] = _at(doc, b)
        p["acuity"] = rng.choices([1, 2, 3, 4, 5], [0.2, 0.32, 0.28, 0.14, 0.06])[0]
        if rng.random() < 0.12:
            p["care_minutes"] = max(15, 5 * round(scale[p["acuity"]] * rng.uniform(0.6, 1.5) / 5))
        extras = []
        if a and rng.random() < 0.4:
            extras.append("admission")
        if b != 720 and rng.random() < 0.5:
            extras.append("discharge")
        gen_rosters.extras_and_needs(rng, p, extras, need_rate)
        out.append(p)
    return out


def _spans_of(doc):
    st = clock_of(doc["shift"]["start"], "shift.start")
    spans = []
    for n in doc["nurses"]:
        s = (clock_of(n["start"], "") - st) % DAY_MINUTES if "start" in n else 0
        e = (clock_of(n["end"], "") - st) % DAY_MINUTES if "end" in n else 720
        spans.append((s, e or 720))
    return spans


def _base(rng, name):
    shift = dict(rng.choice(SHIFTS))
    doc = {"version": 1, "unit": {"name": "Ward %s (invented)" % rng.choice("ABCDEFG")},
           "shift": shift, "policy": {}}
    pol = doc["policy"]
    pol["acuity_minutes"] = dict(rng.choice(ACUITY_SCALES))
    pol["extra_minutes"] = dict(rng.choice(EXTRA_SCALES))
    nn = rng.randint(*NURSES)
    doc["nurses"] = _nurses(rng, doc, nn)
    spans = _spans_of(doc)
    npat = max(PATIENTS[0], min(PATIENTS[1], round(nn * rng.uniform(1.8, 3.2))))
    doc["patients"] = _patients(rng, doc, npat, spans)
    if rng.random() < 0.55:
        doc["expected_admissions"] = []
        for k in range(rng.choice([1, 1, 2])):
            adm = {"id": "ADM-%d%02d" % (rng.randint(1, 9), k), "at": _at(doc, rng.choice(
                ADMIT_TIMES)), "acuity": rng.choice([1, 2, 3, 3, 4]), "extras": ["admission"]}
            if rng.random() < 0.15:
                adm["needs"] = [rng.choice(SKILLS)]
            doc["expected_admissions"].append(adm)
    # Policy: the table, a unit limit, high acuity, isolation, zones.
    peak = max(len(c) for c in derive_clock(doc)["cover"])
    types = [t for t in ["med-surg", "med-surg", "telemetry", "icu"]
             if CALIFORNIA_TABLE[t] * nn >= peak]
    if types and rng.random() < 0.5:
        doc["unit"]["type"] = rng.choice(types)
        pol["ratio_table"] = "california"
    table = CALIFORNIA_TABLE.get(doc["unit"].get("type")) if pol.get("ratio_table") else None
    if table is not None:
        for n in doc["nurses"]:
            if n.get("max_patients", 0) > table:
                n["max_patients"] = table
    if rng.random() < 0.6:
        # A unit limit near the busiest moment's census per nurse.
        pol["max_patients"] = max(2, min(6, ceil_div(peak, nn) + rng.randint(0, 1)))
        if table is not None:
            pol["max_patients"] = min(table, pol["max_patients"])
    if rng.random() < 0.25:
        doc["nurses"][0]["role"] = "charge"
        pol["roles"] = {"charge": {"max_patients": rng.choice([1, 2, 3]),
                                   "duty_minutes": rng.choice([60, 120, 180])}}
        if table is not None:
            pol["roles"]["charge"]["max_patients"] = min(table,
                                                          pol["roles"]["charge"]["max_patients"])
        doc["nurses"][0].pop("max_patients", None)
    if any(n.get("role") == "relief" for n in doc["nurses"]) and rng.random() < 0.3:
        pol.setdefault("roles", {})["relief"] = {"max_patients": 1}
    everyone = doc["patients"] + doc.get("expected_admissions", [])
    if rng.random() < 0.3:
        pol["high_acuity"] = {"level": 4, "max_per_nurse": rng.choice([1, 2])}
    if rng.random() < 0.3:
        for p in everyone:
            if rng.random() < 0.25:
                p["isolation"] = rng.choice(ISOLATION)
        if rng.random() < 0.5:
            pol["isolation_needs"] = {"airborne": ["n95"]}
            for n in doc["nurses"]:
                if rng.random() < 0.7:
                    n.setdefault("skills", []).append("n95")
    if rng.random() < 0.3:
        zones = rng.sample(ZONES, rng.randint(2, 3))
        for p in everyone:
            p["zone"] = rng.choice(zones)
        if rng.random() < 0.7:
            pol["max_zones"] = rng.choice([1, 2])
        pol["balance_tolerance"] = rng.choice([0, 0.05])
    for p in everyone:
        if rng.random() < 0.05:
            p["ratio"] = "1:%d" % min(table or 3, rng.choice([2, 3]))
    doc["name"] = name
    return doc


def _repair(rng, doc, r):
    """Loosen one thing that may block every plan; False when nothing is left."""
    pol, nurses = doc["policy"], doc["nurses"]
    everyone = doc["patients"] + doc.get("expected_admissions", [])
    full = [n for n, (s, e) in zip(nurses, _spans_of(doc)) if (s, e) == (0, 720)]
    for q, el in enumerate(r["eligible"]):
        if not el:
            pat = everyone[r["parts"][q]["person"]]
            need = set(pat.get("needs") or [])
            if pat.get("isolation") in (pol.get("isolation_needs") or {}):
                need |= set(pol["isolation_needs"][pat["isolation"]])
            pick = rng.choice([n for n in full if n.get("role") != "charge"] or full)
            pick["skills"] = sorted(set(pick.get("skills", [])) | need)
            return True
    table = r["table"]
    loosen = [  # what can be loosened, in this order
        ("unit_limit", "max_patients" in pol and (table is None or pol["max_patients"] < table)),
        ("nurse_limit", any("max_patients" in n for n in nurses)),
        ("charge", bool((pol.get("roles") or {}).get("charge"))),
        ("ratio", any("ratio" in p for p in everyone)),
        ("high", "high_acuity" in pol),
        ("isolation", any(p.get("isolation") == "protective" for p in everyone)),
        ("zones", "max_zones" in pol),
        ("table", table is not None),
        ("nurse", len(nurses) < NURSES[1]),
    ]
    options = [what for what, can in loosen if can]
    if not options:
        return False
    what = rng.choice(options)
    if what == "unit_limit":
        pol["max_patients"] += 1
    elif what == "nurse_limit":
        del rng.choice([n for n in nurses if "max_patients" in n])["max_patients"]
    elif what == "charge":
        pol["roles"].pop("charge", None)
        if not pol["roles"]:
            del pol["roles"]
        if nurses[0].get("role") == "charge":
            del nurses[0]["role"]
    elif what == "ratio":
        del rng.choice([p for p in everyone if "ratio" in p])["ratio"]
    elif what == "high":
        pol["high_acuity"]["max_per_nurse"] += 1
    elif what == "isolation":
        del rng.choice([p for p in everyone if p.get("isolation") == "protective"])["isolation"]
    elif what == "zones":
        del pol["max_zones"]
    elif what == "table":
        # A looser table: icu 1:2 -> telemetry 1:4 -> med-surg 1:5 -> none.
        nxt = {"icu": "telemetry", "step-down": "telemetry", "telemetry": "med-surg"}
        if doc["unit"]["type"] in nxt:
            doc["unit"]["type"] = nxt[doc["unit"]["type"]]
        else:
            del pol["ratio_table"]
    else:
        nurses.append({"id": "RN%d" % (len(nurses) + 1), "skills": list(SKILLS)})
    return True


def _break(rng, doc, kind):
    """Make doc infeasible through the clock; False if this roster cannot."""
    nurses = doc["nurses"]
    spans = _spans_of(doc)
    if kind == "skill_leaves":
        # A patient here past 15:00 (or the night's 03:00) needs a skill only a
        # nurse leaving then holds: the part after she leaves has no nurse.
        early = [k for k, (s, e) in enumerate(spans) if s == 0 and e < 720]
        if not early:
            if len(nurses) < 2:
                return False
            k = len(nurses) - 1
            nurses[k]["end"] = _at(doc, 480)
            nurses[k].pop("start", None)
            nurses[k].pop("minutes", None)
            nurses[k].pop("breaks", None)
            early = [k]
        k = rng.choice(early)
        e = _spans_of(doc)[k][1]
        for n in nurses:
            if "ecmo" in n.get("skills", []):
                n["skills"].remove("ecmo")
        nurses[k].setdefault("skills", []).append("ecmo")
        r = derive_clock(doc)
        cand = [i for i, x in enumerate(r["people"]) if x["a"] < e < x["b"]]
        if not cand:
            return False
        everyone = doc["patients"] + doc.get("expected_admissions", [])
        everyone[rng.choice(cand)].setdefault("needs", []).append("ecmo")
        return True
    # moment_count: admissions arrive at the busiest moment until the nurses
    # on then cannot hold them under the unit's limit.
    pol = doc["policy"]
    r = derive_clock(doc)
    m = max(range(len(r["moments"])), key=lambda i: len(r["cover"][i]))
    t0 = r["moments"][m][0]
    on = [j for j, n in enumerate(r["nurses"]) if n["counted"] and n["s"] <= t0 < n["e"]]
    if not on:
        return False
    if "max_patients" not in pol:
        pol["max_patients"] = min(r["table"] or 6, max(2, ceil_div(len(r["cover"][m]), len(on))))
    doc.setdefault("expected_admissions", [])
    for k in range(6):
        if feasible(derive_clock(doc)) is False:
            return True
        doc["expected_admissions"].append({"id": "ADM-X%d" % k, "at": _at(doc, t0),
                                           "acuity": 2})
    return feasible(derive_clock(doc)) is False


def generate(rng, name, kind=None):
    """One clock roster: feasible (HiGHS finds a plan), or made infeasible
    by `kind` (HiGHS proves it)."""
    for _ in range(40):
        doc = _base(rng, name)
        ok = False
        for _ in range(40):
            f = feasible(derive_clock(doc))
            if f:
                ok = True
                break
            if f is None or not _repair(rng, doc, derive_clock(doc)):
                break
        if not ok:
            continue
        if kind is None:
            return doc
        trial = copy.deepcopy(doc)
        if _break(rng, trial, kind) and feasible(derive_clock(trial)) is False:
            return trial
    raise RuntimeError("no %s clock roster made for %s" % (kind or "feasible", name))


NURSE_KEYS = ["id", "role", "skills", "start", "end", "minutes", "breaks", "break_minutes",
              "covers", "max_patients", "duty_minutes"]
PATIENT_KEYS = ["id", "zone", "acuity", "care_minutes", "extras", "needs", "ratio", "isolation",
                "arrives_at", "leaves_at", "nurse", "lock"]


def to_yaml(doc):
    out = gen_rosters.head_lines(doc, "check_clock.py")
    pol = doc["policy"]
    for key in ("roles", "high_acuity", "isolation_needs", "max_zones", "balance_tolerance"):
        if key in pol:
            out.append("  %s: %s" % (key, gen_rosters.q(pol[key])))
    out += gen_rosters.people_lines(doc, NURSE_KEYS, PATIENT_KEYS)
    if doc.get("expected_admissions"):
        out.append("expected_admissions:")
        for p in doc["expected_admissions"]:
            out.append("  - " + flow_map(p, ["id", "at"] + PATIENT_KEYS[1:]))
    return "\n".join(out) + "\n"


def pin_nurse(rng, doc):
    """A nurse pinned at the peak (keel's stage ranks): a nurse on for part
    of the shift (or the whole of it) gets one more patient, present only
    while she is on (one part) and locked to her, whose care is 1.3-1.6
    times her capacity.  Invented figures.  None when no plan would keep
    the rules (the roster stays as it was)."""
    trial = copy.deepcopy(doc)
    r = derive_clock(trial)
    spans = _spans_of(trial)
    ok = [j for j, n in enumerate(r["nurses"]) if j > 0 and n["counted"]
          and (n["limit"] is None or n["limit"] >= 1) and trial["nurses"][j].get("role") is None]
    if not ok:
        return None
    j = rng.choice(ok)
    s, e = spans[j]
    cap = r["nurses"][j]["capacity"]
    # care C present over [s, e) of the 720-minute shift: ceil(C (e - s) / 720)
    present = 5 * round(cap * rng.uniform(1.3, 1.6) / 5)
    p = {"id": "P-9%03d" % rng.randint(0, 999), "care_minutes": -(-present * 720 // (e - s)),
         "nurse": trial["nurses"][j]["id"], "lock": True}
    if s:
        p["arrives_at"] = _at(trial, s)
    if e != 720:
        p["leaves_at"] = _at(trial, e)
    trial["patients"].append(p)
    try:
        return trial if feasible(derive_clock(trial)) else None
    except RosterError:
        return None


def write_rosters(out_dir, seed, count, infeasible_every=5, pinned_every=0):
    """Write `count` clock rosters clock-SEED-K.yaml; every
    infeasible_every-th is infeasible, the kinds in turn; with pinned_every
    K, every K-th feasible one gets a pinned nurse (pin_nurse, its own
    random stream)."""
    def make(rng, name, kind):
        doc = generate(rng, name, kind)
        if kind is None and pinned_every and int(name.rsplit("-", 1)[1]) % pinned_every == 0:
            doc = pin_nurse(random.Random("pin-" + name), doc) or doc
        return doc
    return gen_rosters.write_kinds(out_dir, seed, count, "clock", INFEASIBLE_KINDS,
                                   infeasible_every, make, to_yaml)


# ================================================================ keel's report

def _offset_of(r, text):
    return (clock_of(text, "handoffs.at") - r["start"]) % DAY_MINUTES


def keel_entries(doc):
    """keel's per-patient entries by id: patients[], then expected
    admissions if keel lists them apart."""
    out = {}
    for key in ("patients", "expected_admissions"):
        lst = doc.get(key)
        if isinstance(lst, list):
            for e in lst:
                if isinstance(e, dict) and isinstance(e.get("id"), str):
                    out.setdefault(e["id"], e)
    return out


def read_plan(r, doc, problems):
    """keel's plan, part by part: the first nurse, then each hand-off where
    the presence is cut.  None when it cannot be read."""
    nurses, people, parts = r["nurses"], r["people"], r["parts"]
    by_id = {n["id"]: j for j, n in enumerate(nurses)}
    entries = keel_entries(doc)
    plan = [None] * len(parts)
    for pat in people:
        pid = pat["id"]
        e = entries.get(pid)
        if e is None:
            problems.append("patient %s is missing from keel's report" % pid)
            continue
        if e.get("nurse") not in by_id:
            problems.append("patient %s: nurse %r is no nurse of the roster"
                            % (pid, e.get("nurse")))
            continue
        cur = by_id[e["nurse"]]
        hos = e.get("handoffs", [])
        if hos is None:
            hos = []
        if not isinstance(hos, list):
            problems.append("patient %s: handoffs %r is not a list" % (pid, hos))
            continue
        parsed = []
        for h in hos:
            try:
                at = _offset_of(r, h["at"])
                fr, to = by_id[h["from"]], by_id[h["to"]]
            except (KeyError, TypeError, RosterError):
                problems.append("patient %s: unreadable hand-off %r" % (pid, h))
                continue
            parsed.append((at, fr, to, h))
            if nurses[fr]["e"] != at:
                problems.append("patient %s: hand-off at %s from %s, who leaves at %s (a "
                                "hand-off happens when the nurse handing off leaves)"
                                % (pid, h["at"], h["from"], at_text(r, nurses[fr]["e"])))
            if fr == to:
                problems.append("patient %s: hand-off at %s from %s to herself"
                                % (pid, h["at"], h["from"]))
        if [p[0] for p in parsed] != sorted({p[0] for p in parsed}):
            problems.append("patient %s: hand-offs not in strict time order: %r" % (pid, hos))
        qs = pat["parts"]
        plan[qs[0]] = cur
        k = 0
        for q in qs[1:]:
            t = parts[q]["s"]
            while k < len(parsed) and parsed[k][0] < t:
                problems.append("patient %s: hand-off at %s is not at a cut of the stay "
                                "(a nurse's end time strictly inside %s-%s)"
                                % (pid, parsed[k][3]["at"], at_text(r, pat["a"]),
                                   at_text(r, pat["b"])))
                k += 1
            if k < len(parsed) and parsed[k][0] == t:
                at, fr, to, h = parsed[k]
                if fr != cur:
                    problems.append("patient %s: hand-off at %s from %s, but %s has the "
                                    "patient then" % (pid, h["at"], h["from"], nurses[cur]["id"]))
                cur = to
                k += 1
            plan[q] = cur
        for at, fr, to, h in parsed[k:]:
            problems.append("patient %s: hand-off at %s is not at a cut of the stay "
                            "(a nurse's end time strictly inside %s-%s)"
                            % (pid, h["at"], at_text(r, pat["a"]), at_text(r, pat["b"])))
    return None if None in plan else plan


def check_timeline(r, plan, j, entry, problems):
    """keel's nurses[].timeline ([{at, patients}] at each change) against
    the plan: every count it gives is the count then, and every change of
    the count while she is on is listed."""
    tl = entry.get("timeline")
    nid = r["nurses"][j]["id"]
    if tl is None:
        if r["clock"]:
            problems.append("nurse %s: no timeline" % nid)
        return
    if not isinstance(tl, list):
        problems.append("nurse %s: timeline %r is not a list" % (nid, tl))
        return
    mine = counts_over_time(r, plan, j)
    n = r["nurses"][j]
    at, off = {}, []
    for item in tl:
        try:
            t = _offset_of(r, item["at"])
        except (KeyError, TypeError, RosterError):
            problems.append("nurse %s: unreadable timeline entry %r" % (nid, item))
            continue
        if item.get("off") is True:
            off.append(t)
            if t != n["e"] % DAY_MINUTES:
                problems.append("nurse %s: timeline says off at %s, she leaves at %s"
                                % (nid, item["at"], at_text(r, n["e"])))
            continue
        at[t] = item.get("patients")
    if n["e"] < r["L"] and not off:
        problems.append("nurse %s: timeline does not say she is off at %s"
                        % (nid, at_text(r, n["e"])))

    def count_at(t):
        c = None
        for t0, k in mine:
            if t0 <= t:
                c = k
        return c
    for t, k in at.items():
        if not isinstance(k, int) or isinstance(k, bool):
            problems.append("nurse %s: timeline entry at %s has patients %r"
                            % (nid, at_text(r, t), k))
        else:
            want = count_at(t)
            if not n["s"] <= t < n["e"] or want != k:
                problems.append("nurse %s: timeline says %d patients at %s, the plan gives %s"
                                % (nid, k, at_text(r, t), "off" if not n["s"] <= t < n["e"]
                                   else want))
    last = None
    for t0, k in mine:
        if k != last and t0 not in at:
            problems.append("nurse %s: timeline lacks the change to %d patients at %s"
                            % (nid, k, at_text(r, t0)))
        last = k


def check_times(r, who, entry, keys, problems):
    """The times keel prints for a patient or nurse against the roster's:
    keys [(start-like key, offset), (end-like key, offset)], each checked
    when the entry has it (an end-like 00:00 offset is the shift's end)."""
    for (key, want), endlike in zip(keys, (False, True)):
        if key in entry:
            try:
                got = _offset_of(r, entry[key])
            except (TypeError, RosterError):
                got = None
            if endlike and got == 0:
                got = r["L"]
            if got != want:
                problems.append("%s: %s %r, the roster gives %s"
                                % (who, key, entry[key], at_text(r, want)))


def check_report(r, doc):
    """keel's JSON for a roster with a plan, against the roster.  Returns
    (problems, facts)."""
    problems = []
    plan = read_plan(r, doc, problems)
    if plan is None:
        return problems, None
    for rule, text in violations(r, plan):
        problems.append("keel's plan breaks %s: %s" % (rule, text))
    loads = loads_of(r, plan)
    entries = keel_entries(doc)
    for pat in r["people"]:
        e = entries.get(pat["id"], {})
        first = r["nurses"][plan[pat["parts"][0]]]["id"]
        if e.get("nurse") != first:
            problems.append("patient %s: nurse %r is not the first nurse %s"
                            % (pat["id"], e.get("nurse"), first))
        apart = pat["id"] in {x.get("id") for x in doc.get("expected_admissions") or []
                              if isinstance(x, dict)}
        if pat["expected"] != (apart or e.get("expected") is True):
            problems.append("patient %s: %s, but keel %s" % (
                pat["id"], "an expected admission" if pat["expected"] else "not expected",
                "does not mark it expected" if pat["expected"] else "marks it expected"))
        check_times(r, "patient " + pat["id"], e, (("arrives_at", pat["a"]),
                                                   ("leaves_at", pat["b"])), problems)
        # The patient's care on this shift: its present share plus extras,
        # which its parts add up to.
        want = pat["present"] + pat["E"]
        if e.get("care_minutes") != want:
            problems.append("patient %s: care_minutes %r, ceil(%d x %d / %d) + extras %d = %d"
                            % (pat["id"], e.get("care_minutes"), pat["C"], pat["b"] - pat["a"],
                               r["L"], pat["E"], want))
    by_id = {n["id"]: j for j, n in enumerate(r["nurses"])}
    utils, seen = [], set()
    for entry in doc.get("nurses") or []:
        if not isinstance(entry, dict) or entry.get("id") not in by_id:
            problems.append("unknown nurse entry %r" % (entry,))
            continue
        j = by_id[entry["id"]]
        seen.add(j)
        n = r["nurses"][j]
        for key, want in (("load_minutes", loads[j]), ("capacity_minutes", n["capacity"]),
                          ("duty_minutes", n["duty"]), ("counted", n["counted"])):
            got = entry.get(key)
            if got != want or type(got) is not type(want):
                problems.append("nurse %s: %s %r, the clock gives %r" % (n["id"], key, got, want))
        check_times(r, "nurse " + n["id"], entry, (("start", n["s"]), ("end", n["e"])),
                    problems)
        held = {r["people"][r["parts"][q]["person"]]["id"] for q, jj in enumerate(plan)
                if jj == j}
        if isinstance(entry.get("patients"), list) and set(entry["patients"]) != held:
            problems.append("nurse %s: patients %s, the plan gives her %s at some time"
                            % (n["id"], sorted(entry["patients"]), sorted(held)))
        if n["counted"]:
            u = Fraction(loads[j], n["capacity"])
            utils.append(u)
            got = entry.get("utilisation")
            if not is_num(got) or abs(got - float(u)) > PRINT_TOL:
                problems.append("nurse %s: utilisation %r, load / capacity = %d/%d = %.12f"
                                % (n["id"], got, loads[j], n["capacity"], float(u)))
        check_timeline(r, plan, j, entry, problems)
    for j, n in enumerate(r["nurses"]):
        if j not in seen:
            problems.append("nurse %s missing from the report" % n["id"])
    if not utils:
        return problems, None
    fU, fL = max(utils), min(utils)
    keel_run.check_imbalance(doc, fU, fL, "plan", problems)
    got = keel_run.read_stages(r, doc, problems)
    if got is None:
        return problems, None
    st, proven, status, kU, kL = got
    kr = keel_run.read_ranks(r, doc, kU, problems)
    if kr is None:
        return problems, None
    if r["stage3"] or r["stage4"]:
        # Later stages hold every load in the windows keel's own levels and
        # L give (docs/model.md).
        tol = r["tol"]
        for j, (lo, hi) in highs_model.windows(r, kU, kL, tol, kr["levels"]).items():
            if not lo <= loads[j] <= hi:
                problems.append("nurse %s: load %d outside the window [%d, %d] of keel's "
                                "level %s, lift %s, tolerance %s"
                                % (r["nurses"][j]["id"], loads[j], lo, hi, kr["levels"][j],
                                   kL, tol))
    else:
        if fL != kL or fU > kU or (proven["peak"] and fU != kU):
            problems.append("the plan's utilisation runs %s..%s, the stages give peak %s, "
                            "lift %s" % (fL, fU, kU, kL))
        for j, load, top in keel_run.loads_within(r, loads, kr["levels"]):
            problems.append("nurse %s: load %d above her level's %d"
                            % (r["nurses"][j]["id"], load, top))
    return problems, {"plan": plan, "U": kU, "L": kL, "proven": proven, "status": status,
                      "ranks": kr,
                      "peak_bound": st["peak"].get("bound"),
                      "lift_bound": st["lift"].get("bound")}


def compare(r, k, ref, bf_ranks=None):
    """keel's stage values against the reference's (exact fractions);
    bf_ranks: brute force's ranks when enumerated (they then stand for the
    reference's)."""
    out = []
    U, L = ref["peak"], ref["lift"]
    # Source (every check below): the optimum of HiGHS through Debian's
    # python3-scipy 1.10 (scipy.optimize.milp), each stage confirmed by a
    # descent step HiGHS proves infeasible.
    if U["status"] == "optimal":
        if k["U"] < U["value"]:
            out.append("peak: keel's U %s = %.9f below the proven optimum %s = %.9f"
                       % (k["U"], k["U"], U["value"], U["value"]))
        if k["proven"]["peak"] and k["U"] != U["value"]:
            out.append("peak: keel U* %s = %.9f, reference U* %s = %.9f"
                       % (k["U"], k["U"], U["value"], U["value"]))
    elif k["proven"]["peak"] and k["U"] > U["value"]:
        out.append("peak: keel claims U %.9f optimal, the reference found %.9f"
                   % (k["U"], U["value"]))
    if is_num(k["peak_bound"]) and k["peak_bound"] > float(U["value"]) + TOL:
        out.append("peak: keel's bound %.9f above a feasible U %.9f"
                   % (k["peak_bound"], U["value"]))
    if k["U"] != U["value"] or L is None:
        return out
    # Stage ranks (docs/model.md), on the same U*.
    ref_rk = ref["ranks"] if bf_ranks is None else bf_ranks
    out += keel_run.compare_ranks(r, k["ranks"], ref_rk,
                                  U["status"] == "optimal" and k["proven"]["peak"])[0]
    levels = ref["levels"] if bf_ranks is None else bf_ranks["levels"]
    if k["ranks"]["levels"] != levels:
        return out          # the lift holds other levels
    if L["status"] == "optimal":
        if k["L"] > L["value"]:
            out.append("lift: keel's L %s above the proven optimum %s" % (k["L"], L["value"]))
        if k["proven"]["lift"] and k["L"] != L["value"]:
            out.append("lift: keel L* %s = %.9f, reference L* %s = %.9f"
                       % (k["L"], k["L"], L["value"], L["value"]))
    elif k["proven"]["lift"] and k["L"] < L["value"]:
        out.append("lift: keel claims L %.9f optimal, the reference found %.9f"
                   % (k["L"], L["value"]))
    if is_num(k["lift_bound"]) and k["lift_bound"] < float(L["value"]) - TOL:
        out.append("lift: keel's bound %.9f below a feasible L %.9f"
                   % (k["lift_bound"], L["value"]))
    return out


# ================================================================ edge cases

F = Fraction
# Hand-computed figures for the rosters under data/clock/.  Times are read
# against the shift; every interval is half-open [from, to), so a patient
# leaving at 11:00 and one arriving at 11:00 are never held together, and a
# patient leaving exactly when the nurse leaves needs no hand-off (common
# practice, no source).  Capacity = (end - start) - break minutes; care of a
# part as in the module comment.  "plan": patient -> (first nurse,
# [(at, from, to), ...]); "parts": the care minutes of each part in time
# order.
EDGE_CASES = [
    {"file": "midnight.yaml", "exit": 0,
     # Night 19:00 + 720; RN-B 19:00-03:00 (offsets 0-480): capacity 480 - 60
     # = 420, RN-A 720 - 60 = 660.  E1-P1 [0, 720) C 360, cut at 480:
     # ceil(360*480/720) = 240, then 120.  E1-P2 [0, 420) (02:00):
     # ceil(300*420/720) = 175, RN-B's end 480 is not inside: one part.
     # E1-P3 [360, 720) (01:00): ceil(240*360/720) = 120, cut at 480:
     # ceil(120*120/360) = 40, then 80.  Of the eight plans the best peak is
     # E1-P1 with RN-B until 03:00, the others with RN-A: RN-A 120 + 175 +
     # 120 = 415 (415/660 = 0.6288), RN-B 240 (240/420 = 0.5714); the next
     # best peak is 2/3.
     "parts": {"E1-P1": [240, 120], "E1-P2": [175], "E1-P3": [40, 80]},
     "capacity": {"RN-A": 660, "RN-B": 420},
     "U": F(415, 660), "L": F(240, 420),
     "plan": {"E1-P1": ("RN-B", [("03:00", "RN-B", "RN-A")]), "E1-P2": ("RN-A", []),
              "E1-P3": ("RN-A", [])},
     "loads": {"RN-A": 415, "RN-B": 240}},
    {"file": "leave_at_end.yaml", "exit": 0,
     # E2-P1 [0, 480) ends when RN-A leaves: one part, no hand-off (common
     # practice, no source); ceil(240*480/720) = 160, only RN-A has wound.  E2-P2 [0, 720) C 300: with RN-A until 15:00
     # (200, then 100 to RN-B) RN-A carries 360/420; with RN-B 300/660 = 5/11
     # while RN-A carries 160/420 = 8/21.
     "parts": {"E2-P1": [160], "E2-P2": [200, 100]},
     "capacity": {"RN-A": 420, "RN-B": 660},
     "U": F(300, 660), "L": F(160, 420),
     "plan": {"E2-P1": ("RN-A", []), "E2-P2": ("RN-B", [])},
     "loads": {"RN-A": 160, "RN-B": 300}},
    {"file": "discharge_then_admission.yaml", "exit": 0,
     # Source: California Code of Regulations, Title 22, §70217(a):
     # medical-surgical 1:5 (the per-nurse maximum keel's table encodes).
     # Five patients 07:00-11:00, four 11:00-14:00, five from 14:00: never
     # six at one moment.  E3-P1 [0, 240): ceil(120*240/720) = 40.  E3-A1
     # [420, 720): ceil(90*300/720) = ceil(37.5) = 38, + admission 60 = 98.
     # Load 40 + 4*60 + 98 = 378 of 660.
     "parts": {"E3-P1": [40], "E3-P2": [60], "E3-A1": [98]},
     "capacity": {"RN-A": 660},
     "U": F(378, 660), "L": F(378, 660),
     "plan": {"E3-P1": ("RN-A", []), "E3-A1": ("RN-A", [])},
     "loads": {"RN-A": 378}},
    {"file": "admission_at_discharge.yaml", "exit": 0,
     # The admission at 11:00, when E3-P1 leaves: half-open intervals, never
     # six at once (common practice, no source).
     # E3-A1 [240, 720): ceil(90*480/720) = 60, + 60 = 120; load 400 of 660.
     "parts": {"E3-P1": [40], "E3-A1": [120]},
     "capacity": {"RN-A": 660},
     "U": F(400, 660), "L": F(400, 660),
     "plan": {"E3-A1": ("RN-A", [])},
     "loads": {"RN-A": 400}},
    {"file": "admission_overlap.yaml", "exit": 3,
     # Source: California Code of Regulations, Title 22, §70217(a)
     # (medical-surgical 1:5).  The admission at 10:00: six patients from
     # 10:00 to 11:00, one nurse: no valid assignment.
     # E3-A1 [180, 720): ceil(90*540/720) = ceil(67.5) = 68, + 60 = 128.
     "parts": {"E3-A1": [128]}},
    {"file": "part_ceiling.yaml", "exit": 0,
     # RN-A 07:00-15:00 (capacity 480 - 60 = 420), RN-B 660; every first
     # part locked to RN-A.  E4-P1 [0, 720) C 250: ceil(250*480/720) =
     # ceil(166.67) = 167 + admission 60 = 227, then 250 - 167 = 83.
     # E4-P2 [120, 720) C 100: present ceil(100*600/720) = ceil(83.33) = 84;
     # [120, 480): ceil(84*360/600) = ceil(50.4) = 51, then 33.  E4-P3
     # [120, 600) C 200: present ceil(200*480/720) = 134; [120, 480):
     # ceil(134*360/480) = ceil(100.5) = 101, then 33.  RN-A 227 + 51 + 101
     # = 379, RN-B 83 + 33 + 33 = 149.
     "parts": {"E4-P1": [227, 83], "E4-P2": [51, 33], "E4-P3": [101, 33]},
     "capacity": {"RN-A": 420, "RN-B": 660},
     "U": F(379, 420), "L": F(149, 660),
     "plan": {p: ("RN-A", [("15:00", "RN-A", "RN-B")]) for p in ("E4-P1", "E4-P2", "E4-P3")},
     "loads": {"RN-A": 379, "RN-B": 149}},
    {"file": "day24.yaml", "exit": 0,
     # 24-hour shift from 07:00: end-like "07:00" is minute 1440.  RN-A
     # capacity 1440 - 120 = 1320, RN-B (to 19:00) 720 - 120 = 600.  E5-P1
     # [0, 1440) C 600, cut at 720: 300 + 300.  E5-P2 [0, 720): ceil(300*720
     # /1440) = 150, ends with RN-B: one part.  Best: E5-P1 with RN-A
     # (600/1320 = 5/11), E5-P2 with RN-B (150/600 = 1/4); E5-P1 with RN-B
     # first gives her 300/600 = 1/2 at best.
     "parts": {"E5-P1": [300, 300], "E5-P2": [150]},
     "capacity": {"RN-A": 1320, "RN-B": 600},
     "U": F(600, 1320), "L": F(150, 600),
     "plan": {"E5-P1": ("RN-A", []), "E5-P2": ("RN-B", [])},
     "loads": {"RN-A": 600, "RN-B": 150}},
    {"file": "late_start.yaml", "exit": 0,
     # RN-B on from 11:00 (capacity 480 - 60 = 420) cannot take E6-P1 or
     # E6-P2 (here from 07:00, no cut); E6-P3 [420, 720): ceil(240*300/720)
     # = 100; RN-A holds two from 07:00, her limit: E6-P3 to RN-B.
     # RN-A 400/660 = 20/33, RN-B 100/420 = 5/21.
     "parts": {"E6-P1": [200], "E6-P3": [100]},
     "capacity": {"RN-A": 660, "RN-B": 420},
     "U": F(400, 660), "L": F(100, 420),
     "plan": {"E6-P1": ("RN-A", []), "E6-P2": ("RN-A", []), "E6-P3": ("RN-B", [])},
     "loads": {"RN-A": 400, "RN-B": 100}},
    {"file": "skill_leaves.yaml", "exit": 3,
     # E7-P1 [0, 720) is cut at 15:00; after it no nurse with tele is on.
     "parts": {"E7-P1": [134, 66]}},
    {"file": "outside_shift.yaml", "exit": 2, "stderr": "outside the shift (07:00 to 19:00)"},
]


def check_edge(case, keel, keel_seconds):
    """One hand-computed case: the reference against the hand figures, then
    keel against both."""
    path = os.path.join(EDGE_DIR, case["file"])
    name = "edge:" + os.path.splitext(case["file"])[0]
    out = {"name": name, "kind": None, "problems": [], "keel": None, "ref": None, "notes": []}
    try:
        r = None
        try:
            r = load_clock(path)
        except RosterError as e:
            if case["exit"] != 2:
                out["problems"].append("REFERENCE rejects the roster: %s" % e)
            elif case["stderr"] not in str(e):
                out["problems"].append("REFERENCE rejects it otherwise: %s" % e)
        if r is not None and case["exit"] == 2:
            out["problems"].append("REFERENCE accepts a roster keel must reject")
        if r is not None:
            ids = {p["id"]: p for p in r["people"]}
            for pid, want in case.get("parts", {}).items():
                got = [r["parts"][q]["care"] for q in ids[pid]["parts"]]
                if got != want:
                    out["problems"].append("REFERENCE: %s parts %s, by hand %s" % (pid, got, want))
            for nid, want in case.get("capacity", {}).items():
                got = [n["capacity"] for n in r["nurses"] if n["id"] == nid][0]
                if got != want:
                    out["problems"].append("REFERENCE: %s capacity %d, by hand %d"
                                           % (nid, got, want))
            ref = solve_clock(r, 20.0)
            out["ref"] = {"feasible": ref["feasible"],
                          "U": ref["peak"]["value"] if ref["feasible"] else None,
                          "L": ref["lift"]["value"] if ref["feasible"] else None}
            bf = brute_force(r, 10 ** 6)
            if (case["exit"] == 0) != bool(ref["feasible"]) or (bf is None) == bool(
                    ref["feasible"]):
                out["problems"].append("REFERENCE: HiGHS feasible %s, brute force %s, by hand %s"
                                       % (ref["feasible"], bf is not None, case["exit"] == 0))
            elif case["exit"] == 0:
                got = (ref["peak"]["value"], ref["lift"]["value"])
                if got != (case["U"], case["L"]) or bf != got \
                        or ref["peak"]["status"] != "optimal" \
                        or ref["lift"]["status"] != "optimal":
                    out["problems"].append("REFERENCE: HiGHS (U, L) %s (%s/%s), brute force %s, "
                                           "by hand %s" % (got, ref["peak"]["status"],
                                                           ref["lift"]["status"], bf,
                                                           (case["U"], case["L"])))
        if keel is None:
            return out
        rc, doc, stderr, secs = run_keel(keel, path, keel_seconds)
        out["keel"] = {"rc": rc, "seconds": secs, "status": None}
        if rc != case["exit"]:
            out["problems"].append("keel exit %s (%s), expected %d: %s"
                                   % (rc, EXIT_NAMES.get(rc, "?"), case["exit"],
                                      stderr_head(stderr)))
            return out
        if rc == 2:
            if case["stderr"] not in stderr:
                out["problems"].append("keel's message lacks %r: %s"
                                       % (case["stderr"], stderr_head(stderr)))
            return out
        if rc != 0 or r is None:
            return out
        facts = keel_run.report_facts(out, doc, lambda d: check_report(r, d))
        if facts is None:
            return out
        out["keel"].update(status=facts["status"], U=facts["U"], L=facts["L"])
        if (facts["U"], facts["L"]) != (case["U"], case["L"]):
            out["problems"].append("keel's stages give U %s, L %s; by hand %s, %s"
                                   % (facts["U"], facts["L"], case["U"], case["L"]))
        entries = keel_entries(doc)
        for pid, (first, hos) in case["plan"].items():
            e = entries.get(pid, {})
            got = (e.get("nurse"), [(h.get("at"), h.get("from"), h.get("to"))
                                    for h in e.get("handoffs") or [] if isinstance(h, dict)])
            if got != (first, hos):
                out["problems"].append("patient %s: keel gives nurse %s hand-offs %s; by hand "
                                       "%s %s" % (pid, got[0], got[1], first, hos))
        for entry in doc.get("nurses") or []:
            want = case["loads"].get(entry.get("id"))
            if want is not None and entry.get("load_minutes") != want:
                out["problems"].append("nurse %s: load_minutes %r, by hand %d"
                                       % (entry.get("id"), entry.get("load_minutes"), want))
    except Exception as e:  # a broken case is a failure, not a crash
        out["problems"].append("check crashed: %s: %s" % (type(e).__name__, e))
    return out


# ========================================================== generated rosters

def check_one(job):
    path, kind, keel, keel_seconds, highs_seconds, brute_max, share = job
    name = os.path.splitext(os.path.basename(path))[0]
    out = {"name": name, "kind": kind, "problems": [], "keel": None, "ref": None, "notes": []}
    try:
        r = load_clock(path)
        if keel is not None:
            rc, doc, stderr, ksecs = run_keel(keel, path, keel_seconds)
            out["keel"] = {"rc": rc, "seconds": ksecs, "status": None}
        t0 = time.monotonic()
        ref = solve_clock(r, highs_seconds, share)
        out["ref"] = {"seconds": time.monotonic() - t0, "feasible": ref["feasible"],
                      "U": ref["peak"]["value"] if ref["peak"] else None,
                      "L": ref["lift"]["value"] if ref["lift"] else None,
                      "proven": bool(ref["feasible"]) and ref["peak"]["status"] == "optimal"
                      and ref["lift"]["status"] == "optimal"
                      and ref["ranks"]["status"] == "optimal", "brute": False,
                      "pinned": len(ref["ranks"]["pinned"]) if ref["ranks"]
                      and ref["ranks"]["status"] == "optimal" else None}
        kept = [c for c in r["covers"] if c["kept"]]
        out["ref"]["covers"] = len(kept)
        if kept:
            # Does break cover change the answer?  The same roster with
            # no cover kept, solved again.
            loose = dict(r, covers=[dict(c, kept=False) for c in r["covers"]])
            free = solve_clock(loose, highs_seconds, share)
            out["ref"]["cover_binds"] = (free["feasible"] != ref["feasible"]) or (
                bool(ref["feasible"]) and free["peak"]["value"] != ref["peak"]["value"])
        if kind is not None and ref["feasible"] is not False:
            out["problems"].append("REFERENCE: made infeasible by %s, HiGHS says %s"
                                   % (kind, ref["feasible"]))
        bf_ranks = None
        if plan_count(r) <= brute_max:
            bfr = brute_force(r, brute_max, full=True)
            bf = None if bfr is None else (bfr["U"], bfr["L"])
            out["ref"]["brute"] = True
            if (bf is None) != (ref["feasible"] is False):
                out["problems"].append("REFERENCE: brute force %s, HiGHS feasible %s"
                                       % (bf, ref["feasible"]))
            elif bf is not None:
                bf_ranks = bfr
                out["ref"]["pinned"] = len(bfr["pinned"])
                rk = ref["ranks"]
                got = None if rk is None else (sorted(rk["pinned"]), rk["rest"], rk["levels"])
                if out["ref"]["proven"] and (bf != (ref["peak"]["value"], ref["lift"]["value"])
                                             or got != (sorted(bfr["pinned"]), bfr["rest"],
                                                        bfr["levels"])):
                    out["problems"].append("REFERENCE: brute force (U, L) %s ranks %s, HiGHS "
                                           "%s ranks %s"
                                           % (bf, (sorted(bfr["pinned"]), bfr["rest"]),
                                              (ref["peak"]["value"], ref["lift"]["value"]),
                                              got[:2]))
        if keel is None:
            # Reference only: the textbook model first, then the descent,
            # must prove the same optimum.
            other = solve_clock(r, highs_seconds, 1.0)
            for name in ("peak", "lift"):
                if other[name] and other[name].get("refuted"):
                    out["notes"].append("HiGHS's textbook %s model claimed a wrong optimum; "
                                        "the descent refuted it" % name)
            if other["feasible"] != ref["feasible"]:
                out["problems"].append("REFERENCE: feasible %s with the textbook model, %s "
                                       "without" % (other["feasible"], ref["feasible"]))
            elif ref["feasible"]:
                for name in ("peak", "lift"):
                    a, b = ref[name], other[name]
                    if a["status"] == b["status"] == "optimal" and a["value"] != b["value"]:
                        out["problems"].append("REFERENCE: %s %s by descent, %s with the "
                                               "textbook model" % (name, a["value"], b["value"]))
                    if a["status"] != "optimal" or b["status"] != "optimal" \
                            or a["value"] != b["value"]:
                        break
            return out
        if ref["feasible"] is None:
            out["notes"].append("HiGHS could not decide feasibility; exit code not checked")
            return out
        if ref["feasible"] is False:
            if rc != 3:
                out["problems"].append("no plan keeps the rules, but keel's exit code is %s (%s): "
                                       "%s" % (rc, EXIT_NAMES.get(rc, "?"), stderr_head(stderr)))
                if rc == 0 and isinstance(doc, dict):
                    sub = []
                    plan = read_plan(r, doc, sub)
                    bad = violations(r, plan) if plan else sub
                    out["problems"].append("keel's plan: %s" % (bad[0] if bad else
                                                                 "breaks nothing (reference?)"))
            return out
        if rc != 0:
            out["problems"].append("keel exit code %s (%s) on a roster the reference solves: %s"
                                   % (rc, EXIT_NAMES.get(rc, "?"), stderr_head(stderr)))
            return out
        facts = keel_run.report_facts(out, doc, lambda d: check_report(r, d))
        if facts is None:
            return out
        out["keel"].update(status=facts["status"], U=facts["U"], L=facts["L"],
                           pinned=len(facts["ranks"]["pinned"]))
        out["problems"] += compare(r, facts, ref, bf_ranks)
    except Exception as e:  # a broken roster or reference is a failure, not a crash
        out["problems"].append("check crashed: %s: %s" % (type(e).__name__, e))
    return out


def line(res):
    parts = keel_run.line_head(res, 30)
    k, h = res["keel"], res["ref"]
    if k is not None:
        if k.get("U") is not None:
            parts.append("keel %s U=%s L=%s (%.1fs)" % (k["status"], fmt6(k["U"]), fmt6(k["L"]),
                                                       k["seconds"]))
        else:
            parts.append("keel exit %s (%.1fs)" % (k["rc"], k["seconds"]))
    if h is not None:
        if h["feasible"]:
            parts.append("ref U=%s L=%s%s" % (fmt6(h["U"]), fmt6(h["L"]),
                                              "" if h.get("proven", True) else " unproven"))
        else:
            parts.append("ref %s" % ("infeasible" if h["feasible"] is False else "undecided"))
        if h.get("brute"):
            parts.append("(brute force agrees)" if not any(
                p.startswith("REFERENCE") for p in res["problems"]) else "(brute force)")
    return keel_run.line_end(parts, res)


def main(argv=None):
    ap = argparse.ArgumentParser(description="Check keel's shift clock against HiGHS")
    keel_run.add_arguments(ap, "no keel: HiGHS against brute force and the hand figures")
    ap.add_argument("--count", type=int, default=60, help="generated rosters (default 60)")
    ap.add_argument("--seed", type=int, default=1905)
    ap.add_argument("--keel-seconds", type=float, default=5.0,
                    help="keel --time-limit per roster (default 5)")
    ap.add_argument("--highs-seconds", type=float, default=10.0,
                    help="HiGHS seconds per stage (default 10)")
    ap.add_argument("--brute-max", type=int, default=20000,
                    help="enumerate rosters with at most this many plans (default 20000)")
    ap.add_argument("--pinned-every", type=int, default=4,
                    help="every K-th feasible roster gets a nurse pinned at the peak (default 4)")
    ap.add_argument("--min-pinned", type=float, default=0.15,
                    help="the least share of the generated rosters with a pinned nurse (by the "
                         "reference) for a pass (default 0.15)")
    ap.add_argument("--model-share", type=float, default=0.0,
                    help="part of each stage's HiGHS time for the textbook model before the "
                         "descent (default 0: descent only)")
    args = ap.parse_args(argv)
    keel = keel_run.keel_of(ap, args)
    t0 = time.monotonic()
    out_dir, tmp = keel_run.work_dir(args.keep, "keel-clock-")
    rosters = write_rosters(out_dir, args.seed, args.count, pinned_every=args.pinned_every)
    print("# %d edge cases, %d regression rosters, %d generated rosters (seed %d, made in "
          "%.0f s) in %s; keel --time-limit %g, HiGHS %g s a stage, %d at once"
          % (len(EDGE_CASES), sum(1 for f in os.listdir(EDGE_DIR) if f.startswith("regress_")),
             len(rosters), args.seed, time.monotonic() - t0, out_dir, args.keel_seconds,
             args.highs_seconds, args.jobs), flush=True)
    results = []
    for case in EDGE_CASES:
        res = check_edge(case, keel, args.keel_seconds)
        results.append(res)
        print(line(res), flush=True)
    regress = sorted(os.path.join(EDGE_DIR, f) for f in os.listdir(EDGE_DIR)
                     if f.startswith("regress_") and f.endswith(".yaml"))
    jobs = [(p, kind, keel, args.keel_seconds, args.highs_seconds, args.brute_max,
             args.model_share) for p, kind in [(p, None) for p in regress] + rosters]
    results += keel_run.run_jobs(check_one, jobs, args.jobs, line)
    gen = [x for x in results if x["name"].startswith("clock-")]
    print("# generated: %d feasible (%d proven by the reference, %d also by brute force), "
          "%d infeasible" % (sum(1 for x in gen if x["ref"] and x["ref"]["feasible"]),
                             sum(1 for x in gen if x["ref"] and x["ref"].get("proven")),
                             sum(1 for x in gen if x["ref"] and x["ref"].get("brute")
                                 and x["ref"]["feasible"]),
                             sum(1 for x in gen if x["ref"] and x["ref"]["feasible"] is False)))
    print("# break cover: %d rosters keep covers; on %d of them the covers change the "
          "reference's answer" % (sum(1 for x in gen if x["ref"] and x["ref"].get("covers")),
                                  sum(1 for x in gen if x["ref"] and x["ref"].get("cover_binds"))))
    if keel is not None:
        print("# keel reported optimal on %d of them"
              % sum(1 for x in gen if x["keel"] and x["keel"]["status"] == "optimal"))
        print("# keel reported ranks (a nurse pinned at the peak) on %d rosters"
              % sum(1 for x in results if x["keel"] and x["keel"].get("pinned")))
    short = keel_run.count_pinned(results, [("generated", lambda x: x["name"].startswith(
        "clock-"), len(rosters))], lambda x: x["ref"] and x["ref"].get("pinned"),
        args.min_pinned)
    return keel_run.finish(results, t0, tmp, short)


if __name__ == "__main__":
    sys.exit(main())
