#!/usr/bin/python3
# SPDX-License-Identifier: GPL-3.0-or-later
"""Benchmark of keel audit (run on demand, not by meson test).

Generates invented histories with tests/reference/gen_history.py (4 to 6
nurses a shift, explicit care minutes, 5 % of shifts with a planted break):
a year of one unit (730 shifts) and 10 000 shifts, and times

  * keel audit with the best-possible solve, --jobs 1 and --jobs 2;
  * the same with --no-best;
  * 4 shards run one after another and their merge (the merge's report
    must equal the single run's byte for byte);
  * the same shifts written as 100 files, --jobs 2 (memory: keel audits
    files a batch of rosters at a time);

each once, wall time and peak memory from /usr/bin/time.  Writes a
Markdown table to --out (default: print it).

Usage: bench_audit.py KEEL [--out tests/bench/RESULTS-audit.md] [--big 10000]
"""

import argparse
import datetime
import filecmp
import os
import subprocess
import sys
import tempfile

HERE = os.path.dirname(os.path.abspath(__file__))
GEN = os.path.join(HERE, "..", "reference", "gen_history.py")


def timed(cmd):
    """Runs cmd under /usr/bin/time; returns (seconds, peak KB)."""
    proc = subprocess.run(["/usr/bin/time", "-f", "%e %M"] + cmd, capture_output=True,
                          text=True)
    if proc.returncode not in (0, 5):
        sys.exit("failed: %s\n%s" % (" ".join(cmd), proc.stderr))
    secs, kb = proc.stderr.strip().splitlines()[-1].split()
    return float(secs), int(kb)


def main():
    ap = argparse.ArgumentParser()
    ap.add_argument("keel")
    ap.add_argument("--out")
    ap.add_argument("--big", type=int, default=10000)
    a = ap.parse_args()
    work = tempfile.mkdtemp()
    rows = []
    for n in (730, a.big):
        path = os.path.join(work, "h%d.yaml" % n)
        subprocess.run([sys.executable, GEN, "--shifts", str(n), "--seed", "7", "--vary",
                        "--plant-rate", "0.05", "--care", "--out", path], check=True)
        single = os.path.join(work, "single%d.json" % n)
        for best in (True, False):
            for jobs in (1, 2):
                out = os.path.join(work, "r%d-%d-%d.json" % (n, best, jobs))
                cmd = [a.keel, "audit", path, "--format", "json", "--jobs", str(jobs), "-o", out]
                if not best:
                    cmd.append("--no-best")
                secs, kb = timed(cmd)
                rows.append((n, "best" if best else "--no-best", "--jobs %d" % jobs, secs, kb))
                if best and jobs == 1:
                    os.rename(out, single)
        total, peak = 0.0, 0
        parts = []
        for i in range(1, 5):
            part = os.path.join(work, "p%d-%d.txt" % (n, i))
            secs, kb = timed([a.keel, "audit", path, "--shard", "%d/4" % i, "--jobs", "1",
                              "-o", part])
            total += secs
            peak = max(peak, kb)
            parts.append(part)
        merged = os.path.join(work, "m%d.json" % n)
        secs, kb = timed([a.keel, "audit", "--merge"] + parts + ["--format", "json", "-o", merged])
        same = filecmp.cmp(merged, single, shallow=False)
        rows.append((n, "best", "4 shards, one after another (sum)", total, peak))
        rows.append((n, "merge", "identical to one run: %s" % ("yes" if same else "NO"), secs, kb))
        # The same shifts in 100 files: rosters are audited a batch at a time.
        stem = os.path.join(work, "s%d" % n)
        subprocess.run([sys.executable, GEN, "--shifts", str(n), "--seed", "7", "--vary",
                        "--plant-rate", "0.05", "--care", "--out", stem + ".yaml", "--split",
                        "100"], check=True)
        files = sorted(os.path.join(work, f) for f in os.listdir(work)
                       if f.startswith("s%d-" % n))
        secs, kb = timed([a.keel, "audit"] + files + ["--format", "json", "--jobs", "2",
                                                       "-o", os.path.join(work, "f.json")])
        rows.append((n, "best", "--jobs 2, the shifts in 100 files", secs, kb))
    rev = subprocess.run(["git", "-C", HERE, "rev-parse", "--short", "HEAD"],
                         capture_output=True, text=True).stdout.strip()
    lines = ["<!-- SPDX-License-Identifier: GPL-3.0-or-later -->",
             "## keel audit: shifts per second",
             "",
             "Measured %s on this machine (%d cores shared with other work), source tree at "
             "commit %s, with `tests/bench/bench_audit.py`. Histories are invented "
             "(tests/reference/gen_history.py: 4 to 6 nurses and 8 to 18 patients a shift)."
             % (datetime.datetime.now().strftime("%Y-%m-%d %H:%M"), os.cpu_count(), rev),
             "",
             "| shifts | solve | run | wall | peak memory |",
             "|---|---|---|---|---|"]
    for n, kind, run, secs, kb in rows:
        lines.append("| %d | %s | %s | %.2f s | %.1f MB |" % (n, kind, run, secs, kb / 1024))
    text = "\n".join(lines) + "\n"
    if a.out:
        with open(a.out, "w") as f:
            f.write(text)
    print(text)


if __name__ == "__main__":
    main()
