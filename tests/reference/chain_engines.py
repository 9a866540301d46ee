#!/usr/bin/python3
"""The four engines of docs/engines.md over the independent chain of chain_model.py.

nominal (every deviation 0, continuous readings, no output rounding),
worst case (every corner of the tolerance box enumerated, the reading and
output-rounding intervals at their ends, every calibration reading's ends),
linear budget (JCGM 100:2008 §5.1.2: central differences, u_c² = Σ (c_i u_i)²,
band = centre ± k_p u_c) and Monte Carlo (JCGM 101:2008: units drawn with
NumPy's own generator, each reading sampled sample by sample).

Nothing here reads thermargin's output. The Monte Carlo part also returns,
for a run of the program with a given number of units, the interval each of
the program's statistics must fall in (docs/checks.md derives them).
"""
import itertools
import math

import numpy as np
from scipy import integrate, stats

from chain_model import OK, STATUS, convert, calibrate, deviations, evaluate, front_end

# ---------------------------------------------------------------- nominal


def nominal(d):
    fe = front_end(d, d.t, deviations(d, {}))
    err, status = evaluate(d, d.t, deviations(d, {}))
    return {"nominal": err, "status": [STATUS[s] for s in status], "self_heating": fe["T_el"] - fe["T"],
            "v_node": fe["v_node"], "code": fe["x"]}


# ---------------------------------------------------------------- worst case


def reading_interval(d):
    noise = d.noise_k * d.noise / math.sqrt(d.averaging)
    return (-1.0 - noise, noise) if d.quantizer == "floor" else (-0.5 - noise, 0.5 + noise)


def worst_case(d):
    n = len(d.sources)
    signs = np.array(list(itertools.product((-1.0, 1.0), repeat=n))).reshape(2 ** n, n)
    dev = deviations(d, {s.name: (signs[:, i] * s.bound)[:, None] for i, s in enumerate(d.sources)})
    lo_r, hi_r = reading_interval(d)
    half = 0.5 * d.resolution
    fe = front_end(d, d.t[None, :], dev)
    ok = fe["status"] == OK
    # The calibrations each corner can receive: each calibration reading at
    # either end of its reading and rounding intervals.
    cal_ends = []
    for i in range(d.n_cal):
        fc = front_end(d, np.array([d.cal_at[i]]), dev, calibration=True)
        ends = []
        for shift in (lo_r, hi_r):
            r, s_ = convert(d, fc["x"], shift, 0.0, False)
            ok &= (fc["status"] == OK) & (s_ == OK)
            ends += [r - half, r + half]
        cal_ends.append(ends)
    low = np.full(ok.shape, np.inf)
    high = np.full(ok.shape, -np.inf)
    for shift in (lo_r, hi_r):
        rep, s_ = convert(d, fe["x"], shift, 0.0, False)
        ok &= s_ == OK
        for rounding in (-half, half):
            converted = rep + rounding
            combos = itertools.product(*cal_ends) if d.n_cal else [()]
            for combo in combos:
                if d.n_cal:
                    reference = [d.cal_at[i] + dev(f"calibration_{i + 1}") for i in range(d.n_cal)]
                    if d.n_cal == 2:
                        ok &= combo[1] != combo[0]
                    with np.errstate(invalid="ignore", divide="ignore"):
                        e = calibrate(d, list(combo), reference, converted) - d.t
                else:
                    e = converted - d.t
                low, high = np.fmin(low, e), np.fmax(high, e)
    low, high = np.where(ok, low, np.inf), np.where(ok, high, -np.inf)
    any_ok = ok.any(axis=0)
    return {"wc_low": np.where(any_ok, low.min(axis=0), np.nan), "wc_high": np.where(any_ok, high.max(axis=0), np.nan),
            "wc_failed_corners": (~ok).sum(axis=0), "wc_corners": 2 ** n}


# ---------------------------------------------------------------- linear budget


def standard_uncertainty(src):
    a = src.bound
    if src.dist == "normal":
        return a / src.k
    if src.dist == "uniform":
        return a / math.sqrt(3.0)  # JCGM 100:2008 §4.3.7
    if src.dist == "triangular":
        return a / math.sqrt(6.0)  # JCGM 100:2008 §4.3.9
    s = a / src.k  # gapped: N(0, s²) on gap ≤ |x| ≤ a, its second moment by quadrature
    pdf = stats.norm(0.0, s).pdf
    m2 = integrate.quad(lambda x: x * x * pdf(x), src.gap, a, epsabs=0, epsrel=1e-12)[0]
    m0 = integrate.quad(pdf, src.gap, a, epsabs=0, epsrel=1e-12)[0]
    return math.sqrt(m2 / m0)


