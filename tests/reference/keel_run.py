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
import math
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
    # Stage "ranks" between peak and lift when keel reports ranks
    # (docs/model.md: the stage and the "ranks" key only when some nurse is
    # pinned; read_ranks checks the key itself).
    want_names = ["peak"] + (["ranks"] if doc.get("ranks") is not None else []) + ["lift"] \
        + (["continuity"] if r["stage3"] else []) + (["proximity"] if r["stage4"] else [])
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


def read_ranks(r, doc, kU, problems):
    """keel's stage ranks (docs/model.md "Stage ranks", docs/output.md):
    the "ranks" list and the stage "ranks", checked against each other and
    keel's peak kU; with no pinned nurse only as a stage cut short by the
    time limit.  Returns {"present", "status" (the stage's), "pinned":
    [(nurse index, level)], "rest": the last level of the nurses not pinned
    or None, "rest_status", "levels": {counted j: her ceiling}} (levels
    kU for everyone without ranks), or None when unreadable."""
    counted = [j for j, n in enumerate(r["nurses"]) if n["counted"]]
    stages = doc.get("stages") if isinstance(doc.get("stages"), list) else []
    stage = next((s for s in stages if isinstance(s, dict) and s.get("name") == "ranks"), None)
    entries = doc.get("ranks")
    out = {"present": entries is not None, "status": None, "pinned": [], "rest": None,
           "rest_status": None, "levels": {j: kU for j in counted}}
    if entries is None:
        if stage is not None:
            problems.append("stage ranks without a \"ranks\" list")
            return None
        return out
    if stage is None:
        problems.append("a \"ranks\" list without the stage ranks")
        return None
    out["status"] = stage.get("status")
    by_id = {n["id"]: j for j, n in enumerate(r["nurses"])}
    if not isinstance(entries, list) or not entries:
        problems.append("\"ranks\" is %r, not a non-empty list" % (entries,))
        return None
    last = None
    for k, e in enumerate(entries):
        if not isinstance(e, dict):
            problems.append("ranks entry %r is not an object" % (e,))
            return None
        v = exact(e.get("utilisation"), r)
        if e.get("rank") != k + 1 or v is None:
            problems.append("ranks entry %d: rank %r, utilisation %r" % (k + 1, e.get("rank"),
                                                                       e.get("utilisation")))
            return None
        if last is not None and v > last:
            problems.append("ranks entry %d: utilisation %s above the rank before it (%s)"
                            % (k + 1, v, last))
        last = v
        if e.get("pinned") is True:
            j = by_id.get(e.get("nurse"))
            if j is None or j not in counted or any(j == i for i, _ in out["pinned"]):
                problems.append("ranks entry %d: pinned nurse %r unknown, not counted or "
                                "twice" % (k + 1, e.get("nurse")))
                return None
            if out["rest"] is not None:
                problems.append("ranks entry %d: a pinned nurse after the rest" % (k + 1))
            if e.get("status") != "optimal":
                problems.append("ranks entry %d: pinned with status %r (pinned is proven)"
                                % (k + 1, e.get("status")))
            out["pinned"].append((j, v))
        elif e.get("pinned") is False and e.get("nurse") is None and k == len(entries) - 1:
            out["rest"], out["rest_status"] = v, e.get("status")
        else:
            problems.append("ranks entry %d: %r is neither a pinned nurse nor the last rank"
                            % (k + 1, e))
            return None
    if not out["pinned"]:
        # Only a stage cut short by the time limit lists no pinned nurse:
        # its last rank is then the peak (docs/model.md, "Stage ranks").
        if out["status"] != "time_limit" or out["rest"] != kU:
            problems.append("\"ranks\" names no pinned nurse, and is not a stage cut short "
                            "at the peak (status %r, last rank %s)" % (out["status"], out["rest"]))
            return None
    elif out["pinned"][0][1] != kU:
        problems.append("the first pinned nurse is at %s, the peak is %s"
                        % (out["pinned"][0][1], kU))
    if (out["rest"] is None) != (len(out["pinned"]) == len(counted)):
        problems.append("ranks: %d of %d counted nurses pinned, rest %s"
                        % (len(out["pinned"]), len(counted), out["rest"]))
    sv = exact(stage.get("value"), r)
    if sv != last:
        problems.append("stage ranks value %r, the last rank is %s" % (stage.get("value"), last))
    if out["rest"] is not None and out["rest_status"] != out["status"]:
        problems.append("the last rank's status %r, the stage's %r"
                        % (out["rest_status"], out["status"]))
    for j in counted:
        out["levels"][j] = out["rest"] if out["rest"] is not None else kU
    for j, v in out["pinned"]:
        out["levels"][j] = v
    return out


