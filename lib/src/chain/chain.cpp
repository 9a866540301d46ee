#include "thermargin/chain/chain.hpp"

#include <cmath>

#include "thermargin/chain/divider.hpp"
#include "thermargin/chain/drift.hpp"
#include "thermargin/chain/self_heating.hpp"
#include "thermargin/chain/sensor.hpp"
#include "thermargin/chain/supply.hpp"

namespace thermargin {

std::string_view to_string(Status s) {
  switch (s) {
    case Status::ok: return "ok";
    case Status::saturated: return "saturated";
    case Status::runaway: return "thermal-runaway";
    case Status::out_of_table: return "outside-sensor-table";
    case Status::no_solution: return "no-conversion";
    case Status::calibration_failed: return "calibration-failed";
  }
  return "ok";
}

std::string_view describe(Status s) {
  switch (s) {
    case Status::ok: return "ok";
    case Status::saturated: return "the ADC saturates (a sample at a rail)";
    case Status::runaway: return "thermal runaway: self-heating has no stable solution";
    case Status::out_of_table: return "the sensor is outside its R-T table";
    case Status::no_solution: return "the firmware conversion has no solution for this reading";
    case Status::calibration_failed: return "a calibration reading failed";
  }
  return "ok";
}

Chain::Chain(const Design& d)
    : d_(&d),
      firmware_(d),
      span_(d.adc_span()),
      max_code_(d.adc_span() - 1.0),
      acquisition_(acquisition_model(d)),
      sensor_curve_(d.sensor) {}

namespace {
double at(const Deviations& d, Source s) { return d[static_cast<std::size_t>(s)]; }
}  // namespace

ChainStage stage_of(Source s) {
  switch (s) {
    case Source::v_reference:
    case Source::v_reference_tempco:
    case Source::v_reference_drift:
    case Source::v_reference_hysteresis:
    case Source::adc_leakage:
    case Source::adc_precharge: return ChainStage::node;
    case Source::adc_offset:
    case Source::adc_gain:
    case Source::adc_inl:
    case Source::adc_offset_tempco:
    case Source::adc_gain_tempco:
    case Source::adc_offset_drift:
    case Source::adc_gain_drift: return ChainStage::adc;
    case Source::calibration_1:
    case Source::calibration_2: return ChainStage::calibration_reference;
    default: return ChainStage::element;
  }
}

FrontEnd Chain::front_end(const Deviations& dev, double t_c) const { return adc_stage(analog_front_end(dev, t_c), dev); }

FrontEnd Chain::adc_stage(FrontEnd fe, const Deviations& unit) const { return adc_stage(fe, adc_unit(unit)); }

AdcUnit Chain::adc_unit(const Deviations& unit) {
  Deviations scratch;
  const Deviations& dev = with_drift(unit, scratch);  // drift over life adds to the initial deviations
  AdcUnit a;
  a.offset = at(dev, Source::adc_offset);
  a.offset_tempco = at(dev, Source::adc_offset_tempco);
  a.gain = at(dev, Source::adc_gain);
  a.gain_tempco = at(dev, Source::adc_gain_tempco);
  a.inl = at(dev, Source::adc_inl);
  return a;
}

FrontEnd Chain::adc_stage(FrontEnd fe, const AdcUnit& adc) const {
  if (fe.status != Status::ok) return fe;
  fe.x_static = static_transfer(fe, adc);
  return fe;
}

double Chain::static_transfer(const FrontEnd& fe, const AdcUnit& adc) const {
  const double u = fe.x_ideal / span_;
  return adc_static(fe.x_ideal, u, 1.0 - u, adc_terms(adc, fe.t_board));
}

AdcTerms Chain::adc_terms(const AdcUnit& adc, double t_board) const {
  // The ADC's offset and gain drift with the board temperature (docs/model.md §5).
  const double drift = t_board - 25.0;
  const double offset = adc.offset + adc.offset_tempco * drift;
  // adc.inl_shape = bound: the INL deviation at every code, not the bow.
  double inl = adc.inl;
#ifdef THERMARGIN_BREAK_TERM_adc_inl  // a throwaway test build's deliberate bug (DEVELOPERS.md)
  inl = 0.0;
#endif
  const bool bound = d_->adc.inl_bound;
  return thermargin::adc_terms(adc.gain + adc.gain_tempco * drift, bound ? offset + inl : offset, bound ? 0.0 : inl);
}

FrontEnd Chain::analog_front_end(const Deviations& dev, double t_c) const {
  return node_stage(element_stage(dev, t_c), dev);
}

FrontEnd Chain::analog_calibration_front_end(const Deviations& dev, double t_cal) const {
  return node_stage(calibration_element_stage(dev, t_cal), dev);
}

ElementStage Chain::element_stage(const Deviations& dev, double t_c) const {
  return element_stage(dev, t_c, d_->sensor.dissipation, at(dev, Source::dissipation));
}

ElementStage Chain::calibration_element_stage(const Deviations& dev, double t_cal) const {
  const auto& medium = d_->firmware.calibration_dissipation;
  if (!medium) return element_stage(dev, t_cal);
  return element_stage(dev, t_cal, *medium, 0.0);
}

ElementStage Chain::element_stage(const Deviations& unit, double t_c, double dissipation, double dissipation_dev) const {
  const Design& d = *d_;
  Deviations scratch;
  const Deviations& dev = with_drift(unit, scratch);  // drift over life adds to the initial deviations
  ElementStage es;
  FrontEnd& fe = es.front;
  const SensorUnit sensor(d.sensor, sensor_curve_, at(dev, Source::r25), at(dev, Source::beta), at(dev, Source::rtd_class),
                          at(dev, Source::table_spread), at(dev, Source::sensor_drift));
  const double t_board = board_temperature(d.conditions.board, t_c, at(dev, Source::board_temperature));
  fe.t_board = t_board;
  const SupplyUnit supply = supply_unit(d.supply, dev, t_board);
  const double r_fixed =
      d.divider.r_fixed * (1.0 + at(dev, Source::r_fixed)) * (1.0 + at(dev, Source::r_fixed_tempco) * (t_board - 25.0));
  std::optional<double> r_par;
  if (d.divider.r_parallel) r_par = *d.divider.r_parallel * (1.0 + at(dev, Source::r_parallel));
  const double r_lead = d.sensor.lead_resistance;
  const double r_drive = d.supply.r_drive * (1.0 + at(dev, Source::r_drive));
  // The drive resistance is in series with the divider (docs/model.md §15):
  // for the element's voltage it adds to the fixed resistor wherever it sits.
  const double r_series = r_fixed + r_drive;

  const double t_true_k = t_c + kelvin_offset;
  double t_element = t_true_k;
  if (dissipation > 0.0 && d.divider.duty > 0.0) {
    const double gain = d.divider.duty / (dissipation * (1.0 + dissipation_dev));
    const auto rise_at = [&](double t) -> std::optional<double> {
      const auto l = sensor.ln_resistance(t);
      if (!l) return std::nullopt;
      const double r = std::exp(*l);
      const double v = element_voltage(d.divider.placement, supply.v_excitation, r_series, r, r_lead, r_par);
      return gain * v * v / r;
    };
    // Runaway already at the true temperature: the rise grows faster than the
    // temperature (loop gain d·(dP/dT)/δ ≥ 1), so the element heats until the
    // divider limits it. The iteration would jump past that and may settle
    // on a far equilibrium (thousands of kelvin): refuse it here.
    const auto r0 = rise_at(t_true_k), r1 = rise_at(t_true_k + runaway_probe);
    if (r0 && r1 && (*r1 - *r0) / runaway_probe >= 1.0) {
      fe.status = Status::runaway;
      fe.t_element = t_c + *r0;
      fe.rise = *r0;
      return es;
    }
    // The iteration starts at the true temperature, whose rise is r0 already.
    const SelfHeating sh = solve_self_heating(t_true_k, [&](double t) { return t == t_true_k ? r0 : rise_at(t); });
    if (sh.outcome == SelfHeating::Outcome::out_of_range) {
      fe.status = Status::out_of_table;
      return es;
    }
    if (sh.outcome == SelfHeating::Outcome::runaway) {
      fe.status = Status::runaway;
      fe.t_element = sh.t_element - kelvin_offset;
      fe.rise = sh.rise;
      return es;
    }
    t_element = sh.t_element;
  }
  const auto l = sensor.ln_resistance(t_element);
  if (!l) {
    fe.status = Status::out_of_table;
    return es;
  }
  const double r_element = std::exp(*l);
  fe.t_element = t_element - kelvin_offset;
  fe.rise = t_element - t_true_k;
  es.r_branch = branch_resistance(r_element, r_lead, r_par);
  es.r_fixed = r_fixed;
  es.r_drive = r_drive;
  es.v_excitation = supply.v_excitation;
  fe.r_thevenin = divider_arms(d.divider.placement, r_fixed, es.r_branch, r_drive).thevenin();
  if (acquisition_.on) es.settling = acquisition_map(acquisition_, fe.r_thevenin);
  return es;
}

FrontEnd Chain::node_stage(const ElementStage& es, const Deviations& unit) const {
  FrontEnd fe = es.front;
  if (fe.status != Status::ok) return fe;
  const Design& d = *d_;
  Deviations scratch;
  const Deviations& dev = with_drift(unit, scratch);
  const SupplyUnit supply = supply_unit(d.supply, dev, fe.t_board);
  fe.v_node = node_voltage(d.divider.placement, es.v_excitation, es.r_fixed, es.r_branch, es.r_drive,
                           at(dev, Source::adc_leakage));
  fe.x_ideal = fe.v_node / supply.v_reference * span_;
  if (acquisition_.on) {
    // The ADC digitises what its sampling capacitor holds (docs/model.md §14).
    const double v_start = precharge_voltage(d.adc, d.supply.v_reference_nominal(), supply.v_reference,
                                             at(dev, Source::adc_precharge));
    const double v_s = es.settling.apply(fe.v_node, v_start);
    const double x = v_s / supply.v_reference * span_;
    fe.acquisition_shift = x - fe.x_ideal;
    fe.x_ideal = x;
  }
  return fe;
}

std::optional<double> Chain::convert(double code, bool round_output) const {
  auto t = firmware_.temperature(code);
  if (!t) return std::nullopt;
  return round_output ? firmware_.round_output(*t) : *t;
}

void Chain::calibration_element_stages(const Deviations& dev, ElementStage (&at_cal)[2]) const {
  const FirmwareSettings& f = d_->firmware;
  for (int i = 0; i < calibration_points(f.calibration); ++i)
    at_cal[i] = calibration_element_stage(dev, f.calibration_at[static_cast<std::size_t>(i)]);
}

ElementStages Chain::element_stages(const Deviations& dev, double t_c) const {
  ElementStages s;
  s.at_t = element_stage(dev, t_c);
  calibration_element_stages(dev, s.at_cal);
  return s;
}

std::optional<CalibrationData> Chain::calibrate(const Deviations& dev, const ReadingShift& shift,
                                                bool round_output) const {
  ElementStage at_cal[2];
  calibration_element_stages(dev, at_cal);
  return calibrate(at_cal, dev, shift, round_output);
}

std::optional<CalibrationData> Chain::calibrate(const ElementStage (&at_cal)[2], const Deviations& dev,
                                                const ReadingShift& shift, bool round_output) const {
  const FirmwareSettings& f = d_->firmware;
  CalibrationData k;
  const int points = calibration_points(f.calibration);
  for (int i = 0; i < points; ++i) {
    const double t_cal = f.calibration_at[static_cast<std::size_t>(i)];
    const FrontEnd fe = adc_stage(node_stage(at_cal[i], dev), dev);
    if (fe.status != Status::ok) return std::nullopt;
    const Reading r = continuous_reading(fe.x_static, shift.at_cal[i], max_code_);
    if (r.saturated) return std::nullopt;
    const auto t = convert(r.code, round_output);
    if (!t) return std::nullopt;
    k.reported[i] = *t + shift.output_at_cal[i];
    k.reference[i] = t_cal + at(dev, i == 0 ? Source::calibration_1 : Source::calibration_2);
  }
  if (points == 2 && k.reported[1] == k.reported[0]) return std::nullopt;
  return k;
}

Evaluation Chain::finish(const FrontEnd& fe, double t_c, const Reading& r, const CalibrationData* cal,
                         bool round_output, double output_shift) const {
  Evaluation e;
  e.t_true = t_c;
  e.front = fe;
  e.code = r.code;
  if (r.saturated) {
    e.status = Status::saturated;
    return e;
  }
  const auto t = convert(r.code, round_output);
  if (!t) {
    e.status = Status::no_solution;
    return e;
  }
  const Calibration c = d_->firmware.calibration;
  if (c != Calibration::none && cal == nullptr) {
    e.status = Status::calibration_failed;
    return e;
  }
  const double converted = *t + output_shift;
  e.t_reported = cal ? apply_calibration(c, *cal, converted) : converted;
  e.error = e.t_reported - t_c;
  return e;
}

Evaluation Chain::read(const FrontEnd& fe, double t_c, const ReadingShift& shift, const CalibrationData* cal,
                       bool round_output) const {
  if (fe.status != Status::ok) {
    Evaluation e;
    e.status = fe.status;
    e.t_true = t_c;
    e.front = fe;
    return e;
  }
  return finish(fe, t_c, continuous_reading(fe.x_static, shift.at_t, max_code_), cal, round_output, shift.output_at_t);
}

Evaluation Chain::evaluate(const Deviations& dev, double t_c, const ReadingShift& shift, const CalibrationData* cal,
                           bool round_output) const {
  return read(front_end(dev, t_c), t_c, shift, cal, round_output);
}

Evaluation Chain::evaluate(const Deviations& dev, double t_c, const ReadingShift& shift, bool round_output) const {
  return evaluate(element_stages(dev, t_c), dev, t_c, shift, round_output);
}

Evaluation Chain::evaluate(const ElementStages& stages, const Deviations& dev, double t_c, const ReadingShift& shift,
                           bool round_output) const {
  const FrontEnd fe = adc_stage(node_stage(stages.at_t, dev), dev);
  if (d_->firmware.calibration == Calibration::none) return read(fe, t_c, shift, nullptr, round_output);
  const auto k = calibrate(stages.at_cal, dev, shift, round_output);
  return read(fe, t_c, shift, k ? &*k : nullptr, round_output);
}

}  // namespace thermargin
