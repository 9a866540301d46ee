#!/usr/bin/python3
"""Second opinion on `thermargin budget` for a batch of designs (docs/checks.md).

Usage: chain_second_opinion.py BATCH.json

BATCH.json: {"program_units": N1, "units": N2, "seed": S,
             "designs": [{"name": ..., "path": "x.ini" or null, "overrides": ["--adc.bits=16", ...],
                          "deterministic": true|false, "mc": true|false}, ...]}

For each design, from the scenario file and the overrides alone (the same
arguments the test gives the program), chain_model.py and chain_engines.py
compute the nominal error, the worst-case band by enumeration, the linear
band and each source's contribution, and (with "mc") a NumPy Monte Carlo of
N2 units, from which the intervals that the program's Monte Carlo figures
from N1 units must fall in are derived. Prints one JSON object:
{"designs": [{"name", "t", "status", "nominal", ..., "options": [...]}, ...]}.
"options" names what the design exercises (sensor model, placement, supply,
...), so that the test can hold the batch to covering every option.
"""
import json
import math
import sys

import numpy as np

from chain_engines import (acceptance, linear_budget, max_abs_acceptance, monte_carlo, nominal, worst_case,
                           yield_acceptance)
from chain_model import Design, deviations, front_end


def plain(v):
    if isinstance(v, dict):
        return {k: plain(x) for k, x in v.items()}
    if isinstance(v, (list, tuple)):
        return [plain(x) for x in v]
    if isinstance(v, np.ndarray):
        return plain(v.tolist())
    if isinstance(v, (float, np.floating)):
        return None if not math.isfinite(v) else float(v)
    if isinstance(v, np.integer):
        return int(v)
    return v


def options(d):
    """The options of docs/model.md this design exercises."""
    s = d.s
    o = [f"sensor.model={d.sensor.model}", f"divider.placement={d.placement}",
         f"supply.ratiometric={'true' if d.ratiometric else 'false'}", f"adc.quantizer={d.quantizer}",
         f"firmware.conversion={d.conversion}", f"firmware.calibration={d.calibration}",
         f"firmware.full_scale={s.text('firmware.full_scale')}", f"conditions.board={d.board[0]}"]
    if d.conversion == "table":
        o.append(f"firmware.table_spacing={s.text('firmware.table_spacing', 'code')}")
    if d.r_lead > 0:
        o.append("sensor.lead_resistance")
    if d.lead_comp > 0:
        o.append("firmware.lead_compensation")
    if d.r_par is not None:
        o.append("divider.r_parallel")
    if d.averaging > 1:
        o.append("adc.averaging")
    if d.diss > 0 and d.duty < 1:
        o.append("divider.duty")
    if d.resolution > 0:
        o.append("firmware.resolution")
    if d.acq is not None:
        o += ["adc.c_sample", f"adc.precharge={d.acq['precharge'] if d.acq['precharge'] in ('same', 'any', 'ground', 'reference') else 'voltage'}"]
        o += ["divider.c_node"] if d.acq["c_n"] > 0 else []
        o += ["divider.settle_time"] if d.acq["settle"] is not None else []
    o += [f"drift={k}" for k in DRIFTS if d.s.num(k) > 0]
    if d.sensor.model == "rtd":
        o.append(f"sensor.rtd_construction={d.s.text('sensor.rtd_construction')}")
    if d.inl_bound:
        o.append("adc.inl_shape=bound")
    if d.cal_diss is not None:
        o.append("firmware.calibration_dissipation")
    if d.drive_comp > 0:
        o.append("firmware.drive_compensation")
    if d.sensor.model == "table" and d.sensor.limits is not None:
        o.append("sensor.table_limits")
    o += [f"coverage_factor={x.name}" for x in d.sources if x.dist in ("normal", "gapped") and x.k != d.sigma_per_tol
          and x.name not in ("calibration_1", "calibration_2")]
    o += [f"source={x.name}" for x in d.sources]
    o += [f"distribution={x.dist}" for x in d.sources if x.name not in ("board_temperature", "adc_precharge")]
    return sorted(set(o))


DRIFTS = ["sensor.drift", "divider.r_fixed_drift", "supply.v_excitation_drift", "supply.v_reference_drift",
          "supply.v_reference_hysteresis", "adc.offset_drift", "adc.gain_drift"]


def not_covered(d):
    """What of this design the model does not compute, and which of the program's figures that leaves
    uncompared (the test prints and counts them; docs/checks.md lists them)."""
    out = []
    return out


