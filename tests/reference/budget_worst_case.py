#!/usr/bin/python3
"""Second opinion on the worst-case band of one scenario, with SciPy.

Usage: budget_worst_case.py SCENARIO.ini

Reads the scenario with Python's configparser and re-implements, from
docs/model.md alone, the worst case of docs/engines.md for the designs it
covers: a beta NTC, self-heating, a fixed resistor with tolerance and tempco
at a board temperature range, a ratiometric divider without leads, leakage
or parallel resistor, an ADC with gain, offset and INL (bound or bow), the round
quantiser and noise as an interval on the reading, firmware converting with
the beta equation (full scale 2^N) and rounding its output, no calibration.
Anything else in the scenario is refused (exit 1), so the script never
answers for a design it does not model.

For every temperature: every corner of the tolerance box (each active input
at -bound and +bound, the board at both ends of its range), the reading at
both ends of [-1/2 - k*sigma/sqrt(M), +1/2 + k*sigma/sqrt(M)] LSB, the output
at +/- half its resolution; the band is the minimum and maximum error. The
self-heating equation T_el = T + d*P/delta is solved by scipy.optimize.brentq
(xtol 1e-12 K) for each temperature and each analog corner.

Prints JSON: {"t": [...], "wc_low": [...], "wc_high": [...], "corners": n}.
Nothing of thermargin is used. Run with Debian's interpreter (/usr/bin/python3).
"""
import configparser
import itertools
import json
import re
import sys

import numpy as np
from scipy.optimize import brentq

KELVIN = 273.15
T0 = 298.15
PREFIX = {"p": 1e-12, "n": 1e-9, "u": 1e-6, "m": 1e-3, "k": 1e3, "M": 1e6}


def number(text):
    """Engineering notation as docs/scenarios.md writes it: 10k, 4k7, 1%, 100ppm, 1.5mW/K, 3.3V."""
    s = text.strip().replace(" ", "")
    scale = 1.0
    for unit, f in (("%", 1e-2), ("ppm", 1e-6), ("W/K", 1.0), ("V", 1.0), ("ohm", 1.0)):
        if s.endswith(unit):
            s, scale = s[: -len(unit)], f
            break
    m = re.fullmatch(r"([-+]?[0-9.]+(?:[eE][-+]?[0-9]+)?)([pnumkM]?)([0-9]*)", s)
    if not m:
        raise SystemExit(f"cannot read {text!r}")
    if m.group(3):  # 4k7
        value = float(m.group(1) + "." + m.group(3))
    else:
        value = float(m.group(1))
    return value * PREFIX.get(m.group(2), 1.0) * scale


def read(path):
    cp = configparser.ConfigParser(inline_comment_prefixes=("#",), interpolation=None)
    with open(path) as f:
        cp.read_string("[top]\n" + f.read())
    g = lambda sec, key, default=None: cp.get(sec, key, fallback=default)
    need = {("sensor", "model"): "beta", ("divider", "placement"): "low", ("supply", "ratiometric"): "true",
            ("adc", "quantizer"): "round", ("firmware", "conversion"): "beta", ("firmware", "full_scale"): "pow2",
            ("firmware", "calibration"): "none", ("firmware", "r25"): "sensor", ("firmware", "beta"): "sensor"}
    for (sec, key), want in need.items():
        if g(sec, key, want) != want:
            raise SystemExit(f"{sec}.{key} = {g(sec, key)}: only {want} is modelled here")
    for sec, key in (("sensor", "lead_resistance"), ("adc", "leakage"), ("divider", "r_parallel_tol"),
                     ("firmware", "lead_compensation")):
        if number(g(sec, key, "0")) != 0.0:
            raise SystemExit(f"{sec}.{key} is not modelled here")
    if g("divider", "r_parallel", "none") != "none":
        raise SystemExit("divider.r_parallel is not modelled here")
    board = g("conditions", "board")
    lo, hi = (number(v) for v in board.split(".."))
    return {
        "r25": number(g("sensor", "r25")), "beta": number(g("sensor", "beta")),
        "tol_r25": number(g("sensor", "r25_tol")), "tol_beta": number(g("sensor", "beta_tol")),
        "delta": number(g("sensor", "dissipation")), "tol_delta": number(g("sensor", "dissipation_tol")),
        "duty": number(g("divider", "duty")),
        "rf": number(g("divider", "r_fixed")), "tol_rf": number(g("divider", "r_fixed_tol")),
        "tempco": number(g("divider", "r_fixed_tempco")), "board": (lo, hi),
        "v_exc": number(g("supply", "v_excitation")),
        "bits": int(g("adc", "bits")), "offset": number(g("adc", "offset")), "gain": number(g("adc", "gain_error")),
        "inl": number(g("adc", "inl")), "inl_bound": g("adc", "inl_shape", "bound") == "bound", "noise": number(g("adc", "noise")), "averaging": int(g("adc", "averaging")),
        "noise_k": number(g("montecarlo", "noise_k", "3")), "resolution": number(g("firmware", "resolution")),
        "t": np.arange(number(g("conditions", "t_min")), number(g("conditions", "t_max")) + 1e-9,
                       number(g("conditions", "t_step"))),
    }