def loads_within(r, loads, levels):
    """The counted nurses whose load is above floor(level cap): [(j, load,
    ceiling)]."""
    return [(j, loads[j], math.floor(lv * r["nurses"][j]["capacity"]))
            for j, lv in levels.items() if loads[j] > math.floor(lv * r["nurses"][j]["capacity"])]


def compare_ranks(r, kr, ref_rk, k_peak_proven):
    """keel's ranks kr (read_ranks) against the reference's ranks ref_rk
    (highs_model.ranks or ranks_by_enumeration; None when the reference's
    peak is not proven) on the same proven U*.  Returns (problems, same):
    same is True when both hold the same levels (the lift's problem is then
    the same).

    Source: the reference's pinned tests and descent (HiGHS through
    Debian's python3-scipy 1.10) or exhaustive enumeration, from
    docs/model.md "Stage ranks"."""
    out = []
    if ref_rk is None or kr is None or not k_peak_proven:
        return out, False
    if ref_rk.get("status", "optimal") != "optimal":
        return out, False
    ids = lambda pins: sorted((r["nurses"][j]["id"], str(v)) for j, v in pins)  # noqa: E731
    want = ids(ref_rk["pinned"])
    if not kr["present"]:
        # No stage ranks says that no nurse is pinned at the proven peak
        # (docs/model.md: the stage is reported whenever one is).
        if want:
            out.append("ranks: keel proves its peak and reports no ranks (no nurse pinned), "
                       "the reference pins %s" % want)
        return out, not want
    got = ids(kr["pinned"])
    if kr["status"] != "optimal":
        # keel's ranks stopped on its time limit: what it pinned is still proven.
        extra = sorted(set(got) - set(want))
        if extra:
            out.append("ranks: keel pins %s, the reference does not" % extra)
        return out, False
    if got != want:
        out.append("ranks: keel pins %s, the reference %s" % (got, want))
    if kr["rest"] != ref_rk["rest"]:
        out.append("ranks: keel's last rank %s, the reference's %s"
                   % (kr["rest"], ref_rk["rest"]))
    return out, got == want and kr["rest"] == ref_rk["rest"]


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


def count_pinned(results, kinds, pinned, min_share):
    """Print how many rosters of each kind (label, test, how many were
    made) have a nurse pinned at the peak (pinned(result) true); returns
    the problems when a kind falls short of min_share of its rosters (the
    check must keep exercising the ranks)."""
    out = []
    for label, test, made in kinds:
        n = sum(1 for x in results if test(x) and pinned(x))
        print("# %s rosters with a nurse pinned at the peak (stage ranks): %d of %d"
              % (label, n, made))
        if made and n < min_share * made:
            out.append("only %d of %d %s rosters have a pinned nurse, below the %g required: "
                       "the generator no longer exercises the ranks" % (n, made, label, min_share))
    return out


def finish(results, t0, tmp, problems=()):
    """The closing lines; returns the exit status (1 when any failed, or
    when there are problems of the whole run)."""
    print("# %.0f seconds" % (time.monotonic() - t0))
    if tmp is not None:
        tmp.cleanup()
    for p in problems:
        print("FAIL: " + p)
    failed = sum(1 for x in results if x["problems"]) + len(problems)
    print("%d passed, %d failed" % (len(results) - failed + len(problems), failed))
    return 1 if failed else 0


def fmt6(v):
    return "-" if v is None else "%.6f" % v