RELATIVE_STEP = 1e-3  # of each bound, docs/engines.md


def linear_budget(d):
    k_p = stats.norm.ppf(0.5 + 0.5 * d.coverage)
    mean_shift = -0.5 if d.quantizer == "floor" else 0.0
    cal_shift = (mean_shift, mean_shift)

    def error(values, shift=mean_shift, cal=cal_shift, out=0.0, cal_out=(0.0, 0.0)):
        return evaluate(d, d.t, deviations(d, values), shift, cal, out, cal_out)[0]

    centre = error({})
    contributions, var = {}, np.zeros(d.t.shape)
    for s in d.sources:
        h = s.bound * RELATIVE_STEP
        c = (error({s.name: h}) - error({s.name: -h})) / (2 * h)
        contributions[s.name] = np.abs(c) * standard_uncertainty(s)
    h = 1e-3  # LSB on a reading, K on a converted temperature
    slope_sq, out_sq = np.zeros(d.t.shape), np.zeros(d.t.shape)
    for r in range(d.n_cal + 1):
        def shifted(dh, output):
            cal, cal_out = list(cal_shift), [0.0, 0.0]
            shift, out = mean_shift, 0.0
            if r == 0:
                shift, out = (shift, dh) if output else (shift + dh, out)
            elif output:
                cal_out[r - 1] = dh
            else:
                cal[r - 1] += dh
            return error({}, shift, tuple(cal), out, tuple(cal_out))
        slope_sq += ((shifted(h, False) - shifted(-h, False)) / (2 * h)) ** 2
        out_sq += ((shifted(h, True) - shifted(-h, True)) / (2 * h)) ** 2
    contributions["quantization"] = np.sqrt(slope_sq) / math.sqrt(12.0)  # IEEE Std 1241: ideal quantiser
    contributions["noise"] = np.sqrt(slope_sq) * d.noise / math.sqrt(d.averaging)
    contributions["resolution"] = np.sqrt(out_sq) * d.resolution / math.sqrt(12.0)
    rows = {name: c * c for name, c in contributions.items()}
    first = sum(rows.values())
    slopes = {s.name: (error({s.name: s.bound * RELATIVE_STEP}) - error({s.name: -s.bound * RELATIVE_STEP}))
              / (2 * s.bound * RELATIVE_STEP) for s in d.sources}
    second_order(d, error, slopes, rows, first)
    var = sum(rows.values())
    u_c = np.sqrt(var)
    with np.errstate(invalid="ignore", divide="ignore"):
        shares = {name: r / var for name, r in rows.items() if not name.endswith("(negligible)")}
    return {"rss_low": centre - k_p * u_c, "rss_high": centre + k_p * u_c, "u_c": u_c, "contributions": contributions,
            "shares": shares}


def kurtosis(src):
    """E[x⁴]/u⁴ of a source's distribution: 3 normal, 9/5 uniform, 12/5 triangular, the truncated normal's."""
    if src.dist == "normal":
        return 3.0
    if src.dist == "uniform":
        return 9.0 / 5.0
    if src.dist == "triangular":
        return 12.0 / 5.0
    pdf = stats.norm(0.0, src.bound / src.k).pdf
    m = [integrate.quad(lambda x, p=p: x ** p * pdf(x), src.gap, src.bound, epsabs=0, epsrel=1e-12)[0] for p in (0, 2, 4)]
    return m[2] * m[0] / (m[1] * m[1])


