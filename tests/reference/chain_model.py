#!/usr/bin/python3
"""An independent model of thermargin's whole measurement chain, with NumPy and SciPy.

Written from the project's description of the chain (docs/model.md) and of
its engines (docs/engines.md) alone: it reads a scenario INI itself (its own
engineering-notation reader, with scenarios/default.ini as the defaults, as
docs/scenarios.md says every key left out takes the built-in default), and
never imports, runs or reads anything thermargin computes. Run with Debian's
interpreter, /usr/bin/python3.

The chain is a list of small steps (FRONT_END below): each takes the state
of a batch of readings (NumPy arrays that broadcast over units or corners and
temperatures) and adds what its effect does. A new effect is one function
added to that list, plus its toleranced input in SOURCES when it has one;
the engines (nominal, worst case, linear budget, Monte Carlo) need nothing
else, because they only enumerate, differentiate and sample the deviations.

Statuses are NaN in this model's arrays plus a code (see STATUS): the
comparison test only asks which points carry a status, never their value.
"""
import configparser
import math
import os
import re

import numpy as np
from scipy.interpolate import PchipInterpolator
from scipy.linalg import expm

KELVIN = 273.15
T0 = 298.15
HERE = os.path.dirname(os.path.abspath(__file__))
DEFAULTS = os.path.join(HERE, "..", "..", "scenarios", "default.ini")

# Status codes of a reading (docs/model.md §8); 0 is a reading with a value.
OK, SATURATED, RUNAWAY, OUT_OF_TABLE, NO_CONVERSION, CALIBRATION_FAILED = range(6)
STATUS = ["ok", "saturated", "thermal-runaway", "outside-sensor-table", "no-conversion", "calibration-failed"]

# ---------------------------------------------------------------- reading the scenario

PREFIX = {"p": 1e-12, "n": 1e-9, "u": 1e-6, "µ": 1e-6, "m": 1e-3, "k": 1e3, "M": 1e6, "G": 1e9, "R": 1.0}
UNITS = [("ppm/°C", 1e-6), ("ppm/K", 1e-6), ("ppm", 1e-6), ("%", 1e-2), ("W/K", 1.0), ("kohm", None),
         ("ohm", 1.0), ("Ω", 1.0), ("°C", 1.0), ("V", 1.0), ("A", 1.0), ("kHz", 1e3), ("MHz", 1e6), ("Hz", 1.0),
         ("F", 1.0), ("s", 1.0)]


def number(text):
    """Engineering notation as docs/scenarios.md writes it: 10k, 4k7, 4R7, 470R, 2.2M, 100n, 1%, 0.5 %,
    25ppm, 25ppm/°C, 3.3V, 1.5mW/K, 10kohm, -40C, 3950K (kelvin, never kilo)."""
    s = text.strip().replace(" ", "")
    scale = 1.0
    for unit, f in UNITS:
        if s.endswith(unit):
            if f is None:  # kohm: the k is a prefix
                s, f = s[:-3], 1.0
            else:
                s = s[: -len(unit)]
            scale = f
            break
    else:
        if re.fullmatch(r"[-+]?[0-9.]+(?:[eE][-+]?[0-9]+)?[KC]", s):  # 3950K, -40C
            s = s[:-1]
    m = re.fullmatch(r"([-+]?(?:[0-9]+\.?[0-9]*|\.[0-9]+)(?:[eE][-+]?[0-9]+)?)([pnuµmkMGR]?)([0-9]*)", s)
    if not m:
        raise ValueError(f"cannot read the number {text!r}")
    mantissa = m.group(1) + ("." + m.group(3) if m.group(3) else "")  # 4k7 = 4.7k
    return float(mantissa) * PREFIX.get(m.group(2), 1.0) * scale


class Scenario:
    """The scenario's keys as text: defaults, then the file, then --section.key=value overrides."""

    def __init__(self, path, overrides=()):
        self.values, self.dir = {}, os.path.dirname(os.path.abspath(path)) if path else os.getcwd()
        self._read(DEFAULTS)
        if path:
            self._read(path)
        for o in overrides:
            key, value = o[2:].split("=", 1)
            self.values[key] = value.strip()
            if key == "sensor.table_file":  # relative to the working directory on the command line
                self.table_dir = os.getcwd()
        self.path = path

    def _read(self, path):
        cp = configparser.ConfigParser(inline_comment_prefixes=("#",), interpolation=None, strict=False)
        with open(path, encoding="utf-8-sig") as f:
            cp.read_string("[top]\n" + f.read())
        for sec in cp.sections():
            for key, value in cp.items(sec):
                self.values[key if sec == "top" else f"{sec}.{key}"] = value.strip()

    def text(self, key, default=None):
        return self.values.get(key, default)

    def num(self, key, default=None):
        v = self.values.get(key)
        return default if v is None else number(v)


# ---------------------------------------------------------------- sensor curves (docs/model.md §1)

def cvd_resistance(p, t):
    """Callendar–Van Dusen, IEC 60751: R0[1 + A t + B t² + C (t − 100) t³], C below 0 °C only."""
    t = np.asarray(t, float)
    f = 1.0 + p["A"] * t + p["B"] * t * t + np.where(t < 0.0, p["C"] * (t - 100.0) * t ** 3, 0.0)
    return p["r0"] * f


