#!/usr/bin/python3
# SPDX-License-Identifier: GPL-3.0-or-later
"""The posted sheet (keel assign/check --format html) in a real browser.

Checks, on each roster given, as a TAP stream:
  * the file is well-formed: parsed with Python's html.parser, every
    element that is opened is closed in order (void elements aside), and
    nothing outside the file is loaded (no src=, href= to another file, no
    <script>);
    Source: HTML Living Standard, section 13.1.2 "Elements" (void elements),
    WHATWG, 2024 (from memory);
  * it carries the caution, and the ratio table's citation when the roster
    names one;
  * no patient's name is on it unless --names asks (names from the roster,
    read here with PyYAML);
  * headless Chromium (Debian's chromium) prints it to PDF in one page, its
    print stylesheet fitting the unit on one landscape page (the PDF's page
    objects counted);
  * a PNG screenshot is not blank (Pillow, Debian's python3-pil: more than
    one colour, and dark pixels where the text is);
  * the rendered DOM (chromium --dump-dom) holds one SVG bar per nurse who
    takes patients, as keel's json counts them.

Also the rebalance's page (rebalance:ROSTER: one printed page, a bar per
option of the frontier) and the audit's document (audit:HISTORY: a bar per
nurse, hatched exactly for those who stand out).

Usage: check_html.py KEEL ROSTER... [rebalance:ROSTER] [audit:HISTORY]
A TAP skip ("1..0 # SKIP") when chromium or Pillow is missing.
"""

import html.parser
import json
import os
import re
import shutil
import subprocess
import sys
import tempfile

try:
    import yaml
    from PIL import Image
except ImportError:
    print("1..0 # SKIP python3-yaml or python3-pil missing")
    sys.exit(0)

CHROMIUM = shutil.which("chromium") or shutil.which("chromium-browser")
if not CHROMIUM:
    print("1..0 # SKIP chromium missing (apt-get install chromium)")
    sys.exit(0)

VOID = {"area", "base", "br", "col", "embed", "hr", "img", "input", "link", "meta", "source",
        "track", "wbr"}
# SVG elements written self-closed (<rect .../>): html.parser reports them
# as start-end tags.
CAUTION = ("Decision support only: the charge nurse's judgement, facility policy and the "
           "staffing law that applies locally govern every assignment.")

n = 0
failed = 0


def ok(cond, what):
    global n, failed
    n += 1
    print(("ok %d - %s" if cond else "not ok %d - %s") % (n, what))
    if not cond:
        failed += 1


class Checker(html.parser.HTMLParser):
    def __init__(self):
        super().__init__(convert_charrefs=True)
        self.stack, self.problems, self.text, self.external = [], [], [], []

    def handle_starttag(self, tag, attrs):
        if tag == "script":
            self.external.append("a script")
        for name, value in attrs:
            if name in ("src", "href") and value and not value.startswith("#"):
                self.external.append("%s=%s" % (name, value))
        if tag not in VOID:
            self.stack.append(tag)

    def handle_startendtag(self, tag, attrs):
        self.handle_starttag(tag, attrs)
        if tag not in VOID:
            self.stack.pop()

    def handle_endtag(self, tag):
        if not self.stack or self.stack[-1] != tag:
            self.problems.append("</%s> closes %s" % (tag, self.stack[-1] if self.stack else
                                                      "nothing"))
            return
        self.stack.pop()

    def handle_data(self, data):
        self.text.append(data)


def chromium(*args, timeout=120):
    return subprocess.run([CHROMIUM, "--headless", "--no-sandbox", "--disable-gpu",
                           "--no-first-run", "--disable-dev-shm-usage"] + list(args),
                          capture_output=True, timeout=timeout)


def pdf_pages(path):
    data = open(path, "rb").read()
    return len(re.findall(rb"/Type\s*/Page(?![s\w])", data))


def not_blank(path):
    img = Image.open(path).convert("L")
    lo, hi = img.getextrema()
    dark = sum(1 for v in img.getdata() if v < 100)
    return hi - lo > 100 and dark > 500


def counted_nurses(keel, roster, command):
    extra = ["--best-effort"] if command == "assign" else []
    out = subprocess.run([keel, command, roster, "--format", "json", "--time-limit", "2"] + extra,
                         capture_output=True, text=True, timeout=300).stdout
    d = json.loads(out)
    return sum(1 for x in d["nurses"] if x.get("counted")), d


