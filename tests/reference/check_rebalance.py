#!/usr/bin/python3
# SPDX-License-Identifier: GPL-3.0-or-later
"""Check keel rebalance's hand-off frontier against HiGHS.

Source: HiGHS MILP solver through Debian's python3-scipy
(scipy.optimize.milp, scipy 1.10) as the independent reference solver, on
the rules model of highs_model.py (written from keel's documented contract)
with one more row, the hand-off budget of docs/model.md ("Mid-shift: the
hand-off frontier"):

    sum over present patients p, not forced, of x[p, c(p)] >= |K| - k

where c(p) is the nurse p has now and a patient is forced when c(p) may not
have it (highs_model's own eligibility).

Mid-shift rosters are made from generated unit-size rules rosters
(gen_rosters.generate_rules): the current plan is a valid assignment HiGHS
finds under random costs (so it is not balanced), written as each
patient's `nurse`; then what changed: one counted nurse without locked
patients goes home (`max_patients: 0`), one or two patients become new
admissions (no nurse), one patient's acuity goes up, sometimes one
patient is locked to its nurse, and patients are discharged until some plan
keeps every rule (most often one is found at once).

Every other roster is checked at a time of the shift (`--at HH:MM`): the
reference then solves the roster of the rest of the shift, computed here
from the documented arithmetic (care left, breaks and duty in proportion to
the time left, present patients' extras done), so keel's figures are
checked against it too.

For every roster and every k = 0..3 (keel rebalance --format json):
  * keel's plan for option k keeps every hard rule (highs_model.violations)
    and makes at most k hand-offs, recomputed from the roster; locked
    patients keep their nurse;
  * stage 1 (the heaviest utilisation) and stage 2 (the lightest, the
    heaviest held): when both prove them, keel's and HiGHS's agree within
    1e-6; keel's heaviest is never below HiGHS's proven optimum, and a
    proven keel value is never above HiGHS's best plan;
  * at a time of the shift, the record of the yaml written (the whole
    shift) is who held each patient up to then as posted (check_record.py);
  * an option HiGHS proves to have no plan is `infeasible` in keel, and
    keel says `infeasible` only when HiGHS proves it;
  * the frontier never worsens as k grows; the recommendation is the
    smallest k within min_gain (0.03) of the best option's heaviest
    utilisation; the top-level status is optimal only when every option is.

Usage: check_rebalance.py KEEL_EXE [--count 16] [--seed S]
                          [--keel-seconds 10] [--highs-seconds 6] [--jobs 2]
                          [--keep DIR]
The last line of output is "N passed, M failed"; exit status 1 if M > 0.
"""

import argparse
import copy
import json
import os
import random
import subprocess
import sys
import time

sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))
import requirements  # noqa: E402

requirements.require_modules()

import yaml  # noqa: E402

import check_record  # noqa: E402
import gen_rosters  # noqa: E402
import highs_model  # noqa: E402
import keel_run  # noqa: E402

TOL = 1e-6
MAX_K = 3
MIN_GAIN = 0.03


# ------------------------------------------------------------ the rosters

def current_plan(rng, doc):
    """A valid assignment of doc under random costs (nurse index per
    patient), or None."""
    r = highs_model.derive_rules(doc)
    m = highs_model.RulesModel(r)
    cost = {k: rng.random() for k in m.xof.values()}
    res, _ = m.solve(cost, 20.0)
    a = m.assignment(res)
    if a is None or None in a or highs_model.violations(r, a):
        return None
    return a


def mid_shift(rng, name):
    """A mid-shift roster document, made as the module head says."""
    for _ in range(20):
        doc = gen_rosters.generate_rules(rng, name, (14, 24), (4, 6))
        a = current_plan(rng, doc)
        if a is None:
            continue
        doc = copy.deepcopy(doc)
        nurses, patients = doc["nurses"], doc["patients"]
        for p, j in zip(patients, a):
            p["nurse"] = nurses[j]["id"]
            p.pop("previous_nurse", None)
        r = highs_model.derive_rules(doc)
        locked = {p["nurse"] for p in patients if p.get("lock")}
        preceptors = {n.get("preceptor") for n in nurses}
        leaving = [n for j, n in enumerate(nurses)
                   if r["nurses"][j]["counted"] and n["id"] not in locked
                   and n["id"] not in preceptors and n.get("role", "staff") == "staff"]
        if not leaving:
            continue
        rng.choice(leaving)["max_patients"] = 0
        free = [p for p in patients if not p.get("lock")]
        for p in rng.sample(free, min(len(free), rng.choice([1, 2]))):
            p.pop("nurse", None)
        sick = rng.choice(patients)
        if sick.get("acuity") is not None and sick.get("care_minutes") is None:
            levels = sorted(int(x) for x in doc["policy"]["acuity_minutes"])
            sick["acuity"] = min(levels[-1], int(sick["acuity"]) + 1)
        if rng.random() < 0.5:
            present = [p for p in patients if p.get("nurse") and not p.get("lock")]
            if present:
                rng.choice(present)["lock"] = True
        # Discharges until the unit can be covered at all (a nurse going home
        # often leaves it a place or two short).
        try:
            for _ in range(4):
                if highs_model.feasible_rules(highs_model.derive_rules(doc), 20.0):
                    return doc
                out = [p for p in patients if not p.get("lock")]
                patients.remove(rng.choice(out))
        except highs_model.RosterError:
            continue
    raise RuntimeError("no mid-shift roster made for %s" % name)


