#!/usr/bin/python3
"""Outside reader of a `thermargin budget --report` page, held against the JSON output.

Usage: report_check.py REPORT.html BUDGET.json [PLOTS_DIR]

Reads the page with Python's html.parser (every element closed in order, no
script, no external reference), cuts out each <svg> element and parses it
with xml.etree, then compares every plotted series with the numbers of
`thermargin budget --format json` run on the same scenario:

  error-bands   nominal, the wc / rss / mc bands (wc_low..wc_high, ...), the
                limit lines at +-limit, the window strip, and hatched strips
                exactly over the temperatures that cannot be read
  contributors  each main row's share 100 * variance / u_c^2 (%), the
                row's variance from the JSON's "variances" (contribution^2
                plus the row's second-order terms; a pair row "a x b" has
                only those),
                sources ranked as in window.contributors, "others" the rest
  sensitivity   |sensitivity|
  lsb-size      lsb_in_k
  self-heating  self_heating
  settling      acquisition_error (only when the JSON has "settling": the
                ADC's sampling capacitor is modelled)

A value is expected exactly where the JSON has the number and nowhere else,
so a saturated point must be a gap (never a zero), and the number of runs
between gaps must match. The verdict banner, the caution (before the first
chart), the yield and the contributor ranking are read from the page text;
the chain's schematic (an <svg class="schematic">, not a chart) must be there
once and well formed.
With PLOTS_DIR, each standalone SVG file must hold the same series as the
page's chart of the same title. Prints "ok: N charts" or fails with the
first difference. Nothing of thermargin is used. Run with Debian's
interpreter (/usr/bin/python3).
"""
import json
import math
import os
import sys
import xml.etree.ElementTree as ET
from html.parser import HTMLParser

SVG = "{http://www.w3.org/2000/svg}"
REL_TOL = 2e-8   # the page writes %.9g; JSON holds full doubles
ABS_TOL = 1e-12
VOID = {"area", "base", "br", "col", "embed", "hr", "img", "input", "link", "meta", "source", "track", "wbr"}
EXPECTED_FILES = ["error-bands.svg", "contributors.svg", "sensitivity.svg", "lsb-size.svg", "self-heating.svg"]


def fail(message):
    print("FAIL: " + message)
    sys.exit(1)


class Page(HTMLParser):
    """Checks nesting and collects text, verdict classes, tables and figures."""

    def __init__(self):
        super().__init__(convert_charrefs=True)
        self.stack = []
        self.text = []
        self.classes = []
        self.figures = 0
        self.first_figure_at = None
        self.caution_at = None
        self.tables = []      # each: list of rows, each a list of cell texts
        self._cell = None
        self.scripts = 0
        self.h1 = ""

    def handle_starttag(self, tag, attrs):
        a = dict(attrs)
        for name in ("src", "href", "xlink:href"):
            if name in a:
                fail("external reference %s=%r on <%s>" % (name, a[name], tag))
        if tag == "script":
            self.scripts += 1
        if tag == "figure" and (a.get("class") or "") == "chart":
            self.figures += 1
            if self.first_figure_at is None:
                self.first_figure_at = len("".join(self.text))
        cls = a.get("class") or ""
        self.classes.append(cls)
        if "caution" in cls.split() and self.caution_at is None:
            self.caution_at = len("".join(self.text))
        if tag == "table":
            self.tables.append([])
        if tag == "tr" and self.tables:
            self.tables[-1].append([])
        if tag in ("td", "th"):
            self._cell = []
        if tag not in VOID:
            self.stack.append(tag)

    def handle_startendtag(self, tag, attrs):
        self.handle_starttag(tag, attrs)
        if tag not in VOID:
            self.stack.pop()

    def handle_endtag(self, tag):
        if tag in VOID:
            return
        if not self.stack or self.stack[-1] != tag:
            fail("</%s> closes <%s>" % (tag, self.stack[-1] if self.stack else "nothing"))
        self.stack.pop()
        if tag in ("td", "th") and self._cell is not None and self.tables and self.tables[-1]:
            self.tables[-1][-1].append("".join(self._cell).strip())
            self._cell = None

    def handle_data(self, data):
        self.text.append(data)
        if self._cell is not None:
            self._cell.append(data)
        if self.stack and self.stack[-1] == "h1":
            self.h1 += data


def floats(text):
    return [float(v) for v in text.split()] if text else []


def close(a, b):
    return math.isclose(a, b, rel_tol=REL_TOL, abs_tol=ABS_TOL)


def same_list(name, got, want):
    if len(got) != len(want):
        fail("%s: %d values plotted, %d expected" % (name, len(got), len(want)))
    for i, (g, w) in enumerate(zip(got, want)):
        if not close(g, w):
            fail("%s[%d]: plotted %r, expected %r" % (name, i, g, w))


