#!/usr/bin/python3
# SPDX-License-Identifier: GPL-3.0-or-later
"""Check keel's roster rules and its four stages against independent references.

Source: HiGHS MILP solver through Debian's python3-scipy
(scipy.optimize.milp, scipy 1.10) as the independent reference solver, on a
model written from the specification of keel's roster rules and stages
(highs_model.RulesModel, solve_rules); on tiny rosters also exhaustive
enumeration (highs_model.brute_force_rules).  The ratio table's numbers are
from California Code of Regulations, Title 22, §70217(a)
(highs_model.CALIFORNIA_TABLE).

Rosters come from gen_rosters.py's rules presets (every rule switched on at
random; every third unit-size and every fourth tiny roster infeasible
because of one rule, the rules in turn, so that 30 unit-size rosters meet
each rule's infeasibility at least once).  For each roster keel runs as
`keel assign ROSTER -f json --time-limit S` and:
  * exit code 3 exactly when the reference finds no assignment that keeps
    the hard rules; then "diagnosis" is non-empty and every entry names a
    rule of the spec (skill, patient_limit, patient_ratio, law_limit,
    high_acuity, isolation, zones, lock, avoid);
  * otherwise exit code 0, and keel's assignment keeps every hard rule,
    recomputed from the roster (eligibility with needs + isolation needs,
    avoid, lock; patient limits with the table; "1:N" ratios; high acuity;
    isolation separation; zones per nurse); loads, capacities and
    utilisations recomputed; the stages listed in the spec's order, only
    those that apply; status "optimal" only with every stage proven;
  * the final assignment lies in the tolerance windows keel's own stage
    values give (floor((U + tol) cap), ceil((L - tol) cap), exact);
    "continuity" kept / candidates and "proximity" zones / rooms recomputed
    from the assignment and the roster;
  * against the reference optimum (U*, L* within 1e-6; kept, Z exact):
    equal when both prove the stage and the stage's problem is the same
    (the same U, L, tolerance and kept before it); keel never beats a
    proven reference optimum; keel's own bounds never cut off the
    reference's solution.  Proximity proven means (Z, R) proven: R is
    compared too when Z is the same.  kept_at_zero_tolerance never beats
    the reference's optimum with tol = 0, and equals it when keel calls it
    proven (its kept_at_zero_tolerance_proven, else status "optimal").
  * stage ranks (docs/model.md, "Stage ranks"): keel's "ranks" list and
    stage checked against each other (keel_run.read_ranks); the windows
    and stage 2's ceilings come from each nurse's level; when both prove
    U* and the ranks, the same nurses pinned at the same levels and the
    same last rank; the later stages are compared only when keel and the
    reference hold the same levels.
The references check themselves: HiGHS must agree with brute force on the
tiny rosters (the ranks too), and a roster the generator made infeasible on
purpose must stay infeasible for HiGHS.  Every third feasible roster gets
a nurse pinned at the peak (gen_rosters.pin_nurses: a short shift and a
heavy patient locked to her); the rosters with a pinned nurse are counted
and must reach --min-pinned of each kind.

Usage: check_rules.py KEEL_EXE [--count 30] [--tiny-count 200] [--seed S]
                      [--keel-seconds 10] [--highs-seconds 8] [--jobs 2]
                      [--keep DIR]
       check_rules.py --reference-only [--tiny-count 300] [--count 10]
                      (HiGHS against brute force, three ways, no keel)
The last line of output is "N passed, M failed"; exit status 1 if M > 0,
77 when this Python lacks numpy, scipy's milp or PyYAML.
"""

import argparse
import os
import sys
import time
from fractions import Fraction


sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))
import requirements  # noqa: E402

requirements.require_modules()

import gen_rosters  # noqa: E402
import highs_model  # noqa: E402
import keel_run  # noqa: E402
from highs_model import RULE_NAMES  # noqa: E402
from keel_run import EXIT_NAMES, PRINT_TOL, run_keel  # noqa: E402
from keel_run import is_num, stderr_head  # noqa: E402

TOL = 1e-6          # agreement between solvers on U and L (the contract's 1e-6)


# ---------------------------------------------------------------- keel runs

def _exit_text(rc):
    return "%r (%s)" % (rc, EXIT_NAMES.get(rc, "killed or unknown"))


def _int(v):
    return isinstance(v, int) and not isinstance(v, bool)


# -------------------------------------------------------- keel's report

