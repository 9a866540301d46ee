#!/usr/bin/python3
"""Outside reader of the pick and grades report pages, held against the JSON output.

Usage: report_choice_check.py pick REPORT.html PICK.json LIMIT_K [PLOTS_DIR]
       report_choice_check.py grades REPORT.html GRADES.json [PLOTS_DIR]

The page is read as report_check.py reads a budget page (html.parser for
nesting, no script and no external reference, the caution before the first
chart; xml.etree for each <svg>), then its one chart is compared with the
JSON output of `thermargin pick` / `thermargin grades --format json`:

  pick    feasible / rejected points: (r_fixed, objective) of the rows with
          and without violations, in ranking order (rows whose window cannot
          be read have no objective and no point); the objective curve
          through every row sorted by value, with a gap, never a zero, where
          the objective is null; the winner ringed at its value; every row
          with a violation inside a hatched strip and no other row inside
          one (single-resistor searches); the limit line at LIMIT_K (the
          scenario's max_error, which the pick JSON does not carry); the
          ranking table's "Ruled out by" column. The value axis is read as
          a log axis: every drawn point's horizontal pixel and every tick's
          lie on one straight line against log10 of the value (equal ratios
          at equal distances), with a tick at each decade in the range.
  grades  meets / misses points: (unit_cost, error) by meets_requirement, in
          row order; the front line through the "front" rows in order; the
          recommendation ringed; the limit line at requirement.max_error;
          the banner PASS exactly when there is a recommendation; one table
          row per combination with its grades and its F/M/R flags.

With PLOTS_DIR, the standalone SVG file must hold the same series. Prints
"ok: 1 chart" or fails with the first difference. Nothing of thermargin is
used. Run with Debian's interpreter (/usr/bin/python3).
"""
import json
import math
import os
import re
import sys
import xml.etree.ElementTree as ET

sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))
from report_check import (SVG, data_of, fail, floats, parse_page, runs,  # noqa: E402
                          same_list, series_map, svg_elements)


def read_page(html_path, heading):
    html, page = parse_page(html_path)
    if page.h1.strip() != heading:
        fail("heading %r, expected %r" % (page.h1, heading))
    if page.caution_at is None or page.first_figure_at is None or page.caution_at > page.first_figure_at:
        fail("the caution does not come before the first chart")
    svgs = svg_elements(html)
    if len(svgs) != 1 or page.figures != 1:
        fail("%d charts in %d figures, expected 1" % (len(svgs), page.figures))
    return page, svgs[0]


def points_of(s, name):
    g = s.get(name)
    if g is None:
        fail("series %s is missing" % name)
    return floats(g.get("data-x")), floats(g.get("data-y"))


def check_points(s, name, pairs):
    x, y = points_of(s, name)
    same_list(name + ".x", x, [a for a, b in pairs])
    same_list(name + ".y", y, [b for a, b in pairs])


def check_annotation(s, name, at):
    g = s.get(name)
    if at is None:
        if g is not None and g.get("data-x"):
            fail("%s is marked but the JSON has none" % name)
        return
    if g is None:
        fail("%s is not marked" % name)
    same_list(name, [float(g.get("data-x")), float(g.get("data-y"))], list(at))


PIXEL_SLACK = 0.011   # pixels are written with two decimals


def check_log_x(svg):
    """The x axis of the chart is log10: pixel = a + b * log10(value) for every
    point marker and every x tick, the decades in range among the ticks."""
    marks = [(float(e.get("data-x")), float(e.get("cx"))) for e in svg.iter()
             if e.get("class") == "point" and e.get("cx") is not None]
    ticks = []
    for e in svg.iter(SVG + "path"):
        if e.get("class") != "tick":
            continue
        m = re.fullmatch(r"M([-\d.]+),([-\d.]+)L([-\d.]+),([-\d.]+)", e.get("d"))
        if m and m.group(1) == m.group(3):   # vertical: a tick on the x axis
            ticks.append((float(e.get("data-value")), float(m.group(1))))
    # The line through the two farthest-apart values, so that no pixel is
    # extrapolated from it (each pixel is rounded to 0.01).
    lo, hi = min(marks + ticks, default=None), max(marks + ticks, default=None)
    if lo is None or hi[0] == lo[0]:
        return   # one value or none: nothing to read an axis from
    b = (hi[1] - lo[1]) / (math.log10(hi[0]) - math.log10(lo[0]))
    a = lo[1] - b * math.log10(lo[0])
    for value, pixel in marks + ticks:
        if abs(a + b * math.log10(value) - pixel) > 2 * PIXEL_SLACK:
            fail("x axis is not log10: %g ohm at pixel %g, expected %g" % (value, pixel, a + b * math.log10(value)))
    values = [v for v, _ in ticks]
    for e in range(math.ceil(math.log10(min(values))), math.floor(math.log10(max(values))) + 1):
        if not any(math.isclose(v, 10.0 ** e, rel_tol=1e-9) for v in values):
            fail("no tick at the decade %g" % 10.0 ** e)


def table_with(page, first_header):
    for t in page.tables:
        if t and t[0][:len(first_header)] == first_header:
            return t[1:]
    fail("no table starting with %s" % first_header)


