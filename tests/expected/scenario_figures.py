#!/usr/bin/python3
"""The key figures of one scenario's `thermargin check` and `thermargin budget`, and their comparison
with the stored expectation (tests/expected/<scenario>.json).

Usage:
  scenario_figures.py THERMARGIN SCENARIO.ini --write EXPECTED.json   (scripts/regen_expectations.sh)
  scenario_figures.py THERMARGIN SCENARIO.ini EXPECTED.json           (ctest -R scenario)

These are regression expectations, not outside checks: they hold each shipped
scenario's verdict and key figures to what was reviewed when they were
regenerated (the diff of tests/expected/ is part of the commit that changes
them). The outside checks of the same figures are the second opinions
(docs/checks.md). Compares words exactly, counts exactly, and numbers to
1e-9 K (deterministic engines) or 1e-6 (Monte Carlo figures, whose
histogram interpolation may round differently on another vector unit).
Prints "ok: <n> figures" or one line per difference, exit status 1.

The check also reads the budget's default text (issue 18: one screen a
reviewer reads first): at most SCREEN_WIDTH columns and about 50 lines,
SCREEN_LINES at the most, with END_OF_LIFE_LINES more for the table of a
design over its life. A short Monte Carlo run is enough: the screen's shape
does not depend on the number of units.
"""
import json
import subprocess
import sys

WINDOW_WORDS = ["verdict", "basis", "dominant", "wc_method"]
WINDOW_COUNTS = ["active_inputs", "wc_corners", "status_points", "mc_units"]
WINDOW_EXACT = ["wc_max_abs", "wc_max_at", "rss_max_abs", "rss_max_at", "worst_abs_error", "worst_at", "margin", "limit"]
WINDOW_MC = ["mc_max_abs", "yield", "yield_low", "yield_high"]
DETERMINISTIC, MONTE_CARLO = 1e-9, 1e-6
SCREEN_WIDTH, SCREEN_LINES, END_OF_LIFE_LINES = 100, 60, 8


def screen_problems(program, scenario):
    out = subprocess.run([program, "budget", scenario, "--montecarlo.units=2000"], capture_output=True, text=True)
    if out.returncode != 0:
        return [f"thermargin budget {scenario} (text) exited with {out.returncode}: {out.stderr}"]
    lines = out.stdout.splitlines()
    most = SCREEN_LINES + (END_OF_LIFE_LINES if any(l.startswith("Over the product's life") for l in lines) else 0)
    bad = [f"text line {i + 1} has {len(l)} characters, more than {SCREEN_WIDTH}: {l}"
           for i, l in enumerate(lines) if len(l) > SCREEN_WIDTH]
    if len(lines) > most:
        bad.append(f"the default text has {len(lines)} lines, more than {most}")
    if "Per temperature" in out.stdout:
        bad.append("the default text carries the tables per temperature (they are behind --detail)")
    return bad


def figures(program, scenario):
    def run(*args):
        out = subprocess.run([program, *args, scenario, "--format", "json"], capture_output=True, text=True)
        if out.returncode != 0:
            sys.exit(f"thermargin {args[0]} {scenario} exited with {out.returncode}: {out.stderr}")
        return json.loads(out.stdout)

    check, budget = run("check"), run("budget")
    w = budget["window"]
    f = {"check": {"valid": check["valid"], "active_inputs": check["active_inputs"],
                   "resolved": {r["key"]: r["resolved"] for r in check["rows"]
                                if r["value"] in ("sensor", "fit")}},  # the words the design fills in
         "window": {k: w.get(k) for k in WINDOW_WORDS + WINDOW_COUNTS + WINDOW_EXACT + WINDOW_MC},
         "window_contributors": [c["source"] for c in w["contributors"]][:3],
         "points": len(budget["points"])}
    return f


def compare(got, want, path=""):
    bad = []
    if isinstance(want, dict):
        for k in want:
            bad += compare(got.get(k) if isinstance(got, dict) else None, want[k], f"{path}.{k}")
        return bad
    if isinstance(want, float) and isinstance(got, (int, float)):
        tol = MONTE_CARLO if path.split(".")[-1] in WINDOW_MC else DETERMINISTIC
        return [] if abs(got - want) <= tol * max(1.0, abs(want)) else [f"{path}: {got!r}, expected {want!r}"]
    return [] if got == want else [f"{path}: {got!r}, expected {want!r}"]


def count(want):
    return sum(count(v) for v in want.values()) if isinstance(want, dict) else 1


def main():
    program, scenario = sys.argv[1], sys.argv[2]
    got = figures(program, scenario)
    if sys.argv[3] == "--write":
        with open(sys.argv[4], "w") as f:
            json.dump(got, f, indent=2, sort_keys=True)
            f.write("\n")
        return
    with open(sys.argv[3]) as f:
        want = json.load(f)
    bad = compare(got, want) + screen_problems(program, scenario)
    if bad:
        print("\n".join(bad))
        sys.exit(1)
    print(f"ok: {count(want)} figures of {scenario}")


if __name__ == "__main__":
    main()
