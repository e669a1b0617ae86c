# SPDX-License-Identifier: GPL-3.0-or-later
"""Every stage side by side: keel's stages against HiGHS's chain of stage models.

Part of the benchmark (run_bench.py imports it; on demand only).  The
reference is the one tests/reference/check_rules.py uses, unchanged:
check_rules.reference() runs highs_model.solve_rules(), HiGHS on the
textbook model of each stage in the order of docs/model.md (peak, ranks,
lift, continuity, proximity as zones then rooms, and continuity at zero
tolerance for keel's kept_at_zero_tolerance), each stage with the time
limit, each later stage holding the earlier stages' values as HiGHS found
them.  Each stage gives the objective a tenth of its limit and then asks
feasibility questions ("strictly better than the best plan"); only
HiGHS's "infeasible" on such a question is taken as a proof (the lessons
in highs_model.py).  keel's report is read and checked with
check_rules.check_report() and compared with check_rules.compare(), so a
stage where keel and HiGHS disagree is listed, never averaged away.

A stage counts as proven here only when every stage before it that
applies is proven too (a later stage's optimum holds the earlier values;
proven under an unproven peak, it answers another question).  Where
neither side proved every stage before, keel and HiGHS may still hold the
same values (the same U, levels, L and kept, as check_rules.compare reads
them): the stage is then the same problem for both, and a proof or a
better plan of one side counts against the other too.  Stage ranks
applies to every roster: keel reports it only when some nurse is pinned at
the peak (docs/model.md, "Stage ranks"), so with its peak proven and no
ranks stage reported keel has proven that nobody is pinned (its time is
then not reported and is left out of the times).  HiGHS's proximity is
its zones stage and its rooms stage (keel's proximity is both, Z then R):
proven when both are, its time their sum.  keel's continuity stage also
finds the optimum at zero tolerance; HiGHS's continuity time is its
continuity stage and its zero-tolerance stage together.

Source: HiGHS through Debian 12's python3-scipy 1.10, scipy.optimize.milp
(the solver of tests/reference/highs_model.py).
"""

import math
import os
import statistics
import sys
import time

HERE = os.path.dirname(os.path.abspath(__file__))
sys.path.insert(0, os.path.join(HERE, "..", "reference"))
import check_rules  # noqa: E402  (the reference chain, keel's report checks)
import highs_model  # noqa: E402

STAGES = ("peak", "ranks", "lift", "continuity", "proximity")
UNIT_SIZE_MAX = 100         # patients; the 200-patient floors are not unit-size


def worker(roster, seconds):
    """HiGHS on every stage of the roster (a subprocess of the benchmark)."""
    r = highs_model.load_rules(roster)
    t0 = time.monotonic()
    ref, problems = check_rules.reference(r, False, seconds)
    return {"ref": ref, "problems": problems, "seconds": time.monotonic() - t0}


def _cell(applies, proven, seconds, value):
    return {"applies": applies, "proven": proven, "seconds": seconds, "value": value}


def _chain(cells):
    """Each applying stage proven only with every applying stage before it."""
    ok = True
    for name in STAGES:
        c = cells[name]
        if not c["applies"]:
            continue
        c["own_proof"] = c["proven"]
        c["proven"] = ok and c["proven"]
        ok = c["proven"]
    return cells


def highs_cells(r, res):
    """The reference's stages as cells {applies, proven, seconds, value}."""
    h = res["ref"]["highs"] if res and "ref" in res else None
    s = h["stages"] if h else {}
    cells = {}

    def one(name, st, applies=True):
        if st is None:
            return _cell(applies, False, None, None)
        return _cell(applies, st["status"] == "optimal", st.get("seconds"), st.get("value"))
    cells["peak"] = one("peak", s.get("peak"))
    rk = h["ranks"] if h else None
    cells["ranks"] = _cell(True, rk is not None and rk["status"] == "optimal",
                           None if rk is None else rk["seconds"],
                           None if rk is None else len(rk["pinned"]))
    cells["lift"] = one("lift", s.get("lift"))
    cells["continuity"] = one("continuity", s.get("continuity"), r["stage3"])
    zero = s.get("continuity0")
    if zero is not None and zero is not s.get("continuity") and cells["continuity"]["seconds"]:
        # keel's continuity stage also finds the optimum at zero tolerance
        # (kept_at_zero_tolerance, src/solve/stage_keep.c); HiGHS's is a
        # stage of its own: its time counts with the stage's.
        cells["continuity"]["seconds"] += zero["seconds"]
    z, w = s.get("proximity"), s.get("rooms")
    if z is None or w is None:
        cells["proximity"] = _cell(r["stage4"], False, None, None)
    else:
        cells["proximity"] = _cell(r["stage4"], z["status"] == "optimal" and
                                   w["status"] == "optimal",
                                   z["seconds"] + w["seconds"], (z["value"], w["value"]))
    return _chain(cells)


