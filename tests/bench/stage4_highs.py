#!/usr/bin/python3
# SPDX-License-Identifier: GPL-3.0-or-later
"""Stage 4 (proximity) of one keel run, solved again by HiGHS.

Run on demand only (never in CI, not a meson test):

  keel assign ROSTER -f json --time-limit 10 > RUN.json
  stage4_highs.py ROSTER RUN.json [--seconds 300]

It reads keel's heaviest and lightest utilisation (stages 1 and 2) and the
patients kept with their previous nurse (stage 3) from RUN.json, builds the
same balance windows (policy.balance_tolerance), and asks the reference
model of tests/reference/highs_model.py (written from the roster rules, one
binary per patient and nurse, HiGHS through scipy.optimize.milp) for the
fewest zones per nurse in all, starting from keel's plan: the textbook
objective for 30 % of the time, then a descent that must find fewer zones
or prove there are none.  It prints keel's zones and rooms and HiGHS's
result; keel's plan is checked against the rules and the windows first.
"""
import argparse
import json
import os
import sys
from fractions import Fraction

sys.path.insert(0, os.path.join(os.path.dirname(os.path.abspath(__file__)), "..", "reference"))
import highs_model as hm  # noqa: E402


def main():
    ap = argparse.ArgumentParser(description=__doc__.split("\n")[0])
    ap.add_argument("roster")
    ap.add_argument("run", help="keel assign ROSTER -f json output")
    ap.add_argument("--seconds", type=float, default=300.0)
    args = ap.parse_args()
    r = hm.load_rules(args.roster)
    with open(args.run) as f:
        d = json.load(f)
    stages = {s["name"]: s for s in d["stages"]}
    # The JSON carries utilisations as decimals of fractions of whole
    # minutes; capacities are at most a few thousand minutes.
    U = Fraction(stages["peak"]["value"]).limit_denominator(5000)
    L = Fraction(stages["lift"]["value"]).limit_denominator(5000)
    index = {n["id"]: j for j, n in enumerate(r["nurses"])}
    nurse_of = {p: index[n["id"]] for n in d["nurses"] for p in n["patients"]}
    plan = [nurse_of[p["id"]] for p in r["patients"]]
    kept = d["continuity"]["kept"] if d.get("continuity") else 0
    win = hm.windows(r, U, L, r["tol"])
    broken = hm.violations(r, plan)
    outside = hm.outside_windows(r, plan, win)
    if broken or outside or hm.kept_of(r, plan) < kept:
        sys.exit("keel's plan breaks %s, is outside the windows of nurses %s or keeps too few"
                 % (broken, outside))
    zones, rooms = hm.proximity_of(r, plan)
    print("keel: %d zones, %d rooms (stage 4 %s, bound %s)"
          % (zones, rooms, stages["proximity"]["status"], stages["proximity"]["bound"]))
    _, stage_zones, _ = hm._stage_specs(r)
    st, _ = hm._run_stage(r, stage_zones(win, kept), args.seconds, 0.3, plan)
    print("HiGHS: %s zones, %s after %.1f s (proof: %s)"
          % (st["value"], st["status"], st["seconds"], st["proof"]))


if __name__ == "__main__":
    main()
