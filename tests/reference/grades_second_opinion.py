"""Second opinion on `thermargin grades` for a catalogue of NTC and fixed-
resistor grades on an otherwise ideal chain, computed with NumPy alone.

Usage: grades_second_opinion.py CATALOGUE.csv B WINDOW_MIN WINDOW_MAX STEP VOLUME REJECT_COST
                                LIMIT REQUIRED_YIELD PROGRAM_UNITS

The catalogue is read with Python's csv module (its own RFC 4180 reader).
Nothing of the program's output is read: for every combination the script
computes, independently of the tool:

- the worst case over the window in closed form. With the firmware using
  the sensor's own beta curve, an ideal ADC and no self-heating, a unit with
  R25 off by dR, B off by dB and the fixed resistor off by dF reads
      1/T_est = 1/T + [ln(1 + dR) - ln(1 + dF)] / B + dB * (1/T - 1/T0)
  (the divider's ratio is inverted with the nominal fixed resistor, so the
  resistance seen is R_unit / (1 + dF)); the extreme errors are at the eight
  corners of (dR, dB, dF), all enumerated here on the window's grid;
- the yield: a NumPy Monte Carlo of the same closed form, MODEL_UNITS units
  with each tolerance normal with sigma = bound / 3 (docs/engines.md), the
  share whose largest |error| over the window is within LIMIT; and the
  interval the program's yield from PROGRAM_UNITS units must fall in,
  z * sqrt(y(1 - y)(1/n1 + 1/n2)) with z = 4.5 (docs/checks.md);
- the cost per unit, sum(unit_cost) + sum(setup_cost) / VOLUME, and the cost
  per good unit, cost / y + REJECT_COST * (1 - y) / y, with this yield, and
  the interval it spans over the yield's interval;
- the cost/accuracy front from those costs and these worst cases, by the
  definition: no other point has cost <= and error <= with one <;
- the cheapest combination (by cost per good unit) whose worst case is
  within the limit and whose yield reaches the required yield, and whether
  that choice is robust: no other candidate's cost interval overlaps it and
  no combination's yield interval straddles the required yield.

It prints one JSON object: {"rows": {"grade|grade|...": {...}},
"recommendation": "grade|..." or null, "recommendation_robust": bool}.
"""
import csv
import itertools
import json
import sys

import numpy as np

T0 = 298.15  # K, 25 degC


def fraction(text):
    text = text.strip()
    if text.endswith("%"):
        return float(text[:-1]) / 100.0
    if text.endswith("ppm"):
        return float(text[:-3]) * 1e-6
    return float(text)


MODEL_UNITS = 200000
SIGMA_PER_TOL = 3.0  # a normal bound is 3 standard deviations (scenarios/default.ini)
Z = 4.5


def closed_form_error(T, x, beta, dr, db, df):
    """The error (K) of units (arrays dr, db, df as columns) at temperatures T (a row)."""
    u = (np.log1p(dr) - np.log1p(df)) / beta + db * x
    return 1.0 / (1.0 / T + u) - T


def model_yield(rng, T, x, beta, a, b, f, limit):
    good = 0
    for start in range(0, MODEL_UNITS, 20000):
        n = min(20000, MODEL_UNITS - start)
        dr, db, df = (rng.normal(0.0, tol / SIGMA_PER_TOL, (n, 1)) for tol in (a, b, f))
        good += int(np.sum(np.max(np.abs(closed_form_error(T, x, beta, dr, db, df)), axis=1) <= limit))
    return good / MODEL_UNITS


def main():
    cat_path = sys.argv[1]
    beta, wmin, wmax, step, volume, reject, limit, required, n1 = (float(x) for x in sys.argv[2:11])
    with open(cat_path, newline="", encoding="utf-8") as f:
        rows = [r for r in csv.DictReader(line for line in f if not line.startswith("#"))]
    slots = []
    options = {}
    for r in rows:
        slot = r["slot"].strip()
        if slot not in options:
            slots.append(slot)
            options[slot] = []
        settings = {}
        for item in r["settings"].split(";"):
            if item.strip():
                k, v = item.split("=", 1)
                settings[k.strip()] = fraction(v)
        options[slot].append({"grade": r["grade"].strip(), "unit": float(r["unit_cost"]),
                              "setup": float(r.get("setup_cost") or 0.0), "settings": settings})

    t = np.arange(wmin, wmax + step / 2, step)
    T = t + 273.15
    x = 1.0 / T - 1.0 / T0
    rng = np.random.default_rng(2026)
    out = {}
    for combo in itertools.product(*(options[s] for s in slots)):
        key = "|".join(o["grade"] for o in combo)
        s = {}
        for o in combo:
            s.update(o["settings"])
        a, b, f = s.get("sensor.r25_tol", 0.0), s.get("sensor.beta_tol", 0.0), s.get("divider.r_fixed_tol", 0.0)
        worst = 0.0
        for dr, db, df in itertools.product((-a, a), (-b, b), (-f, f)):
            worst = max(worst, float(np.max(np.abs(closed_form_error(T, x, beta, dr, db, df)))))
        cost = sum(o["unit"] for o in combo) + sum(o["setup"] for o in combo) / volume
        y = model_yield(rng, T, x, beta, a, b, f, limit)
        yy = (y * MODEL_UNITS + 0.5) / (MODEL_UNITS + 1)  # continuity correction: never 0 or 1
        w = Z * np.sqrt(yy * (1 - yy) * (1.0 / n1 + 1.0 / MODEL_UNITS))
        y_lo, y_hi = max(y - w, 0.0), min(y + w, 1.0)
        per_good = lambda yv: cost / yv + reject * (1.0 - yv) / yv if yv > 0 else float("inf")
        out[key] = {"wc_max_abs": worst, "unit_cost": cost, "yield": y, "yield_interval": [float(y - w), float(y + w)],
                    "cost_per_good_unit": per_good(y), "cost_per_good_unit_interval": [per_good(y_hi), per_good(y_lo)],
                    "meets": bool(worst <= limit and y >= required),
                    "meets_undecided": bool(worst <= limit and y_lo < required <= y_hi)}
    keys = list(out)
    cost = np.array([out[k]["unit_cost"] for k in keys])
    err = np.array([out[k]["wc_max_abs"] for k in keys])
    # Dominated: some other point no worse on both and better on one.
    no_worse = (cost[None, :] <= cost[:, None] + 1e-12) & (err[None, :] <= err[:, None])
    better = (cost[None, :] < cost[:, None] - 1e-12) | (err[None, :] < err[:, None])
    dominated = np.any(no_worse & better, axis=1)
    for k, d in zip(keys, dominated):
        out[k]["on_front"] = not bool(d)
    meets = [k for k in keys if out[k]["meets"]]
    rec = min(meets, key=lambda k: out[k]["cost_per_good_unit"]) if meets else None
    robust = bool(not any(out[k]["meets_undecided"] for k in keys))
    if rec is not None:
        hi = out[rec]["cost_per_good_unit_interval"][1]
        robust = robust and all(out[k]["cost_per_good_unit_interval"][0] > hi for k in meets if k != rec)
    print(json.dumps({"rows": out, "recommendation": rec, "recommendation_robust": robust}))


if __name__ == "__main__":
    main()
