// The whole measurement chain of one unit at one true temperature:
// sensor → self-heating → divider → supply → ADC → firmware → calibration
// (docs/model.md §1–§7). Every engine evaluates this; the Monte Carlo kernel
// runs the same steps on blocks of units (monte_carlo.hpp) and is tested
// against it.
//
// A unit is an array of deviations (sources.hpp); a reading is either
// continuous (the quantiser replaced by the identity plus a shift in LSB:
// the nominal, worst-case and linear engines) or sampled (noise, quantiser,
// clamping, averaging: Monte Carlo). Physical limits are a Status, never a
// number: saturation, thermal runaway, a sensor outside its table, a
// conversion without a solution.
#pragma once

#include <cstdint>
#include <optional>
#include <string_view>

#include "thermargin/chain/acquisition.hpp"
#include "thermargin/chain/adc.hpp"
#include "thermargin/chain/calibration.hpp"
#include "thermargin/input/design.hpp"
#include "thermargin/chain/firmware.hpp"
#include "thermargin/chain/sensor.hpp"

namespace thermargin {

enum class Status : std::uint8_t { ok, saturated, runaway, out_of_table, no_solution, calibration_failed };
std::string_view to_string(Status s);
std::string_view describe(Status s);  // one phrase for a reviewer

struct FrontEnd {
  Status status = Status::ok;
  double t_element = 0.0;  // °C
  double rise = 0.0;       // K, self-heating
  double v_node = 0.0;     // V at the ADC pin
  double x_ideal = 0.0;    // LSB, V/V_ref·2^N
  double x_static = 0.0;   // LSB, after gain, offset and INL
  double r_thevenin = 0.0;          // Ω, the divider seen from the node (with the drive)
  double acquisition_shift = 0.0;   // LSB in x_ideal: the settled sample minus the node (docs/model.md §14)
  double t_board = 25.0;   // °C, the board temperature of this reading (the ADC's drift)
};

struct Evaluation {
  Status status = Status::ok;
  double t_true = 0.0;      // °C
  FrontEnd front;
  double code = 0.0;        // LSB, the reading
  double t_reported = 0.0;  // °C
  double error = 0.0;       // K, reported − true
};

// Shifts of continuous readings: in LSB on the reading (quantisation,
// noise) at the measured temperature and at the (up to two) calibration
// points; in K on each converted temperature (the output rounding, which the
// firmware applies to every reading before calibration, docs/model.md §6).
struct ReadingShift {
  double at_t = 0.0;
  double at_cal[2] = {0.0, 0.0};
  double output_at_t = 0.0;
  double output_at_cal[2] = {0.0, 0.0};
};

// The analog stage's first part: the element (sensor, self-heating) and the
// parts its temperature depends on, which the node's and the ADC's own
// deviations do not change (stage_of() below). The worst case computes it
// once for every corner of the later stages.
struct ElementStage {
  FrontEnd front;               // status, t_element, rise, t_board, r_thevenin
  double r_branch = 0.0;        // Ω, the element with its leads and parallel resistor
  double r_fixed = 0.0;         // Ω, at the board temperature
  double r_drive = 0.0;         // Ω
  double v_excitation = 0.0;    // V
  SampleMap settling;           // the sampled node's map at r_thevenin (docs/model.md §14)
};

// The element stages one evaluation reads: at the measured temperature and
// at each calibration point (Chain::element_stages).
struct ElementStages {
  ElementStage at_t;
  ElementStage at_cal[2];
};

// Which stage of the chain a source acts in first: a source of a later
// stage never changes an earlier one (drift over life belongs to its part's
// stage), so an engine may share an earlier stage among the corners of the
// later ones.
// A unit's ADC deviations, drift over life folded in: what the ADC stage
// reads of a unit (Chain::adc_unit).
struct AdcUnit {
  double offset = 0.0, offset_tempco = 0.0;  // LSB, LSB/K
  double gain = 0.0, gain_tempco = 0.0;      // relative, 1/K
  double inl = 0.0;                          // LSB
};

enum class ChainStage { element, node, adc, calibration_reference };
ChainStage stage_of(Source s);

class Chain {
 public:
  // The chain keeps a reference to the design: it must outlive the chain,
  // so a temporary design is refused at compile time.
  explicit Chain(const Design& d);
  explicit Chain(const Design&& d) = delete;

  const Design& design() const { return *d_; }
  const AcquisitionModel& acquisition() const { return acquisition_; }
  const Firmware& firmware() const { return firmware_; }
  // The element's nominal curve constants, taken once (SensorUnit's).
  const SensorCurve& sensor_curve() const { return sensor_curve_; }
  double max_code() const { return max_code_; }