def read_assignment(r, doc, problems):
    """keel's assignment (nurse index per patient) from its nurses[] lists,
    cross-checked with patients[].nurse; None when unreadable."""
    nurses = doc.get("nurses")
    if not isinstance(nurses, list):
        problems.append("report has no nurses list")
        return None
    by_id = {n["id"]: j for j, n in enumerate(r["nurses"])}
    pat_index = {p["id"]: i for i, p in enumerate(r["patients"])}
    seen = set()
    assign = [None] * len(r["patients"])
    for entry in nurses:
        nid = entry.get("id") if isinstance(entry, dict) else None
        if nid not in by_id or nid in seen:
            problems.append("report lists nurse %r unknown or twice" % (nid,))
            continue
        seen.add(nid)
        pats = entry.get("patients")
        if not isinstance(pats, list):
            problems.append("nurse %s: no patients list" % nid)
            continue
        for pid in pats:
            if pid not in pat_index:
                problems.append("nurse %s: unknown patient %r" % (nid, pid))
            elif assign[pat_index[pid]] is not None:
                problems.append("patient %s assigned twice" % pid)
            else:
                assign[pat_index[pid]] = by_id[nid]
    for n in r["nurses"]:
        if n["id"] not in seen:
            problems.append("nurse %s missing from the report" % n["id"])
    for p, j in enumerate(assign):
        if j is None:
            problems.append("patient %s has no nurse" % r["patients"][p]["id"])
    pats = doc.get("patients")
    if isinstance(pats, list):
        for entry in pats:
            if isinstance(entry, dict) and entry.get("id") in pat_index:
                j = assign[pat_index[entry["id"]]]
                if j is not None and entry.get("nurse") != r["nurses"][j]["id"]:
                    problems.append("patients[] gives %s nurse %r, nurses[] gives %s"
                                    % (entry["id"], entry.get("nurse"), r["nurses"][j]["id"]))
    else:
        problems.append("report has no patients list")
    return None if None in assign else assign