def keel_cells(r, doc):
    """keel's stages (its json) as cells; ranks as described above."""
    st = {s.get("name"): s for s in (doc or {}).get("stages", []) if isinstance(s, dict)}
    cells = {}

    def one(name, applies=True):
        x = st.get(name)
        if x is None:
            return _cell(applies, False, None, None)
        return _cell(applies, x.get("status") == "optimal", x.get("seconds"), x.get("value"))
    cells["peak"] = one("peak")
    if "ranks" in st:
        cells["ranks"] = one("ranks")
        cells["ranks"]["value"] = sum(1 for e in doc.get("ranks") or [] if e.get("pinned"))
    else:
        cells["ranks"] = _cell(True, cells["peak"]["proven"], None, 0)
    cells["lift"] = one("lift")
    cells["continuity"] = one("continuity", r["stage3"])
    cells["proximity"] = one("proximity", r["stage4"])
    if cells["proximity"]["value"] is not None and isinstance(doc.get("proximity"), dict):
        cells["proximity"]["value"] = (doc["proximity"].get("zones"),
                                       doc["proximity"].get("rooms"))
    return _chain(cells)


def judge(entry, r, doc, res):
    """Fill entry["stages"] = {"keel": cells, "highs": cells} and add every
    disagreement of keel's report with the roster or with HiGHS's stages to
    entry["disagreements"]."""
    notes = []
    if res is None or res.get("status") == "error":
        notes.append("stages: the HiGHS reference did not finish (%s)"
                     % "; ".join((res or {}).get("message") or ["no result"]))
        res = None
    else:
        notes += ["stages: REFERENCE: " + p for p in res["problems"]]
    facts = None
    if isinstance(doc, dict):
        problems, facts = check_rules.check_report(r, doc)
        notes += ["stages: keel's report: " + p for p in problems]
    ref = None if res is None else res["ref"]
    if facts is not None and ref is not None and ref["U"] is not None:
        notes += ["stages: " + p for p in check_rules.compare(r, facts, ref)]
    entry["stages"] = {"keel": keel_cells(r, doc), "highs": highs_cells(r, res),
                       "same": same_problem(r, facts, ref)}
    entry["stages_highs_seconds"] = None if res is None else res["seconds"]
    entry["disagreements"] += notes


def same_problem(r, facts, ref):
    """{stage: True when keel and HiGHS held the same values before it}:
    the same U for the ranks, the same levels for the lift, the same L for
    continuity, the same kept (when continuity applies) for proximity."""
    same = dict.fromkeys(STAGES, False)
    same["peak"] = True
    if facts is None or ref is None or ref["U"] is None or facts["U"] != ref["U"]["value"]:
        return same
    same["ranks"] = True
    if ref["levels"] is None or facts["ranks"]["levels"] != ref["levels"]:
        return same
    same["lift"] = True
    if ref["L"] is None or facts["L"] != ref["L"]["value"]:
        return same
    same["continuity"] = True
    if r["stage3"] and (ref["kept"] is None or facts["cont_value"] != ref["kept"]["value"]):
        return same
    same["proximity"] = True
    return same


def _own(c):
    """Proven for the values held before it (whether or not those are)."""
    return c.get("own_proof", c["proven"])


# ------------------------------------------------------------ the report

def _ms(x):
    return max(x, 1e-3)


def fmt_s(x, limit=None):
    """Seconds for a table cell; inf (not proven) as "> limit"."""
    if x is None:
        return "–"
    if math.isinf(x):
        return "> %gs" % limit if limit else "> limit"
    if x < 0.01:
        return "%.3fs" % x
    if x < 10:
        return "%.2fs" % x
    return "%.1fs" % x