def cvd_temperature(p, r):
    """The inverse of cvd_resistance: the quadratic root above 0 °C, bisection and Newton below."""
    r = np.asarray(r, float)
    q = 1.0 - r / p["r0"]
    with np.errstate(invalid="ignore"):
        t = (-p["A"] + np.sqrt(p["A"] ** 2 - 4.0 * p["B"] * q)) / (2.0 * p["B"])
    below = r < p["r0"]
    if np.any(below):
        lo, hi = np.full(r.shape, -273.15), np.zeros(r.shape)
        for _ in range(80):
            mid = 0.5 * (lo + hi)
            up = cvd_resistance(p, mid) > r
            hi, lo = np.where(up, mid, hi), np.where(up, lo, mid)
        t = np.where(below, 0.5 * (lo + hi), t)
    return t


CLASS_BOUND = {"AA": (0.10, 0.0017), "A": (0.15, 0.002), "B": (0.30, 0.005), "C": (0.6, 0.01)}  # IEC 60751:2008 §5.1.3


def read_table(path):
    """(T kelvin, ln R_nom, limits): limits (ln R_min, ln R_max) per row when the header names a "min"
    and a "max" column or a "tol" column in % (docs/model.md §12), else None."""
    rows, header = [], None
    with open(path, encoding="utf-8-sig") as f:
        for line in f:
            line = line.split("#")[0].strip()
            if not line:
                continue
            cells = [c.strip() for c in re.split(r"[,;\t]", line)]
            try:
                rows.append([float(c.rstrip("%")) for c in cells])
            except ValueError:
                header = header or [c.lower() for c in cells]  # the header
    rows.sort()
    t = np.array([r[0] for r in rows]) + KELVIN
    lnr = np.log([r[1] for r in rows])
    limits = None
    if header:
        col = lambda word: next((i for i, h in enumerate(header) if word in h), None)
        lo, hi, tol = col("min"), col("max"), col("tol")
        if lo is not None and hi is not None:
            a, b = np.log([r[lo] for r in rows]), np.log([r[hi] for r in rows])
            limits = (np.minimum(a, b), np.maximum(a, b))
        elif tol is not None:
            f = np.array([r[tol] for r in rows]) / 100.0
            limits = (lnr + np.log1p(-f), lnr + np.log1p(f))
    return t, lnr, limits