def check_report(r, doc):
    """Check keel's JSON for a feasible roster against the roster itself.

    Returns (problems, facts): facts holds keel's assignment, its stage
    values (U, L exact), statuses and bounds, and what it recomputes to.
    """
    problems = []
    assign = read_assignment(r, doc, problems)
    if assign is None:
        return problems, None
    # The hard rules, recomputed from the roster (spec rules 1-6).
    # Source: keel's roster-rules spec; the ratio table's numbers from
    # California Code of Regulations, Title 22, §70217(a) (CALIFORNIA_TABLE).
    for rule, text in highs_model.violations(r, assign):
        problems.append("keel's assignment breaks rule %s: %s" % (rule, text))
    loads = highs_model.loads_of(r, assign)
    counts = [0] * len(r["nurses"])
    for j in assign:
        counts[j] += 1
    utils = []
    by_id = {n["id"]: j for j, n in enumerate(r["nurses"])}
    for entry in doc["nurses"]:
        if not isinstance(entry, dict) or entry.get("id") not in by_id:
            continue
        j = by_id[entry["id"]]
        n = r["nurses"][j]
        for key, want in (("load_minutes", loads[j]), ("capacity_minutes", n["capacity"]),
                          ("counted", n["counted"])):
            if entry.get(key) != want or type(entry.get(key)) is not type(want):
                problems.append("nurse %s: %s %r, the roster gives %r"
                                % (n["id"], key, entry.get(key), want))
        # The effective limit; one at or above the census may be shown as the census.
        npat = len(r["patients"])
        if n["limit"] is not None and entry.get("max_patients") != n["limit"] \
                and not (n["limit"] >= npat and entry.get("max_patients") == npat):
            problems.append("nurse %s: max_patients %r, the roster's limit is %d"
                            % (n["id"], entry.get("max_patients"), n["limit"]))
        u = Fraction(loads[j], n["capacity"])
        if n["counted"]:
            utils.append(u)
            got = entry.get("utilisation")
            if not is_num(got) or abs(got - float(u)) > PRINT_TOL:
                problems.append("nurse %s: utilisation %r, load / capacity = %.12f"
                                % (n["id"], got, float(u)))
    fU, fL = max(utils), min(utils)
    keel_run.check_imbalance(doc, fU, fL, "assignment", problems)

    # The stages: names in the spec's order, only those that apply.
    got = keel_run.read_stages(r, doc, problems, ("optimal", "time_limit", "heuristic"))
    if got is None:
        return problems, None
    st, proven, status, kU, kL = got
    kr = keel_run.read_ranks(r, doc, kU, problems)
    if kr is None:
        return problems, None
    tol = r["tol"]
    kept, (Z, R) = highs_model.kept_of(r, assign), highs_model.proximity_of(r, assign)
    if r["stage3"] or r["stage4"]:
        # Stages 3 and 4 hold the windows from keel's own levels and L
        # (docs/model.md: floor((level(n) + t) cap(n)), ceil((L* - t) cap(n))).
        for j, (lo, hi) in highs_model.windows(r, kU, kL, tol, kr["levels"]).items():
            if not lo <= loads[j] <= hi:
                problems.append("nurse %s: load %d outside the window [%d, %d] that keel's "
                                "own level %s and lift %s give with tolerance %s"
                                % (r["nurses"][j]["id"], loads[j], lo, hi, kr["levels"][j],
                                   kL, tol))
    else:
        # Stage 2's assignment is the answer: its lightest is L, heaviest <= U,
        # every nurse within her level.
        if fL != kL or fU > kU or (proven["peak"] and fU != kU):
            problems.append("assignment's utilisation %s..%s, stages give peak %s, lift %s"
                            % (fL, fU, kU, kL))
        for j, load, top in keel_run.loads_within(r, loads, kr["levels"]):
            problems.append("nurse %s: load %d above her level's %d"
                            % (r["nurses"][j]["id"], load, top))
    cont = doc.get("continuity")
    if r["stage3"]:
        cst = st.get("continuity", {})
        if not isinstance(cont, dict):
            problems.append("no continuity object, but %d patients have their previous "
                            "nurse on the roster" % r["candidates"])
        else:
            if cont.get("kept") != kept:
                problems.append("continuity.kept %r, the assignment keeps %d"
                                % (cont.get("kept"), kept))
            if cont.get("candidates") != r["candidates"]:
                problems.append("continuity.candidates %r, the roster has %d"
                                % (cont.get("candidates"), r["candidates"]))
            if not is_num(cont.get("tolerance")) or abs(cont["tolerance"] - float(tol)) > 1e-12:
                problems.append("continuity.tolerance %r, the roster's is %s"
                                % (cont.get("tolerance"), tol))
            k0 = cont.get("kept_at_zero_tolerance", "absent")
            if k0 is not None and not (_int(k0) and 0 <= k0 <= r["candidates"]):
                problems.append("continuity.kept_at_zero_tolerance %r" % (k0,))
        v = cst.get("value")
        if not _int(v) or v > kept:
            problems.append("continuity stage value %r, but the assignment keeps %d "
                            "(stage 4 holds kept >= the stage-3 value)" % (v, kept))
        elif proven["continuity"] and v != kept:
            problems.append("continuity proven at %d, yet the final assignment keeps %d "
                            "in the same windows" % (v, kept))
        b = cst.get("bound")
        if b is not None and (not is_num(b) or b < kept):
            problems.append("continuity bound %r below the kept %d keel found" % (b, kept))
    elif cont is not None:
        problems.append("continuity object %r, but no previous_nurse is on the roster"
                        % (cont,))
    prox = doc.get("proximity")
    if r["stage4"]:
        pst = st.get("proximity", {})
        if not isinstance(prox, dict):
            problems.append("no proximity object, but patients have zones or rooms")
        elif prox.get("zones") != Z or prox.get("rooms") != R:
            problems.append("proximity zones %r rooms %r, the assignment gives %d and %d"
                            % (prox.get("zones"), prox.get("rooms"), Z, R))
        if pst.get("value") != Z:
            problems.append("proximity stage value %r, the assignment gives Z = %d"
                            % (pst.get("value"), Z))
        b = pst.get("bound")
        if b is not None and (not is_num(b) or b > Z):
            problems.append("proximity bound %r above the Z %d keel found" % (b, Z))
    elif prox is not None:
        problems.append("proximity object %r, but no patient has a zone or a room" % (prox,))
    facts = {
        "assign": assign, "status": status, "proven": proven, "U": kU, "L": kL,
        "ranks": kr,
        "fU": fU, "fL": fL, "kept": kept, "Z": Z, "R": R,
        "peak_bound": st["peak"].get("bound"), "lift_bound": st["lift"].get("bound"),
        "cont_value": st.get("continuity", {}).get("value"),
        "cont_bound": st.get("continuity", {}).get("bound"),
        "prox_bound": st.get("proximity", {}).get("bound"),
        "k0": cont.get("kept_at_zero_tolerance") if isinstance(cont, dict) else None,
        # Whether keel calls k0 proven: its own field when given, else the
        # overall status (k0 is "the stage-3 optimum with tol = 0").
        "k0_proven": cont.get("kept_at_zero_tolerance_proven", status == "optimal") is True
        if isinstance(cont, dict) else False,
    }
    return problems, facts


# -------------------------------------------------------- the reference

