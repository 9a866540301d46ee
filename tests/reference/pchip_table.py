#!/usr/bin/python3
"""Second opinion on the R-T table interpolation, with SciPy.

Usage: pchip_table.py TABLE.csv T1 [T2 ...]   (temperatures in degC)

Reads the table (degC, Ohm; ',' ';' or tab separated; '#' comments; an
optional header line), interpolates ln R against 1/T with
scipy.interpolate.PchipInterpolator (Fritsch-Carlson monotone cubic with the
three-point shape-preserving end slopes) and prints R in Ohm at each
temperature, one per line, with 17 significant digits. Nothing of thermargin
is used. Run with Debian's interpreter (/usr/bin/python3).
"""
import re
import sys

import numpy as np
from scipy.interpolate import PchipInterpolator


def read_table(path):
    t, r = [], []
    with open(path) as f:
        for line in f:
            line = line.split("#", 1)[0].strip()
            if not line:
                continue
            fields = [x.strip() for x in re.split("[,;\t]", line)]
            try:
                t.append(float(fields[0]))
                r.append(float(fields[1]))
            except ValueError:
                continue  # the header line
    return np.array(t), np.array(r)


def main():
    t, r = read_table(sys.argv[1])
    x = 1.0 / (t + 273.15)
    order = np.argsort(x)  # PchipInterpolator wants an ascending abscissa
    curve = PchipInterpolator(x[order], np.log(r[order]), extrapolate=False)
    for arg in sys.argv[2:]:
        print(repr(float(np.exp(curve(1.0 / (float(arg) + 273.15))))))


if __name__ == "__main__":
    main()
