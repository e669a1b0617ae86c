#!/usr/bin/python3
# SPDX-License-Identifier: GPL-3.0-or-later
"""Seeded generator of invented roster files for keel's reference checks.

Writes roster YAML (version 1) files: one shift, a unit policy, nurses and
patients, no assignment.  Everything is invented: ids, skills, minutes and
mixes are made up for testing and are not check values.  What the checks
compare is keel against an independent solver on the same file, so the
generator only has to produce realistic *shapes*: acuity levels 1-5 with
minutes per level, some extras (admission, discharge, isolation), some
explicit care minutes, a few skills most nurses hold, per-nurse patient
limits 3-6, some part-shift nurses, a charge nurse with duty minutes and a
lower limit, and now and then a nurse who takes no patients.

The nurse count follows the census (about 3.5-5 patients per nurse), kept
within the requested range.  Minutes per acuity level are scaled to the
shift's length.

Most rosters are made feasible (every patient can be given an eligible nurse
without breaking a patient limit); a small share (--infeasible-rate) is left
deliberately infeasible so that keel's "no valid assignment" path is seen.

Usage:
  gen_rosters.py --seed S --count K --patients A-B --nurses C-D --out DIR
  gen_rosters.py --small --seed S --count K --out DIR
"""

import argparse
import json
import os
import random
import sys

sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))
import highs_model  # noqa: E402  (shared roster arithmetic and feasibility test)

SKILLS = ["tele", "chemo", "wound", "iv_insulin", "vent"]

# Minutes per acuity level for a twelve-hour shift.  Invented scales for test
# rosters: the first is the one in keel's documentation example, the others
# stand for units that keep their own scale.  Shorter shifts scale them down.
ACUITY_SCALES = [
    {1: 90, 2: 150, 3: 210, 4: 300, 5: 420},
    {1: 60, 2: 120, 3: 180, 4: 240, 5: 360},
    {1: 45, 2: 90, 3: 150, 4: 210, 5: 300},
    {1: 50, 2: 100, 3: 160, 4: 240, 5: 330},
]

EXTRA_SCALES = [
    {"admission": 90, "discharge": 45, "isolation": 30},
    {"admission": 75, "discharge": 40, "isolation": 25},
]

SHIFTS = [
    {"label": "day", "start": "07:00", "minutes": 720, "break_minutes": 60},
    {"label": "night", "start": "19:00", "minutes": 720, "break_minutes": 60},
    {"label": "morning", "start": "07:00", "minutes": 480, "break_minutes": 30},
]

PRESETS = {
    "unit": {"patients": (20, 36), "nurses": (5, 8)},
    "small": {"patients": (3, 9), "nurses": (2, 4)},
}


def parse_range(text):
    """Parse 'A-B' (or a single number) into an inclusive (A, B) pair."""
    parts = text.split("-")
    if len(parts) == 1:
        lo = hi = int(parts[0])
    elif len(parts) == 2:
        lo, hi = int(parts[0]), int(parts[1])
    else:
        raise argparse.ArgumentTypeError("expected A-B, got %r" % text)
    if lo < 1 or hi < lo:
        raise argparse.ArgumentTypeError("bad range %r" % text)
    return lo, hi


def make_nurses(rng, count, shift):
    """Nurses of one shift: staff nurses, part-shift nurses, one charge nurse."""
    # Each nurse holds each skill with the skill's own probability; most
    # nurses hold most skills, a rarer skill is held by fewer.
    holding = {s: rng.uniform(0.55, 0.9) for s in SKILLS}
    nurses = []
    for i in range(count):
        nurse = {"id": "N%d" % (i + 1)}
        skills = [s for s in SKILLS if rng.random() < holding[s]]
        if skills:
            nurse["skills"] = skills
        r = rng.random()
        if r < 0.45:
            nurse["max_patients"] = rng.randint(3, 6)
        if shift["minutes"] > 480 and rng.random() < 0.2:
            # Part-shift nurse: eight hours on the unit, a shorter break.
            nurse["minutes"] = 480
            nurse["break_minutes"] = 30
        elif rng.random() < 0.1:
            nurse["break_minutes"] = rng.choice([30, 45, 60])
        nurses.append(nurse)
    # The charge nurse: duty minutes and a lower patient limit.
    charge = nurses[0]
    charge["duty_minutes"] = rng.choice([60, 90, 120, 180, 240])
    charge["max_patients"] = rng.randint(1, 3)
    charge.setdefault("skills", ["tele"])
    # Now and then a preceptor with a little duty time too.
    if count > 3 and rng.random() < 0.25:
        nurses[1]["duty_minutes"] = rng.choice([30, 45, 60])
    # Occasionally a nurse who takes no patients (orientee shadowing, say):
    # not counted in the balance.
    if count > 2 and rng.random() < 0.12:
        rng.choice(nurses[1:])["max_patients"] = 0
    return nurses


