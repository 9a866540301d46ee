#include "thermargin/report/settling_summary.hpp"

#include <cstdio>

#include "thermargin/core/number.hpp"
#include "thermargin/engines/nominal.hpp"

namespace thermargin {

SettlingSummary settling_summary(const Chain& chain, const Budget& b) {
  SettlingSummary s;
  const Design& d = chain.design();
  if (!d.adc.samples_settle()) return s;
  for (const auto& p : b.points)
    if (p.in_window && p.nominal.status == Status::ok && std::fabs(p.nominal.acquisition_error) > s.max_abs) {
      s.max_abs = std::fabs(p.nominal.acquisition_error);
      s.at = p.t;
    }
  bool precharge_leads = false;
  for (std::size_t i = 0; i < b.window_contributors.size() && i < 3; ++i)
    precharge_leads |= b.window_contributors[i].name == info(Source::adc_precharge).name &&
                       b.window_contributors[i].share > 0.0;
  const double quarter = 0.25 * std::min(d.requirement.max_error, b.wc_max_abs > 0.0 ? b.wc_max_abs : d.requirement.max_error);
  s.shown = precharge_leads || (s.max_abs > 0.0 && s.max_abs >= quarter);
  if (s.shown) s.need = settling_need_at(chain, s.at);
  return s;
}

std::string settling_text(const Design& d, const SettlingSummary& s) {
  if (!s.shown) return "";
  const auto time = [](double t) { return std::isfinite(t) ? format_quantity(t, Quantity::time, 3) : std::string("none suffices"); };
  char head[160];
  std::snprintf(head, sizeof head, "Settling: the sampled node reads %.3f K off at %.2f degC (acquisition error).", s.max_abs, s.at);
  std::string out = head;
  out += "\n  For 1/2 LSB there: adc.t_acq >= " + time(s.need.t_acq) + " (now " + format_quantity(d.adc.t_acq, Quantity::time, 3) + ")";
  if (d.divider.settle_time && d.divider.c_node > 0.0)
    out += ", divider.settle_time >= " + time(s.need.settle) + " (now " + format_quantity(*d.divider.settle_time, Quantity::time, 3) + ")";
  // What would fix it, for this kind of node (docs/model.md §14).
  if (d.divider.settle_time && d.divider.c_node > 0.0)
    out += ".\n  Fixes: a longer settle time, a smaller divider resistance or node capacitor";
  else
    out += ".\n  Fixes: a longer acquisition time, a smaller divider resistance, a node capacitor much larger than the"
           " sampling capacitor with a slower sample rate";
  out += ".\n";
  return out;
}

}  // namespace thermargin