def reference(r, tiny, highs_seconds):
    """The reference result: HiGHS always, brute force on tiny rosters.

    Returns (ref, problems): ref maps each measure (U, L, kept, kept0, Z, R)
    to {"value", "proven", "bound"} (bound: a proven lower limit for U, Z, R,
    an upper one for L, kept, kept0), plus "feasible" (True / False / None).
    problems are disagreements inside the reference (HiGHS vs brute force).
    """
    # Source: HiGHS through Debian's python3-scipy 1.10 (scipy.optimize.milp);
    # on tiny rosters brute-force enumeration, which HiGHS must match.
    h = highs_model.solve_rules(r, highs_seconds)
    s = h["stages"]
    problems = []
    ref = {"feasible": h["feasible"], "highs": h, "ranks": h["ranks"], "levels": h["levels"]}
    if h["levels"] is None and h["U"] is not None:
        # No ranks (the peak unproven): U for everyone, as keel without ranks.
        ref["levels"] = {j: h["U"] for j, n in enumerate(r["nurses"]) if n["counted"]}
    for key, name in (("U", "peak"), ("L", "lift"), ("kept", "continuity"),
                      ("kept0", "continuity0"), ("Z", "proximity"), ("R", "rooms")):
        x = s[name]
        ref[key] = None if x is None or x.get("value") is None else {
            "value": x["value"], "proven": x["status"] == "optimal", "bound": x["bound"]}
    if tiny:
        bf = highs_model.brute_force_rules(r)
        if (bf is None) != (h["feasible"] is False):
            problems.append("REFERENCE: brute force says %s, HiGHS says %s"
                            % ("infeasible" if bf is None else "feasible", h["feasible"]))
        elif bf is not None:
            for key in ("U", "L", "kept", "kept0", "Z", "R"):
                hv = ref[key]
                if bf[key] is None and hv is None:
                    continue
                if hv is None or bf[key] is None or not hv["proven"] or hv["value"] != bf[key]:
                    problems.append("REFERENCE: %s: HiGHS %s, brute force %s"
                                    % (key, None if hv is None else
                                       "%s (%s)" % (hv["value"], "proven" if hv["proven"]
                                                    else "unproven"), bf[key]))
            rk, want = h["ranks"], bf["ranks"]
            got = None if rk is None else (rk["status"], sorted(rk["pinned"]), rk["rest"],
                                           rk["levels"])
            if got != ("optimal", sorted(want["pinned"]), want["rest"], want["levels"]):
                problems.append("REFERENCE: ranks: HiGHS %s, brute force %s"
                                % (got, (sorted(want["pinned"]), want["rest"])))
            for key in ("U", "L", "kept", "kept0", "Z", "R"):
                ref[key] = None if bf[key] is None else {"value": bf[key], "proven": True,
                                                        "bound": bf[key]}
            ref["ranks"], ref["levels"] = want, want["levels"]
    return ref, problems


