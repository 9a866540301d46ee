#include "thermargin/chain/acquisition.hpp"

#include <limits>

namespace thermargin {

AcquisitionModel acquisition_model(const Design& d) {
  AcquisitionModel m;
  const AdcSettings& a = d.adc;
  m.on = a.samples_settle();
  if (!m.on) return m;
  m.r_sw = a.r_switch;
  m.c_s = a.c_sample;
  m.c_n = d.divider.c_node;
  m.t_acq = a.t_acq;
  m.t_open = 1.0 / a.sample_rate - a.t_acq;
  m.switched = d.divider.settle_time.has_value();
  m.settle = m.switched ? *d.divider.settle_time : 0.0;
  m.reset = a.precharge != Precharge::same;
  m.m = a.averaging;
  return m;
}

SampleMap acquisition_map(const AcquisitionModel& m, double r_th) {
  if (!m.on) return {};
  const ClosedSwitch c = closed_switch(m, r_th);
  AcquisitionExponents x = acquisition_exponents(m, r_th, c);
  for (double& v : x) v = std::exp(v);
  return acquisition_combine(m, c, x);
}

double precharge_voltage(const AdcSettings& a, double v_ref_nominal, double v_ref, double dev) {
  switch (a.precharge) {
    case Precharge::same:
    case Precharge::ground: return 0.0;
    case Precharge::reference: return v_ref;
    case Precharge::voltage: return a.v_precharge;
    case Precharge::any: return 0.5 * v_ref_nominal + dev;
  }
  return 0.0;
}

namespace {

// The smallest x in [lo, hi] with settled(x) true, by bisection in log x;
// settled must be monotone (false below the answer, true above).
template <class F>
double smallest(double lo, double hi, F settled) {
  if (!settled(hi)) return std::numeric_limits<double>::infinity();
  if (settled(lo)) return lo;
  for (int i = 0; i < 200 && hi / lo > 1.0 + 1e-6; ++i) {
    const double mid = std::sqrt(lo * hi);
    (settled(mid) ? hi : lo) = mid;
  }
  return hi;
}

}  // namespace

SettlingNeed settling_need(const Design& d, double r_th, double v_th, double v_start, double v_ref) {
  SettlingNeed need;
  AcquisitionModel m = acquisition_model(d);
  if (!m.on) return need;
  const double half_lsb = 0.5 * v_ref / d.adc_span();
  const double period = 1.0 / d.adc.sample_rate;
  const auto error_with = [&](const AcquisitionModel& mm) {
    return std::fabs(acquisition_map(mm, r_th).apply(v_th, v_start) - v_th);
  };
  // The settle time with the design's acquisition time; the acquisition
  // time with the node fully settled: each the need of its own step.
  if (m.switched && m.c_n > 0.0) {
    need.settle = smallest(1e-12, 1e6, [&](double s) {
      AcquisitionModel mm = m;
      mm.settle = s;
      return error_with(mm) <= half_lsb;
    });
    m.settle = 1e6;  // the acquisition time's need with the node settled
  }
  need.t_acq = smallest(1e-12, period, [&](double t) {
    AcquisitionModel mm = m;
    mm.t_acq = t;
    mm.t_open = period - t;
    return error_with(mm) <= half_lsb;
  });
  return need;
}

}  // namespace thermargin
