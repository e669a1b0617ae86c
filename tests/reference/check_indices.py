#!/usr/bin/python3
# SPDX-License-Identifier: GPL-3.0-or-later
"""Check keel's imbalance indices against the published formulas.

The indices are taken over the counted nurses' utilisations x_1..x_n
(nurses whose patient limit is above zero), with mean m:
  Jain's index   J = (sum x)^2 / (n * sum x^2)
                 Source: R. Jain, D. Chiu, W. Hawe, "A quantitative measure of
                 fairness and discrimination for resource allocation in shared
                 computer systems", DEC-TR-301, 1984 (J = 1 when all equal,
                 1/n when one takes all).
  Gini           G = sum_i sum_j |x_i - x_j| / (2 n^2 m)
                 Source: Gini coefficient, standard mean-difference formula
                 (common practice, no single document).
  CV             population standard deviation / m (numpy std, ddof=0)
  spread         max - min;   peak_to_mean   max / m

Three kinds of check, each one line of output:
  * formula: the numpy implementation here against hand-computed values on
    fixed vectors (all equal; one takes all; two and three levels);
  * forced: rosters built here so that every patient has exactly one eligible
    nurse, so the utilisations are known by hand; keel's indices must equal
    the hand values (within 1e-6; keel prints at least 6 decimals);
  * generated: gen_rosters.py rosters; keel's JSON is checked against the
    roster (check_highs.check_report) and its indices against numpy on its
    counted nurses' utilisations, within 1e-6.

Usage: check_indices.py KEEL_EXE [--seed S] [--count 6] [--keel-seconds 5]
The last line is "N passed, M failed" (N, M: rosters and fixed vectors);
exit status 1 if M > 0.
"""

import argparse
import math
import os
import sys
import tempfile


sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))
# check_highs exits 77 (meson: skipped) when this Python lacks numpy, scipy's
# milp or PyYAML, before anything below needs them.
import check_highs  # noqa: E402

import numpy as np  # noqa: E402
import gen_rosters  # noqa: E402
import highs_model  # noqa: E402

TOL = 1e-6


def indices(x):
    """The imbalance indices of utilisations x (see the module comment)."""
    x = np.asarray(x, dtype=float)
    n = x.size
    m = x.mean()
    return {
        "max_utilisation": x.max(),
        "min_utilisation": x.min(),
        "spread": x.max() - x.min(),
        "peak_to_mean": x.max() / m,
        "cv": x.std() / m,
        "jain": x.sum() ** 2 / (n * np.square(x).sum()),
        "gini": np.abs(x[:, None] - x[None, :]).sum() / (2.0 * n * n * m),
    }


def hand_values():
    """Fixed vectors and their indices worked by hand from the formulas."""
    return [
        # Source: Jain et al., DEC-TR-301, 1984: J = 1 for an equal
        # allocation; Gini standard formula: G = 0 when all are equal.
        ("all equal (5 x 0.8)", [0.8] * 5,
         {"jain": 1.0, "gini": 0.0, "cv": 0.0, "spread": 0.0, "peak_to_mean": 1.0}),
        # Source: Jain et al., 1984: J = 1/n when one user takes all;
        # Gini: G = (n-1)/n for one-takes-all; CV = sqrt(n-1) (population sd).
        ("one takes all (n=4)", [0.5, 0.0, 0.0, 0.0],
         {"jain": 0.25, "gini": 0.75, "cv": math.sqrt(3.0), "spread": 0.5,
          "peak_to_mean": 4.0}),
        ("one takes all (n=7)", [1.2] + [0.0] * 6,
         {"jain": 1.0 / 7.0, "gini": 6.0 / 7.0, "cv": math.sqrt(6.0), "spread": 1.2,
          "peak_to_mean": 7.0}),
        # Worked by hand: (0.5, 1.0): J = 2.25 / 2.5; G = 1 / (2*4*0.75);
        # sd = 0.25, mean 0.75.
        ("two levels (0.5, 1.0)", [0.5, 1.0],
         {"jain": 0.9, "gini": 1.0 / 6.0, "cv": 1.0 / 3.0, "spread": 0.5,
          "peak_to_mean": 4.0 / 3.0}),
        # Worked by hand: (0.5, 0.75, 1.0): J = 5.0625 / (3 * 1.8125) = 27/29;
        # G = 2 / (2*9*0.75) = 4/27; sd = sqrt(0.125/3), CV = sqrt(2/27).
        ("three levels (0.5, 0.75, 1.0)", [0.5, 0.75, 1.0],
         {"jain": 27.0 / 29.0, "gini": 4.0 / 27.0, "cv": math.sqrt(2.0 / 27.0),
          "spread": 0.5, "peak_to_mean": 4.0 / 3.0}),
    ]


