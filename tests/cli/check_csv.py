#!/usr/bin/python3
# SPDX-License-Identifier: GPL-3.0-or-later
"""keel's CSV, its de-identified yaml and its first text screen, as a TAP
stream.

CSV (`--format csv`, a row per patient; `csv-nurses`, a row per nurse) is
read back with Python's own csv module in strict mode and checked against
the same plan's json: one row per patient (nurse, care minutes) and per
nurse (load, capacity, utilisation, overload), a header row, CRLF line
ends, and a field holding a comma, a quote and a line end quoted as the
standard says.
Source: RFC 4180, "Common Format and MIME Type for Comma-Separated Values
(CSV) Files", section 2 (rules 1, 3, 5, 6 and 7), IETF, 2005.

De-identification: the yaml plan of a roster whose patients have names
keeps them by default (it is the roster again) and drops every one with
--deidentify; the html sheet without --names shows none (the browser suite
reads the sheet).

Usage: check_csv.py KEEL ROSTER...
"""

import csv
import io
import json
import os
import subprocess
import sys
import tempfile

import yaml

n = 0
failed = 0


def ok(cond, what):
    global n, failed
    n += 1
    print(("ok %d - %s" if cond else "not ok %d - %s") % (n, what))
    if not cond:
        failed += 1


def keel(exe, *args):
    r = subprocess.run([exe] + list(args), capture_output=True, timeout=300)
    return r.returncode, r.stdout.decode("utf-8"), r.stderr.decode("utf-8")


def rows_of(text):
    return list(csv.reader(io.StringIO(text, newline=""), strict=True))


def check_roster(exe, roster, work):
    """The csv of one plan against its json: keel's own plan written as a
    roster and scored by keel check (the same plan for every format), or,
    when no valid plan exists, the best-effort plan."""
    name = os.path.basename(roster)
    plan = os.path.join(work, "plan.yaml")
    if os.path.exists(plan):
        os.remove(plan)
    keel(exe, "assign", roster, "--format", "yaml", "--time-limit", "2", "-o", plan)
    if os.path.exists(plan):
        args = ["check", plan, "--time-limit", "1"]
    else:
        args = ["assign", roster, "--best-effort"]
    _, js, _ = keel(exe, *args, "--format", "json")
    d = json.loads(js)
    planned = bool(d.get("plan")) or d.get("best_effort")
    _, text, err = keel(exe, *args, "--format", "csv")
    rows = rows_of(text)
    ok(rows and rows[0][:3] == ["patient", "bed", "room"], "%s: csv has its header" % name)
    ok(all(line.endswith("\r") for line in text.split("\n")[:-1]) and text.endswith("\r\n"),
       "%s: csv lines end in CRLF" % name)
    ok("Decision support only" in err, "%s: the caution goes to stderr beside the csv" % name)
    want = len(d["patients"]) if planned else 0
    ok(len(rows) - 1 == want, "%s: a row per patient (%d)" % (name, len(rows) - 1))
    by_id = {p["id"]: p for p in d["patients"]}
    head = rows[0]
    agree = all(by_id[r[0]].get("nurse", "") == r[head.index("nurse")] and
                int(r[head.index("care_minutes")]) == by_id[r[0]]["care_minutes"]
                for r in rows[1:])
    ok(agree, "%s: each row's nurse and care minutes are the json's" % name)
    _, text, _ = keel(exe, *args, "--format", "csv-nurses")
    rows = rows_of(text)
    head = rows[0]
    ok(len(rows) - 1 == (len(d["nurses"]) if planned else 0),
       "%s: csv-nurses has a row per nurse" % name)
    nurses = {x["id"]: x for x in d["nurses"]}
    agree = all(
        int(r[head.index("load_minutes")]) == nurses[r[0]]["load_minutes"] and
        int(r[head.index("capacity_minutes")]) == nurses[r[0]]["capacity_minutes"] and
        abs(float(r[head.index("utilisation")]) - nurses[r[0]]["utilisation"]) < 1e-6 and
        (r[head.index("overload")] == "yes") == bool(nurses[r[0]].get("overload"))
        for r in rows[1:])
    ok(agree, "%s: each nurse's load, capacity, utilisation and overload are the json's" % name)


def check_quoting(exe, work):
    # A bed name with a comma, a double quote and a line end (RFC 4180,
    # section 2, rules 6 and 7).
    bed = 'Bay 3, "window"\nside'
    doc = {"version": 1, "shift": {"minutes": 720},
           "policy": {"acuity_minutes": {1: 60}},
           "nurses": [{"id": "A"}, {"id": "B"}],
           "patients": [{"id": "p1", "bed": bed, "acuity": 1},
                        {"id": "p2", "bed": "2", "acuity": 1}]}
    path = os.path.join(work, "quoting.yaml")
    with open(path, "w", encoding="utf-8") as f:
        yaml.safe_dump(doc, f)
    _, text, _ = keel(exe, "assign", path, "--format", "csv")
    rows = rows_of(text)
    ok(len(rows) == 3 and rows[1][1] == bed, "a bed with a comma, a quote and a line end "
                                             "reads back whole")
    ok('"Bay 3, ""window""' in text, "its quotes are doubled inside a quoted field")


def check_deidentify(exe, roster):
    name = os.path.basename(roster)
    doc = yaml.safe_load(open(roster, encoding="utf-8"))
    names = [p["name"] for p in doc.get("patients") or [] if p.get("name")]
    if not names:
        return
    _, plain, _ = keel(exe, "assign", roster, "--format", "yaml", "--time-limit", "2")
    _, hidden, _ = keel(exe, "assign", roster, "--format", "yaml", "--time-limit", "2",
                        "--deidentify")
    ok(any(x in plain for x in names), "%s: the yaml plan keeps the names by default" % name)
    ok(not any(x in hidden for x in names), "%s: --deidentify drops every name" % name)
    back = yaml.safe_load(hidden)
    ok(len(back["patients"]) == len(doc["patients"]), "%s: and keeps every patient" % name)
    _, text, _ = keel(exe, "assign", roster, "--time-limit", "2")
    ok(not any(x in text for x in names), "%s: the text report names no patient" % name)
    ok("At a glance" in text and "\033[" not in text,
       "%s: the text opens with the glance, without colour off a terminal" % name)
    code, _, err = keel(exe, "assign", roster, "--names")
    ok(code == 1 and "--names is for the html sheet" in err, "%s: --names wants html" % name)


def main():
    exe, rosters = os.path.abspath(sys.argv[1]), sys.argv[2:]
    with tempfile.TemporaryDirectory() as work:
        for roster in rosters:
            check_roster(exe, roster, work)
            check_deidentify(exe, roster)
        check_quoting(exe, work)
    print("1..%d" % n)
    return 1 if failed else 0


if __name__ == "__main__":
    sys.exit(main())
