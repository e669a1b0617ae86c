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

With --rules (or --rules-tiny) the rosters switch on the roster rules at
random: unit type with the California ratio table on some, patient ratios
"1:N", high-acuity caps, isolation kinds with separation on (sometimes off)
and isolation_needs, rooms and zones with max_zones, previous nurses (mostly
on the roster, some gone home), balance_tolerance 0 / 0.05 / 0.1, locks,
avoid lists, needs and skills, a charge nurse under policy.roles.charge and
now and then an orientee with a preceptor.  Every limit stays within the
table's number (a looser one is an input error, which these rosters are
not).  Every K-th roster (--infeasible-every) is infeasible because of one
rule, the rules taken in turn: HiGHS proves it infeasible, and feasible
again with that rule switched off.

Usage:
  gen_rosters.py --seed S --count K --patients A-B --nurses C-D --out DIR
  gen_rosters.py --small --seed S --count K --out DIR
  gen_rosters.py --rules | --rules-tiny --seed S --count K --out DIR
"""

import argparse
import copy
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
        extras_and_needs(rng, p, extras, need_rate)
        patients.append(p)
    return patients


def extras_and_needs(rng, p, extras, need_rate):
    """Patient p's extras (when there are any) and up to two needs, each
    skill of need_rate drawn at its rate, in need_rate's order."""
    if extras:
        p["extras"] = extras
    needs = [s for s in need_rate if rng.random() < need_rate[s]][:2]
    if needs:
        p["needs"] = needs


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
    """A YAML value in flow style: strings double-quoted (JSON quoting is
    valid YAML), lists and maps as flow sequences and flow maps."""
    if isinstance(value, bool):
        return "true" if value else "false"
    if isinstance(value, str):
        return json.dumps(value)
    if isinstance(value, list):
        return "[" + ", ".join(q(x) for x in value) + "]"
    if isinstance(value, dict):
        return "{" + ", ".join("%s: %s" % (k, q(x)) for k, x in value.items()) + "}"
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
    out += people_lines(doc, ["id", "skills", "max_patients", "minutes", "break_minutes",
                              "duty_minutes"], ["id", "acuity", "care_minutes", "extras", "needs"])
    return "\n".join(out) + "\n"


def people_lines(doc, nurse_keys, patient_keys):
    """The nurses and patients of a roster, one flow map each, keys in the
    order given."""
    out = ["nurses:"]
    out += ["  - " + flow_map(n, nurse_keys) for n in doc["nurses"]]
    out.append("patients:")
    out += ["  - " + flow_map(p, patient_keys) for p in doc["patients"]]
    return out


# ------------------------------------------------------------------ rules

# Presets with every roster rule switched on at random (see generate_rules).
RULES_PRESETS = {
    "rules": {"patients": (16, 30), "nurses": (4, 7)},
    "rules_tiny": {"patients": (5, 8), "nurses": (2, 3)},
}
# The kinds of infeasible roster: one rule alone makes each infeasible.
INFEASIBLE_KINDS = highs_model.RULE_NAMES
UNIT_TYPES = ["icu", "step-down", "telemetry", "med-surg", "pediatrics", "oncology", "other"]
TABLE = highs_model.CALIFORNIA_TABLE
ZONE_NAMES = ["east", "west", "north", "south"]
# Seconds HiGHS may take to decide whether a generated roster is feasible.
FEASIBILITY_SECONDS = 20.0


def _counted(doc):
    return [n for n in highs_model.derive_rules(doc)["nurses"] if n["counted"]]


def _table_of(doc):
    if doc["policy"].get("ratio_table") == "california":
        return TABLE[doc["unit"]["type"]]
    return None


def _cap(doc, value):
    """value held to the table's number (a looser limit is an input error)."""
    t = _table_of(doc)
    return value if t is None else min(value, t)