def compare(r, k, ref):
    """keel's facts against the reference; each check says which stage.

    A later stage's problem is the same for keel and the reference only
    when the values it holds are the same: stage 2 holds U, stages 3 and 4
    the windows from U and L, stage 4 also kept.  Comparisons of a stage
    run only then; "never beats" needs the reference's proven bound,
    "equal" needs both proofs.
    """
    out = []
    U, L = ref["U"], ref["L"]
    # Source (every check below): the optimum of HiGHS through Debian's
    # python3-scipy 1.10 (scipy.optimize.milp) on unit-size rosters, of
    # brute-force enumeration (highs_model.brute_force_rules) on tiny ones.
    # Stage 1 (peak).
    if U["bound"] is not None and float(k["U"]) < float(U["bound"]) - TOL:
        out.append("peak: keel's U %.9f below the reference's proven bound %.9f"
                   % (k["U"], U["bound"]))
    if k["proven"]["peak"] and float(k["U"]) > float(U["value"]) + TOL:
        out.append("peak: keel claims U optimal at %.9f, the reference found %.9f"
                   % (k["U"], U["value"]))
    if U["proven"] and k["proven"]["peak"] and abs(float(k["U"]) - float(U["value"])) > TOL:
        out.append("peak: keel U* %.9f, reference U* %.9f" % (k["U"], U["value"]))
    if is_num(k["peak_bound"]) and k["peak_bound"] > float(U["value"]) + TOL:
        out.append("peak: keel's bound %.9f above the reference's feasible U %.9f"
                   % (k["peak_bound"], U["value"]))
    if k["U"] != U["value"]:
        return out
    # Stage ranks (docs/model.md), on the same U*.
    out += keel_run.compare_ranks(r, k["ranks"], ref["ranks"],
                                  U["proven"] and k["proven"]["peak"])[0]
    if ref["levels"] is None or k["ranks"]["levels"] != ref["levels"]:
        return out          # the lift and the windows hold other levels
    # Stage 2 (lift), the same levels held.
    if L["bound"] is not None and float(k["L"]) > float(L["bound"]) + TOL:
        out.append("lift: keel's L %.9f above the reference's proven bound %.9f"
                   % (k["L"], L["bound"]))
    if k["proven"]["lift"] and float(k["L"]) < float(L["value"]) - TOL:
        out.append("lift: keel claims L optimal at %.9f, the reference found %.9f"
                   % (k["L"], L["value"]))
    if L["proven"] and k["proven"]["lift"] and abs(float(k["L"]) - float(L["value"])) > TOL:
        out.append("lift: keel L* %.9f, reference L* %.9f" % (k["L"], L["value"]))
    if is_num(k["lift_bound"]) and k["lift_bound"] < float(L["value"]) - TOL:
        out.append("lift: keel's bound %.9f below the reference's feasible L %.9f"
                   % (k["lift_bound"], L["value"]))
    if k["L"] != L["value"]:
        return out
    # Stage 3 (continuity), the same windows.  Integers: exact.
    C, C0 = ref["kept"], ref["kept0"]
    if C is not None:
        if C["bound"] is not None and k["kept"] > C["bound"]:
            out.append("continuity: keel keeps %d, the reference proves at most %d"
                       % (k["kept"], C["bound"]))
        if k["proven"]["continuity"] and k["kept"] < C["value"]:
            out.append("continuity: keel claims %d optimal, the reference keeps %d"
                       % (k["kept"], C["value"]))
        if C["proven"] and k["proven"]["continuity"] and k["cont_value"] != C["value"]:
            out.append("continuity: keel %r, reference %d (both proven)"
                       % (k["cont_value"], C["value"]))
        if is_num(k["cont_bound"]) and k["cont_bound"] < C["value"]:
            out.append("continuity: keel's bound %r below the reference's feasible %d"
                       % (k["cont_bound"], C["value"]))
        k0 = k["k0"]
        if k0 is not None and C0 is not None and _int(k0):
            if C0["bound"] is not None and k0 > C0["bound"]:
                out.append("kept_at_zero_tolerance %d, the reference proves at most %d"
                           % (k0, C0["bound"]))
            if k["proven"]["continuity"] and k0 > k["kept"]:
                out.append("kept_at_zero_tolerance %d above the proven kept %d (a wider "
                           "window cannot keep fewer)" % (k0, k["kept"]))
            if C0["proven"] and k["k0_proven"] and k0 != C0["value"]:
                out.append("kept_at_zero_tolerance %d (proven by keel), the reference's "
                           "optimum with tol 0 is %d" % (k0, C0["value"]))
        if k["cont_value"] != C["value"]:
            return out          # stage 4 holds kept >= a different stage-3 value
    # Stage 4 (proximity): Z then R, the same windows and kept.
    Zr, Rr = ref["Z"], ref["R"]
    if Zr is not None:
        if Zr["bound"] is not None and k["Z"] < Zr["bound"]:
            out.append("proximity: keel's Z %d below the reference's proven bound %d"
                       % (k["Z"], Zr["bound"]))
        if k["proven"]["proximity"] and k["Z"] > Zr["value"]:
            out.append("proximity: keel claims Z %d optimal, the reference found %d"
                       % (k["Z"], Zr["value"]))
        if Zr["proven"] and k["proven"]["proximity"] and k["Z"] != Zr["value"]:
            out.append("proximity: keel Z* %d, reference Z* %d" % (k["Z"], Zr["value"]))
        if is_num(k["prox_bound"]) and k["prox_bound"] > Zr["value"]:
            out.append("proximity: keel's bound %r above the reference's feasible Z %d"
                       % (k["prox_bound"], Zr["value"]))
        if Rr is not None and k["Z"] == Zr["value"]:
            # Rooms second (lexicographic): read "optimal" as proven for (Z, R).
            if Rr["bound"] is not None and k["R"] < Rr["bound"]:
                out.append("proximity: keel's R %d below the reference's proven bound %d "
                           "at Z = %d" % (k["R"], Rr["bound"], k["Z"]))
            if Rr["proven"] and k["proven"]["proximity"] and k["R"] != Rr["value"]:
                out.append("proximity: keel R %d, reference R* %d at Z* = %d (proximity "
                           "proven minimises Z, then R)" % (k["R"], Rr["value"], k["Z"]))
    return out


# -------------------------------------------------------- one roster

def check_infeasible(doc, rc, stderr, kind):
    """keel on a roster no assignment can satisfy: exit 3 and a diagnosis.

    Source: the infeasibility verdict of HiGHS through Debian's
    python3-scipy 1.10 (scipy.optimize.milp), and of brute-force
    enumeration on tiny rosters; the rule names from keel's rules spec.
    """
    problems, named = [], []
    if rc != 3:
        text = "no assignment keeps the rules, but keel's exit code is %s" % _exit_text(rc)
        if rc == 2:
            text += "; keel rejected the roster as bad input: " + stderr_head(stderr)
        problems.append(text)
    if rc == 3:
        diag = doc.get("diagnosis") if isinstance(doc, dict) else None
        if not isinstance(diag, list) or not diag:
            problems.append("exit 3 but the JSON has no non-empty diagnosis list")
        else:
            for d in diag:
                rule = d.get("rule") if isinstance(d, dict) else None
                named.append(rule)
                if rule not in RULE_NAMES:
                    problems.append("diagnosis names rule %r, not one of %s"
                                    % (rule, ", ".join(RULE_NAMES)))
        if isinstance(doc, dict) and doc.get("status") not in (None, "infeasible"):
            problems.append("exit 3 with status %r" % doc.get("status"))
    note = None
    if kind is not None and named and kind not in named:
        note = "made infeasible by %s; keel's diagnosis names %s" % (kind, ", ".join(
            str(x) for x in named))
    return problems, named, note


