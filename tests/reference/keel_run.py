# SPDX-License-Identifier: GPL-3.0-or-later
"""Running keel and reading its JSON report, shared by the reference checks.

check_rules.py and check_clock.py run keel the same way, read the same
report fields (imbalance, stages) and drive their rosters through the same
command-line skeleton (arguments, a working directory, a pool of jobs, the
"N passed, M failed" line); check_highs.py shares the skeleton.  Everything
here reads keel's documented CLI and JSON contract, not keel's code.
Imports only the standard library.
"""

import concurrent.futures
import json
import os
import subprocess
import tempfile
import time
from fractions import Fraction

PRINT_TOL = 1e-9    # a printed utilisation against load / capacity
EXIT_NAMES = {0: "success", 1: "usage error", 2: "bad input", 3: "no valid assignment",
              4: "internal or solver failure"}


# ---------------------------------------------------------------- keel runs

def run_keel(keel, path, seconds):
    """Run `keel assign PATH -f json --time-limit S`.

    Returns (exit code or None, parsed JSON or None, stderr, wall seconds).
    """
    cmd = [keel, "assign", path, "-f", "json", "--time-limit", "%g" % seconds]
    t0 = time.monotonic()
    try:
        proc = subprocess.run(cmd, capture_output=True, text=True, timeout=seconds * 2 + 10)
    except subprocess.TimeoutExpired as e:
        return None, None, "keel did not stop: killed after %ss" % e.timeout, \
            time.monotonic() - t0
    except OSError as e:
        return None, None, "cannot run %s: %s" % (keel, e), time.monotonic() - t0
    doc = None
    try:
        doc = json.loads(proc.stdout)
    except ValueError:
        pass
    return proc.returncode, doc, proc.stderr, time.monotonic() - t0


def stderr_head(stderr, lines=3):
    got = [x.strip() for x in (stderr or "").splitlines() if x.strip()]
    text = " | ".join(got[:lines])
    if len(got) > lines:
        text += " | ... (%d lines)" % len(got)
    return text or "(nothing on stderr)"


def is_num(v):
    return isinstance(v, (int, float)) and not isinstance(v, bool)


def exact(value, r):
    """keel's printed utilisation as the exact load / capacity fraction.

    Every stage value of U and L is (whole minutes) / capacity(n) with
    capacity <= 1440; two such fractions differ by more than 4e-7, and keel
    prints 12 significant digits, so the nearest fraction with a
    denominator up to the largest capacity is the value.  None if it is
    not such a fraction.
    """
    if not is_num(value):
        return None
    big = max(n["capacity"] for n in r["nurses"] if n["counted"])
    f = Fraction(value).limit_denominator(big)
    return f if abs(float(f) - value) <= PRINT_TOL * max(1.0, abs(value)) else None


# -------------------------------------------------------- keel's report

def check_imbalance(doc, fU, fL, what, problems):
    """imbalance.max/min_utilisation against the heaviest and lightest
    utilisation of what keel assigned (`what`: "assignment", "plan")."""
    imb = doc.get("imbalance")
    if isinstance(imb, dict):
        for key, want in (("max_utilisation", fU), ("min_utilisation", fL)):
            if not is_num(imb.get(key)) or abs(imb[key] - float(want)) > PRINT_TOL:
                problems.append("imbalance.%s %r, the %s gives %.12f"
                                % (key, imb.get(key), what, float(want)))
    else:
        problems.append("report has no imbalance object")


