#!/usr/bin/python3
# SPDX-License-Identifier: GPL-3.0-or-later
"""Check keel audit against independent computations on generated
histories (tests/reference/gen_history.py), written from keel's documented
contract (docs/audit.md), not from its code.

  * tails: each nurse's exact upper tail P(X >= count), X the sum of
    independent Bernoulli(1 / counted nurses) over her shifts at stake,
    by direct convolution here (numpy); where every chance is equal, also
    scipy.stats.binom.sf.  Source: the Poisson-binomial distribution as a
    sum of independent Bernoulli variables (its pmf is the convolution of
    theirs); scipy.stats.binom (SciPy reference guide).
  * Holm: the step-down procedure as published, computed here.  Source:
    S. Holm, "A simple sequentially rejective multiple test procedure",
    Scand J Stat 6:65-70, 1979: sort p ascending, multiply the j-th by
    (m - j + 1), keep the running maximum, cap at 1.
  * indices: Jain, Gini and CV of each shift's counted utilisations with
    numpy.  Source: Jain, Chiu, Hawe, DEC-TR-301, 1984 (Jain's index); the
    mean-difference Gini (common practice, no single document); CV as the
    population standard deviation over the mean (numpy std, ddof=0).
  * counts: the heaviest load, the most high-acuity and isolation patients
    and zones of each shift recomputed from the rosters (a t-way tie gives
    1/t), with utilisation = care minutes / (shift minutes - break), a
    patient here for part of a clocked shift carrying its share rounded up
    (docs/model.md, "The clock").
  * violations: every planted break found (rule, nurse, the patient for
    skill, the hour for moment_limit), none invented on any shift.
  * best possible: stage 1 of the HiGHS rules model (highs_model.py) on
    each shift without the clock, against keel's best_max_utilisation.

Usage: check_audit.py KEEL [--seed S] [--shifts N]
The last line is "N passed, M failed"; exit 1 if M > 0.
"""

import argparse
import datetime
import json
import math
import os
import subprocess
import sys
import tempfile
from fractions import Fraction

sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))
import check_highs  # noqa: E402,F401  (exits 77 without numpy, scipy or PyYAML)

import numpy as np  # noqa: E402
from scipy import stats  # noqa: E402
import highs_model  # noqa: E402

HERE = os.path.dirname(os.path.abspath(__file__))
MEASURES = ["heaviest", "high_acuity", "isolation", "zones"]
TOL = 1e-9


def clock(text):
    h, m = text.split(":")
    return int(h) * 60 + int(m)


def tail_convolution(ps, k):
    f = np.array([1.0])
    for p in ps:
        f = np.convolve(f, [1.0 - p, p])
    return float(f[k:].sum()) if k <= len(ps) else 0.0


def holm(ps):
    m = len(ps)
    order = sorted(range(m), key=lambda i: (ps[i], i))
    adj, running = [0.0] * m, 0.0
    for j, i in enumerate(order):
        running = max(running, min(1.0, (m - j) * ps[i]))
        adj[i] = running
    return adj


def shift_figures(doc):
    """Per counted nurse: load fraction and amounts; all nurses are counted."""
    s = doc["shift"]
    start = clock(s["start"])
    cap = s["minutes"] - s["break_minutes"]
    out = {n["id"]: {"load": 0, "high": set(), "iso": set(), "zones": set()}
           for n in doc["nurses"]}
    for p in doc["patients"]:
        care = p["care_minutes"] if "care_minutes" in p else \
            {1: 60, 2: 95, 3: 135, 4: 190}[p["acuity"]]
        if "arrives_at" in p:
            a = (clock(p["arrives_at"]) - start) % 1440
            b = (clock(p["leaves_at"]) - start) % 1440
            care = math.ceil(care * (b - a) / s["minutes"])
        o = out[p["nurse"]]
        o["load"] += care
        if p["acuity"] >= 4:
            o["high"].add(p["id"])
        if p.get("isolation"):
            o["iso"].add(p["id"])
        o["zones"].add(p["zone"])
    amounts = {}
    for nid, o in out.items():
        amounts[nid] = {"heaviest": Fraction(o["load"], cap), "high_acuity": len(o["high"]),
                        "isolation": len(o["iso"]), "zones": len(o["zones"])}
    return amounts, cap


def expected_tallies(docs):
    tallies = {}
    for doc in docs:
        amounts, _ = shift_figures(doc)
        k = len(amounts)
        for m in MEASURES:
            top = max(a[m] for a in amounts.values())
            if top == 0:
                continue
            at_top = [n for n, a in amounts.items() if a[m] == top]
            for n in amounts:
                t = tallies.setdefault((n, m), {"count": Fraction(0), "chances": [],
                                                "whole": True})
                share = Fraction(1, len(at_top)) if n in at_top else Fraction(0)
                t["count"] += share
                t["chances"].append(1.0 / k)
                t["whole"] = t["whole"] and share in (0, 1)
    return tallies