def compare_indices(got, want, what):
    problems = []
    if not isinstance(got, dict):
        return ["%s: no imbalance object" % what]
    for key, w in want.items():
        g = got.get(key)
        if not isinstance(g, (int, float)) or isinstance(g, bool) or abs(g - w) > TOL:
            problems.append("%s: %s is %r, expected %.9f" % (what, key, g, w))
    return problems


# ------------------------------------------------------------ forced rosters

SHIFT = '{label: "day", start: "07:00", minutes: 720, break_minutes: 60}'
POLICY = """policy:
  max_patients: 4
  acuity_minutes: {1: 90, 2: 150, 3: 210, 4: 300, 5: 420}
  extra_minutes: {admission: 90, discharge: 45, isolation: 30}
"""
SKILL_OF = ["tele", "chemo", "wound", "vent", "iv_insulin"]


def forced_roster(nurses, patients):
    """Roster text: nurses [(id, skill, extra fields)], patients [(id, skill, care)].

    Each nurse holds one skill of its own and each patient needs one, so every
    patient has exactly one eligible nurse: the assignment is forced.
    Capacity is 720 - 60 = 660 minutes unless a nurse says otherwise.
    """
    lines = ["# Invented roster built by check_indices.py: the assignment is forced.",
             "version: 1", "shift:   " + SHIFT, POLICY.rstrip("\n"), "nurses:"]
    for nid, skill, extra in nurses:
        fields = ['id: "%s"' % nid, 'skills: ["%s"]' % skill] + extra
        lines.append("  - {" + ", ".join(fields) + "}")
    lines.append("patients:")
    for pid, skill, care in patients:
        lines.append('  - {id: "%s", acuity: 3, care_minutes: %d, needs: ["%s"]}'
                     % (pid, care, skill))
    return "\n".join(lines) + "\n"


def forced_cases():
    """(name, roster text, counted utilisations worked by hand, hand indices)."""
    cases = []
    # Four nurses at 330/660 = 0.5 each, plus a nurse who takes no patients
    # (max_patients 0): not counted, so the indices are those of equal loads.
    # Source: Jain et al., 1984 (J = 1 equal); Gini standard formula (G = 0).
    nurses = [("N%d" % (i + 1), SKILL_OF[i], []) for i in range(4)]
    nurses.append(("N5", "iv_insulin", ["max_patients: 0"]))
    patients = [("P-%d" % (101 + i), SKILL_OF[i], 330) for i in range(4)]
    cases.append(("forced-equal", forced_roster(nurses, patients), [0.5] * 4,
                  {"jain": 1.0, "gini": 0.0, "cv": 0.0, "spread": 0.0, "peak_to_mean": 1.0,
                   "max_utilisation": 0.5, "min_utilisation": 0.5}))
    # One nurse carries the only patient, three counted nurses have none:
    # u = (0.5, 0, 0, 0).  Source: Jain et al., 1984 (J = 1/n one takes all);
    # Gini standard formula (G = (n-1)/n).
    nurses = [("N%d" % (i + 1), SKILL_OF[i], []) for i in range(4)]
    patients = [("P-201", "tele", 330)]
    cases.append(("forced-one-takes-all", forced_roster(nurses, patients), [0.5, 0, 0, 0],
                  {"jain": 0.25, "gini": 0.75, "cv": math.sqrt(3.0), "spread": 0.5,
                   "peak_to_mean": 4.0, "max_utilisation": 0.5, "min_utilisation": 0.0}))
    # Two nurses at 330/660 and 660/660 (the second from two patients).
    # Worked by hand as in hand_values(): J = 0.9, G = 1/6, CV = 1/3.
    nurses = [("N1", "tele", []), ("N2", "chemo", [])]
    patients = [("P-301", "tele", 330), ("P-302", "chemo", 400), ("P-303", "chemo", 260)]
    cases.append(("forced-two-levels", forced_roster(nurses, patients), [0.5, 1.0],
                  {"jain": 0.9, "gini": 1.0 / 6.0, "cv": 1.0 / 3.0, "spread": 0.5,
                   "peak_to_mean": 4.0 / 3.0, "max_utilisation": 1.0,
                   "min_utilisation": 0.5}))
    # Three levels, one of them from duty minutes alone: a charge nurse with
    # 330 duty minutes and no eligible patient (0.5), 495/660 = 0.75, and a
    # part-shift nurse with 480 - 30 = 450 minutes carrying 450 (1.0).
    # Worked by hand: J = 27/29, G = 4/27, CV = sqrt(2/27).
    nurses = [("N1", "vent", ["max_patients: 2", "duty_minutes: 330"]),
              ("N2", "tele", []),
              ("N3", "chemo", ["minutes: 480", "break_minutes: 30"])]
    patients = [("P-401", "tele", 495), ("P-402", "chemo", 200), ("P-403", "chemo", 250)]
    cases.append(("forced-three-levels", forced_roster(nurses, patients), [0.5, 0.75, 1.0],
                  {"jain": 27.0 / 29.0, "gini": 4.0 / 27.0, "cv": math.sqrt(2.0 / 27.0),
                   "spread": 0.5, "peak_to_mean": 4.0 / 3.0, "max_utilisation": 1.0,
                   "min_utilisation": 0.5}))
    return cases


