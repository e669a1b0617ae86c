#!/usr/bin/python3
# SPDX-License-Identifier: GPL-3.0-or-later
"""Generate a unit's past shifts for keel audit: rosters with each
patient's nurse filled in, as one YAML stream, with planted rule breaks
and a planted bias, and the truth about them.

Everything is invented: the unit, the nurses (pseudonymous ids N01..),
the patients and the acuity scale.

Each shift picks some of the unit's nurses, draws patients, and assigns
them so that no rule is broken (limit 4 patients, at most one high-acuity
patient per nurse, chemo patients to nurses with chemo, no protective
patient beside an infectious one).  With --bias NURSE that nurse is given
one patient more than the others first, so she carries the heaviest load
more often than chance.  With --plant-rate R a shift has, with
probability R, exactly one planted break, recorded in the truth:

  skill         a chemo patient given to a nurse without chemo
  patient_limit a nurse given a fifth patient
  high_acuity   a second high-acuity patient to one nurse
  isolation     a protective patient beside an infectious one
  moment_limit  (with --clock) a patient here from 10:00 to 11:00 given to
                a nurse who holds four all shift: five for that hour only

Usage: gen_history.py --shifts N --seed S [--nurses-per-shift K | --vary]
                      [--bias N03] [--plant-rate R] [--clock] [--care]
                      --out HISTORY.yaml [--truth TRUTH.json] [--split K]
--split K writes K files HISTORY-1.yaml ... instead of one (shifts dealt in
order, as evenly as they go, a stream each; K at most N).
"""

import argparse
import datetime
import json
import random

POOL = ["N%02d" % i for i in range(1, 9)]
CHEMO = {"N01", "N02", "N05"}
SCALE = {1: 60, 2: 95, 3: 135, 4: 190}
MAX = 4


def y(value):
    if isinstance(value, str):
        return '"%s"' % value
    if isinstance(value, bool):
        return "true" if value else "false"
    if isinstance(value, list):
        return "[" + ", ".join(y(v) for v in value) + "]"
    return str(value)


def flow(d):
    return "{" + ", ".join("%s: %s" % (k, y(v)) for k, v in d.items()) + "}"


def to_yaml(doc):
    s = doc["shift"]
    lines = [
        "version: 1",
        'unit: {name: "Invented Ward 3", type: med-surg}',
        "shift: " + flow(s),
        "policy: {max_patients: %d, acuity_minutes: %s, high_acuity: {level: 4, "
        "max_per_nurse: 1}}" % (MAX, "{" + ", ".join("%d: %d" % kv for kv in SCALE.items()) + "}"),
        "nurses:",
    ]
    lines += ["  - " + flow(n) for n in doc["nurses"]]
    lines.append("patients:")
    lines += ["  - " + flow(p) for p in doc["patients"]]
    return "\n".join(lines) + "\n"


