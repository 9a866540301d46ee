#include "thermargin/chain/sensor.hpp"

#include <cmath>

namespace thermargin {

namespace {
std::optional<double> rtd_ln_resistance(const CallendarVanDusen& cvd, double t) {
  const double r = resistance(cvd, t - kelvin_offset);
  if (!(r > 0.0)) return std::nullopt;
  return std::log(r);
}

// One rule for SensorSettings and NominalCurve (sensor.hpp).
template <class Curve>
std::optional<double> ln_resistance_of(const Curve& s, double t) {
  switch (s.kind) {
    case SensorKind::beta: return ln_resistance(BetaCurve{s.r25, s.beta}, t);
    case SensorKind::steinhart_hart: return ln_resistance(s.sh, t);
    case SensorKind::table: return s.table->ln_resistance(t);
    case SensorKind::rtd: return rtd_ln_resistance(s.cvd, t);
  }
  return std::nullopt;
}

template <class Curve>
std::optional<double> temperature_of(const Curve& s, double ln_r) {
  if (!std::isfinite(ln_r)) return std::nullopt;
  double t = 0.0;
  switch (s.kind) {
    case SensorKind::beta: t = temperature_kelvin(BetaCurve{s.r25, s.beta}, ln_r); break;
    case SensorKind::steinhart_hart: t = temperature_kelvin(s.sh, ln_r); break;
    case SensorKind::table: return s.table->temperature_kelvin(ln_r);
    case SensorKind::rtd: t = temperature_celsius(s.cvd, std::exp(ln_r)) + kelvin_offset; break;
  }
  if (!(t > 0.0) || !std::isfinite(t)) return std::nullopt;
  return t;
}

}  // namespace

NominalCurve nominal_curve(const SensorSettings& s) { return {s.kind, s.r25, s.beta, s.sh, s.table, s.cvd}; }

std::optional<double> nominal_ln_resistance(const SensorSettings& s, double t) { return ln_resistance_of(s, t); }
std::optional<double> nominal_ln_resistance(const NominalCurve& s, double t) { return ln_resistance_of(s, t); }
std::optional<double> nominal_temperature(const SensorSettings& s, double ln_r) { return temperature_of(s, ln_r); }
std::optional<double> nominal_temperature(const NominalCurve& s, double ln_r) { return temperature_of(s, ln_r); }

std::optional<double> nominal_ln_resistance_slope(const SensorSettings& s, double t) {
  switch (s.kind) {
    case SensorKind::beta: return ln_resistance_slope(BetaCurve{s.r25, s.beta}, t);
    case SensorKind::steinhart_hart: return ln_resistance_slope(s.sh, t);
    case SensorKind::table: return s.table->ln_resistance_slope(t);
    case SensorKind::rtd: {
      const double tc = t - kelvin_offset;
      return resistance_slope(s.cvd, tc) / resistance(s.cvd, tc);
    }
  }
  return std::nullopt;
}

SensorCurve::SensorCurve(const SensorSettings& s) {
  if (s.kind == SensorKind::beta) beta = BetaLn(BetaCurve{s.r25, s.beta});
  if (s.kind == SensorKind::rtd && s.rtd_class) rtd_line = class_line(*s.rtd_class);
  if (s.kind != SensorKind::rtd) {
    // The stretch is about T0; a table that misses 25 °C has been refused
    // upstream whenever a tolerance is active, so ln_r0 is only used then.
    const auto l0 = s.kind == SensorKind::beta ? std::optional<double>(thermargin::ln_resistance(beta, t0_kelvin))
                                               : nominal_ln_resistance(s, t0_kelvin);
    if (l0) ln_r0 = *l0;
  }
}

SensorUnit::SensorUnit(const SensorSettings& s, double delta_r25, double delta_beta, double rtd_k, double table_z,
                       double drift)
    : SensorUnit(s, SensorCurve(s), delta_r25, delta_beta, rtd_k, table_z, drift) {}

SensorUnit::SensorUnit(const SensorSettings& s, const SensorCurve& curve, double delta_r25, double delta_beta,
                       double rtd_k, double table_z, double drift)
    : s_(&s),
      beta_(curve.beta),
      rtd_line_(curve.rtd_line),
      ln_r0_(curve.ln_r0),
      rtd_k_(rtd_k),
      table_z_(table_z),
      drift_shift_(std::log1p(drift)),
      beta_unit_(s.kind == SensorKind::beta && table_z == 0.0) {
  if (s.kind != SensorKind::rtd) {
    shift_ = std::log1p(delta_r25);
    stretch_ = 1.0 + delta_beta;
  }
}

std::optional<double> SensorUnit::nominal(double t) const {
  if (s_->kind == SensorKind::beta) return thermargin::ln_resistance(beta_, t);
  return nominal_ln_resistance(*s_, t);
}

std::optional<double> SensorUnit::curve_ln_resistance(double t) const {
  if (s_->kind == SensorKind::rtd) {
    const double tc = t - kelvin_offset;
    const double bound = s_->rtd_class ? rtd_line_.at(tc) : 0.0;
    const auto l = rtd_ln_resistance(s_->cvd, t + rtd_k_ * bound);
    if (!l || drift_shift_ == 0.0) return l;
    return *l + drift_shift_;
  }
  auto l = nominal(t);
  if (!l) return std::nullopt;
  if (table_z_ != 0.0) {
    const auto h = s_->table->spread(t, table_z_ > 0.0);
    if (!h) return std::nullopt;
    *l += table_z_ * *h;
  }
  // The drift over life shifts the unit's curve as it is (outside the stretch).
  if (shift_ == 0.0 && stretch_ == 1.0) return drift_shift_ == 0.0 ? l : *l + drift_shift_;
  const double unit = ln_r0_ + shift_ + stretch_ * (*l - ln_r0_);
  return drift_shift_ == 0.0 ? unit : unit + drift_shift_;
}

}  // namespace thermargin
