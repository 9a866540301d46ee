#!/usr/bin/python3
"""Second opinion on the picker's continuous optimum, with SciPy.

Usage: pick_worst_case.py R25 BETA TOL_R25 TOL_BETA TOL_RF OFFSET GAIN INL BITS
                          T_MIN T_MAX T_STEP R_LOW R_HIGH [R ...]

A re-implementation, from docs/model.md alone, of the worst-case objective for
one simple design: a beta NTC at the bottom of a ratiometric divider (no
self-heating, leads, leakage or parallel resistor, the board at 25 degC so
the fixed resistor's tempco plays no part), an ADC with offset (LSB), gain
error (fraction) and an INL bow (LSB peak), the round quantiser as a reading
interval of +/-0.5 LSB and no noise, and firmware that inverts the divider
with the nominal fixed resistor (full scale 2^N) and converts with the
sensor's own beta equation, without output rounding. The objective is the
largest |error| over every corner of the tolerance box (R25, beta, R_fixed,
offset, gain, INL at +/- their bounds), both ends of the reading interval
and every temperature T_MIN, T_MIN + T_STEP, ..., T_MAX.

scipy.optimize.minimize_scalar (bounded, Brent's method with golden-section
steps) minimises it over ln R_fixed in [ln R_LOW, ln R_HIGH]. Prints JSON:
{"r": optimum, "objective": its value, "at": [objective at each R given]}.
Nothing of thermargin is used. Run with Debian's interpreter
(/usr/bin/python3).
"""
import itertools
import json
import sys

import numpy as np
from scipy.optimize import minimize_scalar

T0 = 298.15


def objective(r_fixed, p):
    t = np.arange(p["t_min"], p["t_max"] + 1e-9, p["t_step"])
    T = t + 273.15
    span = 2.0 ** p["bits"]
    worst = 0.0
    for s_r, s_b, s_f, s_o, s_g, s_i in itertools.product((-1.0, 1.0), repeat=6):
        r25 = p["r25"] * (1 + s_r * p["tol_r25"])
        beta = p["beta"] * (1 + s_b * p["tol_beta"])
        rf = r_fixed * (1 + s_f * p["tol_rf"])
        r = r25 * np.exp(beta * (1 / T - 1 / T0))
        x = r / (rf + r) * span  # ideal reading, LSB
        u = x / span
        x = x * (1 + s_g * p["gain"]) + s_o * p["offset"] + s_i * p["inl"] * 4 * u * (1 - u)
        for shift in (-0.5, 0.5):
            code = x + shift
            if np.any(code < 0) or np.any(code > span - 1):
                return float("inf")  # saturation: the window cannot be read
            rho = code / span
            r_est = r_fixed * rho / (1 - rho)
            t_est = 1 / (1 / T0 + np.log(r_est / p["r25"]) / p["beta"])
            worst = max(worst, float(np.max(np.abs(t_est - T))))
    return worst


def main():
    a = sys.argv[1:]
    keys = ["r25", "beta", "tol_r25", "tol_beta", "tol_rf", "offset", "gain", "inl", "bits", "t_min", "t_max", "t_step"]
    p = dict(zip(keys, map(float, a[:12])))
    lo, hi = float(a[12]), float(a[13])
    res = minimize_scalar(lambda x: objective(np.exp(x), p), bounds=(np.log(lo), np.log(hi)), method="bounded",
                          options={"xatol": 1e-9})
    r = float(np.exp(res.x))
    print(json.dumps({"r": r, "objective": objective(r, p), "at": [objective(float(v), p) for v in a[14:]]}))


if __name__ == "__main__":
    main()
