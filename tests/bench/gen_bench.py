#!/usr/bin/python3
# SPDX-License-Identifier: GPL-3.0-or-later
"""Seeded generator of invented rosters for keel's benchmark.

Writes roster YAML files (format version 1) shaped like real units on one
shift: an intensive care unit, a step-down unit, a telemetry unit, a
medical-surgical unit, an emergency department and a whole floor pooled
across its sub-units.  The hospital, the nurses (with names), the patients,
the skills and every minute figure are invented: these files are load for
timing solvers, never check values.

Each roster uses keel's documented keys only (docs/roster-format.md): unit
type, the california ratio table where the unit type has an entry, a charge
nurse under policy.roles.charge, skills and needs, high acuity, isolation
(separation on, an N95 need for airborne precautions), zones with
policy.max_zones, rooms, previous nurses for continuity, part-shift nurses,
now and then a float, an LPN, a locked patient or an avoid list.

Feasible by construction.  The generator first deals the patients out to
the nurses (a planted assignment within every limit) and then draws each
patient's needs, zone, isolation and acuity so that the planted nurse may
keep the patient under every hard rule: the needs are skills the planted
nurse holds, the zone is one of the nurse's zones, the isolation matches
the nurse's side, the high-acuity count stays within max_per_nurse, an
avoid list never names the planted nurse and a lock names it.  The planted
plan is checked against the reference rule checker (tests/reference/
highs_model.violations) before the file is written.

Staffing level.  Each roster gets a target unit utilisation (total work of
the nurses who take patients over their capacity), from tight (above 1)
to comfortable (about 0.7), the levels taken in turn.  The nurse count
follows the patient limits (the fewest nurses the limits allow, plus 0-2),
and the unit's acuity scale (minutes per level, the unit's own invented
figures) is scaled so that the total work meets the target.

Usage:
  gen_bench.py --seed S --per-kind N --out DIR [--kinds icu,ed,...] [--keel KEEL]
writes DIR/<kind>-<k>.yaml and DIR/manifest.json (kind, seed, target and
actual utilisation, counts, the planted assignment).
"""

import argparse
import datetime
import json
import os
import random
import subprocess
import sys

HERE = os.path.dirname(os.path.abspath(__file__))
sys.path.insert(0, os.path.join(HERE, "..", "reference"))
import highs_model  # noqa: E402  (reference roster arithmetic and rule checker)

HOSPITAL = "Quillmere District Hospital"   # invented

# Per-nurse maximum patients of the california table.
# Source: California Code of Regulations, Title 22, §70217(a) (critical care
# 1:2, step-down 1:3, telemetry 1:4, medical-surgical 1:5), as encoded in keel
# (docs/roster-format.md, "Ratio tables").
CALIFORNIA = {"icu": 2, "step-down": 3, "telemetry": 4, "med-surg": 5}

# Shift patterns: twelve-hour day and night shifts, and eight-hour shifts in
# the emergency department (common practice, no source).
SHIFTS_12 = [{"label": "day", "start": "07:00", "minutes": 720, "break_minutes": 60},
             {"label": "night", "start": "19:00", "minutes": 720, "break_minutes": 60}]
SHIFTS_8 = [{"label": "morning", "start": "07:00", "minutes": 480, "break_minutes": 30},
            {"label": "evening", "start": "15:00", "minutes": 480, "break_minutes": 30},
            {"label": "night", "start": "23:00", "minutes": 480, "break_minutes": 30}]

# Target unit utilisations.  Roster k of a kind takes LEVELS[LEVEL_ORDER[(k +
# offset) % 4]], the offset set per kind, so that any two consecutive rosters
# of a kind are far apart and a few rosters per kind cover every level.
LEVELS = [("tight", 1.03, 1.15), ("busy", 0.92, 1.0), ("normal", 0.8, 0.9),
          ("comfortable", 0.66, 0.74)]
LEVEL_ORDER = [0, 2, 1, 3]