def make_patients(rng, count, scale):
    patients = []
    weights = [0.2, 0.32, 0.28, 0.14, 0.06]
    need_rate = {s: rng.uniform(0.03, 0.2) for s in SKILLS}
    first = rng.randint(1000, 8000)
    for i in range(count):
        p = {"id": "P-%04d" % (first + 7 * i)}
        p["acuity"] = rng.choices([1, 2, 3, 4, 5], weights)[0]
        if rng.random() < 0.12:
            # An explicit figure that overrides the level's minutes.
            base = scale[p["acuity"]]
            p["care_minutes"] = max(15, 5 * round(base * rng.uniform(0.6, 1.5) / 5))
        extras = []
        if rng.random() < 0.1:
            extras.append("admission")
        if rng.random() < 0.15:
            extras.append("discharge")
        if rng.random() < 0.15:
            extras.append("isolation")
        if extras:
            p["extras"] = extras
        needs = [s for s in SKILLS if rng.random() < need_rate[s]][:2]
        if needs:
            p["needs"] = needs
        patients.append(p)
    return patients


def repair(rng, doc):
    """Make an infeasible roster feasible by small, realistic changes."""
    nurses = doc["nurses"]
    policy = doc["policy"]
    counted = [n for n in nurses if n.get("max_patients", 1) != 0]
    for p in doc["patients"]:
        needs = p.get("needs", [])
        if not any(set(needs) <= set(n.get("skills", [])) for n in counted):
            # Give the skill set to a counted staff nurse (not the charge nurse).
            pick = rng.choice(counted[1:] or counted)
            pick["skills"] = sorted(set(pick.get("skills", [])) | set(needs),
                                    key=SKILLS.index)
            return
    # Room: when the patient limits leave too few places, raise one staff
    # nurse's limit a step (and the unit's, when that is what binds).
    r = highs_model.derive(doc)
    room = sum(len(doc["patients"]) if n["limit"] is None else n["limit"]
               for n in r["nurses"] if n["counted"])
    pick = rng.choice(counted[1:] or counted)
    if room < len(doc["patients"]):
        own = pick.get("max_patients")
        unit = policy.get("max_patients")
        if unit is not None and (own is None or own >= unit):
            policy["max_patients"] = unit + 1
            if own is not None:
                pick["max_patients"] = own + 1
        elif own is not None:
            pick["max_patients"] = own + 1
        return
    # Enough places but the skills crowd onto too few nurses: teach a nurse
    # one more skill that patients need.
    needed = sorted({s for p in doc["patients"] for s in p.get("needs", [])},
                    key=SKILLS.index)
    lacking = [s for s in needed if s not in pick.get("skills", [])]
    if lacking:
        pick["skills"] = sorted(set(pick.get("skills", [])) | {rng.choice(lacking)},
                                key=SKILLS.index)