def read_stages(r, doc, problems, statuses=None):
    """keel's stages: named in the spec's order, only those the roster calls
    for (r["stage3"], r["stage4"]); status "optimal" only with every stage
    proven; with `statuses`, the overall status one of them.  Returns (st
    by name, proven by name, status, U, L exact) or None when the peak and
    lift values cannot be read."""
    want_names = ["peak", "lift"] + (["continuity"] if r["stage3"] else []) \
        + (["proximity"] if r["stage4"] else [])
    stages = doc.get("stages")
    if not isinstance(stages, list) or not all(isinstance(s, dict) for s in stages):
        problems.append("report has no stages list")
        return None
    names = [s.get("name") for s in stages]
    if names != want_names:
        problems.append("stages %s, the roster calls for %s" % (names, want_names))
    st = {s.get("name"): s for s in stages}
    proven = {k: st.get(k, {}).get("status") == "optimal" for k in want_names}
    status = doc.get("status")
    if status == "optimal" and not all(proven.values()):
        problems.append("status optimal but stages %s are not all proven"
                        % {k: st.get(k, {}).get("status") for k in want_names})
    if statuses is not None and status not in statuses:
        problems.append("status %r for a feasible roster" % (status,))
    if "peak" not in st or "lift" not in st:
        return None
    kU = exact(st["peak"].get("value"), r)
    kL = exact(st["lift"].get("value"), r)
    if kU is None or kL is None:
        problems.append("stage values peak %r, lift %r are not load / capacity fractions"
                        % (st["peak"].get("value"), st["lift"].get("value")))
        return None
    return st, proven, status, kU, kL


def report_facts(out, doc, check):
    """check(doc) -> (problems, facts) on keel's JSON object, its problems
    added to out["problems"]; returns the facts (None when there is no
    JSON object or check cannot read it)."""
    if not isinstance(doc, dict):
        out["problems"].append("keel printed no JSON object")
        return None
    problems, facts = check(doc)
    out["problems"] += problems
    return facts


# -------------------------------------------------------- the command line

def add_arguments(ap, reference_help):
    """The arguments every check takes: KEEL_EXE, --jobs, --keep and
    --reference-only (reference_help: what that mode checks)."""
    ap.add_argument("keel", nargs="?", help="the keel executable")
    ap.add_argument("--jobs", type=int, default=min(2, os.cpu_count() or 1),
                    help="rosters checked at once (default: 2, or 1 on one core)")
    ap.add_argument("--keep", metavar="DIR", help="write the rosters here and keep them")
    ap.add_argument("--reference-only", action="store_true", help=reference_help)


def keel_of(ap, args):
    """The keel executable's absolute path, None with --reference-only."""
    if args.keel is None and not args.reference_only:
        ap.error("KEEL_EXE is required (or --reference-only)")
    return None if args.reference_only else os.path.abspath(args.keel)


def work_dir(keep, prefix):
    """(directory, TemporaryDirectory or None): `keep`, else a new
    temporary directory named after prefix."""
    if keep:
        return keep, None
    tmp = tempfile.TemporaryDirectory(prefix=prefix)
    return tmp.name, tmp


def run_jobs(work, jobs, workers, line):
    """work(job) for every job, `workers` at once, each result's line
    printed as it comes (in job order).  Returns the results."""
    results = []
    with concurrent.futures.ProcessPoolExecutor(max_workers=max(1, workers)) as ex:
        for res in ex.map(work, jobs):
            results.append(res)
            print(line(res), flush=True)
    return results


def line_head(res, width):
    """The start of a result's line: its name, and what made it infeasible."""
    parts = ["%-*s" % (width, res["name"])]
    if res["kind"]:
        parts.append("[infeasible: %s]" % res["kind"])
    return parts


def line_end(parts, res):
    """A result's line: parts, then ok / FAIL, then its notes and problems
    one to a line."""
    parts.append("FAIL" if res["problems"] else "ok")
    text = "  ".join(parts)
    for n in res.get("notes") or []:
        text += "\n    note: " + n
    for p in res["problems"]:
        text += "\n    " + p
    return text


def finish(results, t0, tmp):
    """The closing lines; returns the exit status (1 when any failed)."""
    print("# %.0f seconds" % (time.monotonic() - t0))
    if tmp is not None:
        tmp.cleanup()
    failed = sum(1 for x in results if x["problems"])
    print("%d passed, %d failed" % (len(results) - failed, failed))
    return 1 if failed else 0


def fmt6(v):
    return "-" if v is None else "%.6f" % v