# The kinds of roster.  Minutes per acuity level are for a twelve-hour shift
# before scaling (invented unit scales); `limit` is the unit's per-nurse
# maximum (the table's number where the unit type has one); skills map to
# (share of nurses holding it, share of the holders' patients needing it).
KINDS = {
    "icu": {
        "level_offset": 0,
        "unit": "3 North Intensive Care", "type": "icu", "census": (8, 16),
        "table": True, "shifts": SHIFTS_12, "prefix": "3N",
        "scale": {1: 240, 2: 300, 3: 360, 4: 450, 5: 600},
        "extras": {"admission": 90, "transport": 60, "isolation": 30},
        "skills": {"crrt": (0.5, 0.25), "ecmo": (0.3, 0.2), "iabp": (0.4, 0.15)},
        "zones": ["Pod A", "Pod B"], "max_zones": [None, 1, 2], "beds_per_room": 1,
        "charge": ([0, 0, 1], (240, 480)), "high": (5, [1]), "one_to_one": 0.5,
    },
    "stepdown": {
        "level_offset": 1,
        "unit": "4 East Step-Down", "type": "step-down", "census": (24, 32),
        "table": True, "shifts": SHIFTS_12, "prefix": "4E",
        "scale": {1: 120, 2: 160, 3: 200, 4: 260, 5: 330},
        "extras": {"admission": 75, "discharge": 40, "isolation": 25, "transfusion": 45},
        "skills": {"tele": (0.9, 0.6), "vasoactive": (0.5, 0.2), "trach": (0.45, 0.15)},
        "zones": ["East hall", "West hall", "Core"], "max_zones": [None, 2],
        "beds_per_room": 1, "charge": ([0, 1, 2], (180, 300)), "high": (5, [1]),
    },
    "telemetry": {
        "level_offset": 2,
        "unit": "5 West Telemetry", "type": "telemetry", "census": (24, 32),
        "table": True, "shifts": SHIFTS_12, "prefix": "5W",
        "scale": {1: 90, 2: 130, 3: 170, 4: 220, 5: 290},
        "extras": {"admission": 70, "discharge": 40, "isolation": 25, "transfusion": 45},
        "skills": {"tele": (0.95, 0.7), "iv_insulin": (0.6, 0.15), "chemo": (0.3, 0.1)},
        "zones": ["North hall", "South hall", "Annex"], "max_zones": [None, 2],
        "beds_per_room": 2, "charge": ([1, 2, 3], (180, 300)), "high": (5, [1, 2]),
    },
    "medsurg": {
        "level_offset": 3,
        "unit": "6 South Medical-Surgical", "type": "med-surg", "census": (30, 48),
        "table": True, "shifts": SHIFTS_12, "prefix": "6S",
        "scale": {1: 60, 2: 95, 3: 135, 4: 190, 5: 270},
        "extras": {"admission": 60, "discharge": 40, "isolation": 25, "transfusion": 45},
        "skills": {"wound": (0.6, 0.15), "chemo": (0.35, 0.12), "tele": (0.5, 0.1)},
        "zones": ["East hall", "West hall", "Corner", "Bridge"], "max_zones": [None, 2, 2],
        "beds_per_room": 2, "charge": ([0, 2, 3], (180, 300)), "high": (4, [1, 2]),
        "lpn": 0.12,
    },
    "ed": {
        "level_offset": 1,
        "unit": "Emergency Department", "type": "emergency", "census": (40, 60),
        "table": False, "limit": (4, 5), "shifts": SHIFTS_12 + SHIFTS_8, "prefix": "ED",
        "scale": {1: 60, 2: 90, 3: 130, 4: 180, 5: 260},
        "extras": {"admission": 45, "transport": 40, "isolation": 20, "sedation": 60},
        "skills": {"trauma": (0.5, 0.2), "peds": (0.4, 0.15), "psych": (0.35, 0.1)},
        "zones": ["Resus", "Acute A", "Acute B", "Fast track", "Hallway"],
        "max_zones": [None, 2], "beds_per_room": 1, "charge": ([0, 0, 1], (300, 480)),
        "high": (5, [1]),
    },
    "floor": {
        "level_offset": 1,
        "unit": "Tower 4-6 pooled floor", "type": "other", "census": (200, 200),
        "table": False, "limit": (4, 5), "shifts": SHIFTS_12, "prefix": "T",
        "scale": {1: 60, 2: 95, 3: 135, 4: 190, 5: 270},
        "extras": {"admission": 60, "discharge": 40, "isolation": 25, "transfusion": 45},
        "skills": {"wound": (0.55, 0.15), "chemo": (0.3, 0.12), "iv_insulin": (0.6, 0.1)},
        # Sub-units: each is one zone; the tele sub-units need the tele skill.
        "zones": ["4 East", "4 West", "5 East", "5 West", "6 East", "6 West"],
        "tele_zones": ["5 East", "5 West"], "max_zones": [1, 2], "beds_per_room": 2,
        "charge": ([0], (480, 600)), "high": (4, [1, 2]), "lpn": 0.1, "resource": True,
    },
}
ACUITY_WEIGHTS = [0.14, 0.3, 0.3, 0.18, 0.08]

