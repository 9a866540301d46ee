#include "thermargin/tools/lookup_table.hpp"

#include <algorithm>
#include <cctype>
#include <cmath>
#include <cstdio>
#include <sstream>
#include <utility>

#include "thermargin/chain/rtd_class_range.hpp"
#include "thermargin/core/caution.hpp"
#include "thermargin/core/text.hpp"

namespace thermargin {

namespace {

std::string kelvin(double v) { return printf_number("%.3g", v) + " K"; }
std::string celsius(double v) { return printf_number("%.2f", v); }

// More codes than this in the range are compared with a stride: the error is
// smooth between points, and 2^20 codes keep the search for P interactive.
constexpr std::int64_t max_compared = std::int64_t{1} << 20;

// The exact temperature at the compared codes of the range.
struct ExactCodes {
  std::int64_t first = 0, last = 0, stride = 1;
  std::vector<std::int64_t> code;
  std::vector<double> t;
};

ExactCodes exact_codes(const Design& d, const Firmware& fw) {
  const CodeSpan r = range_codes(fw.inputs());
  ExactCodes e;
  e.first = std::max<std::int64_t>(static_cast<std::int64_t>(std::ceil(r.low)), 0);
  e.last = std::min<std::int64_t>(static_cast<std::int64_t>(std::floor(r.high)),
                                  static_cast<std::int64_t>(d.adc_span()) - 1);
  const std::int64_t n = e.last - e.first + 1;
  if (n <= 0) return e;
  e.stride = std::max<std::int64_t>((n + max_compared - 1) / max_compared, 1);
  auto add = [&](std::int64_t c) {
    if (const auto t = fw.exact_temperature(static_cast<double>(c))) {
      e.code.push_back(c);
      e.t.push_back(*t);
    }
  };
  std::int64_t c = e.first;
  for (; c <= e.last; c += e.stride) add(c);
  if (c - e.stride != e.last) add(e.last);
  return e;
}

InterpolationError measure(const ExactCodes& ex, const LookupTable& table) {
  InterpolationError r;
  r.first_code = ex.first;
  r.last_code = ex.last;
  r.stride = ex.stride;
  double sum2 = 0.0;
  for (std::size_t i = 0; i < ex.code.size(); ++i) {
    const auto v = table.temperature(static_cast<double>(ex.code[i]));
    if (!v) {
      ++r.uncovered;
      continue;
    }
    const double e = *v - ex.t[i];
    ++r.assessed;
    sum2 += e * e;
    if (std::abs(e) > r.max_abs) {
      r.max_abs = std::abs(e);
      r.max_signed = e;
      r.max_at_code = ex.code[i];
      r.max_at_celsius = ex.t[i];
    }
  }
  if (r.assessed > 0) r.rms = std::sqrt(sum2 / static_cast<double>(r.assessed));
  return r;
}

// The interval of a table a code falls in (the left one at a shared point).
std::size_t interval_of(const LookupTable& t, std::int64_t code) {
  const std::size_t last = t.size() - 2;
  if (t.codes.empty()) {
    const std::int64_t k = (code - t.first_code) / t.step;
    return static_cast<std::size_t>(std::clamp<std::int64_t>(k, 0, static_cast<std::int64_t>(last)));
  }
  const auto it = std::upper_bound(t.codes.begin(), t.codes.end(), code);
  const std::size_t k = it == t.codes.begin() ? 0 : static_cast<std::size_t>(it - t.codes.begin()) - 1;
  return std::min(k, last);
}

std::string describe_spacing(const LookupTable& t) {
  if (t.spacing() == TableSpacing::code)
    return "equally spaced in code: first code " + std::to_string(t.first_code) + ", step " + std::to_string(t.step) +
           ", last code " + std::to_string(t.last_code());
  return "equally spaced in temperature: codes " + std::to_string(t.code(0)) + ".." + std::to_string(t.last_code()) +
         " listed point by point";
}

std::string describe_error(const TableResult& r, double t_first, double t_last) {
  const auto& e = r.error;
  std::string s = "Interpolation error against the exact conversion over the range's codes " +
                  std::to_string(e.first_code) + ".." + std::to_string(e.last_code) + " (" + celsius(t_first) + " .. " +
                  celsius(t_last) + " degC, " + std::to_string(e.assessed) + " codes compared" +
                  (e.stride > 1 ? ", every " + std::to_string(e.stride) + "th" : std::string()) + "): largest " +
                  kelvin(e.max_abs) + " at code " + std::to_string(e.max_at_code) + " (" + celsius(e.max_at_celsius) +
                  " degC, the table reads " + (e.max_signed >= 0.0 ? "warm" : "cold") + "), RMS " + kelvin(e.rms) +
                  "; it includes the rounding of the stored values (up to " + kelvin(0.5 * r.table.unit) + ").";
  if (e.uncovered > 0)
    s += " " + std::to_string(e.uncovered) + " codes of the range fall outside the table and have no temperature.";
  return s;
}

// The exact temperatures at the range's first and last codes, for text.
std::pair<double, double> range_temperatures(const Design& d, const InterpolationError& e) {
  const Firmware fw(d);
  const auto a = fw.exact_temperature(static_cast<double>(e.first_code));
  const auto b = fw.exact_temperature(static_cast<double>(e.last_code));
  return {a.value_or(d.conditions.t_min), b.value_or(d.conditions.t_max)};
}

std::string unit_text(double unit) { return printf_number("%.10g", unit); }

bool valid_identifier(const std::string& s) {
  if (s.empty() || s.size() > 48) return false;
  if (!(std::isalpha(static_cast<unsigned char>(s[0])) || s[0] == '_')) return false;
  return std::all_of(s.begin(), s.end(), [](char c) { return std::isalnum(static_cast<unsigned char>(c)) || c == '_'; });
}

// Text that may sit inside a C block comment: no comment end, no control characters.
std::string comment_safe(std::string s) {
  for (std::size_t i = 0; (i = s.find("*/", i)) != std::string::npos;) s.replace(i, 2, "* /");
  for (char& c : s)
    if (static_cast<unsigned char>(c) < 0x20 || c == 0x7f) c = ' ';
  return s;
}

// Wraps text into comment lines of at most `width` characters after the prefix.
std::string wrap(const std::string& text, const std::string& lead, std::size_t width = 76) {
  std::istringstream in(text);
  std::string word, line, out;
  while (in >> word) {
    if (!line.empty() && line.size() + 1 + word.size() > width) {
      out += lead + line + "\n";
      line.clear();
    }
    line += (line.empty() ? "" : " ") + word;
  }
  if (!line.empty()) out += lead + line + "\n";
  return out;
}

// Two tables the firmware would store alike: the same points and integers.
bool same_table(const LookupTable& a, const LookupTable& b) {
  return a.unit == b.unit && a.stored == b.stored && a.codes == b.codes &&
         (!a.codes.empty() || (a.first_code == b.first_code && a.step == b.step));
}

}  // namespace

std::string_view to_string(StorageType t) { return t == StorageType::int16 ? "int16" : "int32"; }
std::int64_t storage_min(StorageType t) { return t == StorageType::int16 ? INT16_MIN : INT32_MIN; }
std::int64_t storage_max(StorageType t) { return t == StorageType::int16 ? INT16_MAX : INT32_MAX; }
std::size_t storage_bytes(StorageType t) { return t == StorageType::int16 ? 2 : 4; }

std::size_t TableResult::bytes() const {
  std::size_t b = table.size() * storage_bytes(type);
  if (table.spacing() == TableSpacing::temperature) b += table.size() * (adc_bits <= 16 ? 2 : 4);
  return b;
}

InterpolationError interpolation_error(const Design& d, const LookupTable& table) {
  const Firmware fw(d);
  return measure(exact_codes(d, fw), table);
}

TableResult make_table(const Design& d, const TableSettings& s) {
  if (!(s.unit >= 1e-4 && s.unit <= 1.0))
    reject(s.unit_where, unit_text(s.unit), "must be a storage unit in K from 0.0001 to 1, e.g. 0.01 or 0.1");
  const Firmware fw(d);
  const ExactCodes ex = exact_codes(d, fw);
  auto build = [&](int p) { return build_lookup_table(fw, p, s.unit, s.spacing); };

  // A two-point table spans the codes a table of any size spans; P can be at
  // most one point per code of it.
  const LookupTable two = build(2);
  if (two.size() < 2)
    reject(s.points_where, std::to_string(s.points),
           "no table can be built: fewer than two ADC codes of the range have an exact conversion (check the range "
           "and the divider)");
  const std::int64_t max_points = two.last_code() - two.code(0) + 1;
  const std::string span_text = "codes " + std::to_string(two.code(0)) + ".." + std::to_string(two.last_code());

  TableResult r;
  r.type = s.type;
  r.adc_bits = d.adc.bits;
  if (!s.max_error) {
    if (s.points < 2) reject(s.points_where, std::to_string(s.points), "must be at least 2 points");
    if (s.points > max_points)
      reject(s.points_where, std::to_string(s.points),
             "at most " + std::to_string(max_points) + " points, one per code of the table's span (" + span_text + ")");
    r.table = build(s.points);
    r.error = measure(ex, r.table);
  } else {
    const double limit = *s.max_error;
    if (!(limit > 0.0 && std::isfinite(limit)))
      reject(s.max_error_where, printf_number("%g", limit), "must be an error in K > 0, e.g. 0.05");
    const LookupTable dense = build(static_cast<int>(std::min<std::int64_t>(max_points, 1 << 30)));
    const InterpolationError best = measure(ex, dense);
    if (!best.within(limit))
      reject(s.max_error_where, printf_number("%g", limit) + " K",
             "cannot be met: a point at every code still leaves " + kelvin(best.max_abs) +
                 " (the rounding of the stored values, up to half the unit of " + unit_text(s.unit) +
                 " K); accepted: a limit of at least " + printf_number("%.3g", best.max_abs) + " K, or a finer unit");
    // Upwards from two points, so that the first table within the limit is the
    // smallest and P − 1 is known to fail. Spaced in code, tables with the same
    // first code and step agree over the range (the longer one only adds
    // points past its end), so their error is measured once.
    std::optional<InterpolationError> previous;
    std::int64_t prev_first = -1, prev_step = -1;
    for (std::int64_t p = 2; p <= max_points; ++p) {
      LookupTable t = build(static_cast<int>(p));
      InterpolationError e;
      if (s.spacing == TableSpacing::code && previous && t.first_code == prev_first && t.step == prev_step)
        e = *previous;
      else
        e = measure(ex, t);
      prev_first = t.first_code;
      prev_step = t.step;
      if (e.within(limit)) {
        r.table = std::move(t);
        r.error = e;
        r.one_fewer = previous;
        break;
      }
      previous = e;
    }
    if (r.table.size() < 2) {  // cannot happen: the densest table met the limit
      r.table = dense;
      r.error = best;
    }
    r.limit = limit;
  }

  // Every stored value must fit the type the header declares.
  for (std::size_t k = 0; k < r.table.size(); ++k) {
    const std::int64_t v = r.table.stored[k];
    if (v < storage_min(s.type) || v > storage_max(s.type))
      reject(s.type_where, std::string(to_string(s.type)),
             "the point at code " + std::to_string(r.table.code(k)) + " stores " + std::to_string(v) + " (" +
                 celsius(stored_celsius(r.table, k)) + " degC in units of " + unit_text(s.unit) + " K), outside " +
                 std::string(to_string(s.type)) + "'s " + std::to_string(storage_min(s.type)) + ".." +
                 std::to_string(storage_max(s.type)) + "; accepted: int32, or a coarser unit");
  }
  // The header's interpolation multiplies a difference of stored values by a
  // code offset in 64-bit integers; with |stored| < 2^31 and codes < 2^32
  // that product stays below 2^63 unless both are extreme.
  double worst_product = 0.0;
  for (std::size_t k = 0; k + 1 < r.table.size(); ++k)
    worst_product = std::max(worst_product, std::abs(static_cast<double>(r.table.stored[k + 1] - r.table.stored[k])) *
                                                static_cast<double>(r.table.code(k + 1) - r.table.code(k)));
  if (worst_product >= 0x1p62)
    reject(s.points_where, std::to_string(r.table.size()),
           "too few points for 64-bit integer interpolation on this ADC; use more points or a coarser unit");

  r.interval_max.assign(r.table.size() - 1, std::nullopt);
  for (std::size_t i = 0; i < ex.code.size(); ++i) {
    const auto v = r.table.temperature(static_cast<double>(ex.code[i]));
    if (!v) continue;
    auto& m = r.interval_max[interval_of(r.table, ex.code[i])];
    m = std::max(m.value_or(0.0), std::abs(*v - ex.t[i]));
  }
  r.used_by_chain = fw.conversion() == Conversion::table && same_table(fw.table(), r.table);
  return r;
}

std::string table_summary(const Design& d, const TableResult& r) {
  const auto& t = r.table;
  const auto [t_first, t_last] = range_temperatures(d, r.error);
  std::ostringstream out;
  out << t.size() << " points " << describe_spacing(t) << ".\n";
  out << "Stored as " << r.stored_type() << " in units of " << unit_text(t.unit) << " K (degC = stored x "
      << unit_text(t.unit) << "): " << r.bytes() << " bytes"
      << (t.spacing() == TableSpacing::temperature ? " with the " + std::string(r.code_type()) + " codes" : "") << ".\n";
  out << describe_error(r, t_first, t_last) << "\n";
  if (r.limit) {
    out << "Chosen for a largest error of " << kelvin(*r.limit) << ": " << t.size()
        << " points is the smallest table within it";
    if (r.one_fewer)
      out << "; " << t.size() - 1 << " points give " << kelvin(r.one_fewer->max_abs)
          << (r.one_fewer->uncovered ? " and leave codes uncovered" : "");
    out << ".\n";
  }
  if (r.used_by_chain) {
    out << "The scenario's firmware converts with this very table (conversion = table): `thermargin budget` analyses it.\n";
  } else {
    out << "To analyse this table in `thermargin budget`, set firmware.conversion = table, firmware.table_points = "
        << t.size() << ", firmware.table_unit = " << unit_text(t.unit) << ", firmware.table_spacing = "
        << (t.spacing() == TableSpacing::code ? "code" : "temperature") << ".\n";
  }
  return out.str();
}

void require_c_prefix(const std::string& prefix) {
  if (!valid_identifier(prefix))
    reject(command_line("table.prefix"), prefix,
           "must be a C identifier of at most 48 characters: a letter or _, then letters, digits or _");
}

std::string c_header(const Design& d, const TableResult& r, const std::string& prefix) {
  require_c_prefix(prefix);
  std::string upper = prefix;
  for (char& c : upper) c = static_cast<char>(std::toupper(static_cast<unsigned char>(c)));
  const std::string M = upper + "_";
  const auto& t = r.table;
  const bool by_code = t.spacing() == TableSpacing::code;
  const auto [t_first, t_last] = range_temperatures(d, r.error);

  std::ostringstream h;
  h << "/* " << comment_safe(d.title) << "\n";
  h << " *\n";
  h << wrap("Lookup table from ADC code to temperature, written by thermargin " + std::string(version) +
                " (`thermargin table`) from the scenario's nominal chain. " + std::to_string(t.size()) + " points " +
                describe_spacing(t) + ".",
            " * ");
  h << " *\n";
  h << wrap("Stored values: temperature in degC = stored x " + unit_text(t.unit) + " (" + M + "UNIT_K), as " +
                std::string(r.stored_type()) + "; " + std::to_string(r.bytes()) + " bytes.",
            " * ");
  h << " *\n";
  if (by_code) {
    h << wrap("Point k sits at code " + M + "FIRST_CODE + k * " + M + "STEP: the interval of a code is (code - " + M +
                  "FIRST_CODE) / " + M + "STEP, one division.",
              " * ");
  } else {
    h << wrap("Point k sits at code " + prefix + "_codes[k] (strictly increasing, denser where the curve is flat): "
                  "the interval of a code is found by a binary search over that array.",
              " * ");
  }
  h << wrap("Interpolate linearly between the two points around the code, as " + prefix +
                "_lookup() below does in integers. A code outside " + M + "FIRST_CODE.." + M +
                "LAST_CODE is a reading outside the table: report a fault, do not extrapolate.",
            " * ");
  h << " *\n";
  h << wrap(describe_error(r, t_first, t_last), " * ");
  h << " *\n";
  h << wrap(std::string(caution), " * ");
  h << " */\n";
  h << "#ifndef " << M << "H\n#define " << M << "H\n\n#include <stdint.h>\n\n";
  h << "#define " << M << "POINTS " << t.size() << "\n";
  h << "#define " << M << "SPACING_CODE " << (by_code ? 1 : 0) << " /* 1: equally spaced in code; 0: in temperature, see "
    << prefix << "_codes */\n";
  h << "#define " << M << "FIRST_CODE " << t.code(0) << "u\n";
  h << "#define " << M << "LAST_CODE " << t.last_code() << "u\n";
  if (by_code) h << "#define " << M << "STEP " << t.step << "u\n";
  h << "#define " << M << "UNIT_K " << unit_text(t.unit) << " /* K (and degC) per stored count */\n";
  const double per_k = 1.0 / t.unit;
  if (std::abs(per_k - std::round(per_k)) < 1e-9 * per_k)
    h << "#define " << M << "COUNTS_PER_K " << static_cast<long long>(std::llround(per_k)) << "\n";
  h << "#define " << M << "BYTES " << r.bytes() << "u\n\n";

  auto array = [&](const std::string& type, const std::string& name, auto value) {
    h << "static const " << type << " " << name << "[" << M << "POINTS] = {\n";
    for (std::size_t k = 0; k < t.size(); ++k) {
      if (k % 10 == 0) h << "    ";
      h << value(k) << (k + 1 < t.size() ? "," : "");
      h << ((k % 10 == 9 || k + 1 == t.size()) ? "\n" : " ");
    }
    h << "};\n\n";
  };
  array(std::string(r.stored_type()), prefix + "_stored", [&](std::size_t k) { return std::to_string(t.stored[k]); });
  if (!by_code) array(std::string(r.code_type()), prefix + "_codes", [&](std::size_t k) { return std::to_string(t.code(k)) + "u"; });

  const std::string S = prefix + "_stored", C = prefix + "_codes";
  h << "/* The temperature at an ADC code in stored units (degC / " << M << "UNIT_K),\n"
    << " * linearly interpolated and rounded to the nearest unit (halves away from zero).\n"
    << " * Returns 0, or -1 below the first code and +1 above the last (no temperature). */\n";
  h << "static inline int " << prefix << "_lookup(uint32_t code, int32_t *stored)\n{\n";
  h << "    uint32_t k, width, offset;\n    int64_t num, half;\n";
  h << "    if (code < " << M << "FIRST_CODE) return -1;\n";
  h << "    if (code > " << M << "LAST_CODE) return 1;\n";
  if (by_code) {
    h << "    k = (uint32_t)((code - " << M << "FIRST_CODE) / " << M << "STEP);\n";
    h << "    if (k > " << M << "POINTS - 2u) k = " << M << "POINTS - 2u;\n";
    h << "    width = " << M << "STEP;\n";
    h << "    offset = code - (" << M << "FIRST_CODE + k * " << M << "STEP);\n";
  } else {
    h << "    {   /* binary search: " << C << "[lo] <= code <= " << C << "[hi], hi - lo = 1 at the end */\n";
    h << "        uint32_t lo = 0u, hi = " << M << "POINTS - 1u;\n";
    h << "        while (hi - lo > 1u) {\n";
    h << "            uint32_t mid = lo + (hi - lo) / 2u;\n";
    h << "            if (" << C << "[mid] <= code) lo = mid; else hi = mid;\n";
    h << "        }\n";
    h << "        k = lo;\n    }\n";
    h << "    width = (uint32_t)" << C << "[k + 1u] - (uint32_t)" << C << "[k];\n";
    h << "    offset = code - (uint32_t)" << C << "[k];\n";
  }
  h << "    num = ((int64_t)" << S << "[k + 1u] - (int64_t)" << S << "[k]) * (int64_t)offset;\n";
  h << "    half = (int64_t)(width / 2u);\n";
  h << "    num = num >= 0 ? (num + half) / (int64_t)width : -((-num + half) / (int64_t)width);\n";
  h << "    *stored = (int32_t)((int64_t)" << S << "[k] + num);\n";
  h << "    return 0;\n}\n\n";
  h << "#endif /* " << M << "H */\n";
  return h.str();
}

std::string table_csv(const Design& d, const TableResult& r) {
  const auto& t = r.table;
  const auto [t_first, t_last] = range_temperatures(d, r.error);
  std::ostringstream out;
  // Comment lines first: CSV readers told that `#` starts a comment skip them
  // (the data file reader of this project does).
  auto comment = [&](const std::string& s) {
    std::string c = "# " + s;
    for (char& ch : c)
      if (ch == '\n' || ch == '\r') ch = ' ';
    out << c << "\n";
  };
  comment(d.title);
  comment("thermargin " + std::string(version) + " table: " + std::to_string(t.size()) + " points " + describe_spacing(t));
  comment("temperature_degC = stored x " + unit_text(t.unit) + "; stored as " + std::string(r.stored_type()));
  comment(describe_error(r, t_first, t_last));
  comment(std::string(caution));
  if (const std::string note = rtd_class_range_note(d); !note.empty()) comment("RTD class: " + note + ".");
  out << "code,temperature_degC,stored\n";
  for (std::size_t k = 0; k < t.size(); ++k)
    out << t.code(k) << "," << printf_number("%.10g", stored_celsius(t, k)) << "," << t.stored[k] << "\n";
  return out.str();
}

}  // namespace thermargin