def check(keel, roster, work, command, names):
    name = "%s %s%s" % (os.path.basename(roster), command, " --names" if names else "")
    page = os.path.join(work, "sheet.html")
    args = [command, roster, "--format", "html", "-o", page, "--time-limit", "2"]
    if command == "assign":
        args.append("--best-effort")
    if names:
        args.append("--names")
    run = subprocess.run([keel] + args, capture_output=True, text=True, timeout=300)
    ok(os.path.exists(page), "%s: keel writes the sheet (exit %d)" % (name, run.returncode))
    if not os.path.exists(page):
        return
    text = open(page, encoding="utf-8").read()
    p = Checker()
    p.feed(text)
    p.close()
    ok(not p.problems and not p.stack,
       "%s: well-formed (%s)" % (name, "; ".join(p.problems[:3]) or
                                 ("unclosed " + ", ".join(p.stack) if p.stack else "ok")))
    ok(not p.external, "%s: self-contained (%s)" % (name, ", ".join(p.external) or "nothing else"))
    words = " ".join(" ".join(p.text).split())
    ok(CAUTION in words, "%s: carries the caution" % name)
    doc = yaml.safe_load(open(roster, encoding="utf-8"))
    if (doc.get("policy") or {}).get("ratio_table"):
        ok("Ratio table:" in words, "%s: cites the ratio table" % name)
    patient_names = [x["name"] for x in doc.get("patients") or [] if x.get("name")]
    shown = [x for x in patient_names if x in words]
    if names:
        ok(not patient_names or shown, "%s: names the patients when asked" % name)
    else:
        ok(not shown, "%s: no patient's name on the sheet (%s)" % (name, ", ".join(shown[:3])))
    if names:
        return
    pdf = os.path.join(work, "sheet.pdf")
    png = os.path.join(work, "sheet.png")
    for f in (pdf, png):
        if os.path.exists(f):
            os.remove(f)
    url = "file://" + page
    chromium("--print-to-pdf=" + pdf, "--no-pdf-header-footer", url)
    ok(os.path.exists(pdf) and pdf_pages(pdf) == 1,
       "%s: prints on one page (%s)" % (name, pdf_pages(pdf) if os.path.exists(pdf) else
                                        "no PDF"))
    chromium("--screenshot=" + png, "--window-size=1400,1000", url)
    ok(os.path.exists(png) and not_blank(png), "%s: the screenshot is not blank" % name)
    dom = chromium("--dump-dom", url).stdout.decode("utf-8", "replace")
    bars = len(re.findall(r'<rect class="bar', dom))
    want, d = counted_nurses(keel, roster, command)
    plan = d.get("status") != "infeasible" or d.get("best_effort")
    if command == "check":
        plan = bool(d.get("plan"))
    ok(bars == (want if plan else 0),
       "%s: %d bars in the rendered chart for %d nurses who take patients" % (name, bars, want))


def page_checks(name, page, work, one_page):
    """Well-formed, self-contained, the caution, one printed page when asked,
    not blank; returns the rendered DOM."""
    text = open(page, encoding="utf-8").read()
    p = Checker()
    p.feed(text)
    p.close()
    ok(not p.problems and not p.stack, "%s: well-formed" % name)
    ok(not p.external, "%s: self-contained" % name)
    ok(CAUTION in " ".join(" ".join(p.text).split()), "%s: carries the caution" % name)
    url = "file://" + page
    pdf = os.path.join(work, "page.pdf")
    png = os.path.join(work, "page.png")
    for f in (pdf, png):
        if os.path.exists(f):
            os.remove(f)
    if one_page:
        chromium("--print-to-pdf=" + pdf, "--no-pdf-header-footer", url)
        ok(os.path.exists(pdf) and pdf_pages(pdf) == 1, "%s: prints on one page" % name)
    chromium("--screenshot=" + png, "--window-size=1400,1000", url)
    ok(os.path.exists(png) and not_blank(png), "%s: the screenshot is not blank" % name)
    return chromium("--dump-dom", url).stdout.decode("utf-8", "replace")


def render(keel, command, path, work, name, printable, timeout):
    """keel COMMAND PATH as html in Chromium (page_checks) and as json:
    (the page's DOM, the json), or None when keel wrote no page."""
    page = os.path.join(work, command + ".html")
    subprocess.run([keel, command, path, "--format", "html", "-o", page], timeout=timeout,
                   capture_output=True)
    ok(os.path.exists(page), "%s: keel writes the page" % name)
    if not os.path.exists(page):
        return None
    dom = page_checks(name, page, work, printable)
    d = json.loads(subprocess.run([keel, command, path, "--format", "json"],
                                  capture_output=True, text=True, timeout=timeout).stdout)
    return dom, d


def check_rebalance(keel, roster, work):
    """The rebalance's page: the frontier as a chart, a bar per option."""
    name = os.path.basename(roster) + " rebalance"
    got = render(keel, "rebalance", roster, work, name, True, 300)
    if got is None:
        return
    dom, d = got
    bars = len(re.findall(r'<rect class="bar', dom))
    ok(bars == len(d["options"]), "%s: %d bars for %d options of the frontier"
       % (name, bars, len(d["options"])))


def check_audit(keel, history, work):
    """The audit's document: a bar per nurse against chance."""
    name = os.path.basename(history) + " audit"
    got = render(keel, "audit", history, work, name, False, 600)
    if got is None:
        return
    dom, d = got
    bars = len(re.findall(r'<rect class="bar', dom))
    ok(bars == len(d["nurses"]), "%s: %d bars for %d nurses" % (name, bars, len(d["nurses"])))
    marked = len(re.findall(r'<rect class="bar overload"', dom))
    ok(marked == sum(1 for x in d["nurses"] if x["measures"]["heaviest"]["stands_out"]),
       "%s: the nurses who stand out, and only they, are hatched (%d)" % (name, marked))


def main():
    keel, args = os.path.abspath(sys.argv[1]), sys.argv[2:]
    with tempfile.TemporaryDirectory() as work:
        for arg in args:
            kind, _, path = arg.rpartition(":") if arg.startswith(("rebalance:", "audit:")) \
                else ("", "", arg)
            roster = os.path.abspath(path)
            if kind == "rebalance":
                check_rebalance(keel, roster, work)
                continue
            if kind == "audit":
                check_audit(keel, roster, work)
                continue
            check(keel, roster, work, "assign", False)
            check(keel, roster, work, "assign", True)
            check(keel, roster, work, "check", False)
    print("1..%d" % n)
    return 1 if failed else 0


if __name__ == "__main__":
    sys.exit(main())