class Sensor:
    """The nominal curve ln R(T) and its inverse, and one unit's curve (docs/model.md §1)."""

    def __init__(self, s):
        self.model = s.text("sensor.model")
        if self.model == "beta":
            self.r25, self.beta = s.num("sensor.r25"), s.num("sensor.beta")
        elif self.model == "steinhart-hart":
            self.abc = (s.num("sensor.a"), s.num("sensor.b"), s.num("sensor.c"))
        elif self.model == "table":
            base = getattr(s, "table_dir", s.dir)
            t, lnr, limits = read_table(os.path.join(base, s.text("sensor.table_file")))
            self.t_lo, self.t_hi = t[0], t[-1]
            x = 1.0 / t[::-1]
            self.pchip = PchipInterpolator(x, lnr[::-1])  # ln R against 1/T, ascending 1/T
            self.nodes_x, self.nodes_l = x, lnr[::-1]
            self.limits = None
            if limits is not None:  # h above and below, PCHIP against 1/T like the curve (§12)
                self.limits = (PchipInterpolator(x, (lnr - limits[0])[::-1]),
                               PchipInterpolator(x, (limits[1] - lnr)[::-1]))
        elif self.model == "rtd":
            self.cvd = {"r0": s.num("sensor.r0"), "A": s.num("sensor.cvd_a"), "B": s.num("sensor.cvd_b"),
                        "C": s.num("sensor.cvd_c")}
            cls = s.text("sensor.rtd_class")
            self.rtd_class = None if cls == "none" else CLASS_BOUND[cls]
        else:
            raise ValueError(f"sensor.model = {self.model}")

    def ln_r(self, T):
        """Nominal ln R at T kelvin; NaN outside a table."""
        T = np.asarray(T, float)
        if self.model == "beta":
            return math.log(self.r25) + self.beta * (1.0 / T - 1.0 / T0)
        if self.model == "steinhart-hart":
            a, b, c = self.abc
            if c == 0.0:
                return (1.0 / T - a) / b
            # C L³ + B L + (A − 1/T) = 0 has one real root (B, C > 0): Cardano, then Newton.
            p, q = b / c, (a - 1.0 / T) / c
            disc = np.sqrt(q * q / 4.0 + p ** 3 / 27.0)
            L = np.cbrt(-q / 2.0 + disc) + np.cbrt(-q / 2.0 - disc)
            for _ in range(3):
                L = L - (c * L ** 3 + b * L + a - 1.0 / T) / (3.0 * c * L * L + b)
            return L
        if self.model == "table":
            inside = (T >= self.t_lo - 1e-9) & (T <= self.t_hi + 1e-9)
            return np.where(inside, self.pchip(np.clip(1.0 / T, self.nodes_x[0], self.nodes_x[-1])), np.nan)
        r = cvd_resistance(self.cvd, T - KELVIN)
        with np.errstate(invalid="ignore", divide="ignore"):
            return np.where(r > 0, np.log(np.where(r > 0, r, 1.0)), np.nan)

    def temperature(self, L):
        """Nominal T (kelvin) for ln R = L; NaN where there is none."""
        L = np.asarray(L, float)
        with np.errstate(invalid="ignore", divide="ignore", over="ignore"):
            if self.model == "beta":
                T = 1.0 / (1.0 / T0 + (L - math.log(self.r25)) / self.beta)
            elif self.model == "steinhart-hart":
                a, b, c = self.abc
                T = 1.0 / (a + b * L + c * L ** 3)
            elif self.model == "table":
                T = self._table_inverse(L)
            else:
                T = cvd_temperature(self.cvd, np.exp(L)) + KELVIN
        return np.where(np.isfinite(T) & (T > 0), T, np.nan)

    def _table_inverse(self, L):
        """ln R is monotone in 1/T between the nodes: bisection on the interpolant, then Newton."""
        xl, xh = self.nodes_x[0], self.nodes_x[-1]
        yl, yh = self.pchip(xl), self.pchip(xh)
        inc = yh > yl
        lo_y, hi_y = min(yl, yh), max(yl, yh)
        inside = (L >= lo_y) & (L <= hi_y)
        a, b = np.full(L.shape, xl), np.full(L.shape, xh)
        Lc = np.where(inside, L, 0.5 * (yl + yh))
        for _ in range(70):
            m = 0.5 * (a + b)
            above = (self.pchip(m) > Lc) == inc
            b, a = np.where(above, m, b), np.where(above, a, m)
        x = 0.5 * (a + b)
        d = self.pchip.derivative()
        for _ in range(2):
            x = np.clip(x - (self.pchip(x) - Lc) / d(x), xl, xh)
        return np.where(inside, 1.0 / x, np.nan)

    def unit_ln_r(self, T, dev):
        """One unit's ln R at T, with its drift over life: ln R_unit + ln(1 + δ_drift) (docs/model.md §11)."""
        return self._unit_ln_r(T, dev) + np.log1p(dev("sensor_drift"))

    def _unit_ln_r(self, T, dev):
        """One unit's ln R at T: the NTC stretch about 25 °C, or the RTD's class shift (docs/model.md §1)."""
        if self.model == "rtd":
            t = np.asarray(T, float) - KELVIN
            if self.rtd_class is not None:
                c0, c1 = self.rtd_class
                t = t + dev("rtd_class") * (c0 + c1 * np.abs(t))
            return self.ln_r(t + KELVIN)
        if self.model == "table" and self.limits is not None:
            z = dev("table_spread")
            x = np.clip(1.0 / np.asarray(T, float), self.nodes_x[0], self.nodes_x[-1])
            return self.ln_r(T) + z * np.where(z > 0, self.limits[1](x), self.limits[0](x))
        l0 = self.ln_r(T0)
        return l0 + np.log1p(dev("r25")) + (1.0 + dev("beta")) * (self.ln_r(T) - l0)


# ---------------------------------------------------------------- the design


class Source:
    """A toleranced input: its JSON name, the key of its bound, the bound and its distribution."""

    def __init__(self, name, key, bound, dist="normal", gap=0.0, k=3.0):
        self.name, self.key, self.bound, self.dist, self.gap, self.k = name, key, bound, dist, gap, k


