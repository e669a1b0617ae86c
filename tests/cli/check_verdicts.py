#!/usr/bin/env python3
# SPDX-License-Identifier: GPL-3.0-or-later
"""No staffing verdict contradicts the plan it stands beside.

For every roster given (the examples, the tutorial's unit and the CLI test
rosters), `keel assign` and `keel check` run in text, yaml and json. Each
report's verdict (docs/output.md, "The staffing verdict") must be

  * the same in the three formats (the json "text", the yaml comment, the
    text report's first Staffing line, words and kind);
  * true of the report's own figures, recounted here: the status
    (infeasible is "no_plan"), the rules the plan breaks (`keel check` of
    the plan, the assign plan written as yaml and checked again), the
    break plan's flags, each nurse's load against her capacity and the
    ward minimum against the nurses who take patients;
  * "enough" exactly when none of those finds anything, and "short" when
    a staffing limit, a break, an overload or the ward minimum does.

Usage: check_verdicts.py KEEL ROSTER.yaml...   (TAP on stdout)
"""

import json
import os
import re
import subprocess
import sys
import tempfile

# The rules that limit what a nurse holds (src/rule_*.c, `.staffing`).
STAFFING = {"patient_limit", "law_limit", "patient_ratio", "moment_limit", "high_acuity",
            "capacity", "break_cover"}

n = 0
failed = 0


def ok(cond, what):
    global n, failed
    n += 1
    if cond:
        print(f"ok {n} - {what}")
    else:
        failed += 1
        print(f"not ok {n} - {what}")


def run(keel, *args):
    p = subprocess.run([keel, *args], capture_output=True, text=True)
    return p.returncode, p.stdout


def flat(text):
    return " ".join(text.split())


def text_verdict(report):
    """The text report's verdict: the Staffing section's first paragraph."""
    lines = report.split("\n")
    try:
        i = lines.index("Staffing")
    except ValueError:
        return None
    words = []
    for line in lines[i + 1:]:
        if line.startswith("  care "):
            break
        words.append(line.strip())
    return " ".join(words)


def yaml_verdict(report):
    m = re.search(r"^# Staffing verdict \((\w+)\): (.*)$", report, re.M)
    return (m.group(1), m.group(2)) if m else (None, None)


def recount(d, violations):
    """What the verdict's counts must be, from the report's own figures."""
    flags = [b for b in d.get("break_cover", []) if b.get("flag")]
    held = [b for b in d.get("break_cover", []) if b.get("patients")]
    over = [x for x in d["nurses"] if x.get("counted") and "load_minutes" in x
            and x["load_minutes"] > x["capacity_minutes"]]
    needs = d.get("staffing_needs") or {}
    ward = needs.get("ward_minimum", -1)
    taking = d["staffing"]["nurses_taking_patients"]
    # A break without cover is counted once, with the break plan; each
    # break_cover finding of the plan check is one of the flagged breaks.
    cover = [v for v in violations if v["rule"] == "break_cover"]
    limits = [v for v in violations if v["rule"] in STAFFING and v["rule"] != "break_cover"]
    return {
        "limits_broken": len(limits),
        "rules_broken": len(violations) - len(limits) - len(cover),
        "breaks": len(held),
        "breaks_uncovered": len(flags),
        "overloaded": len(over),
        "ward_short": max(0, ward - taking) if ward >= 0 else 0,
    }


def judge(name, cmd, d, violations, text_report, yaml_report):
    v = d.get("verdict")
    ok(v is not None, f"{name} {cmd}: json has a verdict")
    if v is None:
        return
    if d.get("status") == "infeasible":
        ok(v["kind"] == "no_plan", f"{name} {cmd}: no valid assignment is 'no_plan'")
    if cmd == "check" and not d.get("plan"):
        ok(v["kind"] in ("not_judged", "no_plan"), f"{name} check: no plan is not judged")
    if v["kind"] not in ("no_plan", "not_judged"):
        want = recount(d, violations)
        got = {k: v[k] for k in want}
        ok(got == want, f"{name} {cmd}: the verdict's counts {got} are the report's {want}")
        short = want["limits_broken"] or want["breaks_uncovered"] or want["overloaded"] or \
            want["ward_short"]
        expect = "short" if short else "rules_broken" if want["rules_broken"] else "enough"
        ok(v["kind"] == expect, f"{name} {cmd}: verdict '{v['kind']}', the figures say '{expect}'")
    flagged = {b["nurse"] for b in d.get("break_cover", []) if b.get("flag")}
    for f in violations:
        if f["rule"] == "break_cover":
            ok(set(f["nurses"]) <= flagged,
               f"{name} {cmd}: the break_cover finding of {f['nurses']} is a flagged break")
    ok(flat(text_verdict(text_report) or "") == flat(v["text"]),
       f"{name} {cmd}: text says the json's words")
    kind, words = yaml_verdict(yaml_report) if yaml_report is not None else (v["kind"], v["text"])
    ok(kind == v["kind"] and flat(words or "") == flat(v["text"]),
       f"{name} {cmd}: yaml says the json's kind and words")


def main():
    keel, rosters = sys.argv[1], sys.argv[2:]
    with tempfile.TemporaryDirectory() as work:
        for path in rosters:
            name = os.path.relpath(path)
            # keel assign, and its plan checked again.
            _, js = run(keel, "assign", path, "--format", "json", "--best-effort")
            _, text = run(keel, "assign", path, "--best-effort")
            plan = os.path.join(work, "plan.yaml")
            if os.path.exists(plan):
                os.remove(plan)
            run(keel, "assign", path, "--format", "yaml", "--best-effort", "-o", plan)
            yaml_report = open(plan).read() if os.path.exists(plan) else None
            d = json.loads(js)
            violations = d.get("violations", [])
            if d.get("status") != "infeasible" and yaml_report is not None:
                _, cj = run(keel, "check", plan, "--format", "json")
                violations = json.loads(cj).get("violations", [])
            judge(name, "assign", d, violations, text, yaml_report)
            # keel check of the roster as it is.
            _, js = run(keel, "check", path, "--format", "json")
            _, text = run(keel, "check", path)
            d = json.loads(js)
            judge(name, "check", d, d.get("violations", []), text, None)
    print(f"1..{n}")
    return 1 if failed else 0


if __name__ == "__main__":
    sys.exit(main())