def element_temperature(T, r25, beta, rf, v_exc, gain):
    """T_el = T + d/delta * V_el^2 / R(T_el) for the element at the bottom of the divider (docs/model.md section 2)."""
    def excess(te):
        r = r25 * np.exp(beta * (1 / te - 1 / T0))
        v = v_exc * r / (rf + r)
        return te - T - gain * v * v / r
    return brentq(excess, T, T + 100.0, xtol=1e-12, rtol=4 * np.finfo(float).eps)


def band(p):
    T = p["t"] + KELVIN
    span = 2.0 ** p["bits"]
    half = 0.5 + p["noise_k"] * p["noise"] / np.sqrt(p["averaging"])
    mid, half_board = 0.5 * sum(p["board"]), 0.5 * (p["board"][1] - p["board"][0])
    low, high = np.full(T.size, np.inf), np.full(T.size, -np.inf)
    corners = 0
    for s_r, s_b, s_d, s_f, s_a, s_t in itertools.product((-1.0, 1.0), repeat=6):
        r25 = p["r25"] * (1 + s_r * p["tol_r25"])
        beta = p["beta"] * (1 + s_b * p["tol_beta"])
        gain = p["duty"] / (p["delta"] * (1 + s_d * p["tol_delta"]))
        t_board = mid + s_t * half_board
        rf = p["rf"] * (1 + s_f * p["tol_rf"]) * (1 + s_a * p["tempco"] * (t_board - 25.0))
        te = np.array([element_temperature(x, r25, beta, rf, p["v_exc"], gain) for x in T])
        r = r25 * np.exp(beta * (1 / te - 1 / T0))
        x = r / (rf + r) * span  # ideal ADC input, LSB (ratiometric: V/V_ref = divider ratio)
        u = x / span
        for s_o, s_g, s_i in itertools.product((-1.0, 1.0), repeat=3):
            corners += 1
            # The INL: a bound at every code (adc.inl_shape = bound, the
            # default) or the bow 4u(1 - u) that is zero at both ends.
            inl = s_i * p["inl"] * (1.0 if p["inl_bound"] else 4 * u * (1 - u))
            xs = x * (1 + s_g * p["gain"]) + s_o * p["offset"] + inl
            for shift in (-half, half):
                code = xs + shift
                if np.any(code < 0) or np.any(code > span - 1):
                    raise SystemExit("a corner saturates: not modelled here")
                rho = code / span
                r_est = p["rf"] * rho / (1 - rho)
                t_est = 1 / (1 / T0 + np.log(r_est / p["r25"]) / p["beta"])
                for rounding in (-0.5 * p["resolution"], 0.5 * p["resolution"]):
                    err = t_est + rounding - T
                    low, high = np.minimum(low, err), np.maximum(high, err)
    return low, high, corners


def main():
    p = read(sys.argv[1])
    low, high, corners = band(p)
    print(json.dumps({"t": p["t"].tolist(), "wc_low": low.tolist(), "wc_high": high.tolist(), "corners": corners}))


if __name__ == "__main__":
    main()