class Design:
    def __init__(self, path, overrides=(), end_of_life=False):
        s = Scenario(path, overrides)
        self.end_of_life = end_of_life  # the drift inputs active (docs/model.md §11)
        self.s = s
        self.sensor = Sensor(s)
        num, text = s.num, s.text
        ntc = self.sensor.model != "rtd"
        self.placement = text("divider.placement")
        self.rf, self.duty = num("divider.r_fixed"), num("divider.duty")
        self.r_par = None if text("divider.r_parallel") == "none" else num("divider.r_parallel")
        self.r_lead = num("sensor.lead_resistance")
        self.diss = num("sensor.dissipation")
        self.ratiometric = text("supply.ratiometric") == "true"
        self.v_exc = num("supply.v_excitation")
        self.v_ref = self.v_exc if self.ratiometric else num("supply.v_reference")
        self.bits = int(num("adc.bits"))
        self.span = 2.0 ** self.bits
        self.quantizer = text("adc.quantizer")
        self.noise, self.averaging = num("adc.noise"), int(num("adc.averaging"))
        self.conversion = text("firmware.conversion")
        self.full_scale = self.span if text("firmware.full_scale") == "pow2" else self.span - 1.0
        self.lead_comp = num("firmware.lead_compensation")
        self.resolution = num("firmware.resolution")
        self.calibration = text("firmware.calibration")
        self.cal_at = [number(v) for v in text("firmware.calibration_at").split(",")]
        self.n_cal = {"none": 0, "offset": 1, "two-point": 2}[self.calibration]
        self.t_min, self.t_max, self.t_step = num("conditions.t_min"), num("conditions.t_max"), num("conditions.t_step")
        steps = math.floor((self.t_max - self.t_min) / self.t_step + 1e-9)
        t = [self.t_min + k * self.t_step for k in range(steps + 1)]
        if self.t_max - t[-1] > 1e-9 * max(1.0, abs(self.t_max)):
            t.append(self.t_max)
        self.t = np.array(t)
        board = text("conditions.board")
        if board == "sensor":
            self.board = ("sensor",)
        elif ".." in board:
            lo, hi = (number(v) for v in board.split(".."))
            self.board = ("range", lo, hi)
        else:
            self.board = ("fixed", number(board))
        self.window = (num("requirement.window_min"), num("requirement.window_max"))
        self.limit = num("requirement.max_error")
        self.sigma_per_tol = num("montecarlo.sigma_per_tol")
        self.coverage = num("montecarlo.coverage")
        self.noise_k = num("montecarlo.noise_k")
        self.default_dist = text("montecarlo.distribution")
        self.inl_bound = text("adc.inl_shape") == "bound"
        self.r_drive, self.drive_comp = num("supply.r_drive"), num("firmware.drive_compensation")
        cal_diss = text("firmware.calibration_dissipation")
        self.cal_diss = None if cal_diss == "sensor" else number(cal_diss)
        self.acq = None
        if num("adc.c_sample") > 0:  # the sampled node (§14)
            settle = text("divider.settle_time")
            self.acq = {"c_s": num("adc.c_sample"), "c_n": num("divider.c_node"), "r_sw": num("adc.r_switch"),
                        "t_acq": num("adc.t_acq"), "rate": num("adc.sample_rate"), "precharge": text("adc.precharge"),
                        "settle": None if settle == "always" else number(settle)}
        self.sources = self._sources(ntc)
        self.firmware = Firmware(self)

    def _sources(self, ntc):
        s = self.s
        out = []

        def add(name, key, bound):
            if not bound > 0:
                return
            sec, k = key.split(".")
            dist = s.text(f"{key}_dist", "default")
            if dist == "default" and key == "adc.inl" and self.inl_bound:
                dist = "uniform"  # a datasheet's INL maximum as a uniform bound (docs/model.md §5)
            dist = self.default_dist if dist == "default" else dist
            # Coverage factor of the bound (docs/model.md "Coverage factors of a bound").
            k = s.num(f"{key}_k", 2.0 if key == "firmware.calibration_uncertainty" else self.sigma_per_tol)
            out.append(Source(name, key, bound, dist, s.num(f"{key}_gap", 0.0), k))

        for name, key, bound in SOURCES:
            add(name, key, bound(self, s, ntc))
        if self.acq is not None and self.acq["precharge"] == "any":  # uniform over [0, V_ref] (§14)
            out.append(Source("adc_precharge", "adc.precharge", 0.5, "uniform"))
        if self.board[0] == "range":
            out.append(Source("board_temperature", "conditions.board", 0.5 * (self.board[2] - self.board[1]), "uniform"))
        return out

    def board_temperature(self, t_true, dev):
        """°C of the board for one reading (docs/model.md §4)."""
        if self.board[0] == "sensor":
            return t_true
        if self.board[0] == "fixed":
            return self.board[1] + 0.0 * t_true
        return 0.5 * (self.board[1] + self.board[2]) + dev("board_temperature")


def _tempco_active(d):
    return not (d.board[0] == "fixed" and d.board[1] == 25.0)