def check_one(job):
    path, kind, tiny, keel, keel_seconds, highs_seconds = job
    name = os.path.splitext(os.path.basename(path))[0]
    out = {"name": name, "kind": kind, "tiny": tiny, "problems": [], "keel": None,
           "ref": None, "notes": []}
    try:
        r = highs_model.load_rules(path)
        if keel is not None:
            rc, doc, stderr, ksecs = run_keel(keel, path, keel_seconds)
            out["keel"] = {"rc": rc, "seconds": ksecs, "status": None}
        t0 = time.monotonic()
        ref, ref_problems = reference(r, tiny, highs_seconds)
        out["ref"] = {"seconds": time.monotonic() - t0, "feasible": ref["feasible"],
                      **{k: ref[k] for k in ("U", "L", "kept", "Z", "R")},
                      "pinned": None if ref["ranks"] is None
                      or ref["ranks"].get("status", "optimal") != "optimal"
                      else len(ref["ranks"]["pinned"])}
        out["problems"] += ref_problems
        if kind is not None and ref["feasible"] is not False:
            out["problems"].append("REFERENCE: made infeasible by %s, HiGHS says %s"
                                   % (kind, ref["feasible"]))
        if keel is None:
            return out
        kk = out["keel"]
        if ref["feasible"] is None:
            out["notes"].append("HiGHS could not decide feasibility; exit code not checked")
            return out
        if ref["feasible"] is False:
            problems, named, note = check_infeasible(doc, rc, stderr, kind)
            out["problems"] += problems
            kk["status"] = "diag:" + ",".join(str(x) for x in named) if named else None
            if note:
                out["notes"].append(note)
            if rc == 0 and isinstance(doc, dict):
                # Whatever keel assigned must break a rule; say which.
                sub = []
                a = read_assignment(r, doc, sub)
                if a is not None:
                    bad = highs_model.violations(r, a)
                    out["problems"].append("keel's assignment breaks %s"
                                           % (bad[0] if bad else "no rule (reference wrong?)"))
            return out
        if rc != 0:
            text = "keel exit code %s on a roster the reference solves" % _exit_text(rc)
            if rc == 2:
                text += "; keel rejected the roster as bad input: " + stderr_head(stderr)
            else:
                text += ": " + stderr_head(stderr)
            out["problems"].append(text)
            return out
        facts = keel_run.report_facts(out, doc, lambda d: check_report(r, d))
        if facts is None:
            return out
        kk.update(status=facts["status"], U=facts["U"], L=facts["L"],
                  pinned=len(facts["ranks"]["pinned"]),
                  kept=facts["kept"] if r["stage3"] else None,
                  Z=facts["Z"] if r["stage4"] else None, R=facts["R"] if r["stage4"] else None)
        if ref["U"] is not None:
            out["problems"] += compare(r, facts, ref)
    except Exception as e:  # a broken roster or reference is a failure, not a crash
        out["problems"].append("check crashed: %s: %s" % (type(e).__name__, e))
    return out


# -------------------------------------------------------- reference only