def runs(flags):
    n, inside = 0, False
    for f in flags:
        if f and not inside:
            n += 1
        inside = f
    return n


def series_map(svg):
    return {g.get("data-name"): g for g in svg.iter(SVG + "g") if g.get("class") == "series"}


def check_line(series, name, points, value):
    """value(point) -> number or None; checks x, y and the runs between gaps."""
    g = series.get(name)
    if g is None:
        fail("series %s is missing" % name)
    wanted = [(p["t"], value(p)) for p in points]
    xs = [t for t, v in wanted if v is not None]
    ys = [v for t, v in wanted if v is not None]
    same_list(name + ".x", floats(g.get("data-x")), xs)
    same_list(name + ".y", floats(g.get("data-y")), ys)
    want_runs = runs([v is not None for t, v in wanted])
    if int(g.get("data-runs")) != want_runs:
        fail("%s: %s runs drawn, %d expected" % (name, g.get("data-runs"), want_runs))
    if len(g.findall(SVG + "path[@class='segment']")) != want_runs:
        fail("%s: one path per run expected" % name)


def check_band(series, name, points, low_key, high_key, usable):
    g = series.get(name)
    if g is None:
        fail("band %s is missing" % name)
    ok = [usable(p) and low_key in p for p in points]
    same_list(name + ".x", floats(g.get("data-x")), [p["t"] for p, f in zip(points, ok) if f])
    same_list(name + ".low", floats(g.get("data-low")), [p[low_key] for p, f in zip(points, ok) if f])
    same_list(name + ".high", floats(g.get("data-high")), [p[high_key] for p, f in zip(points, ok) if f])
    if int(g.get("data-runs")) != runs(ok):
        fail("%s: %s runs drawn, %d expected" % (name, g.get("data-runs"), runs(ok)))


def readable(p):
    return "nominal" in p


def check_error_chart(svg, j):
    s = series_map(svg)
    pts, w = j["points"], j["window"]
    check_line(s, "nominal", pts, lambda p: p.get("nominal"))
    check_band(s, "wc", pts, "wc_low", "wc_high", lambda p: "wc_failed_corners" not in p)
    check_band(s, "rss", pts, "rss_low", "rss_high", lambda p: True)
    if "yield" in w:
        check_band(s, "mc", pts, "mc_low", "mc_high", lambda p: True)
    elif "mc" in s:
        fail("an mc band without Monte Carlo in the JSON")
    same_list("limit", sorted(floats(s["limit"].get("data-y"))), [-w["limit"], w["limit"]])
    same_list("window", [float(s["window"].get("data-x0")), float(s["window"].get("data-x1"))], [w["min"], w["max"]])
    strips = [(float(g.get("data-x0")), float(g.get("data-x1"))) for n, g in s.items() if n.startswith("unreadable_")]
    for p in pts:
        bad = not readable(p) or "wc_failed_corners" in p or "rss_low" not in p
        inside = any(a <= p["t"] <= b for a, b in strips)
        if bad != inside:
            fail("t = %g: %s but %s a hatched strip" % (p["t"], "cannot be read" if bad else "readable",
                                                         "inside" if inside else "outside"))


def check_contributor_chart(svg, j):
    s = series_map(svg)
    ranked = [c["source"] for c in j["window"]["contributors"] if c["share"] > 0]
    lines = [n for n, g in s.items() if g.get("data-kind") == "line"]
    main = [n for n in lines if n != "others"]
    if main != ranked[:len(main)] or not main:
        fail("contributor curves %s are not the top of the window ranking %s" % (main, ranked))
    if len(main) < min(len(ranked), 5):
        fail("only %d of the main sources drawn" % len(main))

    def share(p, name):
        if "variances" not in p or not p["u_c"] > 0:
            return None
        return 100.0 * p["variances"].get(name, 0.0) / p["u_c"] ** 2

    for name in main:
        check_line(s, name, j["points"], lambda p, n=name: share(p, n))
    if len(ranked) > len(main):
        def rest(p):
            if share(p, main[0]) is None:
                return None
            return max(0.0, 100.0 - sum(share(p, n) for n in main))
        g = s.get("others")
        if g is None:
            fail("the remaining sources have no curve")
        ys = floats(g.get("data-y"))
        want = [v for v in (rest(p) for p in j["points"]) if v is not None]
        if len(ys) != len(want) or any(abs(a - b) > 1e-6 for a, b in zip(ys, want)):
            fail("others: plotted %r, expected %r" % (ys[:5], want[:5]))