# Every unit-level toleranced input of docs/model.md with its JSON name, the key
# of its bound and when it is active (a zero bound is never active). The board
# temperature range is added after these (Design._sources).
SOURCES = [
    ("r25", "sensor.r25_tol", lambda d, s, ntc: s.num("sensor.r25_tol") if ntc else 0.0),
    ("beta", "sensor.beta_tol", lambda d, s, ntc: s.num("sensor.beta_tol") if ntc else 0.0),
    ("rtd_class", "sensor.rtd_class", lambda d, s, ntc: 1.0 if not ntc and d.sensor.rtd_class else 0.0),
    ("dissipation", "sensor.dissipation_tol", lambda d, s, ntc: s.num("sensor.dissipation_tol") if d.diss > 0 else 0.0),
    ("r_fixed", "divider.r_fixed_tol", lambda d, s, ntc: s.num("divider.r_fixed_tol")),
    ("r_fixed_tempco", "divider.r_fixed_tempco",
     lambda d, s, ntc: s.num("divider.r_fixed_tempco") if _tempco_active(d) else 0.0),
    ("r_parallel", "divider.r_parallel_tol", lambda d, s, ntc: s.num("divider.r_parallel_tol") if d.r_par else 0.0),
    ("v_excitation", "supply.v_excitation_tol", lambda d, s, ntc: 0.0 if d.ratiometric else s.num("supply.v_excitation_tol")),
    ("v_excitation_tempco", "supply.v_excitation_tempco",
     lambda d, s, ntc: 0.0 if d.ratiometric else s.num("supply.v_excitation_tempco")),
    ("v_reference", "supply.v_reference_tol", lambda d, s, ntc: 0.0 if d.ratiometric else s.num("supply.v_reference_tol")),
    ("v_reference_tempco", "supply.v_reference_tempco",
     lambda d, s, ntc: 0.0 if d.ratiometric else s.num("supply.v_reference_tempco")),
    ("adc_offset", "adc.offset", lambda d, s, ntc: s.num("adc.offset")),
    ("adc_gain", "adc.gain_error", lambda d, s, ntc: s.num("adc.gain_error")),
    ("adc_inl", "adc.inl", lambda d, s, ntc: s.num("adc.inl")),
    ("adc_leakage", "adc.leakage", lambda d, s, ntc: s.num("adc.leakage")),
    ("adc_offset_tempco", "adc.offset_tempco", lambda d, s, ntc: s.num("adc.offset_tempco") if _tempco_active(d) else 0.0),
    ("adc_gain_tempco", "adc.gain_tempco", lambda d, s, ntc: s.num("adc.gain_tempco") if _tempco_active(d) else 0.0),
    ("r_drive", "supply.r_drive_tol", lambda d, s, ntc: s.num("supply.r_drive_tol") if d.r_drive > 0 else 0.0),
    # Drift over life, zero at delivery (§11); no effect on a ratiometric supply.
    ("sensor_drift", "sensor.drift", lambda d, s, ntc: s.num("sensor.drift") if d.end_of_life else 0.0),
    ("r_fixed_drift", "divider.r_fixed_drift", lambda d, s, ntc: s.num("divider.r_fixed_drift") if d.end_of_life else 0.0),
    ("v_excitation_drift", "supply.v_excitation_drift",
     lambda d, s, ntc: s.num("supply.v_excitation_drift") if d.end_of_life and not d.ratiometric else 0.0),
    ("v_reference_drift", "supply.v_reference_drift",
     lambda d, s, ntc: s.num("supply.v_reference_drift") if d.end_of_life and not d.ratiometric else 0.0),
    ("v_reference_hysteresis", "supply.v_reference_hysteresis",
     lambda d, s, ntc: s.num("supply.v_reference_hysteresis") if d.end_of_life and not d.ratiometric else 0.0),
    ("adc_offset_drift", "adc.offset_drift", lambda d, s, ntc: s.num("adc.offset_drift") if d.end_of_life else 0.0),
    ("adc_gain_drift", "adc.gain_drift", lambda d, s, ntc: s.num("adc.gain_drift") if d.end_of_life else 0.0),
    ("table_spread", "sensor.table_file",
     lambda d, s, ntc: 1.0 if d.sensor.model == "table" and d.sensor.limits is not None else 0.0),
    ("calibration_1", "firmware.calibration_uncertainty",
     lambda d, s, ntc: s.num("firmware.calibration_uncertainty") if d.n_cal >= 1 else 0.0),
    ("calibration_2", "firmware.calibration_uncertainty",
     lambda d, s, ntc: s.num("firmware.calibration_uncertainty") if d.n_cal == 2 else 0.0),
]


# ---------------------------------------------------------------- the analog front end, step by step

def parallel(a, b):
    return a * b / (a + b)


def branch(r_element, r_lead, r_par):
    series = r_element + r_lead
    return series if r_par is None else parallel(series, r_par)


def step_parts(d, st, dev):
    """The unit's fixed and parallel resistors and supply at the reading's board temperature (§3, §4)."""
    tb = st["t_board"]
    st["rf"] = d.rf * (1.0 + dev("r_fixed")) * (1.0 + dev("r_fixed_drift")) * (1.0 + dev("r_fixed_tempco") * (tb - 25.0))
    st["r_par"] = None if d.r_par is None else d.r_par * (1.0 + dev("r_parallel"))
    st["r_drv"] = d.r_drive * (1.0 + dev("r_drive"))  # in series with the divider's top (§15)
    if d.ratiometric:
        st["v_exc"] = st["v_ref"] = d.v_exc + 0.0 * tb
    else:
        st["v_exc"] = (d.v_exc * (1.0 + dev("v_excitation")) * (1.0 + dev("v_excitation_drift"))
                       * (1.0 + dev("v_excitation_tempco") * (tb - 25.0)))
        st["v_ref"] = (d.v_ref * (1.0 + dev("v_reference")) * (1.0 + dev("v_reference_drift"))
                       * (1.0 + dev("v_reference_hysteresis")) * (1.0 + dev("v_reference_tempco") * (tb - 25.0)))


def step_self_heating(d, st, dev):
    """T_el = T + d·P/δ, P = V_el²/R (§2), by Newton's method to 1e-12 K; runaway as §2 defines it."""
    T = st["T"]
    sensor = st["sensor"]
    if not (d.diss > 0 and d.duty > 0):
        st["T_el"] = T + 0.0 * st["rf"]
        return
    # The calibration medium's constant is taken as given, without the unit's deviation (§7).
    medium = st.get("calibration") and d.cal_diss is not None
    gain = d.duty / (d.cal_diss if medium else d.diss * (1.0 + dev("dissipation")))

    def rise(te):
        r = np.exp(sensor.unit_ln_r(te, dev))
        rb = branch(r, d.r_lead, st["r_par"])
        v = st["v_exc"] * rb / (st["rf"] + st["r_drv"] + rb) * r / (r + d.r_lead)
        return gain * v * v / r

    with np.errstate(invalid="ignore", over="ignore"):
        r0 = rise(T)
        loop = (rise(T + 1e-3) - r0) / 1e-3
        te = T + r0
        for _ in range(100):  # Newton on te − T − rise(te) = 0, the slope by a difference over 1e-4 K
            r = rise(te)
            slope = (rise(te + 1e-4) - r) / 1e-4
            step = (te - T - r) / (1.0 - slope)
            te = te - step
            moved = np.nanmax(np.abs(step)) if np.size(step) else 0.0
            if not moved > 1e-12:
                break
    outside = np.isnan(te) & (sensor.model == "table")  # heated past the table's end (§2)
    runaway = ((loop >= 1.0) | (loop < -1.0) | ~np.isfinite(te)) & ~outside
    st["status"] = np.where((st["status"] == OK) & outside, OUT_OF_TABLE, st["status"])
    st["status"] = np.where((st["status"] == OK) & runaway, RUNAWAY, st["status"])
    st["T_el"] = np.where(runaway, T, te)


