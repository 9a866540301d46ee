#include "thermargin/engines/nominal.hpp"

#include <cmath>

namespace thermargin {

namespace {
constexpr double sensitivity_step = 0.01;  // K; central differences, error O(h²)
}

NominalPoint nominal_point(const Chain& chain, double t) {
  const Deviations zero = nominal_deviations();
  NominalPoint p;
  p.t = t;
  const Evaluation e = chain.evaluate(zero, t);
  p.status = e.status;
  p.v_node = e.front.v_node;
  p.code = e.front.x_static;
  p.self_heating = e.front.rise;
  if (e.status != Status::ok) return p;
  p.error = e.error;
  if (e.front.acquisition_shift != 0.0) {
    // The settled reading against the node's own voltage read ideally.
    const auto settled = chain.convert(e.code, false);
    const auto ideal = chain.convert(e.code - e.front.acquisition_shift, false);
    if (settled && ideal) p.acquisition_error = *settled - *ideal;
  }
  const FrontEnd up = chain.front_end(zero, t + sensitivity_step);
  const FrontEnd down = chain.front_end(zero, t - sensitivity_step);
  if (up.status == Status::ok && down.status == Status::ok) {
    p.sensitivity = (up.x_static - down.x_static) / (2 * sensitivity_step);
    p.mv_per_k = 1e3 * (up.v_node - down.v_node) / (2 * sensitivity_step);
  } else {
    const FrontEnd& other = up.status == Status::ok ? up : down;
    const double h = up.status == Status::ok ? sensitivity_step : -sensitivity_step;
    if (other.status == Status::ok) {
      p.sensitivity = (other.x_static - e.front.x_static) / h;
      p.mv_per_k = 1e3 * (other.v_node - e.front.v_node) / h;
    }
  }
  p.lsb_in_k = p.sensitivity != 0.0 ? 1.0 / std::fabs(p.sensitivity) : 0.0;
  return p;
}

std::vector<NominalPoint> nominal_sweep(const Chain& chain) {
  std::vector<NominalPoint> out;
  for (double t : chain.design().conditions.temperatures()) out.push_back(nominal_point(chain, t));
  return out;
}

SettlingNeed settling_need_at(const Chain& chain, double t) {
  const Design& d = chain.design();
  if (!d.adc.samples_settle()) return {};
  const FrontEnd fe = chain.analog_front_end(nominal_deviations(), t);
  if (fe.status != Status::ok) return {};
  const double v_ref = d.supply.v_reference_nominal();
  // The worst start: the rail farthest from the node for precharge = any.
  double v_start = precharge_voltage(d.adc, v_ref, v_ref, 0.0);
  if (d.adc.precharge == Precharge::any) v_start = fe.v_node < 0.5 * v_ref ? v_ref : 0.0;
  return settling_need(d, fe.r_thevenin, fe.v_node, v_start, v_ref);
}

}  // namespace thermargin