def check_sensitivity_chart(svg, j):
    check_line(series_map(svg), "abs_sensitivity", j["points"],
               lambda p: abs(p["sensitivity"]) if "sensitivity" in p and p["sensitivity"] != 0 else None)


def check_lsb_chart(svg, j):
    check_line(series_map(svg), "lsb_in_k", j["points"], lambda p: p.get("lsb_in_k"))


def check_self_heating_chart(svg, j):
    check_line(series_map(svg), "self_heating", j["points"], lambda p: p.get("self_heating"))


def check_settling_chart(svg, j):
    check_line(series_map(svg), "acquisition_error", j["points"], lambda p: p.get("acquisition_error"))


CHECKS = [check_error_chart, check_contributor_chart, check_sensitivity_chart, check_lsb_chart,
          check_self_heating_chart]


def svg_elements(html):
    out, at = [], 0
    while True:
        start = html.find("<svg", at)
        if start < 0:
            return out
        end = html.find("</svg>", start)
        if end < 0:
            fail("an <svg> element is not closed")
        out.append(ET.fromstring(html[start:end + len("</svg>")]))
        at = end


def data_of(svg):
    """Every series' data-* attributes, for comparing two renderings."""
    return {n: {k: v for k, v in g.attrib.items() if k.startswith("data-")} for n, g in series_map(svg).items()}


def pct3(x):
    return "%.3f %%" % (100 * x)


def parse_page(html_path):
    """The page's source and its Page, every element closed and no script."""
    html = open(html_path, encoding="utf-8").read()
    page = Page()
    page.feed(html)
    page.close()
    if page.stack:
        fail("unclosed elements at the end: %s" % page.stack)
    if page.scripts:
        fail("the page has a script")
    return html, page


def main():
    html_path, json_path = sys.argv[1], sys.argv[2]
    html, page = parse_page(html_path)
    j = json.load(open(json_path, encoding="utf-8"))
    text = "".join(page.text)

    if page.h1.strip() != "Design review: " + j["title"]:
        fail("heading %r does not carry the title %r" % (page.h1, j["title"]))
    verdict = [c for c in page.classes if c.startswith("verdict ")]
    if verdict != ["verdict " + j["window"]["verdict"]]:
        fail("verdict banner %s, JSON says %s" % (verdict, j["window"]["verdict"]))
    if j["caution"] not in text:
        fail("the caution is missing")
    if page.caution_at is None or page.first_figure_at is None or page.caution_at > page.first_figure_at:
        fail("the caution does not come before the first chart")

    # The schematic of the chain (a drawing, not a chart): well formed, and once.
    drawings = [e for e in svg_elements(html) if e.get("class") == "schematic"]
    if len(drawings) != 1:
        fail("%d schematics of the chain, expected 1" % len(drawings))
    svgs = [e for e in svg_elements(html) if e.get("class") != "schematic"]
    checks = CHECKS + ([check_settling_chart] if "settling" in j else [])
    if len(svgs) != len(checks) or page.figures != len(checks):
        fail("%d charts in %d figures, expected %d" % (len(svgs), page.figures, len(checks)))
    for svg, check in zip(svgs, checks):
        check(svg, j)

    w = j["window"]
    if "yield" in w:
        for v in (w["yield"], w["yield_low"], w["yield_high"]):
            if pct3(v).replace("-", "\u2212") not in text:
                fail("yield figure %s is not on the page" % pct3(v))
    rank = [t for t in page.tables if t and t[0][:3] == ["#", "Source", "Share of variance"]]
    if len(rank) != 1:
        fail("no contributor ranking table")
    rows = rank[0][1:]
    listed = [c for c in w["contributors"] if c["share"] > 0 or c["half_width"] > 0]
    if len(rows) != len(listed):
        fail("ranking has %d rows, JSON %d sources" % (len(rows), len(listed)))
    for row, c in zip(rows, listed):
        if not row[1].endswith("(" + c["source"] + ")") or row[2] != "%.1f %%" % (100 * c["share"]):
            fail("ranking row %r does not match %r" % (row, c))

    if len(sys.argv) > 3:
        plots = sys.argv[3]
        names = sorted(n for n in os.listdir(plots))
        expected = EXPECTED_FILES + (["settling.svg"] if "settling" in j else [])
        if names != sorted(expected):
            fail("plots directory holds %s" % names)
        for name, inline in zip(expected, svgs):
            root = ET.parse(os.path.join(plots, name)).getroot()
            if root.tag != SVG + "svg":
                fail(name + " is not an SVG document")
            if root.findtext(SVG + "title") != inline.findtext(SVG + "title") or data_of(root) != data_of(inline):
                fail(name + " differs from the page's chart")
    print("ok: %d charts" % len(svgs))


if __name__ == "__main__":
    main()