def check_pick(page, svg, j, limit):
    s = series_map(svg)
    rows = j["rows"]
    check_points(s, "feasible", [(r["r_fixed"], r["objective"]) for r in rows
                                 if r["objective"] is not None and not r["violations"]])
    check_points(s, "rejected", [(r["r_fixed"], r["objective"]) for r in rows
                                 if r["objective"] is not None and r["violations"]])
    w = j["winner"]
    check_annotation(s, "winner", None if w["objective"] is None else (w["r_fixed"], w["objective"]))
    if j["objective"] != "sensitivity":
        same_list("limit", floats(s["limit"].get("data-y")), [limit])
    if not j["candidates"]["pair_search"]:
        by_value = sorted(rows, key=lambda r: r["r_fixed"])
        g = s.get("objective")
        if g is None:
            fail("the objective curve is missing")
        same_list("objective.x", floats(g.get("data-x")),
                  [r["r_fixed"] for r in by_value if r["objective"] is not None])
        same_list("objective.y", floats(g.get("data-y")),
                  [r["objective"] for r in by_value if r["objective"] is not None])
        if int(g.get("data-runs")) != runs([r["objective"] is not None for r in by_value]):
            fail("objective: %s runs drawn" % g.get("data-runs"))
        check_log_x(svg)
        strips = [(float(v.get("data-x0")), float(v.get("data-x1"))) for n, v in s.items()
                  if n.startswith("excluded_")]
        for r in rows:
            inside = any(a <= r["r_fixed"] <= b for a, b in strips)
            if bool(r["violations"]) != inside:
                fail("%g ohm: violations %s but %s a hatched strip" % (r["r_fixed"], r["violations"],
                                                                        "inside" if inside else "outside"))
    table = table_with(page, ["#", "R fixed"])
    if len(table) != len(rows):
        fail("ranking table has %d rows, JSON %d" % (len(table), len(rows)))
    for t, r in zip(table, rows):
        if t[-1] != ", ".join(r["violations"]):
            fail("row %s: ruled out by %r, JSON %r" % (t[0], t[-1], r["violations"]))


def check_grades(page, svg, j):
    s = series_map(svg)
    rows = j["rows"]
    check_points(s, "meets", [(r["unit_cost"], r["error"]) for r in rows
                              if r["error"] is not None and r["meets_requirement"]])
    check_points(s, "misses", [(r["unit_cost"], r["error"]) for r in rows
                               if r["error"] is not None and not r["meets_requirement"]])
    front = [rows[i] for i in j["front"] if rows[i]["error"] is not None]
    check_points(s, "front", [(r["unit_cost"], r["error"]) for r in front])
    if any(not r["on_front"] for r in front):
        fail("a row on the drawn front is not on_front in the JSON")
    rec = j["recommendation"]
    check_annotation(s, "recommended", None if rec is None or rec["error"] is None else (rec["unit_cost"], rec["error"]))
    same_list("limit", floats(s["limit"].get("data-y")), [j["requirement"]["max_error"]])
    verdict = [c for c in page.classes if c.startswith("verdict ")]
    if verdict != ["verdict " + ("pass" if rec is not None else "fail")]:
        fail("banner %s, recommendation %s" % (verdict, rec))
    table = table_with(page, ["#"] + list(rows[0]["choice"].keys()))
    if len(table) != j["combinations"] or len(table) != len(rows):
        fail("table has %d rows, JSON %d combinations" % (len(table), j["combinations"]))
    rec_choice = rec["choice"] if rec else None
    for t, r in zip(table, rows):
        flags = ("F" if r["on_front"] else "") + ("M" if r["meets_requirement"] else "") + \
                ("R" if r["choice"] == rec_choice else "")
        grades = t[1:1 + len(r["choice"])]
        if grades != list(r["choice"].values()) or t[-1] != flags:
            fail("table row %s does not match %s" % (t, r))


def main():
    kind = sys.argv[1]
    if kind == "pick":
        html, js, limit = sys.argv[2], sys.argv[3], float(sys.argv[4])
        plots, expected = (sys.argv[5] if len(sys.argv) > 5 else None), "pick-candidates.svg"
        j = json.load(open(js, encoding="utf-8"))
        page, svg = read_page(html, "Resistor pick: " + j["title"])
        check_pick(page, svg, j, limit)
    elif kind == "grades":
        html, js = sys.argv[2], sys.argv[3]
        plots, expected = (sys.argv[4] if len(sys.argv) > 4 else None), "grades-front.svg"
        j = json.load(open(js, encoding="utf-8"))
        page, svg = read_page(html, "Part grades: " + j["title"])
        check_grades(page, svg, j)
    else:
        fail("unknown report kind " + kind)
    if j["caution"] not in "".join(page.text):
        fail("the caution is missing")
    if plots:
        if sorted(os.listdir(plots)) != [expected]:
            fail("plots directory holds %s" % sorted(os.listdir(plots)))
        root = ET.parse(os.path.join(plots, expected)).getroot()
        if root.tag != SVG + "svg" or data_of(root) != data_of(svg):
            fail(expected + " differs from the page's chart")
    print("ok: 1 chart")


if __name__ == "__main__":
    main()