def generate(rng, name, patients_range, nurses_range, infeasible_rate=0.0):
    """One roster document (a dict shaped like the YAML file)."""
    shift = dict(rng.choice(SHIFTS))
    fraction = shift["minutes"] / 720.0
    scale = {k: 5 * round(v * fraction / 5) for k, v in rng.choice(ACUITY_SCALES).items()}
    extras_scale = {k: 5 * round(v * fraction / 5) for k, v in rng.choice(EXTRA_SCALES).items()}
    npatients = rng.randint(*patients_range)
    # About 3.5-5 patients per nurse, within the requested range.
    nnurses = round(npatients / rng.uniform(3.5, 5.0))
    nnurses = max(nurses_range[0], min(nurses_range[1], nnurses))
    policy = {}
    if rng.random() < 0.8:
        # Unit policy limit, usually a little above the mean census per nurse.
        policy["max_patients"] = max(3, min(6, -(-npatients // nnurses) + rng.randint(0, 1)))
    policy["acuity_minutes"] = dict(scale)
    policy["extra_minutes"] = dict(extras_scale)
    doc = {
        "version": 1,
        "name": name,
        "shift": shift,
        "policy": policy,
        "nurses": make_nurses(rng, nnurses, shift),
        "patients": make_patients(rng, npatients, scale),
    }
    want_infeasible = rng.random() < infeasible_rate
    for _ in range(200):
        if highs_model.assignment_feasible(highs_model.derive(doc)) or want_infeasible:
            break
        repair(rng, doc)
    if want_infeasible and highs_model.assignment_feasible(highs_model.derive(doc)):
        # Make it infeasible on purpose: a patient needs a skill no counted
        # nurse holds.
        held = set()
        for n in doc["nurses"]:
            if n.get("max_patients", 1) != 0:
                held |= set(n.get("skills", []))
        missing = [s for s in SKILLS if s not in held]
        if missing:
            doc["patients"][-1]["needs"] = [missing[0]]
        else:
            doc["patients"][-1]["needs"] = ["ecmo"]
    return doc


def q(value):
    """A YAML scalar: strings double-quoted (JSON quoting is valid YAML)."""
    if isinstance(value, str):
        return json.dumps(value)
    return str(value)


def flow_map(d, keys=None):
    items = []
    for k in (keys or d.keys()):
        if k not in d:
            continue
        v = d[k]
        if isinstance(v, list):
            items.append("%s: [%s]" % (k, ", ".join(q(x) for x in v)))
        else:
            items.append("%s: %s" % (k, q(v)))
    return "{" + ", ".join(items) + "}"


def to_yaml(doc):
    """Render a roster in the layout of keel's documentation (flow maps)."""
    out = ["# Invented test roster (gen_rosters.py); not real patients or staff.",
           "version: 1"]
    out.append("shift:   " + flow_map(doc["shift"], ["label", "start", "minutes",
                                                      "break_minutes"]))
    out.append("policy:")
    pol = doc["policy"]
    if "max_patients" in pol:
        out.append("  max_patients: %d" % pol["max_patients"])
    out.append("  acuity_minutes: {%s}" % ", ".join(
        "%d: %d" % (k, v) for k, v in sorted(pol["acuity_minutes"].items())))
    out.append("  extra_minutes: {%s}" % ", ".join(
        "%s: %d" % (k, v) for k, v in pol["extra_minutes"].items()))
    out.append("nurses:")
    for n in doc["nurses"]:
        out.append("  - " + flow_map(n, ["id", "skills", "max_patients", "minutes",
                                          "break_minutes", "duty_minutes"]))
    out.append("patients:")
    for p in doc["patients"]:
        out.append("  - " + flow_map(p, ["id", "acuity", "care_minutes", "extras", "needs"]))
    return "\n".join(out) + "\n"


def write_rosters(out_dir, seed, count, patients_range, nurses_range,
                  infeasible_rate=0.0, prefix="roster"):
    """Write `count` rosters into out_dir; return their paths in order."""
    os.makedirs(out_dir, exist_ok=True)
    rng = random.Random(seed)
    paths = []
    for k in range(count):
        name = "%s-%d-%03d" % (prefix, seed, k)
        doc = generate(rng, name, patients_range, nurses_range, infeasible_rate)
        text = to_yaml(doc)
        path = os.path.join(out_dir, name + ".yaml")
        with open(path, "w", encoding="utf-8") as f:
            f.write(text)
        paths.append(path)
    return paths


def main(argv=None):
    ap = argparse.ArgumentParser(description=__doc__.split("\n\n")[0])
    ap.add_argument("--seed", type=int, default=1)
    ap.add_argument("--count", type=int, default=10)
    ap.add_argument("--patients", type=parse_range)
    ap.add_argument("--nurses", type=parse_range)
    ap.add_argument("--small", action="store_true",
                    help="tiny rosters (3-9 patients, 2-4 nurses) any MILP solver proves")
    ap.add_argument("--infeasible-rate", type=float, default=0.03,
                    help="share of rosters left infeasible on purpose (default 0.03)")
    ap.add_argument("--out", required=True)
    args = ap.parse_args(argv)
    preset = PRESETS["small" if args.small else "unit"]
    pr = args.patients or preset["patients"]
    nr = args.nurses or preset["nurses"]
    for path in write_rosters(args.out, args.seed, args.count, pr, nr, args.infeasible_rate,
                              prefix="small" if args.small else "roster"):
        print(path)
    return 0


if __name__ == "__main__":
    sys.exit(main())