def make_shift(rng, i, k, bias, plant, clock, care):
    day = datetime.date(2026, 1, 5) + datetime.timedelta(days=i // 2)
    label = "day" if i % 2 == 0 else "night"
    shift = {"label": label, "date": day.isoformat(),
             "start": "07:00" if label == "day" else "19:00",
             "minutes": 720, "break_minutes": 60}
    on = sorted(rng.sample(POOL, k))
    nurses = [{"id": n, "skills": ["tele"] + (["chemo"] if n in CHEMO else [])} for n in on]
    chemo_on = [n for n in on if n in CHEMO]
    npat = rng.randint(2 * k, 3 * k)
    nhigh = rng.randint(0, k - 1)
    patients = []
    for j in range(npat):
        acuity = 4 if j < nhigh else rng.randint(1, 3)
        p = {"id": "P%d-%02d" % (i, j), "acuity": acuity, "zone": rng.choice("ABC")}
        if care:  # an explicit figure: ties at the top are rare
            p["care_minutes"] = rng.randint(SCALE[acuity] - 30, SCALE[acuity] + 30)
        if rng.random() < 0.2:
            p["isolation"] = "contact"
        if chemo_on and j >= nhigh and rng.random() < 0.1:
            p["needs"] = ["chemo"]
        patients.append(p)
    held = {n: [] for n in on}
    order = on[:]
    rng.shuffle(order)
    for j, n in enumerate(order[:nhigh]):  # one high-acuity patient each
        held[n].append(j)
    rest = list(range(nhigh, npat))
    plain = [j for j in rest if "needs" not in patients[j]]
    if bias in held and plain:  # the biased nurse takes one more first
        held[bias].append(plain[-1])
        rest.remove(plain[-1])
    for j in rest:
        p = patients[j]
        room = [n for n in on if len(held[n]) < MAX and
                ("needs" not in p or n in CHEMO)]
        if not room:  # every chemo nurse is full: the patient needs no chemo after all
            p.pop("needs")
            room = [n for n in on if len(held[n]) < MAX]
        fewest = min(len(held[n]) - (n == bias) for n in room)
        n = rng.choice([n for n in room if len(held[n]) - (n == bias) == fewest])
        held[n].append(j)
    truth = []
    if plant:
        kinds = ["skill", "patient_limit", "high_acuity", "isolation"] + \
            (["moment_limit"] if clock else [])
        kind = rng.choice(kinds)
        planted = plant_one(rng, kind, i, on, held, patients)
        if planted:
            truth.append(planted)
    for n, js in held.items():
        for j in js:
            patients[j]["nurse"] = n
    return {"shift": shift, "nurses": nurses, "patients": patients}, truth


def plant_one(rng, kind, i, on, held, patients):
    """Change the plan (or add a patient) so that it breaks rule `kind` once."""
    def add(p, n):
        patients.append(p)
        held[n].append(len(patients) - 1)

    if kind == "skill":
        plain = [n for n in on if n not in CHEMO and len(held[n]) < MAX]
        if not plain:
            return None
        n = rng.choice(plain)
        pid = "P%d-chemo" % i
        add({"id": pid, "acuity": 2, "zone": "A", "needs": ["chemo"]}, n)
        return {"shift": i, "rule": "skill", "nurse": n, "patient": pid}
    if kind == "patient_limit":
        # bring one nurse to five with plain patients (no high acuity)
        n = rng.choice(on)
        while len(held[n]) < MAX + 1:
            add({"id": "P%d-x%d" % (i, len(held[n])), "acuity": 1, "zone": "B"}, n)
        return {"shift": i, "rule": "patient_limit", "nurse": n}
    if kind == "high_acuity":
        with_high = [n for n in on if any(patients[j]["acuity"] == 4 for j in held[n])
                     and len(held[n]) < MAX]
        if not with_high:
            return None
        n = rng.choice(with_high)
        add({"id": "P%d-high" % i, "acuity": 4, "zone": "C"}, n)
        return {"shift": i, "rule": "high_acuity", "nurse": n}
    if kind == "isolation":
        infectious = [n for n in on if any(patients[j].get("isolation") == "contact"
                                           for j in held[n]) and len(held[n]) < MAX]
        if not infectious:
            return None
        n = rng.choice(infectious)
        add({"id": "P%d-prot" % i, "acuity": 1, "zone": "A", "isolation": "protective"}, n)
        return {"shift": i, "rule": "isolation", "nurse": n}
    # moment_limit: a nurse with exactly four all shift, and a fifth for one hour
    n = rng.choice(on)
    while len(held[n]) < MAX:
        add({"id": "P%d-y%d" % (i, len(held[n])), "acuity": 1, "zone": "B"}, n)
    start = "07:00" if i % 2 == 0 else "19:00"
    at = "10:00" if start == "07:00" else "22:00"
    until = "11:00" if start == "07:00" else "23:00"
    add({"id": "P%d-hour" % i, "acuity": 1, "zone": "B", "arrives_at": at,
         "leaves_at": until}, n)
    return {"shift": i, "rule": "moment_limit", "nurse": n, "from": at, "to": until}


def main():
    ap = argparse.ArgumentParser()
    ap.add_argument("--shifts", type=int, required=True)
    ap.add_argument("--seed", type=int, default=1)
    ap.add_argument("--nurses-per-shift", type=int, default=5)
    ap.add_argument("--vary", action="store_true", help="4 to 6 nurses a shift")
    ap.add_argument("--bias", default=None)
    ap.add_argument("--plant-rate", type=float, default=0.0)
    ap.add_argument("--clock", action="store_true")
    ap.add_argument("--care", action="store_true", help="explicit care minutes (few ties)")
    ap.add_argument("--out", required=True)
    ap.add_argument("--truth")
    ap.add_argument("--split", type=int, default=1)
    a = ap.parse_args()
    rng = random.Random(a.seed)
    docs, truth = [], []
    for i in range(a.shifts):
        k = rng.randint(4, 6) if a.vary else a.nurses_per_shift
        doc, t = make_shift(rng, i, k, a.bias, rng.random() < a.plant_rate, a.clock,
                             a.care)
        docs.append(doc)
        truth += t
    header = "# Invented history for keel audit's checks (tests/reference/gen_history.py).\n"
    if a.split == 1:
        with open(a.out, "w") as f:
            f.write(header + "---\n".join(to_yaml(d) for d in docs))
    else:
        stem = a.out[:-5] if a.out.endswith(".yaml") else a.out
        for s in range(a.split):
            part = docs[s * len(docs) // a.split:(s + 1) * len(docs) // a.split]
            with open("%s-%d.yaml" % (stem, s + 1), "w") as f:
                f.write(header + "---\n".join(to_yaml(d) for d in part))
    if a.truth:
        with open(a.truth, "w") as f:
            json.dump({"docs": docs, "planted": truth}, f)


if __name__ == "__main__":
    main()