  // Sensor, self-heating, divider, supply and the ADC's static transfer.
  FrontEnd front_end(const Deviations& dev, double t_celsius) const;
  // The same in two stages: up to the ideal ADC input (x_ideal; x_static
  // left 0), which the ADC's gain, offset and INL deviations do not change,
  // then the ADC's static transfer (a failed front end passes unchanged).
  // front_end(dev, t) is adc_stage(analog_front_end(dev, t), dev), to the
  // bit: the worst case reuses one analog stage for every ADC corner.
  FrontEnd analog_front_end(const Deviations& dev, double t_celsius) const;
  // The analog stage of a calibration reading at t_cal: self-heating in the
  // calibration medium (firmware.calibration_dissipation, without the unit's
  // dissipation deviation), else exactly analog_front_end.
  FrontEnd analog_calibration_front_end(const Deviations& dev, double t_cal) const;
  FrontEnd adc_stage(FrontEnd fe, const Deviations& dev) const;
  // The same from the unit's ADC deviations alone: adc_stage(fe, dev) is
  // adc_stage(fe, adc_unit(dev)), to the bit.
  static AdcUnit adc_unit(const Deviations& dev);
  FrontEnd adc_stage(FrontEnd fe, const AdcUnit& adc) const;
  // The ADC's static transfer alone, for a front end that read (status ok):
  // adc_stage(fe, adc).x_static, to the bit, without copying the front end
  // (the worst case's innermost loop).
  double static_transfer(const FrontEnd& fe, const AdcUnit& adc) const;
  // The unit's part of that transfer at a board temperature (adc.hpp's
  // AdcTerms): static_transfer(fe, adc) is adc_static(fe.x_ideal, u, 1 − u,
  // adc_terms(adc, fe.t_board)) with u = fe.x_ideal / span, to the bit.
  AdcTerms adc_terms(const AdcUnit& adc, double t_board) const;
  double span() const { return span_; }

  // analog_front_end(dev, t) is node_stage(element_stage(dev, t), dev) and
  // analog_calibration_front_end(dev, t) node_stage(calibration_element_stage(dev, t), dev),
  // to the bit; node_stage reads only the node's sources of `dev`
  // (leakage, the reference, the precharge) beside the element stage.
  ElementStage element_stage(const Deviations& dev, double t_celsius) const;
  ElementStage calibration_element_stage(const Deviations& dev, double t_cal) const;
  // calibration_element_stage at each of the firmware's calibration points
  // into at_cal (the entries past their number untouched).
  void calibration_element_stages(const Deviations& dev, ElementStage (&at_cal)[2]) const;
  FrontEnd node_stage(const ElementStage& element, const Deviations& dev) const;
  // The element stages of `dev` at t and at each calibration point (the
  // calibration medium's, as analog_calibration_front_end); they read only
  // the element's sources of `dev`.
  ElementStages element_stages(const Deviations& dev, double t_celsius) const;

  // Firmware steps 1–4 for a reading: temperature before calibration.
  std::optional<double> convert(double code, bool round_output) const;

  // The calibration a unit receives; nullopt when a calibration reading fails.
  std::optional<CalibrationData> calibrate(const Deviations& dev, const ReadingShift& shift, bool round_output) const;
  // The same from the unit's element stages at the calibration points
  // (element_stages(dev, t).at_cal), to the bit.
  std::optional<CalibrationData> calibrate(const ElementStage (&at_cal)[2], const Deviations& dev, const ReadingShift& shift,
                                           bool round_output) const;

  // One reading: continuous, the quantiser the identity plus shift.at_t;
  // `cal` is the unit's calibration (needed when calibration is on).
  Evaluation evaluate(const Deviations& dev, double t_celsius, const ReadingShift& shift,
                      const CalibrationData* cal, bool round_output) const;

  // Convenience: calibrates the unit first with the same shifts.
  Evaluation evaluate(const Deviations& dev, double t_celsius, const ReadingShift& shift = {},
                      bool round_output = false) const;
  // The same from the unit's element stages (element_stages(dev, t)), to
  // the bit: evaluations of units whose element sources are equal may share
  // them (element_memo.hpp).
  Evaluation evaluate(const ElementStages& stages, const Deviations& dev, double t_celsius, const ReadingShift& shift,
                      bool round_output) const;

  // From a reading (however obtained) to the evaluation's tail.
  Evaluation finish(const FrontEnd& fe, double t_celsius, const Reading& r, const CalibrationData* cal,
                    bool round_output, double output_shift = 0.0) const;

 private:
  // `dissipation`: W/K of the medium, `dissipation_dev` the unit's relative deviation of it.
  ElementStage element_stage(const Deviations& dev, double t_celsius, double dissipation, double dissipation_dev) const;
  // A reading from its front end at t: the reading's tail (finish), or the
  // front end's status.
  Evaluation read(const FrontEnd& fe, double t_celsius, const ReadingShift& shift, const CalibrationData* cal,
                  bool round_output) const;
  const Design* d_;
  Firmware firmware_;
  double span_ = 0.0, max_code_ = 0.0;
  AcquisitionModel acquisition_;
  SensorCurve sensor_curve_;  // the element's nominal curve constants, taken once
};

// The nominal unit: every deviation zero.
inline Deviations nominal_deviations() { return Deviations{}; }

}  // namespace thermargin
