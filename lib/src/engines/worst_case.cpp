#include "thermargin/engines/worst_case.hpp"

#include "thermargin/core/parallel.hpp"

#include <algorithm>
#include <cmath>
#include <atomic>
#include <limits>
#include <thread>

#ifdef __AVX2__
#include <immintrin.h>
#endif

#include "thermargin/engines/linear_budget.hpp"

namespace thermargin {

ReadingInterval reading_interval(const Design& d) {
  const double noise = d.montecarlo.noise_k * d.adc.noise / std::sqrt(static_cast<double>(d.adc.averaging));
  if (d.adc.quantizer == Quantizer::floor) return {-1.0 - noise, noise};
  return {-0.5 - noise, 0.5 + noise};
}

namespace {

// The reading-level intervals: the reading in LSB and the output rounding in
// K, at the measured temperature and at each calibration point. The error is
// monotone in each, so only their ends matter.
struct Intervals {
  ReadingInterval reading;
  double rounding;  // ± K
};

// The analog stage of a corner's front end at each calibration point (the
// part its ADC deviations do not change).
struct CalibrationFrontEnds {
  FrontEnd at[2];
};

CalibrationFrontEnds calibration_front_ends(const Chain& chain, const Deviations& dev) {
  const Design& d = chain.design();
  CalibrationFrontEnds c;
  for (int i = 0; i < calibration_points(d.firmware.calibration); ++i)
    c.at[i] = chain.analog_calibration_front_end(dev, d.firmware.calibration_at[static_cast<std::size_t>(i)]);
  return c;
}

// Every calibration one corner's unit can receive: each calibration reading
// at either end of its reading interval and of its rounding interval.
// nullopt entries are calibrations that failed (saturation, no conversion).
// `analog`: the corner's front ends at the calibration points before the ADC
// stage (its element and node deviations; the ADC's are applied here).
std::vector<std::optional<CalibrationData>> corner_calibrations(const Chain& chain, const Deviations& dev,
                                                                const CalibrationFrontEnds& analog,
                                                                const Intervals& iv, Status& failure) {
  const Design& d = chain.design();
  const int n = calibration_points(d.firmware.calibration);
  std::vector<std::optional<CalibrationData>> out;
  if (n == 0) return out;
  // The two ends of each calibration point's converted temperature.
  double ends[2][4];
  int count[2] = {0, 0};
  for (int i = 0; i < n; ++i) {
    const FrontEnd fe = chain.adc_stage(analog.at[i], dev);
    if (fe.status != Status::ok) {
      failure = fe.status;
      out.push_back(std::nullopt);
      return out;
    }
    for (double shift : {iv.reading.lo, iv.reading.hi}) {
      const Reading r = continuous_reading(fe.x_static, shift, chain.max_code());
      const auto t = r.saturated ? std::nullopt : chain.convert(r.code, false);
      if (!t) {
        failure = r.saturated ? Status::saturated : Status::no_solution;
        out.push_back(std::nullopt);
        return out;
      }
      for (double rounding : {-iv.rounding, iv.rounding}) ends[i][count[i]++] = *t + rounding;
    }
  }
  const double ref0 = d.firmware.calibration_at[0] + dev[static_cast<std::size_t>(Source::calibration_1)];
  const double ref1 = n > 1 ? d.firmware.calibration_at[1] + dev[static_cast<std::size_t>(Source::calibration_2)] : 0.0;
  for (int a = 0; a < count[0]; ++a)
    for (int b = 0; b < (n > 1 ? count[1] : 1); ++b) {
      CalibrationData k;
      k.reported[0] = ends[0][a];
      k.reference[0] = ref0;
      if (n > 1) {
        k.reported[1] = ends[1][b];
        k.reference[1] = ref1;
        if (k.reported[1] == k.reported[0]) {
          failure = Status::calibration_failed;
          out.push_back(std::nullopt);
          continue;
        }
      }
      out.push_back(k);
    }
  return out;
}

// The lowest and highest error of one corner at temperature t.
struct CornerRange {
  bool ok = false;
  Status failure = Status::ok;
  double low = 0.0, high = 0.0;
  bool empty = true;  // no error taken yet
  // Widens [low, high] to the error e (the first error sets both ends).
  void take(double e) {
    low = empty ? e : std::min(low, e);
    high = empty ? e : std::max(high, e);
    empty = false;
  }
};

// One corner's reading at t converted at both ends of the reading
// interval, the first end first, up to the first that fails: what
// corner_range reads of a corner besides its calibrations. Corners that
// differ only in a calibration reference share it (a reference changes only
// the calibration: stage_of).
struct ConvertedReadings {
  Status failure = Status::ok;  // the front end's, or the end's that failed (saturated, no conversion)
  int converted = 0;            // the ends converted before it (2: both, no failure)
  double t[2] = {0.0, 0.0};     // °C, unrounded
};

// `fe`: the corner's front end at t.
ConvertedReadings convert_readings(const Chain& chain, const FrontEnd& fe, const Intervals& iv) {
  ConvertedReadings r;
  if (fe.status != Status::ok) {
    r.failure = fe.status;
    return r;
  }
  for (double shift : {iv.reading.lo, iv.reading.hi}) {
    const Reading reading = continuous_reading(fe.x_static, shift, chain.max_code());
    if (reading.saturated) {
      r.failure = Status::saturated;
      return r;
    }
    const auto tr = chain.convert(reading.code, false);
    if (!tr) {
      r.failure = Status::no_solution;
      return r;
    }
    r.t[r.converted++] = *tr;
  }
  return r;
}

// The corner's range from its converted readings: each end in turn, its
// failure where it failed, each end's errors folded before the next end is
// looked at (so a failed calibration is reported before a failure of the
// second end, as when the two were read in one loop).
CornerRange corner_range(const Chain& chain, const ConvertedReadings& r, double t, const Intervals& iv,
                         const std::vector<std::optional<CalibrationData>>& cals, Status cal_failure) {
  CornerRange c;
  const Calibration method = chain.design().firmware.calibration;
  for (int end = 0; end < 2; ++end) {
    if (end == r.converted) {
      c.failure = r.failure;
      return c;
    }
    for (double rounding : {-iv.rounding, iv.rounding}) {
      const double converted = r.t[end] + rounding;
      if (method == Calibration::none) {
        c.take(converted - t);
        continue;
      }
      for (const auto& k : cals) {
        if (!k) {
          c.failure = cal_failure == Status::ok ? Status::calibration_failed : cal_failure;
          return c;
        }
        c.take(apply_calibration(method, *k, converted) - t);
      }
    }
  }
  c.ok = true;
  return c;
}

// `fe`: the corner's front end at t.
CornerRange corner_range(const Chain& chain, const FrontEnd& fe, double t, const Intervals& iv,
                         const std::vector<std::optional<CalibrationData>>& cals, Status cal_failure) {
  return corner_range(chain, convert_readings(chain, fe, iv), t, iv, cals, cal_failure);
}

CornerRange evaluate_corner(const Chain& chain, const Deviations& dev, double t, const Intervals& iv) {
  Status cal_failure = Status::ok;
  const auto cals = corner_calibrations(chain, dev, calibration_front_ends(chain, dev), iv, cal_failure);
  return corner_range(chain, chain.front_end(dev, t), t, iv, cals, cal_failure);
}

void fold(WorstCasePoint& p, const CornerRange& c) {
  if (!c.ok) {
    // The lowest status code is kept, so the report does not depend on the
    // order in which corners were visited.
    ++p.failed_corners;
    if (p.failure == Status::ok || c.failure < p.failure) p.failure = c.failure;
    return;
  }
  p.low = p.any_ok ? std::min(p.low, c.low) : c.low;
  p.high = p.any_ok ? std::max(p.high, c.high) : c.high;
  p.any_ok = true;
}

// q's corners added to p's.
void merge(WorstCasePoint& p, const WorstCasePoint& q) {
  p.failed_corners += q.failed_corners;
  if (q.failure != Status::ok && (p.failure == Status::ok || q.failure < p.failure)) p.failure = q.failure;
  if (!q.any_ok) return;
  p.low = p.any_ok ? std::min(p.low, q.low) : q.low;
  p.high = p.any_ok ? std::max(p.high, q.high) : q.high;
  p.any_ok = true;
}

// Each source's own half-width at t: that source alone at its bound, or the
// reading-level source alone at its interval ends, everything else central.
std::vector<double> own_half_widths(const Chain& chain, double t, const Intervals& iv) {
  const Design& d = chain.design();
  std::vector<double> out;
  const int n = calibration_points(d.firmware.calibration);
  const double mid = 0.5 * (iv.reading.lo + iv.reading.hi);
  ReadingShift centre;
  centre.at_t = centre.at_cal[0] = centre.at_cal[1] = mid;
  const Deviations zero{};
  const Evaluation e0 = chain.evaluate(zero, t, centre, false);
  auto deviation = [&](const Deviations& dev, const ReadingShift& s) {
    const Evaluation e = chain.evaluate(dev, t, s, false);
    return (e.status == Status::ok && e0.status == Status::ok) ? std::fabs(e.error - e0.error) : 0.0;
  };
  // A tempco acts only through the board temperature's distance from 25 °C:
  // with the board a range around 25 °C, the tempco alone at the middle of
  // the range does nothing. Its half-width is therefore taken with the board
  // at each end of its range as well, against the same board without the
  // tempco, so a tempco that matters in the worst case shows in the table.
  double board_bound = 0.0;
  for (const auto& in : d.inputs)
    if (in.source == Source::board_temperature) board_bound = in.bound;
  auto is_tempco = [](Source s) {
    return s == Source::r_fixed_tempco || s == Source::v_excitation_tempco || s == Source::v_reference_tempco ||
           s == Source::adc_offset_tempco || s == Source::adc_gain_tempco;
  };
  const std::size_t board = static_cast<std::size_t>(Source::board_temperature);
  for (const auto& in : d.inputs) {
    double w = 0.0;
    const bool over_board = is_tempco(in.source) && board_bound > 0.0;
    for (double board_at : over_board ? std::vector<double>{0.0, -board_bound, board_bound} : std::vector<double>{0.0}) {
      Deviations base{};
      base[board] = board_at;
      const Evaluation e_base = chain.evaluate(base, t, centre, false);
      if (e_base.status != Status::ok) continue;
      for (double sign : {-1.0, 1.0}) {
        Deviations dev = base;
        dev[static_cast<std::size_t>(in.source)] = sign * in.bound;
        const Evaluation e = chain.evaluate(dev, t, centre, false);
        if (e.status == Status::ok && e0.status == Status::ok) w = std::max(w, std::fabs(e.error - e_base.error));
      }
    }
    out.push_back(w);
  }
  // Every sign combination over the readings (at t and each calibration point).
  auto reading_level = [&](auto apply) {
    double w = 0.0;
    for (int mask = 0; mask < (1 << (n + 1)); ++mask) {
      ReadingShift s = centre;
      for (int r = 0; r <= n; ++r) apply(s, r, (mask >> r & 1) ? 1.0 : -1.0);
      w = std::max(w, deviation(zero, s));
    }
    return w;
  };
  const double noise = d.montecarlo.noise_k * d.adc.noise / std::sqrt(static_cast<double>(d.adc.averaging));
  const double quant_half = 0.5;  // the quantiser's interval is 1 LSB wide for round and floor
  out.push_back(reading_level([&](ReadingShift& s, int r, double sign) { (r == 0 ? s.at_t : s.at_cal[r - 1]) += sign * quant_half; }));
  out.push_back(reading_level([&](ReadingShift& s, int r, double sign) { (r == 0 ? s.at_t : s.at_cal[r - 1]) += sign * noise; }));
  out.push_back(reading_level([&](ReadingShift& s, int r, double sign) {
    (r == 0 ? s.output_at_t : s.output_at_cal[r - 1]) += sign * iv.rounding;
  }));
  return out;
}

// Sensitivity-directed corners refined by a local search: starting from the
// corner the signs of the sensitivities point to, flip any input (or pair of
// inputs) whose flip moves the error further, until none does. Exact for a
// monotone model; the pair flips also find the extremes of products such as
// tempco × board temperature, whose sensitivities vanish at the nominal
// point and whose two local extremes single flips cannot leave.
CornerRange directed_extreme(const Chain& chain, double t, const Intervals& iv, const LinearPoint& lp, bool upper) {
  const Design& d = chain.design();
  const std::size_t n = d.inputs.size();
  std::vector<double> sign(n);
  for (std::size_t k = 0; k < n; ++k) {
    const double c = lp.status == Status::ok ? lp.terms[k].sensitivity : 1.0;
    sign[k] = (c >= 0.0) == upper ? 1.0 : -1.0;
  }
  auto corner = [&]() {
    Deviations dev{};
    for (std::size_t k = 0; k < n; ++k) dev[static_cast<std::size_t>(d.inputs[k].source)] = sign[k] * d.inputs[k].bound;
    return dev;
  };
  CornerRange best = evaluate_corner(chain, corner(), t, iv);
  auto better = [&](const CornerRange& a, const CornerRange& b) {  // a better than b?
    if (!a.ok) return false;
    if (!b.ok) return true;
    return upper ? a.high > b.high : a.low < b.low;
  };
  auto try_flip = [&](std::size_t a, std::size_t b) {  // b == n: a single flip
    sign[a] = -sign[a];
    if (b < n) sign[b] = -sign[b];
    const CornerRange trial = evaluate_corner(chain, corner(), t, iv);
    if (better(trial, best)) {
      best = trial;
      return true;
    }
    sign[a] = -sign[a];
    if (b < n) sign[b] = -sign[b];
    return false;
  };
  // Single flips until none helps, then pairs (a product of two inputs has
  // two local extremes that single flips cannot leave), and again.
  for (int pass = 0; pass < 16; ++pass) {
    bool improved = false;
    for (std::size_t k = 0; k < n; ++k) improved |= try_flip(k, n);
    if (improved) continue;
    for (std::size_t a = 0; a < n && !improved; ++a)
      for (std::size_t b = a + 1; b < n && !improved; ++b) improved = try_flip(a, b);
    if (!improved) break;
  }
  return best;
}

// The active inputs grouped by the stage of the chain they act in first
// (stage_of): indices into d.inputs. The calibration references change only
// the calibration, so they go with the ADC's inputs.
struct StageInputs {
  std::vector<std::size_t> element, node, adc;
};

StageInputs stage_inputs(const Design& d) {
  StageInputs g;
  for (std::size_t k = 0; k < d.inputs.size(); ++k) {
    const ChainStage s = stage_of(d.inputs[k].source);
    (s == ChainStage::element ? g.element : s == ChainStage::node ? g.node : g.adc).push_back(k);
  }
  return g;
}

void set_signs(const Design& d, Deviations& dev, const std::vector<std::size_t>& which, long long mask) {
  for (std::size_t b = 0; b < which.size(); ++b) {
    const auto& in = d.inputs[which[b]];
    dev[static_cast<std::size_t>(in.source)] = (mask >> b & 1) ? in.bound : -in.bound;
  }
}

// An uncalibrated design whose conversion is monotone over the readings
// (Firmware::monotone_between) needs, at one temperature, only the lowest
// and the highest reading any corner converts: every reading between
// converts too, and its error lies between theirs. Readings are gathered in
// the order corner_range takes them, so each corner fails (or not) exactly
// as it would there.
struct ReadingSpan {
  double lo = std::numeric_limits<double>::infinity(), hi = -std::numeric_limits<double>::infinity();
  void add(double code) {
    lo = std::min(lo, code);
    hi = std::max(hi, code);
  }
  bool empty() const { return lo > hi; }
};

struct GatheredReadings {
  ReadingSpan converted;  // every reading a corner converts, saturated ones or not
  ReadingSpan ok;         // the readings of the corners that do not saturate
  WorstCasePoint failed;  // the saturated corners, folded
};

// `node`: the corner's front end before the ADC stage, read through the
// ADC corner `adc` (Chain::static_transfer: adc_stage's reading, no copy).
void gather(const Chain& chain, const FrontEnd& node, const AdcUnit& adc, const Intervals& iv, GatheredReadings& g) {
  if (node.status != Status::ok) {
    CornerRange c;
    c.failure = node.status;
    fold(g.failed, c);
    return;
  }
  const double x_static = chain.static_transfer(node, adc);
  double codes[2];
  int n = 0;
  for (double shift : {iv.reading.lo, iv.reading.hi}) {
    const Reading r = continuous_reading(x_static, shift, chain.max_code());
    if (r.saturated) {
      CornerRange c;
      c.failure = Status::saturated;
      fold(g.failed, c);
      return;
    }
    g.converted.add(r.code);
    codes[n++] = r.code;
  }
  for (int k = 0; k < n; ++k) g.ok.add(codes[k]);
}

// The corners gathered at t folded into p, when the conversion is monotone
// between the readings and both ends convert (else false, p untouched: the
// caller evaluates corner by corner).
bool fold_gathered(const Chain& chain, const GatheredReadings& g, double t, const Intervals& iv, WorstCasePoint& p) {
  if (!g.converted.empty()) {
    if (!chain.firmware().monotone_between(g.converted.lo, g.converted.hi)) return false;
    for (double code : {g.converted.lo, g.converted.hi})
      if (!chain.convert(code, false)) return false;
  }
  WorstCasePoint q = g.failed;
  if (!g.ok.empty()) {
    CornerRange c;
    for (double code : {g.ok.lo, g.ok.hi}) {
      const double tr = *chain.convert(code, false);
      for (double rounding : {-iv.rounding, iv.rounding}) c.take((tr + rounding) - t);
    }
    c.ok = true;
    fold(q, c);
  }
  merge(p, q);
  return true;
}

// Each ADC corner's reading of the ADC's sources (Chain::adc_unit reads
// nothing else), in the order of the corners' masks.
std::vector<AdcUnit> adc_units(const Design& d, const std::vector<std::size_t>& adc_inputs) {
  std::vector<AdcUnit> out;
  for (long long m = 0; m < (1LL << adc_inputs.size()); ++m) {
    Deviations dev{};
    set_signs(d, dev, adc_inputs, m);
    out.push_back(Chain::adc_unit(dev));
  }
  return out;
}

// The usual case of one temperature's gathering, in one pass: every node
// corner read (status ok), and every corner's readings inside the ADC's
// range with the lowest above 0. Then the spans are the lowest static
// transfer plus the interval's low end and the highest plus its high end:
// rounding is monotone, so fl(x + lo) <= fl(x' + lo) for x <= x' (and
// fl(x + lo) <= fl(x + hi)), which also says that no corner's reading is
// below 0 or above the top code when those two are not; the readings are
// all positive, so no zero's sign can depend on the order. The transfer is
// Chain::static_transfer's, its parts computed once a node corner and once
// an ADC corner (adc.hpp's AdcTerms). NaN transfers are passed over, as
// ReadingSpan::add passes them over. Returns false (g untouched) when the
// case does not hold: gather() then reads each corner.
// The ADC corners' terms as arrays (a multiple of four long, padded with
// the last corner's: a repeated corner changes no minimum or maximum).
struct AdcTermArrays {
  std::vector<double> one_plus_gain, offset, inl4;
  void set(const Chain& chain, const std::vector<AdcUnit>& adc, double t_board) {
    const std::size_t n = (adc.size() + 3) / 4 * 4;
    one_plus_gain.resize(n);
    offset.resize(n);
    inl4.resize(n);
    for (std::size_t a = 0; a < n; ++a) {
      const AdcTerms t = chain.adc_terms(adc[std::min(a, adc.size() - 1)], t_board);
      one_plus_gain[a] = t.one_plus_gain;
      offset[a] = t.offset;
      inl4[a] = t.inl4;
    }
  }
};

bool gather_span(const Chain& chain, const FrontEnd* node, std::size_t stride, std::size_t node_corners,
                 const std::vector<AdcUnit>& adc, const Intervals& iv, AdcTermArrays& terms, GatheredReadings& g) {
  constexpr double inf = std::numeric_limits<double>::infinity();
  // Four lanes, each its own minimum and maximum (NaN passed over in each),
  // then the lanes' together: the same extremes as one pass over the corners.
  double lo[4] = {inf, inf, inf, inf}, hi[4] = {-inf, -inf, -inf, -inf};
  const double span = chain.span();
  for (std::size_t b = 0; b < node_corners; ++b) {
    const FrontEnd& fe = node[b * stride];
    if (fe.status != Status::ok) return false;
    if (b == 0 || !(fe.t_board == node[(b - 1) * stride].t_board)) terms.set(chain, adc, fe.t_board);
    const double x = fe.x_ideal, u = x / span, one_minus_u = 1.0 - u;
    const std::size_t n = terms.offset.size();
    const double* g1 = terms.one_plus_gain.data();
    const double* off = terms.offset.data();
    const double* i4 = terms.inl4.data();
#ifdef __AVX2__
    // The same lanes by intrinsics (GCC leaves the loop below scalar):
    // vminpd(s, lo) is s < lo ? s : lo and vmaxpd(s, hi) is hi < s ? s : hi,
    // lane by lane, NaN and zeros included; the multiplications and
    // additions are adc_static's, in its order (no contraction).
    __m256d vlo = _mm256_loadu_pd(lo), vhi = _mm256_loadu_pd(hi);
    const __m256d vx = _mm256_set1_pd(x), vu = _mm256_set1_pd(u), vw = _mm256_set1_pd(one_minus_u);
    for (std::size_t a = 0; a < n; a += 4) {
      const __m256d sum = _mm256_add_pd(_mm256_mul_pd(vx, _mm256_loadu_pd(g1 + a)), _mm256_loadu_pd(off + a));
      const __m256d bow = _mm256_mul_pd(_mm256_mul_pd(_mm256_loadu_pd(i4 + a), vu), vw);
      const __m256d v = _mm256_add_pd(sum, bow);
      vlo = _mm256_min_pd(v, vlo);
      vhi = _mm256_max_pd(v, vhi);
    }
    _mm256_storeu_pd(lo, vlo);
    _mm256_storeu_pd(hi, vhi);
#else
    for (std::size_t a = 0; a < n; a += 4)
      for (std::size_t j = 0; j < 4; ++j) {
        const double s = adc_static(x, u, one_minus_u, AdcTerms{g1[a + j], off[a + j], i4[a + j]});
        lo[j] = s < lo[j] ? s : lo[j];
        hi[j] = hi[j] < s ? s : hi[j];
      }
#endif
  }
  double low = lo[0], high = hi[0];
  for (std::size_t j = 1; j < 4; ++j) {
    low = lo[j] < low ? lo[j] : low;
    high = high < hi[j] ? hi[j] : high;
  }
  if (!(low <= high)) return false;
  const double code_lo = low + iv.reading.lo, code_hi = high + iv.reading.hi;
  if (!(code_lo > 0.0) || code_hi > chain.max_code()) return false;
  g.converted.lo = g.ok.lo = code_lo;
  g.converted.hi = g.ok.hi = code_hi;
  return true;
}

// Every node and ADC corner of one element corner gathered at each
// temperature (`node_at_t`: the node corners' front ends, nt a corner),
// temperature by temperature so that its spans stay at hand. A span's ends
// are a minimum and a maximum and the failures a count and the lowest
// status, whatever the order of the corners.
void gather_corners(const Chain& chain, const std::vector<FrontEnd>& node_at_t, const std::vector<AdcUnit>& adc,
                    const Intervals& iv, std::vector<GatheredReadings>& readings, AdcTermArrays& terms) {
  const std::size_t nt = readings.size(), node_corners = node_at_t.size() / std::max<std::size_t>(nt, 1);
  for (std::size_t i = 0; i < nt; ++i) {
    GatheredReadings g;
    if (!gather_span(chain, &node_at_t[i], nt, node_corners, adc, iv, terms, g))
      for (std::size_t b = 0; b < node_corners; ++b)
        for (const AdcUnit& a : adc) gather(chain, node_at_t[b * nt + i], a, iv, g);
    readings[i] = std::move(g);
  }
}

// Every corner: every combination of the inputs' signs, in three nested
// stages (stage_inputs): the element's (the sensor and its self-heating, the
// costly part) computed once for every corner of the node's inputs, and the
// node once for every corner of the ADC's. Threads over element corners,
// each folding into its own points; min and max are exact, so the merge
// does not depend on how corners were shared or visited.
void enumerate_corners(const Chain& chain, const std::vector<double>& temperatures, const Intervals& iv, int threads,
                       WorstCase& wc) {
  const Design& d = chain.design();
  const std::size_t nt = temperatures.size();
  wc.corners = 1LL << wc.active_inputs;
  const StageInputs g = stage_inputs(d);
  const long long element_corners = 1LL << g.element.size(), node_corners = 1LL << g.node.size(),
                  adc_corners = 1LL << g.adc.size();
  const int cal_points = calibration_points(d.firmware.calibration);
  const bool gathered = cal_points == 0;
  threads = resolve_threads(threads);
  threads = static_cast<int>(std::min<long long>({threads, std::max<long long>(1, wc.corners / 64), element_corners}));
  std::vector<std::vector<WorstCasePoint>> partial(static_cast<std::size_t>(threads), wc.points);
  const std::vector<AdcUnit> adc = gathered ? adc_units(d, g.adc) : std::vector<AdcUnit>{};
  // Of the ADC stage's inputs, the ADC's own and the calibration references.
  std::vector<std::size_t> adc_unit_inputs, reference_inputs;
  for (std::size_t k : g.adc)
    (stage_of(d.inputs[k].source) == ChainStage::calibration_reference ? reference_inputs : adc_unit_inputs).push_back(k);
  const long long unit_corners = 1LL << adc_unit_inputs.size(), reference_corners = 1LL << reference_inputs.size();
  std::atomic<long long> next{0};
  auto work = [&](int worker) {
    std::vector<WorstCasePoint>& out = partial[static_cast<std::size_t>(worker)];
    std::vector<ElementStage> at_t(nt);
    std::vector<FrontEnd> node_at_t(nt * static_cast<std::size_t>(node_corners));
    std::vector<GatheredReadings> readings(gathered ? nt : 0);
    std::vector<ConvertedReadings> converted(gathered ? 0 : nt);
    AdcTermArrays terms;
    for (long long a; (a = next.fetch_add(1)) < element_corners;) {
      Deviations dev{};
      set_signs(d, dev, g.element, a);
      for (std::size_t i = 0; i < nt; ++i) at_t[i] = chain.element_stage(dev, temperatures[i]);
      ElementStage cal_element[2];
      chain.calibration_element_stages(dev, cal_element);
      for (long long b = 0; b < node_corners; ++b) {
        set_signs(d, dev, g.node, b);
        FrontEnd* node = &node_at_t[static_cast<std::size_t>(b) * nt];
        for (std::size_t i = 0; i < nt; ++i) node[i] = chain.node_stage(at_t[i], dev);
        if (gathered) continue;
        CalibrationFrontEnds at_cal;
        for (int k = 0; k < cal_points; ++k) at_cal.at[k] = chain.node_stage(cal_element[k], dev);
        // The ADC's own corners, then the calibration references', whose
        // corners share the readings at t (adc_stage reads no reference).
        for (long long m = 0; m < unit_corners; ++m) {
          set_signs(d, dev, adc_unit_inputs, m);
          for (std::size_t i = 0; i < nt; ++i) converted[i] = convert_readings(chain, chain.adc_stage(node[i], dev), iv);
          for (long long r = 0; r < reference_corners; ++r) {
            set_signs(d, dev, reference_inputs, r);
            Status cal_failure = Status::ok;
            const auto cals = corner_calibrations(chain, dev, at_cal, iv, cal_failure);
            for (std::size_t i = 0; i < nt; ++i)
              fold(out[i], corner_range(chain, converted[i], temperatures[i], iv, cals, cal_failure));
          }
        }
      }
      if (!gathered) continue;
      gather_corners(chain, node_at_t, adc, iv, readings, terms);
      for (std::size_t i = 0; i < nt; ++i) {
        if (fold_gathered(chain, readings[i], temperatures[i], iv, out[i])) continue;
        // An end that does not convert: every corner of this element corner by itself.
        for (long long b = 0; b < node_corners; ++b) {
          set_signs(d, dev, g.node, b);
          for (long long m = 0; m < adc_corners; ++m) {
            set_signs(d, dev, g.adc, m);
            const FrontEnd fe = chain.adc_stage(node_at_t[static_cast<std::size_t>(b) * nt + i], dev);
            fold(out[i], corner_range(chain, fe, temperatures[i], iv, {}, Status::ok));
          }
        }
      }
    }
  };
  run_workers(threads, work);
  for (const auto& part : partial)
    for (std::size_t i = 0; i < nt; ++i) merge(wc.points[i], part[i]);
}

// The two corners the sensitivities' signs direct to at each temperature,
// each improved by flipping inputs (directed_extreme).
void direct_corners(const Chain& chain, const std::vector<double>& temperatures, const Intervals& iv, WorstCase& wc) {
  wc.corners = 2;
  const LinearBudget lb = linear_budget(chain, temperatures, BudgetOrder::first);  // the signs only
  for (std::size_t i = 0; i < temperatures.size(); ++i) {
    const CornerRange lo = directed_extreme(chain, temperatures[i], iv, lb.points[i], false);
    const CornerRange hi = directed_extreme(chain, temperatures[i], iv, lb.points[i], true);
    fold(wc.points[i], lo);
    fold(wc.points[i], hi);
    if (lo.ok && hi.ok) {
      wc.points[i].low = lo.low;
      wc.points[i].high = hi.high;
    }
  }
}

}  // namespace

WorstCase worst_case(const Chain& chain, const std::vector<double>& temperatures, const WorstCaseOptions& options) {
  const Design& d = chain.design();
  const CornerMethod method = options.method;
  WorstCase wc;
  wc.active_inputs = static_cast<int>(d.inputs.size());
  wc.directed = method == CornerMethod::directed ||
                (method == CornerMethod::automatic && wc.active_inputs > max_enumerated_inputs);
  const Intervals iv{reading_interval(d), 0.5 * d.firmware.resolution};
  wc.points.resize(temperatures.size());
  for (std::size_t i = 0; i < temperatures.size(); ++i) {
    wc.points[i].t = temperatures[i];
    if (options.half_widths) wc.points[i].own_half_width = own_half_widths(chain, temperatures[i], iv);
  }
  if (wc.directed) direct_corners(chain, temperatures, iv, wc);
  else enumerate_corners(chain, temperatures, iv, options.threads, wc);
  return wc;
}

}  // namespace thermargin