def end_of_life(spec):
    """The end-of-life design (docs/model.md §11: the drifts added to the active inputs): the window's largest
    worst-case and linear |error| and the number of corners."""
    e = Design(spec.get("path"), spec.get("overrides", []), end_of_life=True)
    inside = (e.t >= e.window[0] - 1e-9) & (e.t <= e.window[1] + 1e-9)
    wc, lin = worst_case(e), linear_budget(e)
    worst = np.fmax(np.abs(wc["wc_low"]), np.abs(wc["wc_high"]))[inside]
    rss = np.fmax(np.abs(lin["rss_low"]), np.abs(lin["rss_high"]))[inside]
    half = (0.5 * (lin["rss_high"] - lin["rss_low"]))[inside]
    k = int(np.nanargmax(rss))
    return {"wc_max_abs": np.nanmax(worst), "rss_max_abs": rss[k], "rss_half_width": half[k],
            "wc_corners": wc["wc_corners"]}


# IEC 60751:2008 validity ranges of each class by construction (from memory, as docs/model.md §1 writes them).
CLASS_RANGE = {"film": {"AA": (0, 150), "A": (-30, 300), "B": (-50, 500), "C": (-50, 600)},
               "wire-wound": {"AA": (-50, 250), "A": (-100, 450), "B": (-196, 600), "C": (-196, 600)}}


def rtd_class_extrapolated(d):
    """Per temperature, whether an RTD's class bound is used outside its rated range (docs/model.md §1)."""
    cls = d.s.text("sensor.rtd_class")
    if d.sensor.model != "rtd" or cls == "none":
        return None
    lo, hi = CLASS_RANGE[d.s.text("sensor.rtd_construction")][cls]
    return [bool(t < lo - 1e-9 or t > hi + 1e-9) for t in d.t]


def run(spec, n1, n2, seed):
    d = Design(spec.get("path"), spec.get("overrides", []))
    out = {"name": spec["name"], "t": d.t, "options": options(d), "not_covered": not_covered(d),
           "rtd_class_extrapolated": rtd_class_extrapolated(d)}
    if any("points" in n["figures"] for n in out["not_covered"]):
        return plain(out)
    if spec.get("deterministic", True):
        out.update(nominal(d))
        out.update(worst_case(d))
        out.update(linear_budget(d))
    if spec.get("deterministic", True) and any(d.s.num(k) > 0 for k in DRIFTS):
        out["end_of_life"] = end_of_life(spec)
    if d.conversion == "table":  # the firmware's lookup table as docs/model.md §6 builds it
        out["table"] = {"codes": d.firmware.codes, "stored": d.firmware.stored}
    if spec.get("mc"):
        n1, n2 = spec.get("program_units", n1), spec.get("units", n2)
        errors, worst = monte_carlo(d, n2, seed)
        out["mc"] = [acceptance(e, n1, d.coverage) for e in errors]
        out["yield"], out["yield_interval"] = yield_acceptance(worst, d.limit, n1)
        if any(d.s.num(k) > 0 for k in DRIFTS):  # the end-of-life design's own Monte Carlo (§11)
            e = Design(spec.get("path"), spec.get("overrides", []), end_of_life=True)
            errors, worst = monte_carlo(e, n2, seed + 1)
            out["end_of_life_yield"], out["end_of_life_yield_interval"] = yield_acceptance(worst, e.limit, n1)
            # Its band per temperature (the program shows only the window's largest |band end|, mc_max_abs).
            out["end_of_life_mc"] = [acceptance(x, n1, e.coverage) for x in errors]
            inside = (e.t >= e.window[0] - 1e-9) & (e.t <= e.window[1] + 1e-9)
            out["end_of_life_mc_max_abs_interval"] = max_abs_acceptance(out["end_of_life_mc"], inside)
        # The spread the quantiser alone gives a reading, 1/√12 LSB over the nominal slope (IEEE Std 1241),
        # against which a source's own spread must stand out to be seen.
        none = deviations(d, {})
        slope = (front_end(d, d.t + 0.01, none)["x"] - front_end(d, d.t - 0.01, none)["x"]) / 0.02
        out["quantisation_sd"] = 1.0 / math.sqrt(12.0) / np.abs(slope)
    return plain(out)


def main():
    with open(sys.argv[1]) as f:
        batch = json.load(f)
    n1, n2, seed = batch["program_units"], batch["units"], batch.get("seed", 20)
    print(json.dumps({"designs": [run(s, n1, n2, seed) for s in batch["designs"]]}))


if __name__ == "__main__":
    main()