def ceil_div(a, b):
    return -(-a // b)


def rest_of_shift(doc, t):
    """The roster of the rest of doc's shift from t minutes after its start,
    by the arithmetic of docs/model.md ("The time of the rebalance"), for
    the generated rosters (no times of nurses or patients)."""
    d = copy.deepcopy(doc)
    shift, policy = d["shift"], d.get("policy") or {}
    L = int(shift["minutes"])
    rest = L - t
    sb = shift.get("break_minutes")
    if sb is not None:
        shift["break_minutes"] = ceil_div(int(sb) * rest, L)
    shift["minutes"] = rest
    hh, mm = (int(x) for x in str(shift["start"]).split(":"))
    start = (hh * 60 + mm + t) % (24 * 60)
    shift["start"] = "%02d:%02d" % (start // 60, start % 60)
    roles = policy.get("roles") or {}
    for n in d["nurses"]:
        on = int(n.get("minutes", L))
        left = on * rest // L
        own = n.get("break_minutes")
        whole = int(own) if own is not None else (int(sb or 0) if 2 * on >= L else 0)
        brk = ceil_div(whole * left, on) if whole else 0
        n["minutes"], n["break_minutes"] = left, brk
        duty = n.get("duty_minutes", (roles.get(n.get("role", "staff")) or {}).get("duty_minutes"))
        if duty:
            n["duty_minutes"] = ceil_div(int(duty) * left, on)
        if left - brk <= 0:
            n["max_patients"] = 0
    acuity = policy.get("acuity_minutes") or {}
    for p in d["patients"]:
        care = int(p["care_minutes"]) if p.get("care_minutes") is not None \
            else int(highs_model._level_minutes(acuity, p.get("acuity")))
        p["care_minutes"] = care - ceil_div(care * t, L)
        if p.get("nurse"):
            p.pop("extras", None)    # a present patient's extras are done
    return d


# ----------------------------------------------------------- the reference

def current_of(r, doc):
    """c(p) as a nurse index, or None (new); and whether p is forced."""
    index = {n["id"]: j for j, n in enumerate(r["nurses"])}
    cur, forced = [], []
    for i, p in enumerate(doc["patients"]):
        c = index.get(p.get("nurse"))
        cur.append(c)
        forced.append(c is not None and c not in r["eligible"][i])
    return cur, forced


def handoffs(cur, forced, assign):
    return sum(1 for c, f, j in zip(cur, forced, assign) if c is not None and not f and j != c)


class BudgetModel(highs_model.RulesModel):
    """The rules model with the hand-off budget row."""

    def __init__(self, r, cur, forced, k):
        super().__init__(r)
        keep = [self.xof[(p, c)] for p, c in enumerate(cur)
                if c is not None and not forced[p] and (p, c) in self.xof]
        need = sum(1 for c, f in zip(cur, forced) if c is not None and not f) - k
        if need > 0:
            self.row([(x, 1.0) for x in keep], lo=float(need))


def reference(r, cur, forced, seconds):
    """Per k: {feasible, U, U_proven, L, L_proven} by HiGHS."""
    out = []
    for k in range(MAX_K + 1):
        model = lambda rr, k=k: BudgetModel(rr, cur, forced, k)  # noqa: E731
        feasible, st1, st2, a = highs_model.run_balance(r, model, "patients", seconds, 0.5)
        if a is not None and handoffs(cur, forced, a) > k:
            raise AssertionError("reference plan breaks its own budget")
        out.append({"feasible": feasible,
                    "U": None if st1 is None else st1["value"],
                    "U_proven": st1 is not None and st1["status"] == "optimal",
                    "L": None if st2 is None else st2["value"],
                    "L_proven": st2 is not None and st2["status"] == "optimal"})
    return out


# ------------------------------------------------------------------ keel

def run_rebalance(keel, path, seconds, at):
    cmd = [keel, "rebalance", path, "-f", "json", "--time-limit", "%g" % seconds,
           "--max-handoffs", str(MAX_K), "--min-gain", str(MIN_GAIN)]
    if at:
        cmd += ["--at", at]
    try:
        proc = subprocess.run(cmd, capture_output=True, text=True, timeout=seconds * 2 + 10)
    except subprocess.TimeoutExpired:
        return None, None, "keel did not stop"
    try:
        doc = json.loads(proc.stdout)
    except ValueError:
        doc = None
    return proc.returncode, doc, proc.stderr


def record_problems(keel, path, at):
    """The record of the whole shift keel writes at `at` against the one
    check_record.py reads from the roster as posted (the record does not
    depend on the option, so option 0 in a short time will do)."""
    written = path[:-len(".yaml")] + "-at.yaml"
    proc = subprocess.run([keel, "rebalance", path, "-f", "yaml", "--at", at, "--max-handoffs",
                           "0", "--time-limit", "2", "-o", written],
                          capture_output=True, text=True, timeout=60)
    if proc.returncode == 3:
        return []  # no plan within 0 hand-offs: nothing written
    if proc.returncode != 0:
        return ["yaml at %s: exit %d: %s" % (at, proc.returncode,
                                             keel_run.stderr_head(proc.stderr))]
    with open(path, encoding="utf-8") as f:
        before = yaml.safe_load(f)
    with open(written, encoding="utf-8") as f:
        after = yaml.safe_load(f)
    return ["record: " + line for line in check_record.problems(before, at, after)]


def option_plan(r, option, problems):
    index = {p["id"]: i for i, p in enumerate(r["patients"])}
    nurse = {n["id"]: j for j, n in enumerate(r["nurses"])}
    assign = [None] * len(r["patients"])
    for entry in option.get("nurses") or []:
        for pid in entry["patients"]:
            assign[index[pid]] = nurse[entry["id"]]
    if None in assign:
        problems.append("option %d leaves a patient without a nurse" % option["handoffs"])
        return None
    return assign


def check_one(job):
    path, keel, keel_seconds, highs_seconds, t = job
    name = os.path.basename(path)
    problems, notes = [], []
    with open(path, encoding="utf-8") as f:
        doc = yaml.safe_load(f)
    at = None
    if t is not None:
        doc = rest_of_shift(doc, t)
        at = doc["shift"]["start"]
    r = highs_model.derive_rules(doc)
    cur, forced = current_of(r, doc)
    ref = reference(r, cur, forced, highs_seconds)
    rc, out, err = run_rebalance(keel, path, keel_seconds, at)
    res = {"name": name + (" --at " + at if at else ""), "kind": None, "problems": problems,
           "notes": notes, "ref": ref, "keel": out}
    if out is None:
        problems.append("keel exit %r, no json: %s" % (rc, keel_run.stderr_head(err)))
        return res
    if out.get("at") != at:
        problems.append("at %r, expected %r" % (out.get("at"), at))
    if at:
        problems.extend(record_problems(keel, path, at))
    options = out["options"]
    if [o["handoffs"] for o in options] != list(range(MAX_K + 1)):
        problems.append("options are not k = 0..%d" % MAX_K)
        return res
    proven_all = True
    for k, (o, h) in enumerate(zip(options, ref)):
        if not o["found"]:
            if o["status"] == "infeasible" and h["feasible"] is not False:
                problems.append("k=%d: keel says infeasible, HiGHS %s"
                                % (k, "found a plan" if h["feasible"] else "did not prove it"))
            if o["status"] != "infeasible":
                proven_all = False
            continue
        if h["feasible"] is False:
            problems.append("k=%d: keel has a plan, HiGHS proves none" % k)
        a = option_plan(r, o, problems)
        if a is None:
            continue
        bad = highs_model.violations(r, a)
        if bad:
            problems.append("k=%d: keel's plan breaks %s" % (k, bad[0]))
        made = handoffs(cur, forced, a)
        if made > k or made != o["handoffs_made"] or made != len(o["moves"]):
            problems.append("k=%d: %d hand-offs (reported %d, %d moves)"
                            % (k, made, o["handoffs_made"], len(o["moves"])))
        for p, pat in enumerate(r["patients"]):
            if pat["lock"] is not None and a[p] != pat["lock"]:
                problems.append("k=%d: locked %s moved" % (k, pat["id"]))
        U, L = highs_model.peak_lift(r, a)
        if abs(float(U) - o["max_utilisation"]) > TOL:
            problems.append("k=%d: reported heaviest %.6f, recomputed %.6f"
                            % (k, o["max_utilisation"], float(U)))
        keel_proven = o["status"] == "optimal"
        proven_all = proven_all and keel_proven
        if h["U"] is not None:
            if h["U_proven"] and float(U) < float(h["U"]) - TOL:
                problems.append("k=%d: keel's heaviest %.6f below HiGHS's proven %.6f"
                                % (k, float(U), float(h["U"])))
            if keel_proven and float(U) > float(h["U"]) + TOL:
                problems.append("k=%d: keel proven %.6f above HiGHS's plan %.6f"
                                % (k, float(U), float(h["U"])))
            if keel_proven and h["U_proven"] and h["L_proven"] and h["L"] is not None \
                    and abs(float(U) - float(h["U"])) <= TOL \
                    and abs(float(L) - float(h["L"])) > TOL:
                problems.append("k=%d: lightest %.6f, HiGHS %.6f" % (k, float(L), float(h["L"])))
        if not (h["U_proven"] and keel_proven):
            notes.append("k=%d: not both proven (keel %s, HiGHS %s)"
                         % (k, o["status"], "optimal" if h["U_proven"] else "open"))
        if k > 0 and options[k - 1]["found"] and \
                o["max_utilisation"] > options[k - 1]["max_utilisation"] + 1e-12:
            problems.append("k=%d: the frontier worsens" % k)
    found = [o for o in options if o["found"]]
    want = None
    if found:
        best = min(o["max_utilisation"] for o in found)
        want = min(o["handoffs"] for o in found if o["max_utilisation"] <= best + MIN_GAIN + 1e-9)
    if out["recommended_handoffs"] != want:
        problems.append("recommended %r, the rule gives %r" % (out["recommended_handoffs"], want))
    want_status = "infeasible" if want is None else "optimal" if proven_all else "time_limit"
    if out["status"] != want_status:
        problems.append("status %s, expected %s" % (out["status"], want_status))
    return res


def line(res):
    parts = keel_run.line_head(res, 26)
    for k, h in enumerate(res["ref"]):
        parts.append("k%d %s" % (k, "-" if h["U"] is None else "%.4f" % float(h["U"])))
    return keel_run.line_end(parts, res)


def main(argv=None):
    ap = argparse.ArgumentParser(description="Check keel rebalance against HiGHS")
    keel_run.add_arguments(ap, "(not supported here)")
    ap.add_argument("--count", type=int, default=16)
    ap.add_argument("--seed", type=int, default=1616)
    ap.add_argument("--keel-seconds", type=float, default=10.0)
    ap.add_argument("--highs-seconds", type=float, default=6.0,
                    help="HiGHS seconds per stage and budget (default 6)")
    args = ap.parse_args(argv)
    keel = keel_run.keel_of(ap, args)
    t0 = time.monotonic()
    out_dir, tmp = keel_run.work_dir(args.keep, "keel-rebalance-")
    rng = random.Random(args.seed)
    jobs = []
    for i in range(args.count):
        name = "midshift%02d" % i
        doc = mid_shift(rng, name)
        path = os.path.join(out_dir, name + ".yaml")
        with open(path, "w", encoding="utf-8") as f:
            f.write(gen_rosters.to_yaml_rules(doc))
        # Every other roster at a time of the shift (--at), its rest
        # computed here from the documented arithmetic.
        minutes = int(doc["shift"]["minutes"])
        t = 5 * rng.randint(12, (minutes - 60) // 5) if i % 2 else None
        jobs.append((path, keel, args.keel_seconds, args.highs_seconds, t))
    print("# %d mid-shift rosters (seed %d) in %s; HiGHS %g s per stage and budget, keel "
          "--time-limit %g, %d at once"
          % (len(jobs), args.seed, out_dir, args.highs_seconds, args.keel_seconds, args.jobs),
          flush=True)
    results = keel_run.run_jobs(check_one, jobs, args.jobs, line)
    both = sum(1 for x in results for k, h in enumerate(x["ref"])
               if h["U_proven"] and x["keel"] and x["keel"]["options"][k]["status"] == "optimal")
    none = sum(1 for x in results for k, h in enumerate(x["ref"])
               if h["feasible"] is False and x["keel"]
               and x["keel"]["options"][k]["status"] == "infeasible")
    print("# of %d options: %d proven optimal by both, %d proven without a plan by both"
          % (len(results) * (MAX_K + 1), both, none))
    return keel_run.finish(results, t0, tmp)


if __name__ == "__main__":
    sys.exit(main())