def reference_one(job):
    """HiGHS three ways (textbook model only, half and half, descent only)
    against brute force (tiny) or against each other (unit size).

    Source: HiGHS through Debian's python3-scipy 1.10 (scipy.optimize.milp)
    against brute-force enumeration (highs_model.brute_force_rules).
    """
    path, kind, tiny, _keel, _ks, highs_seconds = job
    name = os.path.splitext(os.path.basename(path))[0]
    out = {"name": name, "kind": kind, "tiny": tiny, "problems": [], "keel": None,
           "ref": None, "notes": []}
    try:
        r = highs_model.load_rules(path)
        t0 = time.monotonic()
        bf = highs_model.brute_force_rules(r) if tiny else None
        ways = {}
        for share in (1.0, 0.5, 0.0):
            h = highs_model.solve_rules(r, None if tiny else highs_seconds, share)
            ways[share] = h
        rk = ways[0.5]["ranks"]
        out["ref"] = {"seconds": time.monotonic() - t0, "feasible": ways[0.5]["feasible"],
                      "pinned": len(rk["pinned"]) if rk and rk["status"] == "optimal" else None}
        for key in ("U", "L", "kept", "Z", "R"):
            s = ways[0.5]["stages"][{"U": "peak", "L": "lift", "kept": "continuity",
                                     "Z": "proximity", "R": "rooms"}[key]]
            out["ref"][key] = None if s is None or s["value"] is None else \
                {"value": s["value"], "proven": s["status"] == "optimal"}
        if kind is not None and ways[0.5]["feasible"] is not False:
            out["problems"].append("made infeasible by %s, HiGHS says %s"
                                   % (kind, ways[0.5]["feasible"]))
        names = ("peak", "lift", "continuity", "continuity0", "proximity", "rooms")
        bkeys = ("U", "L", "kept", "kept0", "Z", "R")
        # How often the textbook model's "optimal" was a claim the descent
        # refuted (see highs_model._run_stage).
        out["claims"] = sum(1 for h in ways.values() for s in h["stages"].values()
                            if s is not None and s.get("claim") == "model")
        out["refuted"] = ["%s (share %g)" % (nm, share) for share, h in ways.items()
                          for nm in names if h["stages"][nm] is not None
                          and h["stages"][nm].get("refuted")]
        out["notes"] += ["HiGHS's textbook model claimed a wrong optimum: " + x
                         for x in out["refuted"]]
        for share, h in ways.items():
            if tiny:
                if (bf is None) != (h["feasible"] is False):
                    out["problems"].append("share %g: HiGHS feasible %s, brute force %s"
                                           % (share, h["feasible"], bf is not None))
                    continue
                if bf is None:
                    continue
                rk, want = h["ranks"], bf["ranks"]
                got = None if rk is None else (rk["status"], sorted(rk["pinned"]), rk["rest"],
                                               rk["levels"])
                if got != ("optimal", sorted(want["pinned"]), want["rest"], want["levels"]):
                    out["problems"].append("share %g: ranks HiGHS %s, brute force %s"
                                           % (share, got, (sorted(want["pinned"]),
                                                           want["rest"])))
                for nm, bk in zip(names, bkeys):
                    s = h["stages"][nm]
                    got = None if s is None else (s["status"], s["value"])
                    want = None if bf[bk] is None else ("optimal", bf[bk])
                    if got != want:
                        out["problems"].append("share %g: %s HiGHS %s, brute force %s"
                                               % (share, nm, got, want))
            else:
                base = ways[0.5]
                if (h["feasible"] is False) != (base["feasible"] is False):
                    out["problems"].append("share %g: feasible %s, share 0.5: %s"
                                           % (share, h["feasible"], base["feasible"]))
                    continue
                # Later stages compare only while the earlier ones agree (after
                # the peak, the lift and the windows hold the ranks' levels).
                for nm in names:
                    if nm != "peak" and h["levels"] != base["levels"]:
                        break
                    a, b = h["stages"][nm], base["stages"][nm]
                    if a is None or b is None:
                        continue
                    if a["status"] == b["status"] == "optimal":
                        if a["value"] != b["value"]:
                            out["problems"].append("share %g: %s %s, share 0.5: %s"
                                                   % (share, nm, a["value"], b["value"]))
                    if a["status"] != "optimal" or b["status"] != "optimal" \
                            or a["value"] != b["value"]:
                        break
    except Exception as e:
        out["problems"].append("check crashed: %s: %s" % (type(e).__name__, e))
    return out


# -------------------------------------------------------- output

def _fmt(v):
    if v is None:
        return "-"
    if isinstance(v, dict):
        v, mark = v["value"], "" if v.get("proven", True) else "?"
        return _fmt(v) + mark
    if isinstance(v, Fraction):
        return "%.6f" % v
    return str(v)


def line(res):
    parts = keel_run.line_head(res, 16)
    k, h = res["keel"], res["ref"]
    if k is not None:
        if k.get("U") is not None:
            parts.append("keel %s U=%s L=%s kept=%s Z=%s R=%s (%.1fs)"
                         % (k["status"], _fmt(k["U"]), _fmt(k["L"]), _fmt(k["kept"]),
                            _fmt(k["Z"]), _fmt(k["R"]), k["seconds"]))
        else:
            parts.append("keel exit %s %s (%.1fs)" % (k["rc"], k["status"] or "", k["seconds"]))
    if h is not None:
        if h["feasible"]:
            parts.append("ref U=%s L=%s kept=%s Z=%s R=%s (%.1fs)"
                         % (_fmt(h["U"]), _fmt(h["L"]), _fmt(h["kept"]), _fmt(h["Z"]),
                            _fmt(h["R"]), h["seconds"]))
            if h.get("pinned"):
                parts.append("pinned %d" % h["pinned"])
        else:
            parts.append("ref %s (%.1fs)" % ("infeasible" if h["feasible"] is False
                                            else "undecided", h["seconds"]))
    return keel_run.line_end(parts, res)


