#include "thermargin/core/number.hpp"

#include <array>
#include <cctype>
#include <cmath>
#include <cstdio>
#include <optional>
#include <string>

#include "thermargin/core/error.hpp"
#include "thermargin/core/text.hpp"

namespace thermargin {
namespace {

// The multiplier of an SI prefix letter, or nothing.
std::optional<double> prefix_value(std::string_view p) {
  if (p == "p") return 1e-12;
  if (p == "n") return 1e-9;
  if (p == "u" || p == "\xC2\xB5" || p == "\xCE\xBC") return 1e-6;  // u, µ (micro sign), μ (mu)
  if (p == "m") return 1e-3;
  if (p == "k" || p == "K") return 1e3;
  if (p == "M") return 1e6;
  if (p == "G") return 1e9;
  return std::nullopt;
}

std::string_view accepted(Quantity q) {
  switch (q) {
    case Quantity::plain: return "expected a number such as 0.5, 2e-3 or 1.5m";
    case Quantity::ratio: return "expected a fraction such as 1%, 0.5 %, 100ppm or 0.01";
    case Quantity::resistance: return "expected a resistance such as 10k, 4k7, 2.2M, 470R or 10kohm";
    case Quantity::voltage: return "expected a voltage such as 3.3, 3.3V or 2500mV";
    case Quantity::current: return "expected a current such as 10n, 10nA or 1.5uA";
    case Quantity::dissipation: return "expected a dissipation constant such as 1.5mW/K or 0.0015";
    case Quantity::temperature: return "expected a temperature in degC such as 25, -40 or 85C";
    case Quantity::temperature_difference: return "expected a temperature difference such as 0.1 or 100mK";
    case Quantity::beta_value: return "expected a B value in kelvin such as 3950 or 3950K";
    case Quantity::tempco: return "expected a temperature coefficient such as 25ppm, 25ppm/K or 0.01%/K";
    case Quantity::lsb: return "expected a number of ADC counts such as 2, 0.5 or 2LSB";
    case Quantity::integer: return "expected a whole number such as 12";
    case Quantity::time: return "expected a time such as 8, 8s, 500ms, 2us or 2min";
    case Quantity::ramp_rate: return "expected a rate of change such as 2, 2K/min, 0.05K/s or 30K/h";
    case Quantity::capacitance: return "expected a capacitance such as 100n, 100nF or 5pF";
    case Quantity::frequency: return "expected a frequency such as 10k, 10kHz or 1MHz";
    case Quantity::lsb_per_kelvin: return "expected ADC counts per kelvin such as 0.01, 0.01LSB/K or 0.01LSB/C";
  }
  return "expected a number";
}

// The unit words a quantity accepts after the number and any prefix, with the
// factor each stands for.
struct UnitWord {
  std::string_view word;
  double factor;
};

std::optional<double> unit_factor(Quantity q, std::string_view word) {
  static constexpr std::array ratio{UnitWord{"%", 1e-2}, UnitWord{"ppm", 1e-6}};
  static constexpr std::array resistance{UnitWord{"ohm", 1.0}, UnitWord{"ohms", 1.0}, UnitWord{"\xCE\xA9", 1.0},
                                         UnitWord{"\xE2\x84\xA6", 1.0}};
  static constexpr std::array voltage{UnitWord{"V", 1.0}};
  static constexpr std::array current{UnitWord{"A", 1.0}};
  static constexpr std::array dissipation{UnitWord{"W/K", 1.0}, UnitWord{"W/C", 1.0}, UnitWord{"W/\xC2\xB0" "C", 1.0}};
  static constexpr std::array temperature{UnitWord{"C", 1.0}, UnitWord{"\xC2\xB0" "C", 1.0}, UnitWord{"degC", 1.0}};
  static constexpr std::array difference{UnitWord{"K", 1.0}};
  static constexpr std::array tempco{UnitWord{"ppm", 1e-6},  UnitWord{"ppm/K", 1e-6}, UnitWord{"ppm/C", 1e-6},
                                     UnitWord{"ppm/\xC2\xB0" "C", 1e-6}, UnitWord{"%/K", 1e-2},  UnitWord{"%/C", 1e-2},
                                     UnitWord{"%/\xC2\xB0" "C", 1e-2}, UnitWord{"/K", 1.0}};
  static constexpr std::array lsb{UnitWord{"LSB", 1.0}};
  static constexpr std::array time{UnitWord{"s", 1.0}, UnitWord{"min", 60.0}, UnitWord{"h", 3600.0}};
  static constexpr std::array ramp_rate{UnitWord{"K/min", 1.0}, UnitWord{"K/s", 60.0}, UnitWord{"K/h", 1.0 / 60.0}};
  static constexpr std::array capacitance{UnitWord{"F", 1.0}};
  static constexpr std::array frequency{UnitWord{"Hz", 1.0}};
  static constexpr std::array lsb_per_kelvin{UnitWord{"LSB/K", 1.0}, UnitWord{"LSB/C", 1.0},
                                             UnitWord{"LSB/\xC2\xB0" "C", 1.0}};
  auto find = [&](const auto& list) -> std::optional<double> {
    for (const auto& u : list)
      if (u.word == word) return u.factor;
    return std::nullopt;
  };
  switch (q) {
    case Quantity::ratio: return find(ratio);
    case Quantity::resistance: return find(resistance);
    case Quantity::voltage: return find(voltage);
    case Quantity::current: return find(current);
    case Quantity::dissipation: return find(dissipation);
    case Quantity::temperature: return find(temperature);
    case Quantity::temperature_difference:
    case Quantity::beta_value: return find(difference);
    case Quantity::tempco: return find(tempco);
    case Quantity::lsb: return find(lsb);
    case Quantity::time: return find(time);
    case Quantity::ramp_rate: return find(ramp_rate);
    case Quantity::capacitance: return find(capacitance);
    case Quantity::frequency: return find(frequency);
    case Quantity::lsb_per_kelvin: return find(lsb_per_kelvin);
    case Quantity::plain:
    case Quantity::integer: return std::nullopt;
  }
  return std::nullopt;
}

// Length of the UTF-8 prefix symbol at the start of `s` (0 if none).
std::size_t prefix_length(std::string_view s) {
  if (s.empty()) return 0;
  if (s.starts_with("\xC2\xB5") || s.starts_with("\xCE\xBC")) return 2;
  return prefix_value(s.substr(0, 1)) ? 1 : 0;
}

}  // namespace

std::string_view unit_symbol(Quantity q) {
  switch (q) {
    case Quantity::plain: return "";
    case Quantity::ratio: return "%";
    case Quantity::resistance: return "ohm";
    case Quantity::voltage: return "V";
    case Quantity::current: return "A";
    case Quantity::dissipation: return "W/K";
    case Quantity::temperature: return "degC";
    case Quantity::temperature_difference:
    case Quantity::beta_value: return "K";
    case Quantity::tempco: return "ppm/K";
    case Quantity::lsb: return "LSB";
    case Quantity::integer: return "";
    case Quantity::time: return "s";
    case Quantity::ramp_rate: return "K/min";
    case Quantity::capacitance: return "F";
    case Quantity::frequency: return "Hz";
    case Quantity::lsb_per_kelvin: return "LSB/K";
  }
  return "";
}

double parse_quantity(std::string_view raw, Quantity q, const Where& where) {
  const std::string text = trim(raw);
  auto fail = [&]() -> double { reject(where, text, accepted(q)); };
  if (text.empty() || text.size() > 64) return fail();

  // Mantissa: sign, digits, optional point and digits, optional exponent.
  std::size_t i = 0;
  if (text[i] == '+' || text[i] == '-') ++i;
  const std::size_t digits_begin = i;
  while (i < text.size() && std::isdigit(static_cast<unsigned char>(text[i]))) ++i;
  std::size_t int_digits = i - digits_begin;
  std::size_t frac_digits = 0;
  if (i < text.size() && text[i] == '.') {
    ++i;
    const std::size_t f = i;
    while (i < text.size() && std::isdigit(static_cast<unsigned char>(text[i]))) ++i;
    frac_digits = i - f;
  }
  if (int_digits + frac_digits == 0) return fail();
  std::string mantissa = text.substr(0, i);
  // An exponent only when `e`/`E` is followed by a signed integer: `1e-3`.
  if (i < text.size() && (text[i] == 'e' || text[i] == 'E')) {
    std::size_t j = i + 1;
    if (j < text.size() && (text[j] == '+' || text[j] == '-')) ++j;
    const std::size_t d = j;
    while (j < text.size() && std::isdigit(static_cast<unsigned char>(text[j]))) ++j;
    if (j > d) {
      mantissa = text.substr(0, j);
      i = j;
    }
  }
  std::string rest = text.substr(i);

  double multiplier = 1.0;
  if (q != Quantity::integer) {
    // RKM code: a prefix letter (or R for ohms) standing for the decimal point.
    const std::size_t plen = prefix_length(rest);
    const bool r_point = q == Quantity::resistance && !rest.empty() && rest[0] == 'R';
    if ((plen > 0 || r_point) && frac_digits == 0 && mantissa.find_first_of(".eE") == std::string::npos) {
      const std::size_t skip = r_point ? 1 : plen;
      std::size_t j = skip;
      while (j < rest.size() && std::isdigit(static_cast<unsigned char>(rest[j]))) ++j;
      if (j > skip) {
        mantissa += "." + rest.substr(skip, j - skip);
        multiplier = r_point ? 1.0 : *prefix_value(rest.substr(0, plen));
        rest = rest.substr(j);
        goto unit;
      }
    }
    // Otherwise an SI prefix may follow (not for ratios: `1m%` is nonsense),
    // unless the rest is itself a unit word (`1K` as kelvin, `2A`).
    {
      const std::string t = trim(rest);
      if (!t.empty() && !unit_factor(q, t)) {
        const std::size_t p = prefix_length(t);
        if (p > 0 && q != Quantity::ratio && q != Quantity::temperature) {
          multiplier = *prefix_value(t.substr(0, p));
          rest = t.substr(p);
        } else if (q == Quantity::resistance && t == "R") {
          rest.clear();
        }
      }
    }
  }
unit:
  {
    const std::string word = trim(rest);
    if (!word.empty()) {
      const auto f = unit_factor(q, word);
      if (!f) return fail();
      multiplier *= *f;
    }
  }
  std::size_t used = 0;
  double v = 0.0;
  try {
    v = std::stod(mantissa, &used);
  } catch (const std::exception&) {
    return fail();
  }
  if (used != mantissa.size()) return fail();
  v *= multiplier;
  if (!std::isfinite(v)) return fail();
  if (q == Quantity::integer && (v != std::floor(v) || std::fabs(v) > 9.0e15)) return fail();
  return v;
}

std::string format_quantity(double value, Quantity q, int digits) {
  char buf[64];
  auto eng = [&](double v, std::string_view unit) {
    static constexpr std::array<std::pair<double, const char*>, 7> prefixes{
        {{1e9, "G"}, {1e6, "M"}, {1e3, "k"}, {1.0, ""}, {1e-3, "m"}, {1e-6, "u"}, {1e-9, "n"}}};
    const double a = std::fabs(v);
    if (a == 0.0) {
      std::snprintf(buf, sizeof buf, "0 %.*s", static_cast<int>(unit.size()), unit.data());
      return std::string(buf);
    }
    std::pair<double, const char*> chosen{1e-12, "p"};
    for (const auto& p : prefixes)
      if (a >= p.first * 0.9999999) {
        chosen = p;
        break;
      }
    std::snprintf(buf, sizeof buf, "%.*g %s%.*s", digits, v / chosen.first, chosen.second,
                  static_cast<int>(unit.size()), unit.data());
    return std::string(buf);
  };
  switch (q) {
    case Quantity::ratio:
      std::snprintf(buf, sizeof buf, "%.*g %%", digits, value * 100.0);
      return buf;
    case Quantity::tempco:
      std::snprintf(buf, sizeof buf, "%.*g ppm/K", digits, value * 1e6);
      return buf;
    case Quantity::resistance: return eng(value, "ohm");
    case Quantity::voltage: return eng(value, "V");
    case Quantity::current: return eng(value, "A");
    case Quantity::dissipation: return eng(value, "W/K");
    case Quantity::capacitance: return eng(value, "F");
    case Quantity::time: return eng(value, "s");
    case Quantity::frequency: return eng(value, "Hz");
    case Quantity::temperature:
      std::snprintf(buf, sizeof buf, "%.*g degC", digits, value);
      return buf;
    case Quantity::temperature_difference:
    case Quantity::beta_value:
      std::snprintf(buf, sizeof buf, "%.*g K", digits, value);
      return buf;
    case Quantity::lsb:
      std::snprintf(buf, sizeof buf, "%.*g LSB", digits, value);
      return buf;
    case Quantity::lsb_per_kelvin:
      std::snprintf(buf, sizeof buf, "%.*g LSB/K", digits, value);
      return buf;
    case Quantity::integer:
      std::snprintf(buf, sizeof buf, "%.0f", value);
      return buf;
    case Quantity::ramp_rate:
      std::snprintf(buf, sizeof buf, "%.*g K/min", digits, value);
      return buf;
    case Quantity::plain: break;
  }
  std::snprintf(buf, sizeof buf, "%.*g", digits, value);
  return buf;
}

std::string fixed(double v, int decimals) {
  if (!std::isfinite(v)) return "n/a";
  char buf[64];
  std::snprintf(buf, sizeof buf, "%.*f", decimals, v);
  std::string s = buf;
  if (s.starts_with("-") && s.find_first_not_of("-0.") == std::string::npos) s = s.substr(1);  // no "-0.000"
  return s;
}

std::string significant(double v, int digits) {
  char buf[64];
  std::snprintf(buf, sizeof buf, "%.*g", digits, v);
  return buf;
}

namespace {

double exact_power_of_ten(int e) {  // e >= 0
  static constexpr std::array<double, 23> exact{1e0,  1e1,  1e2,  1e3,  1e4,  1e5,  1e6,  1e7,  1e8,  1e9,  1e10, 1e11,
                                                1e12, 1e13, 1e14, 1e15, 1e16, 1e17, 1e18, 1e19, 1e20, 1e21, 1e22};
  return e <= 22 ? exact[static_cast<std::size_t>(e)] : std::pow(10.0, e);
}

}  // namespace

double times_power_of_ten(double k, int e) { return e >= 0 ? k * exact_power_of_ten(e) : k / exact_power_of_ten(-e); }

std::string ohms(double r, int digits) { return format_quantity(r, Quantity::resistance, digits); }

std::string percent(double fraction, int decimals) { return fixed(100.0 * fraction, decimals) + " %"; }

}  // namespace thermargin