# ------------------------------------------------------------ keel runs

def check_keel_roster(keel, path, seconds, hand=None):
    """Run keel on one roster; return (problems, counted utilisations)."""
    r = highs_model.load(path)
    rc, doc, stdout, stderr, secs = check_highs.run_keel(keel, path, seconds)
    if rc != 0 or not isinstance(doc, dict):
        tail = stderr.strip().splitlines()[-1:] if stderr else []
        return ["keel exit code %r, JSON %s (stderr: %s)"
                % (rc, "ok" if isinstance(doc, dict) else "missing", tail)], None
    problems, facts = check_highs.check_report(r, doc)
    if facts is None:
        return problems, None
    xs = [float(facts["utils"][n["id"]]) for n in r["nurses"] if n["counted"]]
    # Indices over keel's own counted utilisations (checked against the
    # roster by check_report), recomputed with numpy.
    problems += compare_indices(doc.get("imbalance"), indices(xs), "numpy")
    if hand is not None:
        want_x, want = hand
        if sorted(round(x, 9) for x in xs) != sorted(round(x, 9) for x in want_x):
            problems.append("counted utilisations %s, worked by hand %s" % (xs, want_x))
        problems += compare_indices(doc.get("imbalance"), want, "hand")
    return problems, xs


def main(argv=None):
    ap = argparse.ArgumentParser(description="Check keel's imbalance indices")
    ap.add_argument("keel", nargs="?", help="the keel executable")
    ap.add_argument("--seed", type=int, default=77)
    ap.add_argument("--count", type=int, default=6,
                    help="generated rosters of each size (default 6 unit-size, 6 tiny)")
    ap.add_argument("--keel-seconds", type=float, default=5.0)
    ap.add_argument("--formulas-only", action="store_true",
                    help="no keel: check only the numpy formulas on fixed vectors")
    args = ap.parse_args(argv)
    if args.keel is None and not args.formulas_only:
        ap.error("KEEL_EXE is required (or --formulas-only)")

    passed = failed = 0

    def report(name, problems, detail=""):
        nonlocal passed, failed
        print("%-32s %s%s" % (name, "FAIL" if problems else "ok", detail))
        for p in problems:
            print("    " + p)
        if problems:
            failed += 1
        else:
            passed += 1

    for name, x, want in hand_values():
        report("formula " + name, compare_indices(indices(x), want, "numpy"))

    if not args.formulas_only:
        keel = os.path.abspath(args.keel)
        with tempfile.TemporaryDirectory(prefix="keel-idx-") as tmp:
            for name, text, xs, want in forced_cases():
                path = os.path.join(tmp, name + ".yaml")
                with open(path, "w", encoding="utf-8") as f:
                    f.write(text)
                # The forced utilisations must also follow from the roster
                # arithmetic here, or the case itself is wrong.
                r = highs_model.load(path)
                own = []
                if all(len(e) == 1 for e in r["eligible"]):
                    assign = [e[0] for e in r["eligible"]]
                    loads = highs_model.loads_of(r, assign)
                    own = [loads[j] / n["capacity"] for j, n in enumerate(r["nurses"])
                           if n["counted"]]
                if sorted(own) != sorted(xs):
                    report(name, ["REFERENCE: forced case computes to %s, not %s" % (own, xs)])
                    continue
                problems, _ = check_keel_roster(keel, path, args.keel_seconds, (xs, want))
                report(name, problems)
            paths = gen_rosters.write_rosters(tmp, args.seed, args.count,
                                              gen_rosters.PRESETS["unit"]["patients"],
                                              gen_rosters.PRESETS["unit"]["nurses"], 0.0)
            paths += gen_rosters.write_rosters(tmp, args.seed, args.count,
                                               gen_rosters.PRESETS["small"]["patients"],
                                               gen_rosters.PRESETS["small"]["nurses"], 0.0,
                                               "small")
            for path in paths:
                name = os.path.splitext(os.path.basename(path))[0]
                problems, xs = check_keel_roster(keel, path, args.keel_seconds)
                detail = ""
                if xs:
                    got = indices(xs)
                    detail = "  J=%.6f G=%.6f CV=%.6f" % (got["jain"], got["gini"], got["cv"])
                report(name, problems, detail)
    print("%d passed, %d failed" % (passed, failed))
    return 1 if failed else 0


if __name__ == "__main__":
    sys.exit(main())