FIRST = ["Ada", "Bram", "Cleo", "Dara", "Emil", "Fern", "Gus", "Hana", "Ivo", "Juno", "Kit",
         "Lior", "Mina", "Nils", "Odile", "Pia", "Quin", "Rhea", "Soren", "Tove", "Uma",
         "Vero", "Wren", "Xavi", "Yara", "Zeno"]
SYLL_A = ["Ash", "Brack", "Cobble", "Dun", "Elder", "Fen", "Gorse", "Hollin", "Ivy", "Jessel",
          "Kestle", "Larch", "Mire", "Nettle", "Oast", "Pell", "Quarry", "Rook", "Sedge",
          "Thistle", "Umber", "Vetch", "Wold", "Yarrow"]
SYLL_B = ["by", "combe", "dale", "field", "gate", "holt", "ley", "mere", "stow", "thorpe",
          "wick", "worth"]


def invented_name(rng, used):
    """A nurse name made of invented parts, unique within the roster."""
    while True:
        name = "%s %s%s" % (rng.choice(FIRST), rng.choice(SYLL_A), rng.choice(SYLL_B))
        if name not in used:
            used.add(name)
            return name


def round5(x):
    return int(5 * round(x / 5.0))


def make_nurses(rng, spec, census, limit, level, shift):
    """The nurses of the shift: a charge nurse, staff (some part-shift), and
    on the floor a resource nurse.  Returns (nurses, roles) where each nurse
    carries private keys (starting with '_') used while planting."""
    roles = {}
    charge_opts, duty = spec["charge"]
    charge_max = min(rng.choice(charge_opts), limit)
    roles["charge"] = {"max_patients": charge_max,
                       "duty_minutes": round5(rng.uniform(*duty)) * shift["minutes"] // 720}
    if spec.get("resource"):
        roles["resource"] = {"max_patients": 0}
    names = set()
    held = {s: share for s, (share, _) in spec["skills"].items()}
    nurses = []

    def add(role=None):
        k = len(nurses) + 1
        n = {"id": "N%02d" % k, "name": invented_name(rng, names), "_limit": limit}
        skills = [s for s, share in held.items() if rng.random() < share]
        if rng.random() < 0.75:
            skills.append("n95")
        n["skills"] = skills
        if role:
            n["role"] = role
        nurses.append(n)
        return n

    charge = add("charge")
    charge["skills"] = sorted(set(charge["skills"]) | set(held) | {"n95"})
    charge["_limit"] = charge_max
    if spec.get("resource"):
        add("resource")["_limit"] = 0
    # Staff: the fewest the limits allow, plus 0-2 (fewer when tight).
    extra = {"tight": [0, 0, 1], "busy": [0, 1], "normal": [0, 1, 1, 2],
             "comfortable": [1, 1, 2]}[level]
    while sum(n["_limit"] for n in nurses) < census:
        add()
    for _ in range(rng.choice(extra)):
        add()
    for n in nurses:
        if n.get("role"):
            continue
        r = rng.random()
        if shift["minutes"] > 480 and r < 0.15:
            # Part-shift nurse: eight hours on the unit, a shorter break.
            n["minutes"] = 480
            n["break_minutes"] = 30
        if rng.random() < spec.get("lpn", 0.0):
            n["licence"] = "lpn"
            n["skills"] = [s for s in n["skills"] if s == "n95"]
        elif rng.random() < 0.1:
            n["role"] = "float"
        if limit > 2 and rng.random() < 0.1:
            # A newer nurse with a lighter own limit.
            n["max_patients"] = limit - 1
            n["_limit"] = limit - 1
    # The own limits may have taken places away: top up with staff nurses.
    while sum(n["_limit"] for n in nurses) < census:
        add()
    if spec.get("tele_zones"):
        for n in nurses:
            if n.get("licence") != "lpn" and rng.random() < 0.45:
                n["skills"] = sorted(set(n["skills"]) | {"tele"})
    return nurses, roles


def plant(rng, nurses, census):
    """Deal `census` patient places to nurses within their limits, nearly
    evenly (the least filled first, ties at random)."""
    counts = {n["id"]: 0 for n in nurses}
    takers = [n for n in nurses if n["_limit"] > 0]
    out = []
    for _ in range(census):
        room = [n for n in takers if counts[n["id"]] < n["_limit"]]
        if rng.random() < 0.15:
            pick = rng.choice(room)
        else:
            low = min(counts[n["id"]] / n["_limit"] for n in room)
            pick = rng.choice([n for n in room if counts[n["id"]] / n["_limit"] == low])
        counts[pick["id"]] += 1
        out.append(pick)
    rng.shuffle(out)
    return out


def generate(rng, kind, index, seed):
    """One roster (a dict shaped like the YAML file) and its manifest entry."""
    spec = KINDS[kind]
    level, lo_u, hi_u = LEVELS[LEVEL_ORDER[(index + spec["level_offset"]) % len(LEVELS)]]
    target = round(rng.uniform(lo_u, hi_u), 3)
    shift = dict(rng.choice(spec["shifts"]))
    shift["date"] = (datetime.date(2027, 1, 4) + datetime.timedelta(days=index)).isoformat()
    census = rng.randint(*spec["census"])
    if spec["table"]:
        limit = CALIFORNIA[spec["type"]]
    else:
        # Unit policy for units without a table entry (common practice, no source).
        limit = rng.randint(*spec["limit"])
    nurses, roles = make_nurses(rng, spec, census, limit, level, shift)
    policy = {}
    if not spec["table"]:
        policy["max_patients"] = limit
    high_level, high_opts = spec["high"]
    high_max = rng.choice(high_opts)
    max_zones = rng.choice(spec["max_zones"])
    zones = list(spec["zones"])
    rng.shuffle(zones)
    holders = plant(rng, nurses, census)

    # Each nurse's zones (one home zone, a second now and then) and
    # isolation side, then each patient drawn to suit the planted nurse.
    takers = [n for n in nurses if n["_limit"] > 0]
    tele_zones = spec.get("tele_zones", [])
    for k, n in enumerate(takers):
        home = zones[k % len(zones)]
        n["_zones"] = [home]
        if max_zones != 1 and rng.random() < 0.4:
            n["_zones"].append(zones[(k + 1) % len(zones)])
        if tele_zones and set(n["_zones"]) & set(tele_zones):
            n["skills"] = sorted(set(n["skills"]) | {"tele"})
        side = rng.random()
        n["_side"] = "infectious" if side < 0.3 else "protective" if side < 0.38 else None
        n["_high"] = 0
        n["_count"] = 0
    first = rng.randint(10000, 60000)
    patients = []
    planted = {}
    for i, n in enumerate(holders):
        n["_count"] += 1
        p = {"id": "Q-%05d" % (first + 11 * i)}
        zone = rng.choice(n["_zones"]) if rng.random() < 0.75 else n["_zones"][0]
        acuity = rng.choices([1, 2, 3, 4, 5], ACUITY_WEIGHTS)[0]
        if acuity >= high_level and n["_high"] >= high_max:
            acuity = rng.randint(1, high_level - 1)
        if acuity >= high_level:
            n["_high"] += 1
        p["acuity"] = acuity
        extras = []
        if rng.random() < 0.12:
            extras.append("admission")
        if "discharge" in spec["extras"] and rng.random() < 0.12:
            extras.append("discharge")
        for x in spec["extras"]:
            if x not in ("admission", "discharge", "isolation") and rng.random() < 0.06:
                extras.append(x)
        needs = [s for s, (_, rate) in spec["skills"].items()
                 if s in n["skills"] and rng.random() < rate]
        if zone in tele_zones:
            needs.append("tele")
        if needs:
            p["needs"] = needs
        if n["_side"] == "infectious" and rng.random() < 0.4:
            iso = rng.choices(["contact", "droplet", "airborne"], [60, 25, 15])[0]
            if iso == "airborne" and "n95" not in n["skills"]:
                iso = "contact"
            p["isolation"] = iso
        elif n["_side"] == "protective" and rng.random() < 0.45:
            p["isolation"] = "protective"
        if "isolation" in p and rng.random() < 0.8:
            extras.append("isolation")
        if extras:
            p["extras"] = extras
        p["zone"] = zone
        p["_zone_index"] = spec["zones"].index(zone)
        patients.append(p)
        planted[p["id"]] = n["id"]

    # One-to-one patients in the ICU: a nurse holding one patient only.
    if spec.get("one_to_one"):
        for n in takers:
            mine = [p for p in patients if planted[p["id"]] == n["id"]]
            if len(mine) == 1 and rng.random() < spec["one_to_one"]:
                mine[0]["ratio"] = "1:1"
                mine[0]["acuity"] = 5       # one nurse alone: the sickest level

    # Beds, rooms, previous nurses, the odd lock and avoid list.
    per_zone = {}
    for p in sorted(patients, key=lambda q: (q["_zone_index"], q["id"])):
        k = per_zone.get(p["zone"], 0)
        per_zone[p["zone"]] = k + 1
        zi = p.pop("_zone_index")
        p["bed"] = "%s-%d%02d" % (spec["prefix"], zi + 1, k + 1)
        p["room"] = "%s-%d%02d" % (spec["prefix"], zi + 1, k // spec["beds_per_room"] + 1)
    gone = ["N%02d" % (len(nurses) + k) for k in range(1, 12)]
    takers_ids = [n["id"] for n in takers]
    for p in patients:
        r = rng.random()
        if r < 0.3:
            p["previous_nurse"] = planted[p["id"]] if rng.random() < 0.4 \
                else rng.choice(takers_ids)
        elif r < 0.65:
            p["previous_nurse"] = rng.choice(gone)      # off duty now
        if rng.random() < 0.015:
            p["nurse"] = planted[p["id"]]
            p["lock"] = True
        elif rng.random() < 0.03:
            others = [x for x in takers_ids if x != planted[p["id"]]]
            if others:
                p["avoid"] = [rng.choice(others)]

    # The unit's acuity scale, scaled so that the total work meets the target.
    frac = shift["minutes"] / 720.0
    base = {k: v * frac for k, v in spec["scale"].items()}
    extra_min = {k: round5(v * max(frac, 0.75)) for k, v in spec["extras"].items()}
    cap = {n["id"]: n.get("minutes", shift["minutes"])
           - n.get("break_minutes", shift["break_minutes"]) for n in takers}
    duty = sum(roles[n["role"]]["duty_minutes"] for n in takers
               if n.get("role") in roles and "duty_minutes" in roles[n["role"]])
    extras_total = sum(extra_min[x] for p in patients for x in p.get("extras", []))
    explicit = {}
    for p in patients:
        if rng.random() < 0.06 and "ratio" not in p:
            explicit[p["id"]] = rng.uniform(0.7, 1.4)
    raw = sum(base[p["acuity"]] * explicit.get(p["id"], 1.0) for p in patients)
    want = target * sum(cap.values()) - duty - extras_total
    factor = max(want / raw, 0.15)
    scale = {}
    for k in sorted(base):
        v = max(15, round5(base[k] * factor))
        scale[k] = max(v, scale.get(k - 1, 0) + 5)
    for p in patients:
        if p["id"] in explicit:
            p["care_minutes"] = min(1440, max(10, round5(base[p["acuity"]] * factor
                                                         * explicit[p["id"]])))
    policy["acuity_minutes"] = scale
    policy["extra_minutes"] = extra_min
    policy["roles"] = roles
    if spec["table"]:
        policy["ratio_table"] = "california"
    policy["high_acuity"] = {"level": high_level, "max_per_nurse": high_max}
    policy["isolation_needs"] = {"airborne": ["n95"]}
    if max_zones is not None:
        policy["max_zones"] = max_zones

    doc = {
        "version": 1,
        "unit": {"name": "%s - %s" % (HOSPITAL, spec["unit"]), "type": spec["type"]},
        "shift": shift,
        "policy": policy,
        "nurses": [{k: v for k, v in n.items() if not k.startswith("_")} for n in nurses],
        "patients": patients,
    }
    # The planted plan keeps every hard rule (reference checker).
    r = highs_model.derive_rules(doc)
    index_of = {n["id"]: j for j, n in enumerate(r["nurses"])}
    assign = [index_of[planted[p["id"]]] for p in patients]
    bad = highs_model.violations(r, assign)
    if bad:
        raise AssertionError("gen_bench: planted plan of %s-%d breaks %s" % (kind, index, bad[0]))
    counted = [n for n in r["nurses"] if n["counted"]]
    work = sum(p["care"] for p in r["patients"]) + sum(n["duty"] for n in counted)
    util = work / sum(n["capacity"] for n in counted)
    entry = {"kind": kind, "index": index, "seed": seed, "level": level, "target": target,
             "utilisation": round(util, 4), "patients": len(patients),
             "nurses": len(nurses), "counted": len(counted), "planted": planted}
    return doc, entry


def q(value):
    """A YAML scalar: strings double-quoted (JSON quoting is valid YAML)."""
    if isinstance(value, bool):
        return "true" if value else "false"
    if isinstance(value, str):
        return json.dumps(value)
    return str(value)


def flow(d, keys):
    items = []
    for k in keys:
        if k not in d:
            continue
        v = d[k]
        if isinstance(v, list):
            items.append("%s: [%s]" % (k, ", ".join(q(x) for x in v)))
        elif isinstance(v, dict):
            items.append("%s: %s" % (k, flow(v, list(v))))
        else:
            items.append("%s: %s" % (k, q(v)))
    return "{" + ", ".join(items) + "}"


NURSE_KEYS = ["id", "name", "role", "licence", "skills", "max_patients", "minutes",
              "break_minutes", "duty_minutes"]
PATIENT_KEYS = ["id", "bed", "room", "zone", "acuity", "care_minutes", "extras", "needs",
                "isolation", "ratio", "previous_nurse", "nurse", "lock", "avoid"]


def to_yaml(doc, entry):
    out = ["# SPDX-License-Identifier: GPL-3.0-or-later",
           "# Invented benchmark roster (tests/bench/gen_bench.py, seed %d, %s #%d, %s,"
           % (entry["seed"], entry["kind"], entry["index"], entry["level"]),
           "# target unit utilisation %.3f, actual %.4f).  Not real patients or staff."
           % (entry["target"], entry["utilisation"]),
           "version: 1",
           "unit: " + flow(doc["unit"], ["name", "type"]),
           "shift: " + flow(doc["shift"], ["label", "date", "start", "minutes",
                                           "break_minutes"]),
           "policy:"]
    pol = doc["policy"]
    if "max_patients" in pol:
        out.append("  max_patients: %d" % pol["max_patients"])
    out.append("  acuity_minutes: {%s}" % ", ".join(
        "%d: %d" % (k, v) for k, v in sorted(pol["acuity_minutes"].items())))
    out.append("  extra_minutes: " + flow(pol["extra_minutes"], list(pol["extra_minutes"])))
    out.append("  roles:")
    for role, spec in pol["roles"].items():
        out.append("    %s: %s" % (role, flow(spec, ["max_patients", "duty_minutes"])))
    for key in ("ratio_table",):
        if key in pol:
            out.append("  %s: %s" % (key, pol[key]))
    out.append("  high_acuity: " + flow(pol["high_acuity"], ["level", "max_per_nurse"]))
    out.append("  isolation_needs: " + flow(pol["isolation_needs"], ["airborne"]))
    if "max_zones" in pol:
        out.append("  max_zones: %d" % pol["max_zones"])
    out.append("nurses:")
    for n in doc["nurses"]:
        out.append("  - " + flow(n, NURSE_KEYS))
    out.append("patients:")
    for p in doc["patients"]:
        out.append("  - " + flow(p, PATIENT_KEYS))
    return "\n".join(out) + "\n"


def write_set(seed, per_kind, out_dir, kinds=None, per_kind_of=None):
    """Generate per_kind rosters of each kind into out_dir; returns the
    manifest (a list of entries with a `file` key).  per_kind_of may give
    another count for some kinds.  Roster k of a kind comes from the seed
    (seed, kind, k) alone, so adding kinds or rosters never changes others."""
    os.makedirs(out_dir, exist_ok=True)
    manifest = []
    for kind in kinds or list(KINDS):
        count = (per_kind_of or {}).get(kind, per_kind)
        for k in range(count):
            rng = random.Random("%d/%s/%d" % (seed, kind, k))
            doc, entry = generate(rng, kind, k, seed)
            path = os.path.join(out_dir, "%s-%d.yaml" % (kind, k))
            with open(path, "w", encoding="utf-8") as f:
                f.write(to_yaml(doc, entry))
            entry["file"] = path
            manifest.append(entry)
    with open(os.path.join(out_dir, "manifest.json"), "w", encoding="utf-8") as f:
        json.dump(manifest, f, indent=1)
    return manifest


def main(argv=None):
    ap = argparse.ArgumentParser(description="Generate invented benchmark rosters")
    ap.add_argument("--seed", type=int, default=1)
    ap.add_argument("--per-kind", type=int, default=4)
    ap.add_argument("--kinds", default=",".join(KINDS),
                    help="comma-separated kinds (default: %s)" % ",".join(KINDS))
    ap.add_argument("--out", required=True, help="directory for the roster files")
    ap.add_argument("--keel", help="run `KEEL check` on every roster written (exit 2, bad "
                    "input, or 3, no valid assignment, fails: every roster loads and has "
                    "its planted plan)")
    args = ap.parse_args(argv)
    kinds = [k for k in args.kinds.split(",") if k]
    for k in kinds:
        if k not in KINDS:
            ap.error("unknown kind %r; expected one of %s" % (k, ", ".join(KINDS)))
    manifest = write_set(args.seed, args.per_kind, args.out, kinds)
    for e in manifest:
        print("%-28s %-9s %3d patients %3d nurses  utilisation %.3f (target %.3f, %s)"
              % (os.path.basename(e["file"]), e["kind"], e["patients"], e["nurses"],
                 e["utilisation"], e["target"], e["level"]))
    if args.keel:
        failed = 0
        for e in manifest:
            proc = subprocess.run([args.keel, "check", e["file"], "--time-limit", "1"],
                                  capture_output=True, text=True)
            # 0: loads; 4: loads, the search for any plan ran out of time.
            if proc.returncode not in (0, 4):
                failed += 1
                print("keel check %s: exit %d: %s" % (e["file"], proc.returncode,
                                                      proc.stderr.strip()[:300]))
        print("keel check: %d of %d rosters load" % (len(manifest) - failed, len(manifest)))
        return 1 if failed else 0
    return 0


if __name__ == "__main__":
    sys.exit(main())
