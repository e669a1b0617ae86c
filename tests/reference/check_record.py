#!/usr/bin/python3
# SPDX-License-Identifier: GPL-3.0-or-later
"""Check the record keel rebalance --at writes (patients[].record), from the
roster before the rebalance, written from docs/roster-format.md ("record")
and not from keel's code.

Who held a patient up to the time T of the rebalance, as posted: her
record, then from its end (or her arrival) her `nurse`, who hands her to
the next of `handoffs` when she leaves (her `end`); with no hand-off left
the nurse before goes on.  Adjacent stretches of one nurse are one.  The
record written must be exactly that, up to T or her departure; a patient
without a nurse and without a record is new: no record, and she arrives at
T unless she arrives later.

Usage: check_record.py BEFORE.yaml HH:MM AFTER.yaml
Prints each problem; exit status 1 if there is one.
"""

import sys

import yaml


def clock(text):
    h, m = text.split(":")
    return int(h) * 60 + int(m)


class Shift:
    def __init__(self, doc):
        self.start = clock(doc["shift"]["start"])
        self.minutes = int(doc["shift"]["minutes"])

    def offset(self, text, end_like=False):
        t = (clock(text) - self.start) % 1440
        return 1440 if end_like and t == 0 and self.minutes == 1440 else t


def patients(doc):
    return list(doc.get("patients") or []) + list(doc.get("expected_admissions") or [])


def posted(doc, shift, t):
    """Patient id -> the stretches [nurse, from, to) up to t, as posted."""
    ends = {n["id"]: shift.offset(n["end"], True) if "end" in n else shift.minutes
            for n in doc["nurses"]}
    out = {}
    for p in patients(doc):
        arrival = p.get("arrives_at", p.get("at"))
        a = shift.offset(arrival) if arrival else 0
        b = shift.offset(p["leaves_at"], True) if "leaves_at" in p else shift.minutes
        until = min(b, t)
        held = [[s["nurse"], shift.offset(s["from"]), shift.offset(s["to"], True)]
                for s in p.get("record") or []]
        s = held[-1][2] if held else a
        nurse, handoffs = p.get("nurse"), list(p.get("handoffs") or [])
        while nurse and s < until:
            e = ends[nurse]
            if e <= s and handoffs:
                nurse = handoffs.pop(0)
                continue
            if e <= s or e >= until or not handoffs:
                e = until  # nobody named next: the nurse before goes on
            held.append([nurse, s, e])
            s = e
            if s < until:
                nurse = handoffs.pop(0)
        joined = []
        for stretch in held:
            if joined and joined[-1][0] == stretch[0] and joined[-1][2] == stretch[1]:
                joined[-1][2] = stretch[2]
            else:
                joined.append(stretch)
        out[p["id"]] = (joined, a)
    return out


def problems(before, at, after):
    shift = Shift(before)
    t = shift.offset(at)
    want = posted(before, shift, t)
    found = []
    written = {p["id"]: p for p in patients(after)}
    for pid, (stretches, a) in want.items():
        p = written.get(pid)
        if p is None:
            found.append("%s is not on the roster written" % pid)
            continue
        got = [[s["nurse"], shift.offset(s["from"]), shift.offset(s["to"], True)]
               for s in p.get("record") or []]
        if got != stretches:
            found.append("%s: record %r, posted %r" % (pid, got, stretches))
        if not stretches and a < t and p.get("arrives_at") != at:
            found.append("%s: new, arrives at %r, expected %s" % (pid, p.get("arrives_at"), at))
    return found


def main(argv):
    if len(argv) != 4:
        print(__doc__.strip().splitlines()[-2], file=sys.stderr)
        return 2
    with open(argv[1], encoding="utf-8") as f:
        before = yaml.safe_load(f)
    with open(argv[3], encoding="utf-8") as f:
        after = yaml.safe_load(f)
    found = problems(before, argv[2], after)
    for line in found:
        print(line)
    return 1 if found else 0


if __name__ == "__main__":
    sys.exit(main(sys.argv))