def second_order(d, error, slopes, rows, first):
    """JCGM 100:2008 §5.1.2, the note to eq. 10, as docs/engines.md writes it: central differences at
    h_i = u_i/4; a pair's c_ij² u_i² u_j² its own row (when ≥ 1e-4 of the first-order u_c²), its
    c_i c_ijj u_i² u_j² in input i's row; an input's own [¼(κ − 1) c_ii² + (κ/3) c_i c_iii] u_i⁴ in its row."""
    src = d.sources
    u = {s.name: standard_uncertainty(s) for s in src}
    pairs = list(itertools.combinations(src, 2))
    # Every step in one batch of units (rows) over the temperatures (columns).
    points = [{s.name: m * u[s.name] / 4.0} for s in src for m in (-2, -1, 1, 2)]
    points += [{a.name: p * u[a.name] / 4.0, b.name: q * u[b.name] / 4.0}
               for a, b in pairs for p in (-1, 1) for q in (-1, 1)]
    names = {n for p in points for n in p}
    values = error({n: np.array([p.get(n, 0.0) for p in points])[:, None] for n in names})
    rows_of = iter(values)
    f0 = error({})
    one = {}
    for s in src:
        h = u[s.name] / 4.0
        f = {m: next(rows_of) for m in (-2, -1, 1, 2)}
        one[s.name] = f
        c_ii = (f[1] - 2.0 * f0 + f[-1]) / h ** 2
        c_iii = (f[2] - 2.0 * f[1] + 2.0 * f[-1] - f[-2]) / (2.0 * h ** 3)
        kappa = kurtosis(s)
        term = (0.25 * (kappa - 1.0) * c_ii ** 2 + kappa / 3.0 * slopes[s.name] * c_iii) * u[s.name] ** 4
        rows[s.name] = rows[s.name] + np.nan_to_num(term)
    for a, b in pairs:
        hi, hj = u[a.name] / 4.0, u[b.name] / 4.0
        f = {(p, q): next(rows_of) for p in (-1, 1) for q in (-1, 1)}
        c_ij = (f[1, 1] - f[1, -1] - f[-1, 1] + f[-1, -1]) / (4.0 * hi * hj)
        # i's slope bending with x_j, and j's with x_i
        c_ijj = ((f[1, 1] + f[1, -1] - 2.0 * one[a.name][1]) - (f[-1, 1] + f[-1, -1] - 2.0 * one[a.name][-1])) \
            / (2.0 * hi * hj * hj)
        c_iij = ((f[1, 1] + f[-1, 1] - 2.0 * one[b.name][1]) - (f[1, -1] + f[-1, -1] - 2.0 * one[b.name][-1])) \
            / (2.0 * hj * hi * hi)
        uu = u[a.name] ** 2 * u[b.name] ** 2
        rows[a.name] = rows[a.name] + np.nan_to_num(slopes[a.name] * c_ijj * uu)
        rows[b.name] = rows[b.name] + np.nan_to_num(slopes[b.name] * c_iij * uu)
        pair = np.nan_to_num(c_ij ** 2 * uu)
        if np.any(pair >= 1e-4 * first):
            rows[f"{a.name} × {b.name}"] = pair
        else:
            rows[f"{a.name} × {b.name} (negligible)"] = pair


# ---------------------------------------------------------------- Monte Carlo


def draw(rng, src, n):
    a = src.bound
    if src.dist == "normal":
        return rng.normal(0.0, a / src.k, n)
    if src.dist == "uniform":
        return rng.uniform(-a, a, n)
    if src.dist == "triangular":
        return rng.triangular(-a, 0.0, a, n)
    s = a / src.k
    x = stats.truncnorm.rvs(src.gap / s, a / s, scale=s, size=n, random_state=rng)
    return np.where(rng.uniform(size=n) < 0.5, -x, x)


def sampled_reading(d, rng, x, rounding):
    """M samples Q(x' + n), each clamped to [0, 2^N − 1]; their mean; saturated if any was clamped (§5)."""
    total = np.zeros(x.shape)
    sat = np.zeros(x.shape, bool)
    for _ in range(d.averaging):
        v = x + (rng.normal(0.0, d.noise, x.shape) if d.noise > 0 else 0.0)
        q = np.floor(v + 0.5) if d.quantizer == "round" else np.floor(v)
        sat |= (q < 0) | (q > d.span - 1)
        total += np.clip(q, 0, d.span - 1)
    code = total / d.averaging
    t = d.firmware.temperature(np.where(sat, 1.0, code))
    if rounding:
        t = d.firmware.rounded(t)
    return t, sat | np.isnan(t)


def board_draw(d, rng, n):
    """The inputs drawn per reading: the board temperature in its range, another channel's precharge (§14)."""
    out = {}
    if d.acq is not None and d.acq["precharge"] == "any":
        out["adc_precharge"] = rng.uniform(-0.5, 0.5, n)
    if d.board[0] != "range":
        return out
    out["board_temperature"] = rng.uniform(d.board[1], d.board[2], n) - 0.5 * (d.board[1] + d.board[2])
    return out