def _rules_nurses(rng, count, shift, roles, orientee_ok=True):
    holding = {s: rng.uniform(0.55, 0.9) for s in SKILLS}
    n95 = rng.uniform(0.5, 0.9)
    nurses = []
    for i in range(count):
        nurse = {"id": "N%d" % (i + 1)}
        skills = [s for s in SKILLS if rng.random() < holding[s]]
        if rng.random() < n95:
            skills.append("n95")
        if skills:
            nurse["skills"] = skills
        if rng.random() < 0.3:
            nurse["max_patients"] = rng.randint(3, 6)
        if shift["minutes"] > 480 and rng.random() < 0.15:
            nurse["minutes"] = 480
            nurse["break_minutes"] = 30
        nurses.append(nurse)
    # A charge nurse with the role's limits (now and then none on a tiny roster).
    if count >= 3 or rng.random() < 0.4:
        nurses[0]["role"] = "charge"
        roles["charge"] = {"max_patients": rng.choice([0, 1, 2, 2, 3]),
                           "duty_minutes": rng.choice([60, 90, 120, 180])}
        nurses[0].pop("max_patients", None)
        if rng.random() < 0.3:
            nurses[0]["duty_minutes"] = rng.choice([120, 240])
        if count == 2 and roles["charge"]["max_patients"] == 0:
            roles["charge"]["max_patients"] = 2
    # An orientee sharing a staff nurse's assignment.
    if count >= 3 and orientee_ok and rng.random() < 0.35:
        ori = nurses[-1]
        ori["role"] = "orientee"
        ori["preceptor"] = rng.choice([n["id"] for n in nurses[:-1] if "role" not in n])
        ori.pop("max_patients", None)
    if count >= 4 and rng.random() < 0.25:
        rng.choice([n for n in nurses if "role" not in n])["role"] = "float"
    return nurses


def _rules_patients(rng, count, scale, nurse_ids, nnurses):
    patients = make_patients(rng, count, scale)
    with_places = rng.random() < 0.88
    zones = rng.sample(ZONE_NAMES, rng.randint(2, 4))
    rooms = {z: ["%s%d" % (z[0].upper(), 10 + k)
                 for k in range(max(1, round(count / len(zones) * 0.75)))] for z in zones}
    with_prev = rng.random() < 0.85
    iso_rate = rng.uniform(0.1, 0.35)
    for p in patients:
        if rng.random() < 0.08:
            # Care minutes only, no acuity level: never high-acuity.
            p["care_minutes"] = p.get("care_minutes", 5 * rng.randint(12, 60))
            del p["acuity"]
        if rng.random() < 0.07:
            p["ratio"] = "1:%d" % rng.choice([1, 2, 2, 3, 3, 4])
        if rng.random() < iso_rate:
            p["isolation"] = rng.choices(highs_model.ISOLATION_KINDS, [45, 25, 15, 15])[0]
        if with_places:
            z = rng.choice(zones)
            u = rng.random()
            if u < 0.8:
                p["zone"], p["room"] = z, rng.choice(rooms[z])
            elif u < 0.85:
                p["room"] = rng.choice(rooms[z])
            elif u < 0.9:
                p["zone"] = z
        if with_prev and rng.random() < 0.7:
            if rng.random() < 0.85:
                p["previous_nurse"] = rng.choice(nurse_ids)
            else:
                # Off duty now: not on this roster.
                p["previous_nurse"] = "N%d" % (nnurses + rng.randint(1, 6))
    return patients


