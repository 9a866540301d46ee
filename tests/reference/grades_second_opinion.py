"""Second opinion on `thermargin grades` for a catalogue of NTC and fixed-
resistor grades on an otherwise ideal chain, computed with NumPy alone.

Usage: grades_second_opinion.py CATALOGUE.csv GRADES.json B WINDOW_MIN WINDOW_MAX STEP VOLUME REJECT_COST

The catalogue is read with Python's csv module (its own RFC 4180 reader).
For every combination the script computes, independently of the tool:

- the worst case over the window in closed form. With the firmware using
  the sensor's own beta curve, an ideal ADC and no self-heating, a unit with
  R25 off by dR, B off by dB and the fixed resistor off by dF reads
      1/T_est = 1/T + [ln(1 + dR) - ln(1 + dF)] / B + dB * (1/T - 1/T0)
  (the divider's ratio is inverted with the nominal fixed resistor, so the
  resistance seen is R_unit / (1 + dF)); the extreme errors are at the eight
  corners of (dR, dB, dF), all enumerated here on the window's grid;
- the cost per unit, sum(unit_cost) + sum(setup_cost) / VOLUME, and the cost
  per good unit, cost / y + REJECT_COST * (1 - y) / y, with the tool's yield y;
- the cost/accuracy front from those costs and the tool's worst-case errors,
  by the definition: no other point has cost <= and error <= with one <;
- the cheapest combination whose worst case is within the limit and whose
  yield (the tool's) reaches the required yield.

It prints one JSON object: {"rows": {"grade|grade|...": {...}}, "recommendation": "grade|..." or null}.
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


def main():
    cat_path, json_path = sys.argv[1], sys.argv[2]
    beta, wmin, wmax, step, volume, reject = (float(x) for x in sys.argv[3:9])
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
    tool = json.load(open(json_path, encoding="utf-8"))
    limit = tool["requirement"]["max_error"]
    required = tool["requirement"]["yield"]
    by_choice = {"|".join(r["choice"][s] for s in slots): r for r in tool["rows"]}

    t = np.arange(wmin, wmax + step / 2, step)
    T = t + 273.15
    x = 1.0 / T - 1.0 / T0
    out = {}
    for combo in itertools.product(*(options[s] for s in slots)):
        key = "|".join(o["grade"] for o in combo)
        s = {}
        for o in combo:
            s.update(o["settings"])
        a, b, f = s.get("sensor.r25_tol", 0.0), s.get("sensor.beta_tol", 0.0), s.get("divider.r_fixed_tol", 0.0)
        worst = 0.0
        for dr, db, df in itertools.product((-a, a), (-b, b), (-f, f)):
            u = (np.log1p(dr) - np.log1p(df)) / beta + db * x
            worst = max(worst, float(np.max(np.abs(1.0 / (1.0 / T + u) - T))))
        cost = sum(o["unit"] for o in combo) + sum(o["setup"] for o in combo) / volume
        y = by_choice[key]["yield"]
        good = None if y is None or y <= 0 else cost / y + reject * (1.0 - y) / y
        out[key] = {"wc_max_abs": worst, "unit_cost": cost, "cost_per_good_unit": good,
                    "error": by_choice[key]["wc_max_abs"], "yield": y}
    keys = list(out)
    cost = np.array([out[k]["unit_cost"] for k in keys])
    err = np.array([out[k]["error"] for k in keys])
    # Dominated: some other point no worse on both and better on one.
    no_worse = (cost[None, :] <= cost[:, None] + 1e-12) & (err[None, :] <= err[:, None])
    better = (cost[None, :] < cost[:, None] - 1e-12) | (err[None, :] < err[:, None])
    dominated = np.any(no_worse & better, axis=1)
    for k, d in zip(keys, dominated):
        out[k]["on_front"] = not bool(d)
    meets = [k for k in keys if out[k]["wc_max_abs"] <= limit and out[k]["yield"] is not None and out[k]["yield"] >= required]
    rec = min(meets, key=lambda k: out[k]["cost_per_good_unit"]) if meets else None
    print(json.dumps({"rows": out, "recommendation": rec}))


if __name__ == "__main__":
    main()