def step_divider(d, st, dev):
    """The element, its leads and the parallel resistor; the node voltage with leakage (§3)."""
    l = st["sensor"].unit_ln_r(st["T_el"], dev)
    st["status"] = np.where((st["status"] == OK) & np.isnan(l), OUT_OF_TABLE, st["status"])
    rb = branch(np.exp(l), d.r_lead, st["r_par"])
    top, bottom = (st["rf"] + st["r_drv"], rb) if d.placement == "low" else (rb + st["r_drv"], st["rf"])
    st["r_th"] = parallel(top, bottom)  # the node's Thevenin resistance (§14)
    st["v_node"] = st["v_exc"] * bottom / (top + bottom) - dev("adc_leakage") * st["r_th"]


def _expm(a, t):
    """exp(A·t) of a batch of 2×2 matrices (SciPy's expm over the last two axes)."""
    return expm(a * t)


def step_sampled_node(d, st, dev):
    """The ADC's sampling capacitor on the node (§14): the mean of the M sampled voltages replaces the node's
    voltage. Deviations from the equilibrium V_th evolve as exp(A t) with the switch closed for t_acq and open
    for T_s − t_acq; C_n = 0 is the single exponential of RC charging."""
    a = d.acq
    if a is None:
        return
    v_th, r_th = st["v_node"], st["r_th"] + 0.0 * st["v_node"]
    pre = a["precharge"]
    if pre == "any":  # another channel's voltage, uniform over [0, V_ref nominal]: z of bound ½ (its own source's)
        v_start = (d.v_exc if d.ratiometric else d.v_ref) * (0.5 + dev("adc_precharge")) + 0.0 * v_th
    elif pre == "ground":
        v_start = 0.0 * v_th
    elif pre == "reference":
        v_start = st["v_ref"] + 0.0 * v_th
    elif pre == "same":
        v_start = None
    else:
        v_start = number(pre) + 0.0 * v_th
    t_acq, t_s, m = a["t_acq"], 1.0 / a["rate"], d.averaging
    if a["c_n"] == 0.0:
        e = np.exp(-t_acq / ((r_th + a["r_sw"]) * a["c_s"]))
        if a["settle"] is None:  # continuous: with `same` the capacitor already holds V_th
            st["v_node"] = v_th if v_start is None else v_th + (v_start - v_th) * e
            return
        prev, total = 0.0 * v_th, 0.0 * v_th  # switched: C_s at 0 V from power-on
        for _ in range(m):
            start = prev if v_start is None else v_start
            prev = v_th + (start - v_th) * e
            total = total + prev
        st["v_node"] = total / m
        return
    cn, cs, rsw = a["c_n"], a["c_s"], a["r_sw"]
    shape = np.shape(v_th)
    closed = np.zeros(shape + (2, 2))
    closed[..., 0, 0] = -1.0 / (r_th * cn) - 1.0 / (rsw * cn)
    closed[..., 0, 1] = 1.0 / (rsw * cn)
    closed[..., 1, 0] = 1.0 / (rsw * cs)
    closed[..., 1, 1] = -1.0 / (rsw * cs)
    opened = np.zeros(shape + (2, 2))
    opened[..., 0, 0] = -1.0 / (r_th * cn)
    phi_c, phi_o = _expm(closed, t_acq), _expm(opened, t_s - t_acq)
    if a["settle"] is None:  # the periodic steady state of the one-period map, by a linear solve
        if v_start is None:
            st["v_node"] = v_th
            return
        ds = v_start - v_th
        period = phi_o @ phi_c
        yn = period[..., 0, 1] * ds / (1.0 - period[..., 0, 0])
        st["v_node"] = v_th + phi_c[..., 1, 0] * yn + phi_c[..., 1, 1] * ds
        return
    # Switched divider: C_n (and C_s with `same`) at 0 V at power-on, the node charging for the settle time,
    # then M samples at T_s.
    y = np.stack([-v_th, (0.0 * v_th if v_start is None else v_start) - v_th], axis=-1)[..., None]
    y = _expm(opened, a["settle"]) @ y
    total = 0.0 * v_th
    for _ in range(m):
        if v_start is not None:
            y[..., 1, 0] = v_start - v_th
        y = phi_c @ y
        total = total + v_th + y[..., 1, 0]
        y = phi_o @ y
    st["v_node"] = total / m


def step_adc(d, st, dev):
    """x = V/V_ref·2^N, x' = x(1 + g) + o + i·4u(1 − u) (§5)."""
    x = st["v_node"] / st["v_ref"] * d.span
    u = x / d.span
    tb = st["t_board"] - 25.0
    inl = dev("adc_inl") * (1.0 if d.inl_bound else 4.0 * u * (1.0 - u))  # bound: ± i at every code
    st["x"] = (x * (1.0 + dev("adc_gain") + dev("adc_gain_tempco") * tb) * (1.0 + dev("adc_gain_drift"))
               + dev("adc_offset") + dev("adc_offset_drift") + dev("adc_offset_tempco") * tb + inl)


