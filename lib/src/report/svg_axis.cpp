// The SVG charts' axes (svg_chart.hpp: plan_axis): ticks on the 1-2-5
// sequence for a linear axis and on decades for a log one, labelled with SI
// prefixes or powers of ten and a true minus sign.
#include <algorithm>
#include <array>
#include <charconv>
#include <cmath>
#include <initializer_list>
#include <limits>
#include <stdexcept>
#include <string>

#include "svg_internal.hpp"
#include "thermargin/core/number.hpp"
#include "thermargin/report/svg_chart.hpp"

namespace thermargin::svg {

namespace detail {

[[noreturn]] void bug(const std::string& what) { throw std::invalid_argument("svg chart: " + what); }

void check_forced(const Axis& axis) {
  for (const auto& lim : {axis.min, axis.max}) {
    if (!lim) continue;
    if (!std::isfinite(*lim)) bug("axis \"" + axis.label + "\" has a non-finite forced limit");
    if (axis.scale == Scale::log10 && *lim <= 0)
      bug("log axis \"" + axis.label + "\" has a forced limit <= 0");
  }
  if (axis.min && axis.max && !(*axis.min < *axis.max))
    bug("axis \"" + axis.label + "\" has forced min >= max");
}

}  // namespace detail

namespace {

using detail::bug;

// k * 10^e (times_power_of_ten, number.hpp) is the double nearest the decimal
// number: an exact integer times or divided by an exact power of ten rounds
// once, so 2 * 10^-1 is exactly 0.2.

// The 1-2-5 sequence as an integer index: n = 3e + {0, 1, 2} stands for
// {1, 2, 5} * 10^e, so neighbouring indices are neighbouring round steps.
int decade_of(int n) { return n >= 0 ? n / 3 : -((-n + 2) / 3); }
int mantissa_of(int n) {
  static constexpr std::array<int, 3> m{1, 2, 5};
  return m[static_cast<std::size_t>(n - 3 * decade_of(n))];
}
double seq125(int n) { return times_power_of_ten(mantissa_of(n), decade_of(n)); }
int floor125(double v) {  // largest n with seq125(n) <= v
  int n = 3 * static_cast<int>(std::floor(std::log10(v))) + 5;
  while (seq125(n) > v * (1 + 1e-12)) --n;
  return n;
}
int ceil125(double v) {  // smallest n with seq125(n) >= v
  int n = 3 * static_cast<int>(std::floor(std::log10(v))) - 3;
  while (seq125(n) < v * (1 - 1e-12)) ++n;
  return n;
}

// A tick step of mant * 10^exp, mant in {1, 2, 5}.
struct Step {
  int mant = 1;
  int exp = 0;
  static Step of(int n) { return {mantissa_of(n), decade_of(n)}; }
  double value() const { return times_power_of_ten(mant, exp); }
  double at(double k) const { return times_power_of_ten(k * mant + 0.0, exp); }  // + 0.0: no -0
};

std::string with_true_minus(std::string s) {
  if (!s.empty() && s[0] == '-') s.replace(0, 1, "\u2212");
  return s;
}

std::string si_label(double v) {
  if (v == 0) return "0";
  static constexpr std::array<const char*, 9> prefix{"p", "n", "\u00b5", "m", "", "k", "M", "G", "T"};
  int g = static_cast<int>(std::floor(std::log10(std::fabs(v)) / 3.0 + 1e-12)) * 3;
  g = std::clamp(g, -12, 12);
  double mant = times_power_of_ten(v, -g);
  return with_true_minus(significant(mant, 6) + prefix[static_cast<std::size_t>(g / 3 + 4)]);
}

std::string superscript(int n) {
  static constexpr std::array<const char*, 10> digit{"\u2070", "\u00b9", "\u00b2", "\u00b3", "\u2074",
                                                     "\u2075", "\u2076", "\u2077", "\u2078", "\u2079"};
  std::string s = n < 0 ? "\u207b" : "";
  for (char c : std::to_string(std::abs(n))) s += digit[static_cast<std::size_t>(c - '0')];
  return s;
}

// 1e6 and up (or tiny) as "10⁶" or "2×10⁶" rather than "1e+06". A bare
// decade suits a log axis; a linear axis keeps "1×10⁹" beside "2×10⁹".
std::string power_label(double v, bool bare_decade) {
  double a = std::fabs(v);
  if (v == 0 || (a >= 1e-4 && a < 1e6)) return with_true_minus(significant(v, 6));
  int e = static_cast<int>(std::floor(std::log10(a) + 1e-12));
  double mant = v / times_power_of_ten(1, e);
  std::string m = significant(mant, 6);
  std::string s = bare_decade && m == "1" ? std::string() : m + "\u00d7";
  s += "10";
  s += superscript(e);
  return with_true_minus(s);
}

std::string linear_label(double v, const Step& step, double magnitude, bool si) {
  if (si) return si_label(v);
  int decimals = std::max(0, -step.exp);
  if (decimals > 8 || magnitude >= 1e9) return power_label(v, false);
  char buf[64];
  auto r = std::to_chars(buf, buf + sizeof buf, v, std::chars_format::fixed, decimals);
  return with_true_minus(std::string(buf, r.ptr));
}

AxisPlan plan_linear(const Axis& axis, bool has_data, double lo, double hi, int target) {
  if (!has_data) lo = 0, hi = 1;
  if (axis.min) lo = *axis.min;
  if (axis.max) hi = *axis.max;
  // one forced end with all the data on its wrong side: keep the forced end
  if (hi <= lo) {
    double pad = lo != 0 ? std::fabs(lo) * 0.1 : 1.0;
    if (axis.min && axis.max) {
      // unreachable: check_forced rejected it
    } else if (axis.min) {
      hi = lo + pad;
    } else if (axis.max) {
      lo = hi - pad;
    } else {
      lo -= pad;
      hi += pad;
    }
  }
  // Try the round step nearest span/target and its two neighbours; keep the
  // one whose widened range has the interval count closest to the target
  // (ties: the coarser step). Rounding one raw step alone can land on 3
  // intervals where 6 were wanted.
  double raw = hi / target - lo / target;  // no overflow near the double limits
  int centre = (raw > 0 && std::isfinite(raw)) ? ceil125(raw) : 0;
  constexpr double tol = 1e-9;
  Step step;
  AxisPlan plan;
  double best = std::numeric_limits<double>::infinity();
  for (int n = centre - 1; n <= centre + 1; ++n) {
    Step cand = Step::of(n);
    double sv = cand.value();
    double a = axis.min ? lo : cand.at(std::floor(lo / sv + tol));
    double b = axis.max ? hi : cand.at(std::ceil(hi / sv - tol));
    double intervals = (b / 2 - a / 2) / (sv / 2);
    double score = std::fabs(intervals - target) + 1e-3 * intervals;
    if (score < best) best = score, step = cand, plan.min = a, plan.max = b;
  }
  double sv = step.value();
  if (!(plan.min < plan.max)) plan.max = plan.min + sv;
  double magnitude = std::max(std::fabs(plan.min), std::fabs(plan.max));
  double k0 = std::ceil(plan.min / sv - tol), k1 = std::floor(plan.max / sv + tol);
  double slack = (plan.max - plan.min) * 1e-9;
  for (double k = k0; k <= k1 && plan.ticks.size() < 200; k += 1) {
    double v = step.at(k);
    if (v < plan.min - slack || v > plan.max + slack) continue;
    plan.ticks.push_back({v, true, linear_label(v, step, magnitude, axis.si_prefix)});
  }
  return plan;
}

AxisPlan plan_log(const Axis& axis, bool has_data, double lo, double hi, int target) {
  if (!has_data) lo = 1, hi = 10;
  if (axis.min) lo = *axis.min;
  if (axis.max) hi = *axis.max;
  if (hi <= lo) {
    if (axis.min && !axis.max) hi = lo * 10;
    else if (axis.max && !axis.min) lo = hi / 10;
  }
  AxisPlan plan;
  plan.min = axis.min ? lo : seq125(floor125(lo));
  plan.max = axis.max ? hi : seq125(ceil125(hi));
  if (!(plan.min < plan.max)) {
    if (!axis.min) plan.min = seq125(floor125(plan.min) - 1);
    if (!axis.max) plan.max = seq125(ceil125(plan.max) + 1);
  }
  double decades = std::log10(plan.max / plan.min);
  int every = std::max(1, static_cast<int>(std::ceil(decades / std::max(target, 1) / 2.0)));
  auto label = [&](double v) { return axis.si_prefix ? si_label(v) : power_label(v, true); };
  int n0 = floor125(plan.min) - 1, n1 = ceil125(plan.max) + 1;
  for (int n = n0; n <= n1; ++n) {
    double v = seq125(n);
    if (v < plan.min * (1 - 1e-12) || v > plan.max * (1 + 1e-12)) continue;
    int e = decade_of(n);
    bool decade = mantissa_of(n) == 1;
    if (!decade && decades > 8) continue;  // sub-ticks would merge into a grey smear
    bool major = decade && (e % every == 0);
    plan.ticks.push_back({v, major, major ? label(v) : std::string()});
  }
  auto majors = std::count_if(plan.ticks.begin(), plan.ticks.end(), [](const Tick& t) { return t.major; });
  if (majors < 2) {  // less than a decade: label the 2s and 5s as well
    for (Tick& t : plan.ticks) t.major = true, t.label = label(t.value);
  }
  if (plan.ticks.size() < 2) {  // inside one 1-2-5 interval: round linear ticks instead
    Axis lin = axis;
    lin.scale = Scale::linear;
    lin.min = plan.min;
    lin.max = plan.max;
    plan.ticks = plan_linear(lin, true, plan.min, plan.max, target).ticks;
  }
  return plan;
}

}  // namespace

AxisPlan plan_axis(const Axis& axis, double data_min, double data_max, int target_intervals) {
  detail::check_forced(axis);
  int target = std::clamp(target_intervals, 1, 20);
  bool log = axis.scale == Scale::log10;
  bool has_data = std::isfinite(data_min) && std::isfinite(data_max) && (!log || (data_min > 0 && data_max > 0));
  if (has_data && data_min > data_max) std::swap(data_min, data_max);
  return log ? plan_log(axis, has_data, data_min, data_max, target)
             : plan_linear(axis, has_data, data_min, data_max, target);
}

}  // namespace thermargin::svg
