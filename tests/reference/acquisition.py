#!/usr/bin/python3
"""Second opinion on the sampled node of a divider, with SciPy.

Usage: acquisition.py key=value ...   keys: v_th (V), r_th (Ohm), r_sw (Ohm),
  c_s (F), c_n (F, 0 = none), t_acq (s), t_s (s, the sample period),
  v_start (V: what the sampling capacitor holds before each acquisition),
  reset (1: the capacitor is set to v_start before every acquisition; 0: it
  keeps its charge), settle (s from power-on to the first acquisition, or
  "always" for a divider powered continuously), m (samples averaged).

The circuit: a source v_th behind r_th drives a node with capacitor c_n to
ground; a switch r_sw connects the node to the sampling capacitor c_s for
t_acq once every t_s. While closed
    c_n dV_n/dt = (v_th - V_n)/r_th - (V_n - V_s)/r_sw
    c_s dV_s/dt = (V_n - V_s)/r_sw
and while open c_n dV_n/dt = (v_th - V_n)/r_th (Kirchhoff's current law).
With c_n = 0 the node is algebraic and c_s charges through r_th + r_sw.
Both phases are integrated numerically with scipy.integrate.solve_ivp
(Radau, rtol 1e-12), never with a closed form.

"always": the periodic steady state. The circuit is linear, so one period
maps the state (V_n, V_s) at the start of an acquisition affinely,
z -> J z + c (superposition); J and c are measured by integrating one
period from three start states, and the state that repeats is the solution
of (I - J) z = c (numpy.linalg.solve). A number: from power-on, the node and (when it keeps its charge)
c_s at 0 V, the node charging for `settle` seconds before the first
acquisition. "periods=N" with "always": the periodic steady state reached
the long way instead, N periods integrated one after the other from
power-on (the node and c_s at 0 V), the mean taken over the last m samples;
for a node that forgets its start within N periods this agrees with the
fixed point. Prints the mean of the m sampled voltages (V_s at the end of
each acquisition) with 17 significant digits. Nothing of thermargin is used.
Run with Debian's interpreter (/usr/bin/python3).
"""
import sys

import numpy as np
from scipy.integrate import solve_ivp

RTOL, ATOL = 1e-12, 1e-15


def closed(p, vn, vs):
    """The switch closed for t_acq from (vn, vs)."""
    if p["c_n"] == 0.0:
        tau = (p["r_th"] + p["r_sw"]) * p["c_s"]
        f = lambda t, y: [(p["v_th"] - y[0]) / tau]
        y = solve_ivp(f, (0.0, p["t_acq"]), [vs], method="Radau", rtol=RTOL, atol=ATOL).y[:, -1]
        return p["v_th"], y[0]

    def f(t, y):
        i_sw = (y[0] - y[1]) / p["r_sw"]
        return [((p["v_th"] - y[0]) / p["r_th"] - i_sw) / p["c_n"], i_sw / p["c_s"]]

    a = 1.0 / (p["r_th"] * p["c_n"]) + 1.0 / (p["r_sw"] * p["c_n"])
    jac = [[-a, 1.0 / (p["r_sw"] * p["c_n"])], [1.0 / (p["r_sw"] * p["c_s"]), -1.0 / (p["r_sw"] * p["c_s"])]]
    y = solve_ivp(f, (0.0, p["t_acq"]), [vn, vs], method="Radau", rtol=RTOL, atol=ATOL, jac=jac).y[:, -1]
    return y[0], y[1]


def open_node(p, vn, t):
    """The node alone for t seconds (switch open)."""
    if p["c_n"] == 0.0 or t <= 0.0:
        return p["v_th"] if p["c_n"] == 0.0 else vn
    tau = p["r_th"] * p["c_n"]
    f = lambda s, y: [(p["v_th"] - y[0]) / tau]
    return solve_ivp(f, (0.0, t), [vn], method="Radau", rtol=RTOL, atol=ATOL).y[0, -1]


def period(p, vn, vs):
    """One sample: acquisition, then the open rest of the period; returns
    the sample and the state at the start of the next acquisition."""
    vn, vs = closed(p, vn, vs)
    sample = vs
    vn = open_node(p, vn, p["t_s"] - p["t_acq"])
    if p["reset"]:
        vs = p["v_start"]
    return sample, vn, vs


def main():
    p = dict(arg.split("=", 1) for arg in sys.argv[1:])
    for k in ("v_th", "r_th", "r_sw", "c_s", "c_n", "t_acq", "t_s", "v_start"):
        p[k] = float(p[k])
    p["reset"] = p["reset"] == "1"
    m = int(p["m"])
    if p["settle"] == "always" and "periods" in p:
        vn, vs = 0.0, 0.0
        samples = []
        for _ in range(int(p["periods"])):
            sample, vn, vs = period(p, vn, vs)
            samples.append(sample)
        total = sum(samples[-m:])
    elif p["settle"] == "always":
        def step(z):
            _, vn1, vs1 = period(p, z[0], z[1])
            return np.array([vn1, vs1])

        c = step(np.zeros(2))
        j = np.column_stack([step(np.array([1.0, 0.0])) - c, step(np.array([0.0, 1.0])) - c])
        vn, vs = np.linalg.solve(np.eye(2) - j, c)
        total = 0.0
        for _ in range(m):
            sample, vn, vs = period(p, vn, vs)
            total += sample
    else:
        vs = p["v_start"] if p["reset"] else 0.0
        vn = open_node(p, 0.0, float(p["settle"]))
        total = 0.0
        for _ in range(m):
            sample, vn, vs = period(p, vn, vs)
            total += sample
    print(f"{total / m:.17g}")


if __name__ == "__main__":
    main()