def monte_carlo(d, units, seed):
    """Per temperature the valid units' errors; per unit the window's largest |error| (inf if a reading failed)."""
    rng = np.random.default_rng(seed)
    unit = {s.name: draw(rng, s, units) for s in d.sources if s.name not in ("board_temperature", "adc_precharge")}
    cal_ok = np.ones(units, bool)
    reported, reference = [], []
    for i in range(d.n_cal):
        dev = deviations(d, {**unit, **board_draw(d, rng, units)})
        fc = front_end(d, np.full(units, d.cal_at[i]), dev, calibration=True)
        t, bad = sampled_reading(d, rng, fc["x"], True)
        cal_ok &= (fc["status"] == OK) & ~bad
        reported.append(t)
        reference.append(d.cal_at[i] + dev(f"calibration_{i + 1}"))
    if d.n_cal == 2:
        cal_ok &= reported[1] != reported[0]
    errors, worst = [], np.zeros(units)
    for t in d.t:
        dev = deviations(d, {**unit, **board_draw(d, rng, units)})
        fe = front_end(d, np.full(units, t), dev)
        rep, bad = sampled_reading(d, rng, fe["x"], True)
        if d.n_cal:
            with np.errstate(invalid="ignore", divide="ignore"):
                rep = calibrate(d, reported, reference, rep)
            bad |= ~cal_ok
        bad |= fe["status"] != OK
        e = rep - t
        errors.append(e[~bad])
        if d.window[0] - 1e-9 <= t <= d.window[1] + 1e-9:
            worst = np.maximum(worst, np.where(bad, np.inf, np.abs(e)))
    return errors, worst


# Acceptance limits for the program's Monte Carlo statistics from a run of
# `n1` units against this model's `n2` (docs/checks.md, "Monte Carlo").
Z = 4.5  # standard normal quantile; two-sided false-alarm probability 7e-6 per statistic
HISTOGRAM_BINS = 8192  # the program's histogram per temperature (docs/engines.md)


def acceptance(e, n1, coverage, worst=None, limit=None):
    """Intervals the program's mc_low, mc_high, mc_mean, mc_stddev must fall in."""
    n2 = e.size
    out = {}
    if n2 < 10:
        return out
    s = np.sort(e)
    # Quantiles: the program's estimate of the p-quantile sits, in this model's
    # distribution, at a probability within z·√(p(1−p)(1/n1 + 1/n2)) of p; the
    # interval is this sample's order statistics at those probabilities, widened by
    # the program's histogram bin (its pilot range, widened by half on each side).
    slack = 4.0 * (s[-1] - s[0]) / HISTOGRAM_BINS + 1e-12
    for name, p in (("mc_low", 0.5 * (1 - coverage)), ("mc_high", 0.5 * (1 + coverage))):
        w = Z * math.sqrt(p * (1 - p) * (1.0 / n1 + 1.0 / n2)) + 1.0 / n2
        lo = s[max(int(math.floor((p - w) * n2)), 0)] if p - w > 0 else -np.inf
        hi = s[min(int(math.ceil((p + w) * n2)), n2 - 1)] if p + w < 1 else np.inf
        out[name] = (lo - slack, hi + slack)
    mean, sd = float(e.mean()), float(e.std(ddof=1))
    w = Z * sd * math.sqrt(1.0 / n1 + 1.0 / n2)
    out["mc_mean"] = (mean - w - 1e-12, mean + w + 1e-12)
    # ln s² has variance (κ − 1)/n for a distribution of kurtosis κ (2/n for a normal:
    # the F test's large-sample form); κ from this sample.
    kurt = float(np.mean((e - mean) ** 4) / max(np.mean((e - mean) ** 2) ** 2, 1e-300)) if sd > 0 else 3.0
    w = Z * math.sqrt(max(kurt - 1.0, 0.1) * (1.0 / n1 + 1.0 / n2))
    out["mc_stddev"] = (sd * math.exp(-w / 2) - 1e-12, sd * math.exp(w / 2) + 1e-12)
    out["mc_mean_model"], out["mc_stddev_model"] = mean, sd
    return out


def max_abs_acceptance(accepted, inside):
    """The interval the program's window.mc_max_abs (the largest |mc_low| or |mc_high| over the window's
    readable temperatures, docs/engines.md) must fall in, from each band end's own interval: |x| of an x in
    [a, b] lies in [0 or min(|a|, |b|), max(|a|, |b|)], and a largest of values each in an interval lies
    between the largest lower and the largest upper end."""
    lo, hi = 0.0, 0.0
    for a, keep in zip(accepted, inside):
        if not keep or "mc_low" not in a:
            continue
        for end in ("mc_low", "mc_high"):
            x, y = a[end]
            lo = max(lo, 0.0 if x <= 0.0 <= y else min(abs(x), abs(y)))
            hi = max(hi, abs(x), abs(y))
    return lo, hi


def yield_acceptance(worst, limit, n1):
    n2 = worst.size
    y = float(np.mean(worst <= limit))
    yy = (y * n2 + 0.5) / (n2 + 1)  # never 0 or 1, so an interval remains (continuity correction)
    w = Z * math.sqrt(yy * (1 - yy) * (1.0 / n1 + 1.0 / n2))
    return y, (y - w, y + w)