FRONT_END = [step_parts, step_self_heating, step_divider, step_sampled_node, step_adc]


def front_end(d, t, dev, t_board=None, calibration=False):
    """The ADC's static reading x' (LSB) and the status of unit(s) `dev` at true temperature(s) t (°C);
    `calibration` for a calibration reading (in the calibration medium, §7)."""
    t = np.asarray(t, float)
    st = {"T": t + KELVIN, "sensor": d.sensor, "calibration": calibration,
          "t_board": d.board_temperature(t, dev) if t_board is None else t_board}
    st["status"] = np.zeros(np.broadcast(st["T"], st["t_board"]).shape, dtype=int)
    for step in FRONT_END:
        step(d, st, dev)
    return st


# ---------------------------------------------------------------- the firmware (§6)

class Firmware:
    def __init__(self, d):
        s, sensor = d.s, d.sensor
        self.d = d
        self.ratio_scale = 1.0 if d.ratiometric else d.v_ref / d.v_exc
        t1, t2 = d.t_min + KELVIN, d.t_max + KELVIN
        if d.conversion == "beta":
            r25, beta = s.text("firmware.r25"), s.text("firmware.beta")
            if sensor.model == "beta":
                self.r25 = sensor.r25 if r25 == "sensor" else number(r25)
                self.beta = sensor.beta if beta == "sensor" else number(beta)
            else:  # the two-point B value over the range (IEC 60539-1), and the R25 of that line
                l1, l2 = float(sensor.ln_r(t1)), float(sensor.ln_r(t2))
                self.beta = (l1 - l2) / (1.0 / t1 - 1.0 / t2) if beta == "sensor" else number(beta)
                self.r25 = math.exp(l1 + self.beta * (1.0 / T0 - 1.0 / t1)) if r25 == "sensor" else number(r25)
        if d.conversion == "steinhart-hart":
            if s.text("firmware.a") == "fit":
                T = np.array([t1, 0.5 * (t1 + t2), t2])
                L = np.array([float(sensor.ln_r(x)) for x in T])
                self.abc = np.linalg.solve(np.column_stack([np.ones(3), L, L ** 3]), 1.0 / T)
            else:
                self.abc = (s.num("firmware.a"), s.num("firmware.b"), s.num("firmware.c"))
        if d.conversion == "table":
            self._build_table(int(s.num("firmware.table_points")), s.num("firmware.table_unit"),
                              s.text("firmware.table_spacing", "code"))

    def element_ln_r(self, code):
        """ln of the element resistance the firmware infers from a reading; NaN without a solution."""
        d = self.d
        rho = np.asarray(code, float) / d.full_scale * self.ratio_scale
        ok = (rho > 0) & (rho < 1)
        rho = np.where(ok, rho, 0.5)
        dc = d.drive_comp  # the drive resistance the firmware assumes in the divider's top (§15)
        rb = (d.rf + dc) * rho / (1 - rho) if d.placement == "low" else d.rf * (1 - rho) / rho - dc
        ok &= rb > 0
        rb = np.where(rb > 0, rb, 1.0)
        if d.r_par is not None:
            ok &= rb < d.r_par
            rb = 1.0 / (1.0 / rb - 1.0 / np.where(rb < d.r_par, d.r_par, np.inf))
        r = rb - d.lead_comp
        ok &= r > 0
        return np.where(ok, np.log(np.where(ok, r, 1.0)), np.nan)

    def exact(self, code):
        return self.d.sensor.temperature(self.element_ln_r(code)) - KELVIN

    def exact_code(self, t):
        """The firmware's own model forward: nominal parts and its lead compensation."""
        d = self.d
        rb = branch(np.exp(d.sensor.ln_r(t + KELVIN)), d.lead_comp, d.r_par)
        ratio = (rb if d.placement == "low" else d.rf) / (d.rf + d.drive_comp + rb)
        return ratio / self.ratio_scale * d.full_scale

    def temperature(self, code):
        """Steps 1–3: the temperature (°C) the firmware reports before rounding; NaN for no conversion."""
        conv = self.d.conversion
        if conv == "table":
            return self._table_lookup(np.asarray(code, float))
        if conv == "exact":
            return self.exact(code)
        L = self.element_ln_r(code)
        with np.errstate(invalid="ignore", divide="ignore"):
            if conv == "beta":
                T = 1.0 / (1.0 / T0 + (L - math.log(self.r25)) / self.beta)
            else:
                a, b, c = self.abc
                T = 1.0 / (a + b * L + c * L ** 3)
        return np.where(T > 0, T - KELVIN, np.nan)

    def rounded(self, t):
        r = self.d.resolution
        return t if r <= 0 else np.floor(t / r + 0.5) * r

    # The lookup table, as docs/model.md §6 describes it.
    def _solves(self, c):
        return bool(np.isfinite(self.exact(float(c))))

    def _range_codes(self):
        d = self.d
        v_ratio = 1.0 if d.ratiometric else d.v_exc / d.v_ref
        t_lo, t_hi = d.t_min, d.t_max
        if d.sensor.model == "table":
            t_lo, t_hi = max(t_lo, d.sensor.t_lo - KELVIN), min(t_hi, d.sensor.t_hi - KELVIN)
        codes = []
        for t in (t_lo, t_hi):
            L = float(d.sensor.ln_r(t + KELVIN))
            if np.isnan(L):
                codes.append(0.0 if t == t_lo else d.span)
                continue
            rb = branch(math.exp(L), d.r_lead, d.r_par)
            codes.append((rb if d.placement == "low" else d.rf) / (d.rf + rb) * v_ratio * d.span)
        return min(codes), max(codes)

    def _build_table(self, points, unit, spacing):
        d = self.d
        lo, hi = self._range_codes()
        margin = 0.05 * (hi - lo)
        first = max(math.floor(lo - margin), 1)
        last = min(math.ceil(hi + margin), int(d.span) - 2)
        while first < last and not self._solves(first):
            first += 1
        while last > first and not self._solves(last):
            last -= 1
        store = lambda t: int(math.copysign(math.floor(abs(t / unit) + 0.5), t))  # round half away from zero
        self.unit = unit
        if spacing == "temperature":
            n = min(points, last - first + 1)
            ta, tb = float(self.exact(first)), float(self.exact(last))
            codes = []
            for k in range(n):
                if k == 0:
                    c = first
                elif k == n - 1:
                    c = last
                else:
                    x = float(self.exact_code(ta + (tb - ta) * k / (n - 1)))
                    c = int(math.copysign(math.floor(abs(x) + 0.5), x)) if np.isfinite(x) else first
                    c = min(max(c, codes[-1] + 1), last - (n - 1 - k))
                codes.append(c)
            self.codes = np.array(codes, float)
        else:
            span = max(last - first, 1)
            step = max(-(-span // (points - 1)), 1)
            end = first + step * (points - 1)
            if not self._solves(end):
                top = end
                while top > last and not self._solves(top):
                    top -= 1
                moved = first - (end - top)
                while moved < first and (moved < 1 or not self._solves(moved)):
                    moved += 1
                first = moved
            codes = []
            for k in range(points):
                if not self._solves(first + step * k):
                    break
                codes.append(first + step * k)
            self.codes = np.array(codes, float)
        self.stored = np.array([store(float(self.exact(c))) for c in self.codes], float)

    def _table_lookup(self, code):
        c = self.codes
        inside = (code >= c[0]) & (code <= c[-1])
        k = np.clip(np.searchsorted(c, np.where(inside, code, c[0]), side="right") - 1, 0, len(c) - 2)
        f = (code - c[k]) / (c[k + 1] - c[k])
        v = (self.stored[k] + f * (self.stored[k + 1] - self.stored[k])) * self.unit
        return np.where(inside, v, np.nan)


# ---------------------------------------------------------------- readings, conversion and calibration

def convert(d, x, shift, out_shift, rounding):
    """A continuous reading x + shift (saturated outside [0, 2^N − 1], §5), converted (§6 steps 1–4),
    plus a shift of the output. Returns (temperature, status)."""
    c = x + shift
    sat = (c < 0) | (c > d.span - 1)
    t = d.firmware.temperature(np.where(sat, 1.0, c))
    if rounding:
        t = d.firmware.rounded(t)
    status = np.where(sat, SATURATED, np.where(np.isnan(t), NO_CONVERSION, OK))
    return t + out_shift, status


def calibrate(d, reported, reference, t):
    """§7: offset, or the straight line through the two (reading, reference) pairs."""
    if d.n_cal == 1:
        return t - (reported[0] - reference[0])
    slope = (reference[1] - reference[0]) / (reported[1] - reported[0])
    return reference[0] + (t - reported[0]) * slope


def deviations(d, values):
    """A deviation lookup over this design's sources: values maps name -> array (missing = 0)."""
    return lambda name: values.get(name, 0.0)


def evaluate(d, t, dev, shift=0.0, cal_shift=(0.0, 0.0), out_shift=0.0, cal_out=(0.0, 0.0), rounding=False):
    """The error (K) of unit(s) `dev` at t with continuous readings; NaN and a status where none."""
    fe = front_end(d, t, dev)
    rep, status = convert(d, fe["x"], shift, out_shift, rounding)
    status = np.where(fe["status"] != OK, fe["status"], status)
    if d.n_cal:
        reported, reference, cal_ok = [], [], True
        for i in range(d.n_cal):
            fc = front_end(d, d.cal_at[i], dev, calibration=True)
            r, s_ = convert(d, fc["x"], cal_shift[i], cal_out[i], rounding)
            cal_ok = cal_ok & (fc["status"] == OK) & (s_ == OK)
            reported.append(r)
            reference.append(d.cal_at[i] + dev(f"calibration_{i + 1}"))
        if d.n_cal == 2:
            cal_ok = cal_ok & (reported[1] != reported[0])
        with np.errstate(invalid="ignore", divide="ignore"):
            rep = calibrate(d, reported, reference, rep)
        status = np.where((status == OK) & ~cal_ok, CALIBRATION_FAILED, status)
    err = np.where(status == OK, rep - t, np.nan)
    return err, status
