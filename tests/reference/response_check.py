#!/usr/bin/python3
"""A SciPy second opinion on `thermargin response` (docs/response.md).

Usage: response_check.py TAU PERIOD RAMP_K_PER_MIN STEP SETTLE_TO FILTER...
       FILTER is none, moving-average:N or exponential:ALPHA
       response_check.py --report PAGE.html TAU PERIOD RAMP_K_PER_MIN STEP

For each filter it simulates, independently of thermargin:
  - the sensor as the continuous first-order system 1/(tau*s + 1),
    scipy.signal.lsim over the reading instants t_k = k*PERIOD (the input is
    linear between samples, so a ramp and a step held from t = 0 are
    simulated exactly), starting from rest;
  - the firmware's filter on those readings with scipy.signal.lfilter
    (moving average b = ones(N)/N, a = [1]; exponential b = [alpha],
    a = [1, alpha - 1]), zero initial state (every earlier reading at the
    steady start);
and prints one JSON list, a row per filter:
  ramp_error          K, -(reported - true) at the last reading of a ramp
                      simulated until every transient has decayed
  settling_readings   the first reading index from which every reading after
                      the step is within SETTLE_TO of the new temperature
  noise_factor        sqrt(sum of the filter's squared impulse response): the
                      standard deviation white noise keeps through the filter
With --report it reads the page's two charts (xml.etree on each <svg>):
every filter's curve (a series named none, moving-average-N or
exponential-ALPHA), the medium and the sensor must equal the same
simulation at the plotted times, within the 9 significant digits the chart
writes; prints "ok: ..." or fails with the first difference.
Nothing of thermargin is used. Run with Debian's interpreter (/usr/bin/python3).
"""
import json
import math
import sys

import numpy as np
from scipy import signal


def coefficients(spec):
    if spec == "none":
        return np.array([1.0]), np.array([1.0]), 1, 1.0
    kind, value = spec.split(":")
    if kind == "moving-average":
        n = int(value)
        return np.ones(n) / n, np.array([1.0]), n, 1.0
    if kind == "exponential":
        alpha = float(value)
        return np.array([alpha]), np.array([1.0, alpha - 1.0]), 1, alpha
    raise SystemExit("unknown filter " + spec)


def simulate(tau, period, spec, medium):
    b, a, _, _ = coefficients(spec)
    t = np.arange(len(medium)) * period
    _, x, _ = signal.lsim(signal.lti([1.0], [tau, 1.0]), medium, t)
    return x, signal.lfilter(b, a, x)


def series_filter(name):
    if name == "none":
        return "none"
    if name.startswith("moving-average-"):
        return "moving-average:" + name[len("moving-average-"):]
    if name.startswith("exponential-"):
        return "exponential:" + name[len("exponential-"):]
    return None


def check_report(page, tau, period, ramp_per_min, step):
    import re
    import xml.etree.ElementTree as ET
    html = open(page, encoding="utf-8").read()
    charts = re.findall(r"<svg.*?</svg>", html, re.S)
    checked = 0
    for markup in charts:
        root = ET.fromstring(markup)
        groups = [g for g in root.iter() if g.get("class") == "series"]
        names = {g.get("data-name") for g in groups}
        if "medium" not in names:
            continue
        is_step = "settle_band" in names
        for g in groups:
            name = g.get("data-name")
            spec = series_filter(name)
            if spec is None and name not in ("medium", "sensor"):
                continue
            xs = [float(v) for v in g.get("data-x").split()]
            ys = [float(v) for v in g.get("data-y").split()]
            k = np.rint(np.array(xs) / period).astype(int)
            t = np.arange(k[-1] + 1) * period
            medium = np.full(len(t), step) if is_step else ramp_per_min / 60.0 * t
            x, y = simulate(tau, period, spec or "none", medium)
            want = {"medium": medium, "sensor": x}.get(name, y)[k]
            scale = max(1.0, float(np.max(np.abs(want))))
            worst = float(np.max(np.abs(np.array(ys) - want)))
            if worst > 2e-8 * scale:
                raise SystemExit("%s chart, series %s: off by %.3g K from scipy" % ("step" if is_step else "ramp", name, worst))
            checked += 1
    if checked == 0:
        raise SystemExit("no response chart found in " + page)
    print("ok: %d curves equal the scipy simulation" % checked)


def main():
    if sys.argv[1] == "--report":
        check_report(sys.argv[2], *(float(v) for v in sys.argv[3:7]))
        return
    tau, period, ramp_per_min, step, settle_to = (float(v) for v in sys.argv[1:6])
    rate = ramp_per_min / 60.0
    sensor = signal.lti([1.0], [tau, 1.0])
    rows = []
    for spec in sys.argv[6:]:
        b, a, n, alpha = coefficients(spec)
        # Long enough for every transient to fall below 1e-15 of its start,
        # and for the step to settle well inside the run.
        slow = max(tau / period, 1.0 / alpha, n)
        count = int(math.ceil(40.0 * slow + 2 * n)) + 10
        t = np.arange(count) * period
        _, x_ramp, _ = signal.lsim(sensor, rate * t, t)
        y_ramp = signal.lfilter(b, a, x_ramp)
        ramp_error = -(y_ramp[-1] - rate * t[-1])
        _, x_step, _ = signal.lsim(sensor, np.full(count, step), t)
        y_step = signal.lfilter(b, a, x_step)
        outside = np.nonzero(np.abs(step - y_step) > settle_to)[0]
        if len(outside) and outside[-1] == count - 1:
            raise SystemExit("the step did not settle within the simulated readings")
        settling = int(outside[-1]) + 1 if len(outside) else 0
        impulse = np.zeros(max(count, 64 * n))
        impulse[0] = 1.0
        h = signal.lfilter(b, a, impulse)
        rows.append({"filter": spec, "ramp_error": float(ramp_error), "settling_readings": settling,
                     "noise_factor": float(math.sqrt(np.sum(h * h)))})
    print(json.dumps(rows))


if __name__ == "__main__":
    main()