def _rules_base(rng, name, patients_range, nurses_range):
    """A roster with the rules switched on at random (not yet made feasible)."""
    shift = dict(rng.choice(SHIFTS))
    fraction = shift["minutes"] / 720.0
    scale = {k: 5 * round(v * fraction / 5) for k, v in rng.choice(ACUITY_SCALES).items()}
    extras_scale = {k: 5 * round(v * fraction / 5) for k, v in rng.choice(EXTRA_SCALES).items()}
    npatients = rng.randint(*patients_range)
    # About 3-4.5 patients per nurse on shift (the charge nurse and an
    # orientee take few or none), within the requested range.
    nnurses = round(npatients / rng.uniform(3.0, 4.5))
    nnurses = max(nurses_range[0], min(nurses_range[1], nnurses))
    roles = {}
    policy = {"acuity_minutes": dict(scale), "extra_minutes": dict(extras_scale)}
    nurses = _rules_nurses(rng, nnurses, shift, roles,
                           orientee_ok=npatients / max(1, nnurses - 2) <= 5.5)
    if roles:
        policy["roles"] = roles
    doc = {"version": 1, "name": name, "unit": {"name": "Invented test unit"},
           "shift": shift, "policy": policy, "nurses": nurses,
           "patients": _rules_patients(rng, npatients, scale,
                                       [n["id"] for n in nurses], nnurses)}
    counted = len(_counted(doc))
    fits = [t for t, v in TABLE.items() if v * counted >= npatients + 1]
    if fits and rng.random() < 0.5:
        doc["unit"]["type"] = rng.choice(fits)
        policy["ratio_table"] = "california"
    elif rng.random() < 0.8:
        doc["unit"]["type"] = rng.choice(UNIT_TYPES)
    if rng.random() < 0.8:
        policy["max_patients"] = _cap(doc, max(3, -(-npatients // max(1, counted))
                                               + rng.randint(0, 1)))
    for n in nurses:
        if "max_patients" in n:
            n["max_patients"] = _cap(doc, n["max_patients"])
    for spec in roles.values():
        spec["max_patients"] = _cap(doc, spec["max_patients"])
    for p in doc["patients"]:
        if "ratio" in p:
            p["ratio"] = "1:%d" % _cap(doc, int(p["ratio"][2:]))
    if rng.random() < 0.7:
        policy["high_acuity"] = {"level": rng.choice([3, 4, 4, 5]),
                                 "max_per_nurse": rng.randint(1, 3)}
    sep = rng.random()
    if sep < 0.3:
        policy["isolation_separation"] = True
    elif sep < 0.5:
        policy["isolation_separation"] = False
    if rng.random() < 0.85:
        policy["isolation_needs"] = {"airborne": ["n95"]}
    if rng.random() < 0.6:
        policy["max_zones"] = rng.randint(1, 3)
    tol = rng.choice([None, 0, 0.0, 0.05, 0.1, 0.1])
    if tol is not None:
        policy["balance_tolerance"] = tol
    # Locks to a nurse who may take the patient, and avoid lists.
    r = highs_model.derive_rules(doc)
    for _ in range(rng.choice([0, 0, 1, 1, 2])):
        p = rng.randrange(len(doc["patients"]))
        if r["eligible"][p]:
            doc["patients"][p]["nurse"] = r["nurses"][rng.choice(r["eligible"][p])]["id"]
            doc["patients"][p]["lock"] = True
    for _ in range(rng.choice([0, 1, 2, 3])):
        p = doc["patients"][rng.randrange(len(doc["patients"]))]
        others = [n["id"] for n in nurses if n["id"] != p.get("nurse")]
        p["avoid"] = sorted(rng.sample(others, min(len(others), rng.randint(1, 2))))
    return doc


def _feasible(doc, relax=()):
    return highs_model.feasible_rules(highs_model.derive_rules(doc, relax), FEASIBILITY_SECONDS)


def _repair_rule(rng, doc, rule):
    """One small, realistic change that loosens `rule`."""
    policy, nurses, patients = doc["policy"], doc["nurses"], doc["patients"]
    table = _table_of(doc)
    if rule == "skill":
        r = highs_model.derive_rules(doc)
        tight = min(len(e) for e in r["eligible"])
        p = rng.choice([i for i, e in enumerate(r["eligible"]) if len(e) == tight])
        counted = [j for j, n in enumerate(r["nurses"]) if n["counted"]]
        pick = nurses[rng.choice(counted)]
        pick["skills"] = sorted(set(pick.get("skills", [])) | r["patients"][p]["needs"])
    elif rule == "patient_limit":
        options = []
        if "max_patients" in policy and (table is None or policy["max_patients"] < table):
            options.append(("policy", None))
        for n in nurses:
            if n.get("max_patients") is not None and n.get("role") != "orientee" \
                    and (table is None or n["max_patients"] < table):
                options.append(("nurse", n))
        charge = policy.get("roles", {}).get("charge")
        if charge and charge["max_patients"] < (3 if table is None else min(3, table)):
            options.append(("charge", charge))
        if not options:
            for n in nurses:
                n.pop("max_patients", None)
            policy.pop("max_patients", None)
            return
        what, obj = rng.choice(options)
        if what == "policy":
            policy["max_patients"] += 1
        else:
            obj["max_patients"] += 1
    elif rule == "law_limit":
        order = ["icu", "step-down", "telemetry", "med-surg"]
        k = order.index(doc["unit"]["type"])
        if k + 1 < len(order):
            doc["unit"]["type"] = order[k + 1]
        else:
            del policy["ratio_table"]
    elif rule == "patient_ratio":
        p = rng.choice([p for p in patients if "ratio" in p])
        n = int(p["ratio"][2:]) + 1
        if rng.random() < 0.5 or (table is not None and n > table):
            del p["ratio"]
        else:
            p["ratio"] = "1:%d" % n
    elif rule == "high_acuity":
        ha = policy["high_acuity"]
        if ha["max_per_nurse"] < 4 and rng.random() < 0.6:
            ha["max_per_nurse"] += 1
        elif ha["level"] < 5:
            ha["level"] += 1
        else:
            del policy["high_acuity"]
    elif rule == "isolation":
        prot = [p for p in patients if p.get("isolation") == "protective"]
        del rng.choice(prot)["isolation"]
    elif rule == "zones":
        if policy["max_zones"] < 3:
            policy["max_zones"] += 1
        else:
            del policy["max_zones"]
    elif rule == "lock":
        p = rng.choice([p for p in patients if p.get("lock")])
        del p["lock"], p["nurse"]
    elif rule == "avoid":
        del rng.choice([p for p in patients if "avoid" in p])["avoid"]


def _active_rules(doc):
    """The rules this roster switches on (the ones a repair may loosen)."""
    policy, patients = doc["policy"], doc["patients"]
    out = ["skill", "patient_limit"]
    if policy.get("ratio_table"):
        out.append("law_limit")
    if any("ratio" in p for p in patients):
        out.append("patient_ratio")
    if "high_acuity" in policy:
        out.append("high_acuity")
    if any(p.get("isolation") == "protective" for p in patients):
        out.append("isolation")
    if "max_zones" in policy:
        out.append("zones")
    if any(p.get("lock") for p in patients):
        out.append("lock")
    if any("avoid" in p for p in patients):
        out.append("avoid")
    return out


def _make_feasible(rng, doc):
    """Loosen the rules that block every assignment; False if it fails."""
    for _ in range(60):
        f = _feasible(doc)
        if f:
            return True
        if f is None:
            return False
        active = _active_rules(doc)
        culprits = [rule for rule in active if _feasible(doc, [rule])]
        _repair_rule(rng, doc, rng.choice(culprits or active))
    return False


def _unblock(p, nurse_id):
    """Let patient p go to nurse_id: no lock elsewhere, not avoided."""
    if p.get("lock") and p.get("nurse") != nurse_id:
        del p["lock"], p["nurse"]
    if nurse_id in p.get("avoid", []):
        p["avoid"].remove(nurse_id)
        if not p["avoid"]:
            del p["avoid"]


def _break(rng, doc, kind):
    """Change doc so that rule `kind` alone rules out every assignment."""
    policy, nurses, patients = doc["policy"], doc["nurses"], doc["patients"]
    r = highs_model.derive_rules(doc)
    counted = [j for j, n in enumerate(r["nurses"]) if n["counted"]]
    P = len(patients)
    if kind == "skill":
        rng.choice(patients).setdefault("needs", []).append("ecmo")
    elif kind == "avoid":
        p = rng.choice([p for p in patients if not p.get("lock")] or patients)
        p.pop("lock", None)
        p.pop("nurse", None)
        i = patients.index(p)
        r0 = highs_model.derive_rules(doc, ["avoid"])
        p["avoid"] = sorted(r["nurses"][j]["id"] for j in r0["eligible"][i])
    elif kind == "lock":
        idle = [n for j, n in enumerate(r["nurses"]) if not n["counted"]]
        p = rng.choice(patients)
        lacking = [n for j, n in enumerate(r["nurses"])
                   if n["counted"] and not r["patients"][patients.index(p)]["needs"] <= n["skills"]]
        if idle and rng.random() < 0.5:
            target = rng.choice(idle)["id"]
            _unblock(p, target)
            p["nurse"], p["lock"] = target, True
        elif lacking:
            target = rng.choice(lacking)["id"]
            _unblock(p, target)
            p["nurse"], p["lock"] = target, True
        else:
            j = rng.choice(counted)
            target = r["nurses"][j]["id"]
            limit = r["nurses"][j]["limit"]
            if limit is None or limit + 1 > P:
                return False
            for q in rng.sample(patients, limit + 1):
                _unblock(q, target)
                q["nurse"], q["lock"] = target, True
    elif kind == "patient_limit":
        m = (P - 1) // len(counted)
        if m < 1:
            return False
        policy["max_patients"] = m
    elif kind == "law_limit":
        fits = [t for t, v in sorted(TABLE.items(), key=lambda tv: tv[1])
                if v * len(counted) < P]
        if not fits:
            return False
        doc["unit"]["type"] = rng.choice(fits)
        policy["ratio_table"] = "california"
        t = TABLE[doc["unit"]["type"]]
        # Drop (not lower) every looser limit, so that only the law binds.
        if policy.get("max_patients", 0) > t:
            del policy["max_patients"]
        for spec in policy.get("roles", {}).values():
            if spec.get("max_patients", 0) > t:
                del spec["max_patients"]
        for n in nurses:
            if n.get("max_patients", 0) > t:
                del n["max_patients"]
        for p in patients:
            if "ratio" in p and int(p["ratio"][2:]) > t:
                del p["ratio"]
    elif kind == "patient_ratio":
        for p in rng.sample(patients, len(counted)):
            p["ratio"] = "1:1"
    elif kind == "high_acuity":
        k = 1
        levels = [p["acuity"] for p in patients if "acuity" in p]
        fit = [lv for lv in range(1, 6) if sum(1 for a in levels if a >= lv) > k * len(counted)]
        if not fit:
            return False
        policy["high_acuity"] = {"level": max(fit), "max_per_nurse": k}
    elif kind in ("isolation", "zones"):
        # Two patients only one nurse X may take (a skill only X holds); the
        # rule keeps them apart.
        j = rng.choice(counted)
        x = nurses[j]
        skill = "chemo" if kind == "isolation" else "wound"
        for n in nurses:
            if skill in n.get("skills", []):
                n["skills"].remove(skill)
                if not n["skills"]:
                    del n["skills"]
        x["skills"] = sorted(set(x.get("skills", [])) | {skill})
        for p in patients:
            if skill in p.get("needs", []):
                p["needs"].remove(skill)
                if not p["needs"]:
                    del p["needs"]
        a, b = rng.sample(patients, 2)
        for p in (a, b):
            _unblock(p, x["id"])
            p.pop("ratio", None)
        a.setdefault("needs", []).append(skill)
        if kind == "isolation":
            if rng.random() < 0.5:
                policy.pop("isolation_separation", None)     # on by default
            else:
                policy["isolation_separation"] = True
            a["isolation"] = "protective"
            b["isolation"] = rng.choice(highs_model.INFECTIOUS)
            b.setdefault("needs", []).append(skill)
            extra = policy.get("isolation_needs", {}).get(b["isolation"], [])
            x["skills"] = sorted(set(x["skills"]) | set(extra))
        else:
            zones = sorted({p["zone"] for p in patients if "zone" in p} | {"east", "west"})
            za, zb = rng.sample(zones, 2)
            a["zone"], b["zone"] = za, zb
            a.pop("room", None)
            b.pop("room", None)
            b.setdefault("needs", []).append(skill)
            policy["max_zones"] = 1
    return True


def generate_rules(rng, name, patients_range, nurses_range, kind=None):
    """One roster with every rule switched on at random.

    kind None: feasible (some assignment keeps every hard rule, proven by
    HiGHS).  kind in INFEASIBLE_KINDS: no assignment keeps the rules, and
    switching that one rule off makes the roster feasible again.
    """
    for _ in range(40):
        doc = _rules_base(rng, name, patients_range, nurses_range)
        if not _make_feasible(rng, doc):
            continue
        if kind is None:
            return doc
        for _ in range(5):
            trial = copy.deepcopy(doc)
            if not _break(rng, trial, kind):
                break
            try:
                highs_model.derive_rules(trial)
            except highs_model.RosterError:
                continue
            if _feasible(trial) is False and _feasible(trial, [kind]):
                return trial
    raise RuntimeError("no %s roster made for %s" % (kind or "feasible", name))


def head_lines(doc, maker):
    """The first lines of a roster with a unit: the invented-data comment
    (naming its maker), version, unit, shift, and policy up to
    extra_minutes (ratio_table, max_patients, acuity_minutes)."""
    out = ["# Invented test roster (%s); not real patients or staff." % maker, "version: 1"]
    out.append("unit:    " + flow_map(doc["unit"], ["name", "type"]))
    out.append("shift:   " + flow_map(doc["shift"], ["label", "start", "minutes",
                                                      "break_minutes"]))
    out.append("policy:")
    pol = doc["policy"]
    for key in ("ratio_table", "max_patients"):
        if key in pol:
            out.append("  %s: %s" % (key, q(pol[key])))
    out.append("  acuity_minutes: {%s}" % ", ".join(
        "%d: %d" % (k, v) for k, v in sorted(pol["acuity_minutes"].items())))
    out.append("  extra_minutes: " + q(pol["extra_minutes"]))
    return out


def to_yaml_rules(doc):
    """Render a rules roster (flow maps, keys in a fixed order)."""
    out = head_lines(doc, "gen_rosters.py --rules")
    pol = doc["policy"]
    if pol.get("roles"):
        out.append("  roles:")
        for role, spec in pol["roles"].items():
            out.append("    %s: %s" % (role, flow_map(spec, ["max_patients", "duty_minutes"])))
    if "high_acuity" in pol:
        out.append("  high_acuity: " + flow_map(pol["high_acuity"], ["level", "max_per_nurse"]))
    for key in ("isolation_separation", "max_zones", "balance_tolerance"):
        if key in pol:
            out.append("  %s: %s" % (key, q(pol[key])))
    if "isolation_needs" in pol:
        out.append("  isolation_needs: " + flow_map(pol["isolation_needs"]))
    out += people_lines(doc, ["id", "role", "preceptor", "skills", "max_patients", "minutes",
                              "break_minutes", "duty_minutes"],
                        ["id", "room", "zone", "acuity", "care_minutes", "extras", "needs",
                         "ratio", "isolation", "previous_nurse", "nurse", "lock", "avoid"])
    return "\n".join(out) + "\n"


def write_kinds(out_dir, seed, count, prefix, kinds, infeasible_every, make, render):
    """Write `count` rosters PREFIX-SEED-K.yaml, doc = make(rng, name,
    kind), text = render(doc); every infeasible_every-th one is infeasible,
    the kinds taken in turn.  Returns [(path, kind or None)].  Each roster
    has its own random stream (prefix, seed, index), so one roster's
    retries do not change the others."""
    os.makedirs(out_dir, exist_ok=True)
    out = []
    for k in range(count):
        rng = random.Random("%s-%d-%d" % (prefix, seed, k))
        kind = None
        if infeasible_every and k % infeasible_every == infeasible_every - 1:
            kind = kinds[(k // infeasible_every) % len(kinds)]
        name = "%s-%d-%03d" % (prefix, seed, k)
        doc = make(rng, name, kind)
        path = os.path.join(out_dir, name + ".yaml")
        with open(path, "w", encoding="utf-8") as f:
            f.write(render(doc))
        out.append((path, kind))
    return out


def write_rules_rosters(out_dir, seed, count, patients_range, nurses_range,
                        infeasible_every=4, prefix="rules", pinned_every=0):
    """Write `count` rules rosters (write_kinds, the kinds INFEASIBLE_KINDS);
    with pinned_every K, every K-th feasible one gets a nurse pinned at the
    peak (pin_nurses, its own random stream)."""
    def make(rng, name, kind):
        doc = generate_rules(rng, name, patients_range, nurses_range, kind)
        index = int(name.rsplit("-", 1)[1])
        if kind is None and pinned_every and index % pinned_every == 0:
            doc = pin_nurses(random.Random("pin-" + name), doc, rules=True) or doc
        return doc
    return write_kinds(out_dir, seed, count, prefix, INFEASIBLE_KINDS, infeasible_every,
                       make, to_yaml_rules)


def write_rosters(out_dir, seed, count, patients_range, nurses_range,
                  infeasible_rate=0.0, prefix="roster", pinned_every=0):
    """Write `count` rosters into out_dir; return their paths in order.
    With pinned_every K, every K-th feasible roster gets a nurse pinned at
    the peak (pin_nurses, its own random stream: the others stay as they
    were)."""
    os.makedirs(out_dir, exist_ok=True)
    rng = random.Random(seed)
    paths = []
    for k in range(count):
        name = "%s-%d-%03d" % (prefix, seed, k)
        doc = generate(rng, name, patients_range, nurses_range, infeasible_rate)
        if pinned_every and k % pinned_every == 0 \
                and highs_model.assignment_feasible(highs_model.derive(doc)):
            doc = pin_nurses(random.Random("pin-" + name), doc) or doc
        text = to_yaml(doc)
        path = os.path.join(out_dir, name + ".yaml")
        with open(path, "w", encoding="utf-8") as f:
            f.write(text)
        paths.append(path)
    return paths


# ------------------------------------------------------------ pinned nurses

# A skill no generated nurse holds (SKILLS does not name it): a patient who
# needs it can go only to the nurse given it here.
PIN_SKILL = "ecmo"


def _pin_targets(rng, doc, r, how_many):
    """Up to how_many counted nurses (indices) who may take a patient, the
    first (charge) nurse and orientees left out."""
    ok = [j for j, n in enumerate(r["nurses"])
          if j > 0 and n["counted"] and (n["limit"] is None or n["limit"] >= 1)
          and doc["nurses"][j].get("role") in (None, "float")]
    return rng.sample(ok, min(len(ok), how_many))


def pin_nurses(rng, doc, rules=False):
    """Shape doc so that a nurse is pinned at the peak (keel's stage ranks,
    docs/model.md): one nurse (two, now and then, at different levels)
    works a few hours with no break and alone may take one more patient
    whose care is 1.0-1.6 times her capacity; a skill only she holds
    (PIN_SKILL) on the plain rosters, a lock to her on the rules rosters
    (rules=True).  Every figure is invented.  Returns the changed document,
    or None when the change would leave no valid assignment (the caller
    keeps the roster as it was)."""
    trial = copy.deepcopy(doc)
    derive = highs_model.derive_rules if rules else highs_model.derive
    r = derive(trial)
    short = trial["shift"]["minutes"] <= 480
    targets = _pin_targets(rng, trial, r, 2 if rng.random() < 0.3 else 1)
    if not targets:
        return None
    for k, j in enumerate(targets):
        nurse = trial["nurses"][j]
        nurse["minutes"] = rng.choice([120, 180, 240] if short else [180, 240, 300])
        nurse["break_minutes"] = 0
        nurse.pop("duty_minutes", None)
        # The second nurse a step lower than the first.
        care = 5 * round(nurse["minutes"] * rng.uniform(1.3, 1.6) / (1.0 + 0.25 * k) / 5)
        p = {"id": "P-9%03d" % (100 * k + rng.randint(0, 99)), "care_minutes": care}
        if rules:
            p["nurse"], p["lock"] = nurse["id"], True
        else:
            skill = PIN_SKILL + ("" if k == 0 else str(k + 1))
            for other in trial["nurses"]:
                if skill in other.get("skills", []):
                    other["skills"].remove(skill)
            nurse["skills"] = list(nurse.get("skills", [])) + [skill]
            p["needs"] = [skill]
        trial["patients"].append(p)
    if rules:
        try:
            highs_model.derive_rules(trial)
        except highs_model.RosterError:
            return None
        return trial if _feasible(trial) else None
    return trial if highs_model.assignment_feasible(highs_model.derive(trial)) else None


def main(argv=None):
    ap = argparse.ArgumentParser(description=__doc__.split("\n\n")[0])
    ap.add_argument("--seed", type=int, default=1)
    ap.add_argument("--count", type=int, default=10)
    ap.add_argument("--patients", type=parse_range)
    ap.add_argument("--nurses", type=parse_range)
    ap.add_argument("--small", action="store_true",
                    help="tiny rosters (3-9 patients, 2-4 nurses) any MILP solver proves")
    ap.add_argument("--rules", action="store_true",
                    help="unit-size rosters (16-30 patients, 4-7 nurses) with every rule of "
                         "the ratio table, isolation, zones, previous nurse, ... at random")
    ap.add_argument("--rules-tiny", action="store_true",
                    help="the same rules on tiny rosters (5-8 patients, 2-3 nurses) for "
                         "brute force")
    ap.add_argument("--infeasible-every", type=int, default=4,
                    help="with --rules / --rules-tiny: every K-th roster is infeasible, "
                         "one rule at a time (default 4; 0 = none)")
    ap.add_argument("--infeasible-rate", type=float, default=0.03,
                    help="share of rosters left infeasible on purpose (default 0.03)")
    ap.add_argument("--out", required=True)
    args = ap.parse_args(argv)
    if args.rules or args.rules_tiny:
        preset = RULES_PRESETS["rules_tiny" if args.rules_tiny else "rules"]
        for path, kind in write_rules_rosters(
                args.out, args.seed, args.count, args.patients or preset["patients"],
                args.nurses or preset["nurses"], args.infeasible_every,
                prefix="rtiny" if args.rules_tiny else "rules"):
            print(path if kind is None else "%s  (infeasible: %s)" % (path, kind))
        return 0
    preset = PRESETS["small" if args.small else "unit"]
    pr = args.patients or preset["patients"]
    nr = args.nurses or preset["nurses"]
    for path in write_rosters(args.out, args.seed, args.count, pr, nr, args.infeasible_rate,
                              prefix="small" if args.small else "roster"):
        print(path)
    return 0


if __name__ == "__main__":
    sys.exit(main())
