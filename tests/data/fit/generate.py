#!/usr/bin/python3
"""Writes the R-T data files the fit tests read.

Nothing here is a measurement. Every point is computed from a published
equation with published coefficients, then (for the "rounded" files) rounded
the way a datasheet table prints it:

- 10 kOhm NTC: Steinhart & Hart (Deep-Sea Research 15, 1968),
  1/T = A + B ln R + C (ln R)^3 with the widely published coefficients
  A = 1.129148e-3, B = 2.34125e-4, C = 8.76741e-8 (common practice).
  ln R is found by root bracketing (scipy.optimize.brentq), independently of
  the project's closed-form inverse.
- Pt100: IEC 60751 Callendar-Van Dusen, A = 3.9083e-3, B = -5.775e-7,
  C = -4.183e-12 (C below 0 degC only), R0 = 100 Ohm.

Run with Debian's interpreter: /usr/bin/python3 generate.py (from this folder).
"""
import math
import os

from scipy.optimize import brentq

SH_A, SH_B, SH_C = 1.129148e-3, 2.34125e-4, 8.76741e-8
CVD_A, CVD_B, CVD_C = 3.9083e-3, -5.775e-7, -4.183e-12
HERE = os.path.dirname(os.path.abspath(__file__))


def sh_resistance(t_celsius):
    inv_t = 1.0 / (t_celsius + 273.15)
    f = lambda l: SH_A + SH_B * l + SH_C * l ** 3 - inv_t
    ln_r = brentq(f, 0.0, 30.0, xtol=1e-15, rtol=8.9e-16, maxiter=500)
    return math.exp(ln_r)


def pt100(t_celsius):
    r = 1.0 + CVD_A * t_celsius + CVD_B * t_celsius ** 2
    if t_celsius < 0.0:
        r += CVD_C * (t_celsius - 100.0) * t_celsius ** 3
    return 100.0 * r


def round_sig(x, digits):
    exponent = math.floor(math.log10(abs(x)))
    quantum = 10.0 ** (exponent - digits + 1)
    return round(x / quantum) * quantum, quantum


def write(name, header, rows):
    with open(os.path.join(HERE, name), "w") as f:
        for line in header:
            f.write("# " + line + "\n")
        for row in rows:
            f.write(",".join(row) + "\n")


SH_NOTE = ("10 kOhm NTC from the Steinhart-Hart equation with the widely published "
           "coefficients A = 1.129148e-3, B = 2.34125e-4, C = 8.76741e-8 (common practice)")
temps = list(range(-40, 126, 5))

write("sh10k_exact.csv",
      ["Computed, not measured: " + SH_NOTE + ".", "Resistance to 17 significant digits. Written by generate.py."],
      [["temperature_degC", "resistance_ohm"]] + [[str(t), "%.17g" % sh_resistance(t)] for t in temps])

rounded = []
for t in temps:
    r, quantum = round_sig(sh_resistance(t), 4)
    # A value rounded to a quantum q is uniform within +-q/2: u = (q/2)/sqrt(3) (GUM, JCGM 100:2008, 4.3.7).
    rounded.append((t, r, quantum / 2.0 / math.sqrt(3.0)))
write("sh10k_rounded.csv",
      ["Computed, not measured: " + SH_NOTE + ",",
       "rounded to 4 significant digits as a datasheet table prints them. Written by generate.py."],
      [["temperature_degC", "resistance_ohm"]] + [[str(t), "%.6g" % r] for t, r, _ in rounded])
write("sh10k_rounded_u.csv",
      ["Computed, not measured: " + SH_NOTE + ",",
       "rounded to 4 significant digits; column 3 is the rounding's standard uncertainty,",
       "half a unit of the last digit over sqrt(3) (JCGM 100:2008, 4.3.7). Written by generate.py."],
      [["temperature_degC", "resistance_ohm", "u_ohm"]] +
      [[str(t), "%.6g" % r, "%.17g" % u] for t, r, u in rounded])

# R of the Steinhart-Hart equation (Steinhart & Hart 1968) with the common-practice coefficients, rounded.
write("sh10k_reference.csv",
      ["R at 0, 25, 50 and 100 degC of the 10 kOhm Steinhart-Hart curve above, as rounded",
       "for these tests (common practice coefficients)."],
      [["temperature_degC", "resistance_ohm"], ["0", "32650.375"], ["25", "9999.854"], ["50", "3601.035"],
       ["100", "678.4235"]])

write("pt100_iec60751.csv",
      ["Computed, not measured: Pt100 from the IEC 60751 Callendar-Van Dusen equation,",
       "A = 3.9083e-3, B = -5.775e-7, C = -4.183e-12 (C below 0 degC), rounded to 1 micro-ohm.",
       "Written by generate.py."],
      [["temperature_degC", "resistance_ohm"]] +
      [[str(t), "%.6f" % pt100(t)] for t in range(-200, 851, 10)])

# Faulty files for the input checks: each is a few points of the 10 kOhm curve
# with one deliberate defect, on the line named in its comment.
few = [(t, "%.3f" % sh_resistance(t)) for t in (0, 25, 50, 75)]
write("bad_duplicate_temperature.csv", ["Deliberate defect for a test: line 5 repeats the temperature of line 4."],
      [["temperature_degC", "resistance_ohm"], ["0", few[0][1]], ["25", few[1][1]], ["25", few[2][1]],
       ["75", few[3][1]]])
write("bad_nonmonotonic.csv", ["Deliberate defect for a test: the resistance on line 5 rises again."],
      [["temperature_degC", "resistance_ohm"], ["0", few[0][1]], ["25", few[1][1]], ["50", few[0][1]],
       ["75", few[3][1]]])
write("bad_negative.csv", ["Deliberate defect for a test: the resistance on line 4 is negative."],
      [["temperature_degC", "resistance_ohm"], ["0", few[0][1]], ["25", "-" + few[1][1]], ["50", few[2][1]],
       ["75", few[3][1]]])
write("bad_missing_column.csv", ["Deliberate defect for a test: line 5 has no resistance."],
      [["temperature_degC", "resistance_ohm"], ["0", few[0][1]], ["25", few[1][1]], ["50"], ["75", few[3][1]]])
write("bad_negative_uncertainty.csv", ["Deliberate defect for a test: the uncertainty on line 5 is negative."],
      [["temperature_degC", "resistance_ohm", "u"], ["0", few[0][1], "0.5%"], ["25", few[1][1], "0.5%"],
       ["50", few[2][1], "-0.5%"], ["75", few[3][1], "0.5%"]])
write("too_few_points.csv", ["Deliberate defect for a test: two points, fewer than Steinhart-Hart needs."],
      [["temperature_degC", "resistance_ohm"], ["0", few[0][1]], ["50", few[2][1]]])
