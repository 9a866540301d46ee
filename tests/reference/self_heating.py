#!/usr/bin/python3
"""Second opinion on the self-heating of a beta-model NTC in a divider, with SciPy.

Usage: self_heating.py key=value ...   keys: r25 (Ohm), beta (K), r_fixed (Ohm;
  a comma-separated list answers for each value in turn, so that a caller
  asks once for many designs), v_exc (V), duty (fraction), dissipation (W/K),
  lead (Ohm, default 0), r_par (Ohm, default none), t (degC, the true
  temperature; a comma-separated list gives one answer a line)

Solves T_e - T - d * V_e^2 / (R(T_e) * delta) = 0 for the element's
temperature T_e with scipy.optimize.brentq, where R(T) = R25 exp(B (1/T - 1/T0))
(IEC 60539-1 beta equation) and V_e is the element's share of the branch
voltage of the divider: branch = (R + lead) || r_par, V_branch = V_exc *
branch / (r_fixed + branch), V_e = V_branch * R / (R + lead) (the same
whichever side of the node the branch sits). The root is bracketed by
[T, T + d * P_max / delta] with P_max = V_exc^2 / (4 r_fixed), the most any
load can draw through r_fixed (maximum power transfer). Prints T_e in degC
with 17 significant digits. Nothing of thermargin is used. Run with
Debian's interpreter (/usr/bin/python3).
"""
import math
import sys

from scipy.optimize import brentq

T0 = 298.15


def main():
    p = dict(arg.split("=", 1) for arg in sys.argv[1:])
    r25, beta = float(p["r25"]), float(p["beta"])
    v_exc = float(p["v_exc"])
    duty, delta = float(p["duty"]), float(p["dissipation"])
    lead = float(p.get("lead", "0"))
    r_par = float(p["r_par"]) if p.get("r_par", "none") != "none" else None

    def element_power(t_e, r_fixed):
        r = r25 * math.exp(beta * (1.0 / t_e - 1.0 / T0))
        series = r + lead
        branch = series * r_par / (series + r_par) if r_par else series
        v_e = v_exc * branch / (r_fixed + branch) * r / series
        return v_e * v_e / r

    for r_fixed in (float(v) for v in p["r_fixed"].split(",")):
        for t_celsius in p["t"].split(","):
            t = float(t_celsius) + 273.15
            f = lambda t_e: t_e - t - duty * element_power(t_e, r_fixed) / delta
            upper = t + duty * v_exc * v_exc / (4.0 * r_fixed) / delta + 1e-6
            t_e = brentq(f, t, upper, xtol=1e-13, rtol=8.9e-16, maxiter=500)
            print(repr(t_e - 273.15))


if __name__ == "__main__":
    main()