def main(argv=None):
    ap = argparse.ArgumentParser(description="Check keel's roster rules and stages "
                                 "against HiGHS and brute force")
    keel_run.add_arguments(ap, "no keel: HiGHS three ways against brute force (tiny) and "
                           "against itself (unit size)")
    ap.add_argument("--count", type=int, default=None,
                    help="unit-size rosters (default 30; 10 with --reference-only)")
    ap.add_argument("--tiny-count", type=int, default=None,
                    help="tiny rosters checked by brute force too (default 200; 300 with "
                         "--reference-only)")
    ap.add_argument("--seed", type=int, default=2718)
    ap.add_argument("--keel-seconds", type=float, default=10.0,
                    help="keel --time-limit per roster (default 10)")
    ap.add_argument("--highs-seconds", type=float, default=8.0,
                    help="HiGHS seconds per stage on unit-size rosters (default 8)")
    ap.add_argument("--pinned-every", type=int, default=3,
                    help="every K-th feasible roster gets a nurse pinned at the peak (default 3)")
    ap.add_argument("--min-pinned", type=float, default=0.2,
                    help="the least share of each kind's rosters with a pinned nurse (by the "
                         "reference) for a pass (default 0.2)")
    args = ap.parse_args(argv)
    keel = keel_run.keel_of(ap, args)
    if args.count is None:
        args.count = 10 if args.reference_only else 30
    if args.tiny_count is None:
        args.tiny_count = 300 if args.reference_only else 200

    t0 = time.monotonic()
    out_dir, tmp = keel_run.work_dir(args.keep, "keel-rules-")
    pre = gen_rosters.RULES_PRESETS
    # Every third unit-size roster is infeasible (30 cover the nine rules
    # once and a third of them again); every fourth tiny one.
    unit = gen_rosters.write_rules_rosters(out_dir, args.seed, args.count,
                                           pre["rules"]["patients"], pre["rules"]["nurses"],
                                           infeasible_every=3, prefix="rules",
                                           pinned_every=args.pinned_every)
    tiny = gen_rosters.write_rules_rosters(out_dir, args.seed, args.tiny_count,
                                           pre["rules_tiny"]["patients"],
                                           pre["rules_tiny"]["nurses"], infeasible_every=4,
                                           prefix="rtiny", pinned_every=args.pinned_every)
    gen_secs = time.monotonic() - t0
    jobs = [(p, kind, False, keel, args.keel_seconds, args.highs_seconds) for p, kind in unit]
    jobs += [(p, kind, True, keel, args.keel_seconds, args.highs_seconds) for p, kind in tiny]
    print("# %d unit-size and %d tiny rosters (seed %d, made in %.0f s) in %s; HiGHS %g s "
          "per stage, keel --time-limit %g, %d at once"
          % (len(unit), len(tiny), args.seed, gen_secs, out_dir, args.highs_seconds,
             args.keel_seconds, args.jobs), flush=True)
    work = reference_one if args.reference_only else check_one
    results = keel_run.run_jobs(work, jobs, args.jobs, line)

    unit_res = [x for x in results if not x["tiny"] and x["ref"] and x["ref"]["feasible"]]
    for key, label in (("U", "peak"), ("L", "lift"), ("kept", "continuity"),
                       ("Z", "proximity"), ("R", "rooms")):
        have = [x for x in unit_res if x["ref"].get(key) is not None]
        print("# reference proved %s on %d of %d feasible unit-size rosters"
              % (label, sum(1 for x in have if x["ref"][key]["proven"]), len(have)))
    if args.reference_only:
        print("# HiGHS's textbook model claimed %d stage optima; the descent refuted %d"
              % (sum(x.get("claims", 0) for x in results),
                 sum(len(x.get("refuted", [])) for x in results)))
    if keel is not None:
        kproved = sum(1 for x in results if not x["tiny"] and x["keel"]
                      and x["keel"]["status"] == "optimal")
        print("# keel reported optimal on %d of %d feasible unit-size rosters"
              % (kproved, len(unit_res)))
        rejected = sum(1 for x in results if x["keel"] and x["keel"]["rc"] == 2)
        if rejected:
            print("# keel rejected %d of %d rosters as bad input (exit 2): does this keel "
                  "know the roster rules?" % (rejected, len(results)))
    if keel is not None:
        print("# keel reported ranks (a nurse pinned at the peak) on %d rosters"
              % sum(1 for x in results if x["keel"] and x["keel"].get("pinned")))
    short = keel_run.count_pinned(
        results, [("unit-size", lambda x: not x["tiny"], len(unit)),
                  ("tiny", lambda x: x["tiny"], len(tiny))],
        lambda x: x["ref"] and x["ref"].get("pinned"), args.min_pinned)
    return keel_run.finish(results, t0, tmp, short)


if __name__ == "__main__":
    sys.exit(main())