def median_inf(xs):
    """Median with unproven runs as +inf (above every proven time)."""
    if not xs:
        return None
    xs = sorted(xs)
    n = len(xs)
    if n % 2:
        return xs[n // 2]
    a, b = xs[n // 2 - 1], xs[n // 2]
    return math.inf if math.isinf(a) or math.isinf(b) else (a + b) / 2


def p95(xs):
    """Nearest-rank 95th percentile (with 10 values, the largest)."""
    xs = sorted(xs)
    return xs[max(0, math.ceil(0.95 * len(xs)) - 1)] if xs else None


def _time(c):
    """Seconds to a proven stage, inf when not proven, None when proven
    without a reported time (keel's ranks with nobody pinned)."""
    if not c["proven"]:
        return math.inf
    return c["seconds"]


def unit_size(e):
    return e["patients"] <= UNIT_SIZE_MAX


def ratios(es):
    """keel ÷ HiGHS per (roster, stage) both prove for the same values held
    before it, times below 1 ms as 1 ms."""
    out = []
    for e in es:
        for name in STAGES:
            k, h = e["stages"]["keel"][name], e["stages"]["highs"][name]
            if k["applies"] and e["stages"]["same"][name] and _own(k) and _own(h) \
                    and k["seconds"] is not None and h["seconds"] is not None:
                out.append((_ms(k["seconds"]) / _ms(h["seconds"]), e, name))
    return out


def misses(es):
    """(roster, stage, who) where HiGHS (every stage) or the plain stage-1
    models of HiGHS and CBC prove and keel does not."""
    out = []
    for e in es:
        for name in STAGES:
            k, h = e["stages"]["keel"][name], e["stages"]["highs"][name]
            if h["applies"] and h["proven"] and not k["proven"]:
                out.append((e, name, "HiGHS (every stage) in %s" % fmt_s(h["seconds"])))
            elif h["applies"] and e["stages"]["same"][name] and _own(h) and not _own(k):
                out.append((e, name, "HiGHS in %s, for the same values held before it "
                            "(not all proven)" % fmt_s(h["seconds"])))
        if not e["stages"]["keel"]["peak"]["proven"]:
            for who, label in (("highs", "HiGHS"), ("cbc", "CBC")):
                if e["proven"][who]:
                    out.append((e, "peak", "%s (plain stage-1 model) in %s"
                                % (label, fmt_s(e["results"][who].get("seconds")))))
    return out


def better_plans(es):
    """(roster, stage, HiGHS's value, keel's) where HiGHS's plan is better
    for the same values held before it."""
    out = []
    for e in es:
        for name in ("peak", "lift", "continuity", "proximity"):
            k, h = e["stages"]["keel"][name], e["stages"]["highs"][name]
            if not k["applies"] or not e["stages"]["same"][name] or k["value"] is None \
                    or h["value"] is None:
                continue
            kv, hv = k["value"], h["value"]
            if name == "peak":
                better = float(hv) < kv - 1e-9
            elif name == "lift":
                better = float(hv) > kv + 1e-9
            elif name == "continuity":
                better = hv > kv
            else:
                better = tuple(hv) < tuple(kv)
            if better:
                out.append((e, name, hv, kv))
    return out


def _value(name, v):
    if v is None:
        return "–"
    if name in ("peak", "lift"):
        return "%.4f" % float(v)
    if name == "ranks":
        return "%d pinned" % v
    if name == "proximity":
        return "%s z, %s r" % v
    return str(v)


def _short(c, name):
    if not c["applies"]:
        return "n/a"
    tag = "opt" if c["proven"] else ("opt\\*" if c.get("own_proof") else "lim")
    return "%s %s %s" % (tag, fmt_s(c["seconds"]), _value(name, c["value"]))


def section(entries, args, stage1_seconds):
    """The markdown section: the stage table, the targets, the per-roster cells."""
    es = [e for e in entries if "stages" in e]
    unit = [e for e in es if unit_size(e)]
    big = [e for e in es if not unit_size(e)]
    out = ["## Every stage side by side", ""]
    out.append("keel (one run, `--time-limit %g` for all its stages) against HiGHS on the "
               "textbook model of every stage in order (tests/reference/highs_model."
               "solve_rules, as check_rules.py runs it: %g s for each stage, a tenth of it "
               "for the stage's objective, the rest for a descent of feasibility questions; "
               "each stage holds the values HiGHS found before it). A stage counts as proven "
               "only when every stage before it is proven too; the ratios, the misses (HiGHS "
               "or, on stage 1, CBC proves and keel does not) and the better plans also take "
               "the stages keel and HiGHS solved for the same values held before them (the "
               "same U, levels, L and kept) when those are not all proven. keel's ranks "
               "stage with no nurse pinned is not reported: proven with its peak, its time "
               "not given. Continuity's times include the optimum at zero tolerance on both "
               "sides (keel's stage finds it too). CBC "
               "stays on stage 1 (the table above): a CBC chain would need every stage's "
               "model written as an LP file with its descent, and about as long again as "
               "the HiGHS chain (up to 7 × %g s a roster). Unit-size rosters (the %s); the "
               "floors are below the table."
               % (args.keel_seconds, args.ref_seconds, args.ref_seconds,
                  ", ".join(dict.fromkeys(e["kind"] for e in unit))))
    out.append("")
    out.append("| stage | rosters | keel proven | keel median | keel worst | HiGHS proven | "
               "HiGHS median | HiGHS worst | keel ÷ HiGHS median (worst, n) | HiGHS proves, "
               "keel not |")
    out.append("|" + "---|" * 10)
    for name in STAGES:
        app = [e for e in unit if e["stages"]["keel"][name]["applies"]]
        if not app:
            continue
        cells = [name, str(len(app))]
        for who, limit in (("keel", args.keel_seconds), ("highs", args.ref_seconds)):
            cs = [e["stages"][who][name] for e in app]
            ts = [_time(c) for c in cs]
            known = [t for t in ts if t is not None]
            cells.append("%d/%d" % (sum(1 for c in cs if c["proven"]), len(cs)))
            cells.append(fmt_s(median_inf(known), limit))
            cells.append(fmt_s(max(known), limit) if known else "–")
        rs = [x[0] for x in ratios(app) if x[2] == name]
        cells.append("%.2g (%.2g, %d)" % (statistics.median(rs), max(rs), len(rs))
                     if rs else "–")
        cells.append(str(sum(1 for x in misses(app) if x[1] == name)))
        out.append("| " + " | ".join(cells) + " |")
    out.append("")
    if big:
        parts = []
        for e in big:
            k = sum(1 for n in STAGES if e["stages"]["keel"][n]["applies"]
                    and e["stages"]["keel"][n]["proven"])
            h = sum(1 for n in STAGES if e["stages"]["highs"][n]["applies"]
                    and e["stages"]["highs"][n]["proven"])
            a = sum(1 for n in STAGES if e["stages"]["keel"][n]["applies"])
            parts.append("%s: keel proves %d of %d stages, HiGHS %d" % (
                os.path.basename(e["file"])[:-5], k, a, h))
        out.append("Floors (not unit-size): " + "; ".join(parts) + ".")
        out.append("")
    out += targets(unit, es, args, stage1_seconds)
    out.append("")
    out.append("<details><summary>Every stage, per roster</summary>")
    out.append("")
    out.append("Each cell: keel / HiGHS: opt (proven, every stage before it too), opt\\* "
               "(proven for the values before it, which are not all proven), lim (the "
               "limit came first), the stage's seconds and value (peak and lift "
               "utilisation, pinned nurses, kept patients, zones and rooms). HiGHS's whole "
               "chain took the last column's time.")
    out.append("")
    out.append("| roster | " + " | ".join(STAGES) + " | keel wall | HiGHS chain |")
    out.append("|" + "---|" * (len(STAGES) + 3))
    for e in es:
        row = [os.path.basename(e["file"])[:-5]]
        for name in STAGES:
            k, h = e["stages"]["keel"][name], e["stages"]["highs"][name]
            row.append("n/a" if not k["applies"] else
                       "%s / %s" % (_short(k, name), _short(h, name)))
        row.append(fmt_s(e["results"]["keel"]["wall"]))
        row.append(fmt_s(e.get("stages_highs_seconds")))
        out.append("| " + " | ".join(row) + " |")
    out.append("")
    out.append("</details>")
    return out


def targets(unit, es, args, stage1_seconds):
    """The issue's targets with the measured distance, figures only."""
    out = ["Targets (unit-size rosters: %d):" % len(unit), ""]
    every = sum(1 for e in unit if all(c["proven"] for c in e["stages"]["keel"].values()
                                       if c["applies"]))
    out.append("- Every stage proven: %d of %d rosters (target: all)." % (every, len(unit)))
    walls = [e["results"]["keel"]["wall"] for e in unit]
    if walls:
        med, top = statistics.median(walls), p95(walls)
        out.append("- keel's whole process (wall, `--time-limit %g`): median %s (target "
                   "under 0.05 s: %s), 95th percentile %s (target under 0.5 s: %s; nearest "
                   "rank, with %d rosters the %s)."
                   % (args.keel_seconds, fmt_s(med), "met" if med < 0.05 else
                      "%.0f× over" % (med / 0.05), fmt_s(top),
                      "met" if top < 0.5 else "%.0f× over" % (top / 0.5), len(walls),
                      "largest" if len(walls) <= 20 else "value at that rank"))
    rk = [e for e in unit if e["stages"]["keel"]["ranks"]["proven"]]
    out.append("- Ranks (leximax) proven: %d of %d (target: all); HiGHS proves it on %d."
               % (len(rk), len(unit), sum(1 for e in unit
                                          if e["stages"]["highs"]["ranks"]["proven"])))
    rs = ratios(unit)
    hp = sum(1 for e in unit for n in STAGES
             if e["stages"]["highs"][n]["applies"] and e["stages"]["same"][n]
             and _own(e["stages"]["highs"][n]))
    if rs:
        worst = max(rs, key=lambda x: x[0])
        out.append("- keel ÷ HiGHS over the %d (roster, stage) pairs both prove for the same "
                   "values held before it (of %d HiGHS so proves): median %.3g (target under "
                   "0.2: %s), worst %.3g on %s %s (target under 1: %s)."
                   % (len(rs), hp, statistics.median([x[0] for x in rs]),
                      "met" if statistics.median([x[0] for x in rs]) < 0.2 else "not met",
                      worst[0], os.path.basename(worst[1]["file"])[:-5], worst[2],
                      "met" if worst[0] < 1 else "not met"))
        over = [x for x in rs if x[0] >= 1]
        if over:
            out.append("  Pairs where keel is slower than HiGHS: %s."
                       % "; ".join("%s %s %.3g (keel %s, HiGHS %s)" % (
                           os.path.basename(e["file"])[:-5], n, x,
                           fmt_s(e["stages"]["keel"][n]["seconds"]),
                           fmt_s(e["stages"]["highs"][n]["seconds"]))
                           for x, e, n in sorted(over, key=lambda y: -y[0])))
    else:
        out.append("- keel ÷ HiGHS: no (roster, stage) pair proven by both.")
    ms = misses(es)
    out.append("- Where HiGHS or CBC proves a stage within its limit and keel does not "
               "(every roster, floors too): %s" % ("none." if not ms else "%d." % len(ms)))
    for e, name, who in ms:
        k = e["stages"]["keel"][name]
        out.append("  - %s, %s: %s; keel %s" % (
            os.path.basename(e["file"])[:-5], name, who,
            "proves it only under unproven values before it" if k.get("own_proof")
            else "stops at the limit (%s, value %s)" % (fmt_s(k["seconds"]),
                                                         _value(name, k["value"]))))
    bp = better_plans(es)
    out.append("- Where HiGHS's plan is better than keel's for the same values held before "
               "the stage (both at the limit, or HiGHS's proof): %s"
               % ("none." if not bp else "%d." % len(bp)))
    for e, name, hv, kv in bp:
        out.append("  - %s, %s: HiGHS %s, keel %s" % (os.path.basename(e["file"])[:-5], name,
                                                     _value(name, hv), _value(name, kv)))
    out.append("")
    out.append("keel's stage-1 share of its limit here: %.1f s; HiGHS %g s a stage."
               % (stage1_seconds, args.ref_seconds))
    return out
