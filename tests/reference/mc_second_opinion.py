#!/usr/bin/env python3
"""An independent Monte Carlo of a beta-NTC divider design with NumPy.

Written from docs/model.md's equations (sensor spread, self-heating, divider with
a tempco'd fixed resistor at a uniformly drawn board temperature, ratiometric
ADC with gain, offset, bow INL, Gaussian noise and a round quantiser, beta
conversion, output rounding), with NumPy's own generator: it shares no code
and no random numbers with thermargin. bench/run_times.sh passes the design's
numbers as key=value arguments and times it (the tests compare the program with
chain_second_opinion.py instead, docs/checks.md).

Prints one line per temperature: t mean stddev low high, then
"yield <fraction>".
"""
import sys

import numpy as np

p = {k: float(v) for k, v in (a.split("=") for a in sys.argv[1:])}
n = int(p["units"])
rng = np.random.default_rng(int(p["seed"]))
k_sigma = p["sigma_per_tol"]
T0 = 298.15


def normal(bound):
    return rng.normal(0.0, bound / k_sigma, n) if bound > 0 else np.zeros(n)


d_r25, d_beta = normal(p["r25_tol"]), normal(p["beta_tol"])
d_rf, d_tc = normal(p["rf_tol"]), normal(p["rf_tempco"])
d_diss = normal(p["diss_tol"])
d_off, d_gain, d_inl = normal(p["offset"]), normal(p["gain"]), normal(p["inl"])

r25, beta, rf_nom = p["r25"], p["beta"], p["rf"]
span = 2.0 ** p["bits"]
v_exc = p["v_exc"]
g_heat = 1.0 / (p["diss"] * (1.0 + d_diss))
temps = np.arange(p["t_min"], p["t_max"] + 1e-9, p["t_step"])
worst = np.zeros(n)
bad = np.zeros(n, dtype=bool)

for t in temps:
    T = t + 273.15
    tb = rng.uniform(p["board_min"], p["board_max"], n)
    rf = rf_nom * (1 + d_rf) * (1 + d_tc * (tb - 25.0))

    def resistance(te):
        return r25 * (1 + d_r25) * np.exp(beta * (1 + d_beta) * (1 / te - 1 / T0))

    te = np.full(n, T)
    for _ in range(100):  # fixed point: T_e = T + P/δ, P = V_e²/R
        r = resistance(te)
        v_e = v_exc * r / (r + rf)
        nxt = T + g_heat * v_e * v_e / r
        done = np.max(np.abs(nxt - te)) < 1e-12
        te = nxt
        if done:
            break
    r = resistance(te)
    x = r / (r + rf) * span
    u = x / span
    xs = x * (1 + d_gain) + d_off + d_inl * 4 * u * (1 - u)
    code = np.floor(xs + rng.normal(0.0, p["noise"], n) + 0.5)
    sat = (code < 0) | (code > span - 1)
    ratio = np.clip(code, 1, span - 2) / span
    r_est = rf_nom * ratio / (1 - ratio)
    t_est = 1.0 / (1.0 / T0 + np.log(r_est / r25) / beta) - 273.15
    t_rep = np.floor(t_est / p["resolution"] + 0.5) * p["resolution"]
    err = t_rep - t
    ok = ~sat
    e = err[ok]
    lo, hi = np.quantile(e, [(1 - p["coverage"]) / 2, (1 + p["coverage"]) / 2])
    print(f"{t:.6f} {e.mean():.9f} {e.std(ddof=1):.9f} {lo:.9f} {hi:.9f}")
    if p["window_min"] - 1e-9 <= t <= p["window_max"] + 1e-9:
        worst = np.maximum(worst, np.where(ok, np.abs(err), np.inf))
        bad |= sat

print(f"yield {np.mean((worst <= p['limit']) & ~bad):.9f}")
