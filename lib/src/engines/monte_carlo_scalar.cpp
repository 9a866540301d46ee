// The Monte Carlo engine's draws and its scalar reference (docs/engines.md,
// "Random numbers"): a unit's deviations, a reading's own draws, and one
// unit's error at one temperature simulated through Chain with the same
// numbers as the vectorised kernel, which the tests hold it equal to.
#include <cstddef>

#include "monte_carlo_streams.hpp"
#include "thermargin/chain/calibration.hpp"
#include "thermargin/chain/drift.hpp"
#include "thermargin/engines/monte_carlo.hpp"

namespace thermargin {

using namespace mc_detail;

Deviations draw_unit(const std::vector<ToleranceInput>& inputs, double sigma_per_tol, std::uint64_t seed,
                     std::uint64_t unit) {
  Deviations dev{};
  const Philox4x32Key key = philox_key(seed);
  for (const auto& in : inputs) {
    if (in.source == Source::board_temperature) continue;  // drawn per reading
    const auto w = philox4x32_10({static_cast<std::uint32_t>(unit), static_cast<std::uint32_t>(unit >> 32), unit_stream,
                                  static_cast<std::uint32_t>(in.source)},
                                 key);
    dev[static_cast<std::size_t>(in.source)] =
        draw_deviation(in, sigma_per_tol, unit_double(w[0], w[1]), unit_double(w[2], w[3]));
  }
  return dev;
}

Deviations draw_unit(const Design& d, std::uint64_t unit) {
  return with_drift(draw_unit(d.inputs, d.montecarlo.sigma_per_tol, d.montecarlo.seed, unit));
}

ReadingDraw draw_reading(const Design& d, std::uint64_t unit, std::uint32_t reading) {
  ReadingDraw r;
  const Philox4x32Key key = philox_key(d.montecarlo.seed);
  const auto w0 = reading_words(key, unit, reading, 0);
  r.board_u = uniform32(w0[2]);
  r.precharge_u = uniform32(w0[3]);
  for (int s = 0; s < d.adc.averaging; ++s)
    r.noise.push_back(d.adc.noise > 0.0 ? d.adc.noise * noise_sample(key, unit, reading, s) : 0.0);
  return r;
}

namespace {
// A unit's deviations with this reading's own draws: the board temperature
// and what another channel left on the sampling capacitor.
Deviations with_reading_draw(const Design& d, const Deviations& dev, const ReadingDraw& rd) {
  Deviations dv = dev;
  if (d.conditions.board.kind == BoardKind::range)
    dv[static_cast<std::size_t>(Source::board_temperature)] =
        d.conditions.board.min + (d.conditions.board.max - d.conditions.board.min) * rd.board_u - d.conditions.board.middle();
  if (d.adc.samples_settle() && d.adc.precharge == Precharge::any)
    dv[static_cast<std::size_t>(Source::adc_precharge)] = (rd.precharge_u - 0.5) * d.supply.v_reference_nominal();
  return dv;
}
}  // namespace

Evaluation simulate_reading(const Chain& chain, std::uint64_t unit, std::uint32_t t_index, double t) {
  const Design& d = chain.design();
  Deviations dev = draw_unit(d, unit);
  auto one = [&](double temp, std::uint32_t reading, CalibrationData* cal) -> Evaluation {
    const ReadingDraw rd = draw_reading(d, unit, reading);
    const Deviations dv = with_reading_draw(d, dev, rd);
    const FrontEnd fe = chain.front_end(dv, temp);
    if (fe.status != Status::ok) {
      Evaluation e;
      e.status = fe.status;
      return e;
    }
    const Reading r = sample_reading(fe.x_static, rd.noise.data(), d.adc.averaging, d.adc.quantizer, chain.max_code());
    return chain.finish(fe, temp, r, cal, true);
  };
  CalibrationData k;
  const int n = calibration_points(d.firmware.calibration);
  bool cal_ok = true;
  for (int i = 0; i < n; ++i) {
    const double t_cal = d.firmware.calibration_at[static_cast<std::size_t>(i)];
    // The calibration reading is reported uncalibrated: convert it directly.
    const ReadingDraw rd = draw_reading(d, unit, calibration_reading(i));
    const Deviations dv = with_reading_draw(d, dev, rd);
    const FrontEnd fe = chain.adc_stage(chain.analog_calibration_front_end(dv, t_cal), dv);
    if (fe.status != Status::ok) {
      cal_ok = false;
      break;
    }
    const Reading r = sample_reading(fe.x_static, rd.noise.data(), d.adc.averaging, d.adc.quantizer, chain.max_code());
    const auto tr = r.saturated ? std::nullopt : chain.convert(r.code, true);
    if (!tr) {
      cal_ok = false;
      break;
    }
    k.reported[i] = *tr;
    k.reference[i] = t_cal + dev[static_cast<std::size_t>(i == 0 ? Source::calibration_1 : Source::calibration_2)];
  }
  if (n == 2 && cal_ok && k.reported[0] == k.reported[1]) cal_ok = false;
  return one(t, t_index, (n > 0 && cal_ok) ? &k : nullptr);
}

}  // namespace thermargin