def run_audit(keel, path, extra):
    proc = subprocess.run([keel, "audit", path, "--format", "json"] + extra,
                          capture_output=True, text=True, timeout=900)
    if proc.returncode not in (0, 5):
        raise RuntimeError("keel audit exited %d: %s" % (proc.returncode, proc.stderr[:500]))
    return json.loads(proc.stdout)


def main():
    ap = argparse.ArgumentParser()
    ap.add_argument("keel")
    ap.add_argument("--seed", type=int, default=20261203)
    ap.add_argument("--shifts", type=int, default=160)
    a = ap.parse_args()
    passed = failed = 0

    def check(ok, what):
        nonlocal passed, failed
        if ok:
            passed += 1
        else:
            failed += 1
            print("FAIL: " + what)

    work = tempfile.mkdtemp()
    gen = os.path.join(HERE, "gen_history.py")
    # Three histories: chances that vary (4-6 nurses) with a biased nurse,
    # breaks planted under the clock; equal chances (5 nurses) for the
    # binomial; and the same without explicit care minutes (many ties).
    histories = [
        ("vary", ["--vary", "--bias", "N03", "--plant-rate", "0.3", "--clock", "--care"]),
        ("equal", ["--nurses-per-shift", "5", "--bias", "N06", "--plant-rate", "0.2", "--care"]),
        ("ties", ["--vary", "--plant-rate", "0.2"]),
    ]
    for h, (name, opts) in enumerate(histories):
        path = os.path.join(work, name + ".yaml")
        truth_path = os.path.join(work, name + ".json")
        subprocess.run([sys.executable, gen, "--shifts", str(a.shifts), "--seed",
                        str(a.seed + h), "--out", path, "--truth", truth_path] + opts,
                       check=True)
        truth = json.load(open(truth_path))
        docs = truth["docs"]
        rep = run_audit(a.keel, path, ["--min-shifts", "20", "--jobs", "2"])
        check(len(rep["shifts"]) == len(docs), "%s: one report entry per shift" % name)

        # indices and utilisations, shift by shift
        for i, (doc, s) in enumerate(zip(docs, rep["shifts"])):
            amounts, _ = shift_figures(doc)
            x = np.array([float(v["heaviest"]) for v in amounts.values()])
            m = x.mean()
            jain = x.sum() ** 2 / (x.size * (x ** 2).sum())
            gini = np.abs(x[:, None] - x[None, :]).sum() / (2 * x.size ** 2 * m)
            cv = x.std() / m
            ok = (abs(s["max_utilisation"] - x.max()) < TOL and abs(s["jain"] - jain) < TOL
                  and abs(s["gini"] - gini) < TOL and abs(s["cv"] - cv) < TOL
                  and abs(s["spread"] - (x.max() - x.min())) < TOL)
            check(ok, "%s shift %d: indices %s against numpy %s" % (
                name, i, (s["max_utilisation"], s["jain"], s["gini"], s["cv"]),
                (x.max(), jain, gini, cv)))

        # violations: planted all found, none invented
        planted = {}
        for t in truth["planted"]:
            planted.setdefault(t["shift"], []).append(t)
        for i, s in enumerate(rep["shifts"]):
            want = planted.get(i, [])
            got = s["violations"]
            ok = len(got) == len(want)
            for t in want:
                ok = ok and any(
                    v["rule"] == t["rule"] and t["nurse"] in v["nurses"]
                    and ("patient" not in t or t["patient"] in v["patients"])
                    and ("from" not in t or v["intervals"] == [{"from": t["from"],
                                                                "to": t["to"]}])
                    for v in got)
            check(ok, "%s shift %d: planted %s, keel found %s" % (
                name, i, want, [(v["rule"], v["nurses"], v["intervals"]) for v in got]))
        check(sum(len(s["violations"]) for s in rep["shifts"]) == len(truth["planted"]),
              "%s: as many violations as planted" % name)

        # per nurse tallies, tails and Holm
        tallies = expected_tallies(docs)
        people = {p["id"]: p for p in rep["nurses"]}
        for m in MEASURES:
            tested, pvals = [], []
            for (n, mm), t in sorted(tallies.items()):
                if mm != m:
                    continue
                got = people[n]["measures"][m]
                exp = sum(t["chances"])
                ok = abs(got["count"] - float(t["count"])) < TOL and \
                    abs(got["expected"] - exp) < TOL and got["shifts_at_stake"] == len(t["chances"])
                check(ok, "%s %s %s: count %s expected %s at stake %s; here %s %s %s" % (
                    name, n, m, got["count"], got["expected"], got["shifts_at_stake"],
                    float(t["count"]), exp, len(t["chances"])))
                if not t["whole"]:
                    check(got["p_value"] is None, "%s %s %s: no p-value with a tie" % (name, n, m))
                    continue
                k = int(t["count"])
                p = tail_convolution(t["chances"], k)
                check(got["p_value"] is not None and
                      abs(got["p_value"] - p) <= 1e-12 + 1e-9 * p,
                      "%s %s %s: tail %s against convolution %s" % (name, n, m,
                                                                     got["p_value"], p))
                if len(set(t["chances"])) == 1:
                    b = float(stats.binom.sf(k - 1, len(t["chances"]), t["chances"][0]))
                    check(abs(got["p_value"] - b) <= 1e-12 + 1e-9 * b,
                          "%s %s %s: tail %s against scipy binom %s" % (name, n, m,
                                                                         got["p_value"], b))
                if len(t["chances"]) >= 20:
                    tested.append(n)
                    pvals.append(p)
            adj = holm(pvals)
            for n, q in zip(tested, adj):
                got = people[n]["measures"][m]
                check(got["p_adjusted"] is not None and abs(got["p_adjusted"] - q) <= 1e-9 * max(q, 1e-12) + 1e-12
                      and got["stands_out"] == (q <= 0.05),
                      "%s %s %s: Holm %s (%s) against %s" % (name, n, m, got["p_adjusted"],
                                                            got["stands_out"], q))
            for n in people:
                if n not in tested:
                    check(people[n]["measures"][m]["p_adjusted"] is None and
                          not people[n]["measures"][m]["stands_out"],
                          "%s %s %s: not tested, not standing out" % (name, n, m))
        # each nurse's heaviest loads by weekday and by label
        by = {}
        for doc in docs:
            amounts, _ = shift_figures(doc)
            top = max(v["heaviest"] for v in amounts.values())
            at_top = [n for n, v in amounts.items() if v["heaviest"] == top]
            wd = datetime.date.fromisoformat(doc["shift"]["date"]).strftime("%a")
            for n in amounts:
                for key in (("weekday", wd), ("label", doc["shift"]["label"])):
                    e = by.setdefault((n,) + key, [0, Fraction(0), 0.0])
                    e[0] += 1
                    e[1] += Fraction(1, len(at_top)) if n in at_top else 0
                    e[2] += 1.0 / len(amounts)
        for n, person in people.items():
            got = {(n, g["by"], g["key"]): g for g in person["by"]}
            want = {k: v for k, v in by.items() if k[0] == n}
            ok = set(got) == set(want) and all(
                got[k]["shifts"] == v[0] and abs(got[k]["heaviest"] - float(v[1])) < TOL
                and abs(got[k]["expected_heaviest"] - v[2]) < TOL for k, v in want.items())
            check(ok, "%s %s: heaviest by weekday and label %s against %s" % (
                name, n, person["by"], sorted(want.items())))

        if name in ("vary", "equal"):
            bias = "N03" if name == "vary" else "N06"
            check(people[bias]["measures"]["heaviest"]["stands_out"],
                  "%s: the biased nurse %s stands out" % (name, bias))

        # best possible against HiGHS (shifts without the clock)
        compared = 0
        for i, (doc, s) in enumerate(zip(docs, rep["shifts"])):
            if any("arrives_at" in p for p in doc["patients"]) or compared >= 25:
                continue
            plain = json.loads(json.dumps(doc))
            for p in plain["patients"]:
                p.pop("nurse", None)
            plain["policy"] = {"max_patients": 4,
                               "acuity_minutes": {1: 60, 2: 95, 3: 135, 4: 190},
                               "high_acuity": {"level": 4, "max_per_nurse": 1}}
            r = highs_model.derive_rules(plain)
            # stage 1 only (the peak): what keel's best_max_utilisation is
            if any(not e for e in r["eligible"]):
                st = {"status": "infeasible"}
            else:
                peak, _ = highs_model._balance_stages(r, highs_model.RulesModel, "patients")
                st, _ = highs_model._run_stage(r, peak(), 20.0, 0.1, None, None)
            compared += 1
            if st["status"] == "infeasible":
                check(s["best_max_utilisation"] is None,
                      "%s shift %d: HiGHS says infeasible, keel %s" % (
                          name, i, s["best_max_utilisation"]))
            elif st["status"] == "optimal" and s["best_status"] == "optimal":
                check(abs(s["best_max_utilisation"] - float(st["value"])) < TOL,
                      "%s shift %d: best %s against HiGHS %s" % (
                          name, i, s["best_max_utilisation"], float(st["value"])))
        check(compared > 0, "%s: some shifts compared with HiGHS" % name)
    print("%d passed, %d failed" % (passed, failed))
    return 1 if failed else 0


if __name__ == "__main__":
    sys.exit(main())
