#include "thermargin/tools/series.hpp"
#include "thermargin/core/number.hpp"

#include <algorithm>
#include <cassert>
#include <cmath>

namespace thermargin {

namespace {

constexpr double membership_tolerance = 1e-9;  // relative

// IEC 60063 E24, as published.
const std::vector<int> e24_figures{10, 11, 12, 13, 15, 16, 18, 20, 22, 24, 27, 30,
                                   33, 36, 39, 43, 47, 51, 56, 62, 68, 75, 82, 91};

std::vector<int> every_second(const std::vector<int>& v) {
  std::vector<int> out;
  for (std::size_t i = 0; i < v.size(); i += 2) out.push_back(v[i]);
  return out;
}

// round(100·10^(i/n)) for i = 0..n−1. The products never fall near a
// half-integer for n ≤ 192, so the rounding is not sensitive to the last bit.
std::vector<int> geometric_figures(int n) {
  std::vector<int> out;
  for (int i = 0; i < n; ++i)
    out.push_back(static_cast<int>(std::lround(100.0 * std::pow(10.0, static_cast<double>(i) / n))));
  return out;
}

std::vector<int> e192_figures() {
  std::vector<int> v = geometric_figures(192);
  // The one published departure from the formula.
  std::replace(v.begin(), v.end(), 919, 920);
  return v;
}

int figure_digits(Series s) { return s == Series::e12 || s == Series::e24 ? 2 : 3; }

}  // namespace

std::string_view to_string(Series s) {
  switch (s) {
    case Series::e12: return "E12";
    case Series::e24: return "E24";
    case Series::e48: return "E48";
    case Series::e96: return "E96";
    case Series::e192: return "E192";
  }
  return "E96";
}

std::optional<Series> series_from_name(std::string_view name) {
  for (Series s : all_series) {
    const std::string_view n = to_string(s);
    if (name.size() == n.size() && (name[0] == 'e' || name[0] == 'E') && name.substr(1) == n.substr(1)) return s;
  }
  return std::nullopt;
}

std::string_view series_names() { return "e12 | e24 | e48 | e96 | e192"; }

int values_per_decade(Series s) { return static_cast<int>(series_figures(s).size()); }

double series_tolerance(Series s) {
  switch (s) {
    case Series::e12: return 0.10;
    case Series::e24: return 0.05;
    case Series::e48: return 0.02;
    case Series::e96: return 0.01;
    case Series::e192: return 0.005;
  }
  return 0.01;
}

const std::vector<int>& series_figures(Series s) {
  static const std::vector<int> e12 = every_second(e24_figures);
  static const std::vector<int> e192 = e192_figures();
  static const std::vector<int> e96 = every_second(e192);
  static const std::vector<int> e48 = every_second(e96);
  switch (s) {
    case Series::e12: return e12;
    case Series::e24: return e24_figures;
    case Series::e48: return e48;
    case Series::e96: return e96;
    case Series::e192: return e192;
  }
  return e96;
}

std::vector<double> series_values(Series s, double low, double high) {
  std::vector<double> out;
  if (!(low > 0.0) || !(high >= low)) return out;
  const auto& figures = series_figures(s);
  const int digits = figure_digits(s);
  // Decade exponents such that figure·10^e spans [low, high].
  const int first = static_cast<int>(std::floor(std::log10(low))) - digits;
  const int last = static_cast<int>(std::floor(std::log10(high))) + 1;
  for (int e = first; e <= last; ++e)
    for (int f : figures) {
      const double v = times_power_of_ten(f, e);
      if (v >= low * (1.0 - membership_tolerance) && v <= high * (1.0 + membership_tolerance)) out.push_back(v);
    }
  std::sort(out.begin(), out.end());
  out.erase(std::unique(out.begin(), out.end()), out.end());
  return out;
}

SeriesBracket series_bracket(Series s, double x) {
  assert(x > 0.0);
  // The decade of x and its neighbours always hold one value on each side.
  const std::vector<double> near = series_values(s, x / 20.0, x * 20.0);
  SeriesBracket b{near.front(), near.back()};
  for (double v : near) {
    if (std::fabs(v - x) <= membership_tolerance * x) return {v, v};
    if (v < x) b.below = v;
    else {
      b.above = v;
      break;
    }
  }
  return b;
}

std::optional<Series> coarsest_series(double x) {
  if (!(x > 0.0)) return std::nullopt;
  for (Series s : all_series) {
    const SeriesBracket b = series_bracket(s, x);
    if (b.below == b.above) return s;
  }
  return std::nullopt;
}

}  // namespace thermargin
