#include "thermargin/input/scenario.hpp"

#include <algorithm>
#include <cmath>
#include <cstdio>
#include <filesystem>
#include <set>
#include <sstream>

#include <boost/program_options.hpp>

#include "thermargin/chain/firmware.hpp"
#include "thermargin/chain/sensor.hpp"
#include "thermargin/core/text_file.hpp"

namespace po = boost::program_options;

namespace thermargin {
namespace {

using Q = Quantity;

std::vector<KeySpec> make_schema() {
  std::vector<KeySpec> s = {
      {"title", Q::plain, "Default design: 10 kOhm NTC, 12-bit ratiometric ADC", "a title for reports"},
      {"sensor.model", Q::plain, "beta", "beta | steinhart-hart | table | rtd"},
      {"sensor.r25", Q::resistance, "10k", "NTC resistance at 25 degC (beta model)"},
      {"sensor.r25_tol", Q::ratio, "1%", "+/- tolerance of R25 (any NTC model)"},
      {"sensor.beta", Q::beta_value, "3950", "B value in K (beta model): 3950 or 3950K"},
      {"sensor.beta_tol", Q::ratio, "1%", "+/- tolerance of beta (any NTC model)"},
      {"sensor.a", Q::plain, "1.129148e-3", "Steinhart-Hart A in 1/K"},
      {"sensor.b", Q::plain, "2.34125e-4", "Steinhart-Hart B in 1/K"},
      {"sensor.c", Q::plain, "8.76741e-8", "Steinhart-Hart C in 1/K"},
      {"sensor.table_file", Q::plain, "", "R-T table CSV (degC, ohm), relative to the scenario file"},
      {"sensor.r0", Q::resistance, "100", "RTD resistance at 0 degC"},
      {"sensor.rtd_class", Q::plain, "none", "IEC 60751 class: none | AA | A | B | C"},
      {"sensor.cvd_a", Q::plain, "3.9083e-3", "Callendar-Van Dusen A in 1/degC"},
      {"sensor.cvd_b", Q::plain, "-5.775e-7", "Callendar-Van Dusen B in 1/degC^2"},
      {"sensor.cvd_c", Q::plain, "-4.183e-12", "Callendar-Van Dusen C in 1/degC^4 (below 0 degC)"},
      {"sensor.dissipation", Q::dissipation, "1.5mW/K", "dissipation constant; 0 = no self-heating"},
      {"sensor.dissipation_tol", Q::ratio, "20%", "+/- tolerance of the dissipation constant"},
      {"sensor.lead_resistance", Q::resistance, "0", "lead resistance in series with the element (both leads)"},
      {"divider.placement", Q::plain, "low", "low (sensor node-to-ground) | high (sensor excitation-to-node)"},
      {"divider.r_fixed", Q::resistance, "10k", "fixed resistor"},
      {"divider.r_fixed_tol", Q::ratio, "1%", "+/- tolerance of the fixed resistor"},
      {"divider.r_fixed_tempco", Q::tempco, "100ppm", "+/- tempco of the fixed resistor at board temperature"},
      {"divider.r_parallel", Q::resistance, "none", "resistor across the sensor branch; none = absent"},
      {"divider.r_parallel_tol", Q::ratio, "0", "+/- tolerance of the parallel resistor"},
      {"divider.duty", Q::ratio, "1", "fraction of time the divider is powered (self-heating)"},
      {"supply.ratiometric", Q::plain, "true", "true: the ADC reference is the excitation; false: absolute"},
      {"supply.v_excitation", Q::voltage, "3.3V", "divider excitation voltage"},
      {"supply.v_excitation_tol", Q::ratio, "0", "+/- initial tolerance (absolute only)"},
      {"supply.v_excitation_tempco", Q::tempco, "0", "+/- tempco at board temperature (absolute only)"},
      {"supply.v_reference", Q::voltage, "3.3V", "ADC reference voltage (absolute only)"},
      {"supply.v_reference_tol", Q::ratio, "0", "+/- initial tolerance (absolute only)"},
      {"supply.v_reference_tempco", Q::tempco, "0", "+/- tempco at board temperature (absolute only)"},
      {"adc.bits", Q::integer, "12", "resolution in bits, 1..32"},
      {"adc.quantizer", Q::plain, "round", "round (nearest) | floor (truncate)"},
      {"adc.offset", Q::lsb, "2", "+/- offset error in LSB"},
      {"adc.gain_error", Q::ratio, "0.2%", "+/- gain error"},
      {"adc.inl", Q::lsb, "1", "+/- integral non-linearity, peak of the bow, in LSB"},
      {"adc.noise", Q::lsb, "0.5", "input-referred noise in LSB rms"},
      {"adc.averaging", Q::integer, "1", "samples averaged per reading"},
      {"adc.leakage", Q::current, "0", "+/- pin leakage current"},
      {"firmware.conversion", Q::plain, "beta", "exact | beta | steinhart-hart | table"},
      {"firmware.full_scale", Q::plain, "pow2", "pow2 (ratio = code/2^N) | pow2-minus-1 (code/(2^N - 1))"},
      {"firmware.r25", Q::resistance, "sensor", "R25 the firmware assumes; sensor = the sensor's"},
      {"firmware.beta", Q::beta_value, "sensor", "B value in K the firmware assumes; sensor = the sensor's"},
      {"firmware.a", Q::plain, "fit", "Steinhart-Hart A the firmware uses; fit = through the nominal curve"},
      {"firmware.b", Q::plain, "fit", "Steinhart-Hart B; fit = through the nominal curve"},
      {"firmware.c", Q::plain, "fit", "Steinhart-Hart C; fit = through the nominal curve"},
      {"firmware.table_points", Q::integer, "33", "lookup-table points (where they sit: firmware.table_spacing)"},
      {"firmware.table_unit", Q::temperature_difference, "0.01", "lookup-table storage unit in K, 0.0001..1"},
      {"firmware.table_spacing", Q::plain, "code", "lookup-table points equally spaced in: code | temperature"},
      {"firmware.lead_compensation", Q::resistance, "0", "lead resistance the firmware subtracts"},
      {"firmware.resolution", Q::temperature_difference, "0.1", "output resolution in K; 0 = none"},
      {"firmware.calibration", Q::plain, "none", "none | offset | two-point"},
      {"firmware.calibration_at", Q::plain, "25", "calibration temperature(s) in degC: t or t1,t2"},
      {"firmware.calibration_uncertainty", Q::temperature_difference, "0.1", "+/- error of the calibration reference"},
      {"conditions.t_min", Q::temperature, "-20", "lowest temperature analysed"},
      {"conditions.t_max", Q::temperature, "80", "highest temperature analysed"},
      {"conditions.t_step", Q::temperature_difference, "0.5", "temperature step"},
      {"conditions.board", Q::plain, "10..40", "board temperature: sensor | t | tmin..tmax (degC)"},
      {"requirement.window_min", Q::temperature, "0", "start of the window that must meet the limit"},
      {"requirement.window_max", Q::temperature, "60", "end of that window"},
      {"requirement.max_error", Q::temperature_difference, "1", "+/- error limit in K"},
      {"requirement.yield", Q::ratio, "99%", "required fraction of units within the limit"},
      {"requirement.basis", Q::plain, "worst-case", "the verdict's bound: worst-case | linear | monte-carlo (yield)"},
      {"requirement.include_dynamic", Q::plain, "false", "true: budget's verdict adds the [response] ramp error | false"},
      {"montecarlo.units", Q::plain, "100000", "units drawn, or auto (JCGM 101 7.9 adaptive)"},
      {"montecarlo.seed", Q::integer, "1", "random seed"},
      {"montecarlo.threads", Q::integer, "0", "worker threads; 0 = all cores"},
      {"montecarlo.distribution", Q::plain, "normal", "normal | uniform | triangular | gapped"},
      {"montecarlo.sigma_per_tol", Q::plain, "3", "a normal bound is this many standard deviations"},
      {"montecarlo.coverage", Q::ratio, "99.73%", "coverage probability of the bands"},
      {"montecarlo.noise_k", Q::plain, "3", "worst case: noise enters as +/- noise_k sigma"},
      {"montecarlo.max_units", Q::plain, "10000000", "cap on units for auto"},
      // Following a changing temperature (docs/response.md), read by read_response_section().
      {"response.time_constant", Q::time, "10s", "the sensor's thermal time constant (63.2 % of a step)"},
      {"response.time_constant_tol", Q::ratio, "0", "+/- tolerance of the time constant"},
      {"response.reading_period", Q::time, "1s", "time between the firmware's readings"},
      {"response.filter", Q::plain, "none", "the firmware's filter: none | moving-average | exponential"},
      {"response.filter_length", Q::integer, "8", "moving average: readings averaged, N >= 1"},
      {"response.filter_alpha", Q::plain, "0.125", "exponential filter y += alpha (x - y): alpha in (0, 1]"},
      {"response.ramp", Q::ramp_rate, "0", "rate of change the reading must follow, K/min (0 = none)"},
      {"response.step", Q::temperature_difference, "10", "size of the step whose settling is computed, K"},
      {"response.settle_to", Q::temperature_difference, "0.1", "a step has settled when the error stays within this, K"},
  };
  // Per-input distribution overrides beside each toleranced key.
  std::set<std::string> done;
  for (int i = 0; i < source_count; ++i) {
    const std::string key(info(static_cast<Source>(i)).key);
    if (key == "conditions.board" || !done.insert(key).second) continue;
    s.push_back({key + "_dist", Q::plain, "default", "distribution of " + key + ": default | normal | uniform | triangular | gapped"});
    s.push_back({key + "_gap", info(static_cast<Source>(i)).quantity == Q::plain ? Q::plain : info(static_cast<Source>(i)).quantity,
                 "0", "gapped: the inner band sorted out of " + key});
  }
  return s;
}

std::string trim(const std::string& s) {
  const auto b = s.find_first_not_of(" \t\r");
  if (b == std::string::npos) return "";
  const auto e = s.find_last_not_of(" \t\r");
  return s.substr(b, e - b + 1);
}

bool known_section(const std::string& name) {
  static const std::set<std::string> sections{"sensor", "divider", "supply", "adc", "firmware",
                                             "conditions", "requirement", "montecarlo", "response"};
  return sections.count(name) > 0;
}

std::string section_list() { return "sensor, divider, supply, adc, firmware, conditions, requirement, montecarlo, response"; }

}  // namespace

const std::vector<KeySpec>& scenario_schema() {
  static const std::vector<KeySpec> schema = make_schema();
  return schema;
}

const KeySpec* find_key(std::string_view key) {
  for (const auto& k : scenario_schema())
    if (k.key == key) return &k;
  return nullptr;
}

Scenario::Scenario() {
  for (const auto& k : scenario_schema()) values_[k.key] = Setting{k.default_value, Where{Origin::built_in, "", 0, k.key}};
}

const Setting& Scenario::get(const std::string& key) const { return values_.at(key); }

void Scenario::set(const std::string& key, const std::string& value, const Where& where) {
  if (!find_key(key)) {
    Where w = where;
    w.key = key;
    reject(w, value, "unknown key; `thermargin check --help` lists the keys (section.key, e.g. divider.r_fixed)");
  }
  Where w = where;
  w.key = key;
  values_[key] = Setting{value, w};
}

void Scenario::load_file(const std::string& path) {
  const std::string text = read_text_file(path);
  file_ = path;
  // The line scan: sections, keys and their lines, syntax errors with lines.
  std::map<std::string, int> lines;
  std::string section;
  int n = 0;
  for (const std::string& raw : split_lines(text, path)) {
    ++n;
    const std::string line = trim(raw.substr(0, raw.find('#')));
    if (line.empty()) continue;
    // Boost's parser refuses these without a line number: refuse them here.
    if (line[0] == ';') reject_at(path, n, "'" + line.substr(0, 60) + "': comments start with '#'");
    if (line.front() == '[') {
      if (line.back() != ']') reject_at(path, n, "malformed section header '" + line + "': expected [section]");
      section = trim(line.substr(1, line.size() - 2));
      if (section != line.substr(1, line.size() - 2))
        reject_at(path, n, "malformed section header '" + line + "': expected [" + section + "], no spaces inside the brackets");
      if (!known_section(section))
        reject_at(path, n, "unknown section [" + section + "]; accepted sections: " + section_list());
      continue;
    }
    const auto eq = line.find('=');
    if (eq == std::string::npos)
      reject_at(path, n, "expected 'key = value' or '[section]', found '" + line.substr(0, 60) + "'");
    const std::string key = trim(line.substr(0, eq));
    if (key.empty()) reject_at(path, n, "a line with '=' but no key");
    const std::string full = section.empty() ? key : section + "." + key;
    if (!find_key(full))
      reject_at(path, n,
                "unknown key '" + full + "'" +
                    (section.empty() ? " (keys other than title belong in a [section])" : "") +
                    "; `thermargin check --help` lists the accepted keys");
    if (!lines.emplace(full, n).second)
      reject_at(path, n, "key '" + full + "' is set twice (first on line " + std::to_string(lines[full]) + ")");
  }
  // The parse itself, by Boost.Program_options.
  po::options_description desc;
  for (const auto& k : scenario_schema()) desc.add_options()(k.key.c_str(), po::value<std::string>());
  po::variables_map vm;
  std::istringstream in(text);
  try {
    po::store(po::parse_config_file(in, desc, false), vm);
  } catch (const po::error& e) {
    reject_at(path, 0, std::string("cannot be read as a scenario: ") + e.what());
  }
  for (const auto& [key, value] : vm) {
    const auto it = lines.find(key);
    values_[key] = Setting{trim(value.as<std::string>()), Where{Origin::file, path, it == lines.end() ? 0 : it->second, key}};
  }
  // A file without a title is named by its file name in reports, never by
  // the built-in design's title (which would describe another circuit).
  if (values_["title"].where.kind == Origin::built_in)
    values_["title"] = Setting{std::filesystem::path(path).filename().string(), Where{Origin::file, path, 0, "title"}};
}

std::string to_ini(const Scenario& s, bool with_help) {
  std::ostringstream out;
  std::string section;
  for (const auto& k : scenario_schema()) {
    const auto dot = k.key.find('.');
    const std::string sec = dot == std::string::npos ? "" : k.key.substr(0, dot);
    const std::string name = dot == std::string::npos ? k.key : k.key.substr(dot + 1);
    if (name.ends_with("_dist") || name.ends_with("_gap")) {
      const auto& v = s.get(k.key).value;
      if (v == k.default_value) continue;  // overrides only when set
    }
    if (sec != section) {
      out << "\n[" << sec << "]\n";
      section = sec;
    }
    if (with_help) out << "# " << k.help << "\n";
    out << name << " = " << s.get(k.key).value << "\n";
  }
  return out.str();
}

// ---------------------------------------------------------------------------
// Building the design: typed reads, value checks, combination checks.

namespace {

class Reader {
 public:
  explicit Reader(const Scenario& s) : s_(s) {}

  const Setting& at(const std::string& key) const { return s_.get(key); }
  bool is_default(const std::string& key) const { return at(key).where.kind == Origin::built_in; }

  double number(const std::string& key) const {
    const auto& st = at(key);
    return parse_quantity(st.value, find_key(key)->quantity, st.where);
  }
  double positive(const std::string& key) const {
    const double v = number(key);
    if (!(v > 0.0)) fail(key, "must be > 0");
    return v;
  }
  double non_negative(const std::string& key) const {
    const double v = number(key);
    if (v < 0.0) fail(key, "must be >= 0");
    return v;
  }
  double tolerance(const std::string& key) const {
    const double v = number(key);
    if (v < 0.0 || v >= 1.0) fail(key, "must be a tolerance from 0 up to (not including) 100 %");
    return v;
  }
  long long integer(const std::string& key, long long lo, long long hi) const {
    const double v = number(key);
    if (v < static_cast<double>(lo) || v > static_cast<double>(hi))
      fail(key, "must be a whole number from " + std::to_string(lo) + " to " + std::to_string(hi));
    return static_cast<long long>(v);
  }
  template <class E>
  E word(const std::string& key, std::initializer_list<std::pair<const char*, E>> choices) const {
    const auto& st = at(key);
    std::string list;
    for (const auto& c : choices) {
      if (st.value == c.first) return c.second;
      list += (list.empty() ? "" : " | ") + std::string(c.first);
    }
    fail(key, "must be one of: " + list);
  }
  bool boolean(const std::string& key) const {
    return word<bool>(key, {{"true", true}, {"yes", true}, {"1", true}, {"false", false}, {"no", false}, {"0", false}});
  }
  // Of two keys checked against each other, the one to name in a message:
  // `preferred`, unless only `other` was set (a default has no line to show).
  const char* set_one(const char* preferred, const char* other) const {
    return is_default(preferred) && !is_default(other) ? other : preferred;
  }
  [[noreturn]] void fail(const std::string& key, const std::string& why) const {
    const auto& st = at(key);
    reject(st.where, st.value, why);
  }

 private:
  const Scenario& s_;
};

std::vector<double> parse_list(const Reader& r, const std::string& key, Quantity q) {
  const auto& st = r.at(key);
  std::vector<double> out;
  std::string item;
  std::istringstream in(st.value);
  while (std::getline(in, item, ',')) out.push_back(parse_quantity(item, q, st.where));
  return out;
}

std::string resolve_path(const Scenario& s, const std::string& file) {
  namespace fs = std::filesystem;
  const Setting& st = s.get("sensor.table_file");
  if (fs::path(file).is_absolute() || st.where.kind != Origin::file) return file;
  return (fs::path(st.where.file).parent_path() / file).string();
}

}  // namespace

Design build_design(const Scenario& s) {
  const Reader r(s);
  Design d;
  d.title = s.get("title").value;

  // Sensor.
  SensorSettings& se = d.sensor;
  se.kind = r.word<SensorKind>("sensor.model", {{"beta", SensorKind::beta},
                                                {"steinhart-hart", SensorKind::steinhart_hart},
                                                {"table", SensorKind::table},
                                                {"rtd", SensorKind::rtd}});
  se.r25 = r.positive("sensor.r25");
  se.beta = r.positive("sensor.beta");
  se.sh = {r.number("sensor.a"), r.number("sensor.b"), r.number("sensor.c")};
  se.cvd = {r.positive("sensor.r0"), r.number("sensor.cvd_a"), r.number("sensor.cvd_b"), r.number("sensor.cvd_c")};
  const bool ntc = se.kind != SensorKind::rtd;
  se.r25_tol = ntc ? r.tolerance("sensor.r25_tol") : 0.0;
  se.beta_tol = ntc ? r.tolerance("sensor.beta_tol") : 0.0;
  if (se.kind == SensorKind::steinhart_hart && !(se.sh.b > 0.0 && se.sh.c >= 0.0))
    r.fail("sensor.b", "Steinhart-Hart needs B > 0 and C >= 0 for a falling NTC curve");
  if (se.kind == SensorKind::table) {
    const auto& tf = s.get("sensor.table_file");
    if (tf.value.empty()) r.fail("sensor.table_file", "model = table needs a table file (CSV of degC, ohm)");
    se.table_file = resolve_path(s, tf.value);
    try {
      se.table.emplace(read_rt_data(se.table_file));
    } catch (const input_error& e) {
      reject(tf.where, tf.value, std::string("the table cannot be used: ") + e.what());
    }
    if ((se.r25_tol > 0.0 || se.beta_tol > 0.0) && !se.table->covers(t0_kelvin))
      r.fail("sensor.r25_tol", "tolerances are defined at 25 degC, which the table does not cover; extend the table "
                               "or set the tolerances to 0");
  }
  const auto cls = r.word<int>("sensor.rtd_class", {{"none", -1}, {"AA", 0}, {"A", 1}, {"B", 2}, {"C", 3}});
  if (cls >= 0 && se.kind == SensorKind::rtd) se.rtd_class = static_cast<RtdClass>(cls);
  se.dissipation = r.non_negative("sensor.dissipation");
  se.dissipation_tol = r.tolerance("sensor.dissipation_tol");
  se.lead_resistance = r.non_negative("sensor.lead_resistance");

  // Divider.
  DividerSettings& dv = d.divider;
  dv.placement = r.word<Placement>("divider.placement", {{"low", Placement::low}, {"high", Placement::high}});
  dv.r_fixed = r.positive("divider.r_fixed");
  dv.r_fixed_tol = r.tolerance("divider.r_fixed_tol");
  dv.r_fixed_tempco = r.non_negative("divider.r_fixed_tempco");
  if (dv.r_fixed_tempco >= 0.01) r.fail("divider.r_fixed_tempco", "must be below 10000 ppm/K");
  if (s.get("divider.r_parallel").value != "none") dv.r_parallel = r.positive("divider.r_parallel");
  dv.r_parallel_tol = r.tolerance("divider.r_parallel_tol");
  if (!dv.r_parallel && dv.r_parallel_tol > 0.0)
    r.fail("divider.r_parallel_tol", "a tolerance for a parallel resistor that is absent; set divider.r_parallel");
  dv.duty = r.positive("divider.duty");
  if (dv.duty > 1.0) r.fail("divider.duty", "must be a fraction of time in (0, 1]");

  // Supply.
  SupplySettings& su = d.supply;
  su.ratiometric = r.boolean("supply.ratiometric");
  su.v_excitation = r.positive("supply.v_excitation");
  su.v_reference = r.positive("supply.v_reference");
  su.v_excitation_tol = r.tolerance("supply.v_excitation_tol");
  su.v_excitation_tempco = r.non_negative("supply.v_excitation_tempco");
  su.v_reference_tol = r.tolerance("supply.v_reference_tol");
  su.v_reference_tempco = r.non_negative("supply.v_reference_tempco");
  if (su.ratiometric) {
    for (const char* k : {"supply.v_excitation_tol", "supply.v_excitation_tempco", "supply.v_reference_tol",
                          "supply.v_reference_tempco", "supply.v_reference"})
      if (!r.is_default(k) && r.number(k) != 0.0 && std::string(k) != "supply.v_reference")
        r.fail(k, "has no effect with supply.ratiometric = true (the errors cancel); set it to 0 or make the supply absolute");
  } else if (r.is_default("supply.v_reference")) {
    r.fail("supply.v_reference", "an absolute reference (supply.ratiometric = false) needs its voltage set explicitly");
  }

  // ADC.
  AdcSettings& a = d.adc;
  a.bits = static_cast<int>(r.integer("adc.bits", 1, 32));
  a.quantizer = r.word<Quantizer>("adc.quantizer", {{"round", Quantizer::round}, {"floor", Quantizer::floor}});
  a.offset = r.non_negative("adc.offset");
  a.gain_error = r.tolerance("adc.gain_error");
  a.inl = r.non_negative("adc.inl");
  a.noise = r.non_negative("adc.noise");
  a.averaging = static_cast<int>(r.integer("adc.averaging", 1, 65536));
  a.leakage = r.non_negative("adc.leakage");
  if (a.offset >= d.adc_span() / 2) r.fail("adc.offset", "must be less than half the ADC span");

  // Firmware.
  FirmwareSettings& f = d.firmware;
  f.conversion = r.word<Conversion>("firmware.conversion", {{"exact", Conversion::exact},
                                                            {"beta", Conversion::beta},
                                                            {"steinhart-hart", Conversion::steinhart_hart},
                                                            {"table", Conversion::table}});
  f.full_scale = r.word<FullScale>("firmware.full_scale", {{"pow2", FullScale::pow2}, {"pow2-minus-1", FullScale::pow2_minus_1}});
  f.r25 = s.get("firmware.r25").value == "sensor" ? (se.kind == SensorKind::beta ? se.r25 : 0.0) : r.positive("firmware.r25");
  f.beta = s.get("firmware.beta").value == "sensor" ? (se.kind == SensorKind::beta ? se.beta : 0.0) : r.positive("firmware.beta");
  {
    const bool fit_a = s.get("firmware.a").value == "fit", fit_b = s.get("firmware.b").value == "fit",
               fit_c = s.get("firmware.c").value == "fit";
    if (fit_a != fit_b || fit_b != fit_c)
      r.fail("firmware.a", "give all three of firmware.a, b, c, or none (fit = through the nominal curve)");
    if (!fit_a) f.sh = SteinhartHart{r.number("firmware.a"), r.number("firmware.b"), r.number("firmware.c")};
  }
  f.table_points = static_cast<int>(r.integer("firmware.table_points", 2, 65536));
  f.table_unit = r.positive("firmware.table_unit");
  if (f.table_unit < 1e-4 || f.table_unit > 1.0) r.fail("firmware.table_unit", "must be from 0.0001 K to 1 K");
  f.table_spacing = r.word<TableSpacing>("firmware.table_spacing",
                                         {{"code", TableSpacing::code}, {"temperature", TableSpacing::temperature}});
  f.lead_compensation = r.non_negative("firmware.lead_compensation");
  f.resolution = r.non_negative("firmware.resolution");
  f.calibration = r.word<Calibration>("firmware.calibration", {{"none", Calibration::none},
                                                               {"offset", Calibration::offset},
                                                               {"two-point", Calibration::two_point}});
  f.calibration_uncertainty = r.non_negative("firmware.calibration_uncertainty");

  // Conditions.
  Conditions& c = d.conditions;
  c.t_min = r.number("conditions.t_min");
  c.t_max = r.number("conditions.t_max");
  c.t_step = r.positive("conditions.t_step");
  if (c.t_min <= -kelvin_offset) r.fail("conditions.t_min", "must be above absolute zero (-273.15 degC)");
  if (!(c.t_max > c.t_min)) {
    if (r.set_one("conditions.t_max", "conditions.t_min") == std::string("conditions.t_min"))
      r.fail("conditions.t_min", "must be below conditions.t_max (" + s.get("conditions.t_max").value + ")");
    r.fail("conditions.t_max", "must be above conditions.t_min (" + s.get("conditions.t_min").value + ")");
  }
  {
    // As many temperatures as Conditions::temperatures() makes: every step
    // from t_min, then t_max when the last step falls short of it. Counted in
    // double: a tiny step gives more than a long long holds.
    const double steps = std::floor((c.t_max - c.t_min) / c.t_step + 1e-9);
    const bool t_max_added = c.t_max - (c.t_min + steps * c.t_step) > 1e-9 * std::max(1.0, std::fabs(c.t_max));
    const double count = steps + 1 + (t_max_added ? 1 : 0);
    if (count > 100001) {
      char text[32];
      std::snprintf(text, sizeof text, count < 1e15 ? "%.0f" : "%.3g", count);
      r.fail("conditions.t_step", std::string("gives ") + text + " temperatures; at most 100001 are analysed");
    }
  }
  {
    const auto& b = s.get("conditions.board");
    if (b.value == "sensor") {
      c.board.kind = BoardKind::sensor;
    } else if (const auto dots = b.value.find(".."); dots != std::string::npos) {
      c.board.kind = BoardKind::range;
      c.board.min = parse_quantity(b.value.substr(0, dots), Quantity::temperature, b.where);
      c.board.max = parse_quantity(b.value.substr(dots + 2), Quantity::temperature, b.where);
      if (!(c.board.max > c.board.min)) reject(b.where, b.value, "a range must be written low..high with low < high");
    } else {
      c.board.kind = BoardKind::fixed;
      c.board.min = c.board.max = parse_quantity(b.value, Quantity::temperature, b.where);
    }
    if (c.board.kind != BoardKind::sensor && c.board.min <= -kelvin_offset)
      reject(b.where, b.value, "must be above absolute zero");
  }

  // The nominal curve must give a usable resistance at both ends of the
  // range (a table's ends are results instead: outside-sensor-table). A B
  // value with a stray prefix, or an RTD analysed where its polynomial is no
  // longer positive, would otherwise reach the engines as inf or nothing.
  if (se.kind != SensorKind::table) {
    for (const double t : {c.t_min, c.t_max}) {
      const auto l = nominal_ln_resistance(se, t + kelvin_offset);
      if (l && std::isfinite(*l) && std::exp(*l) > 0.0 && std::isfinite(std::exp(*l))) continue;
      const std::string at = " at " + s.get(t == c.t_min ? "conditions.t_min" : "conditions.t_max").value + " degC";
      if (se.kind == SensorKind::beta)
        r.fail("sensor.beta", "gives the sensor no finite resistance" + at + "; a B value is some thousands of kelvin (3950 or 3950K)");
      if (se.kind == SensorKind::steinhart_hart)
        r.fail("sensor.a", "the Steinhart-Hart curve (sensor.a, b, c) gives no finite resistance" + at);
      r.fail(t == c.t_min ? "conditions.t_min" : "conditions.t_max",
             "the RTD's Callendar-Van Dusen curve has no positive resistance there; IEC 60751 defines it from -200 to 850 degC");
    }
  }

  // Calibration points need the range. Read even when calibration is off, so
  // that a typo is refused rather than waiting for the day it is switched on.
  {
    const std::vector<double> at = parse_list(r, "firmware.calibration_at", Quantity::temperature);
    if (f.calibration != Calibration::none) f.calibration_at = at;
  }
  if (f.calibration != Calibration::none) {
    const std::size_t want = f.calibration == Calibration::offset ? 1 : 2;
    if (f.calibration_at.size() != want)
      r.fail("firmware.calibration_at", want == 1 ? "offset calibration takes one temperature" :
                                                     "two-point calibration takes two temperatures, t1,t2");
    for (double t : f.calibration_at)
      if (t < c.t_min || t > c.t_max) r.fail("firmware.calibration_at", "must lie within conditions.t_min..t_max");
    if (want == 2 && f.calibration_at[0] == f.calibration_at[1])
      r.fail("firmware.calibration_at", "the two calibration temperatures must differ");
  }
  if (f.conversion == Conversion::beta && (f.r25 <= 0.0 || f.beta <= 0.0)) {
    // A non-beta sensor: the beta conversion through the nominal curve at the range ends.
    const double t1 = c.t_min + kelvin_offset, t2 = c.t_max + kelvin_offset;
    const auto l1 = nominal_ln_resistance(se, t1), l2 = nominal_ln_resistance(se, t2);
    if (!l1 || !l2) r.fail("firmware.beta", "the sensor's curve does not cover t_min..t_max; give firmware.r25 and firmware.beta");
    const double b = (*l1 - *l2) / (1.0 / t1 - 1.0 / t2);
    if (f.beta <= 0.0) f.beta = b;
    if (f.r25 <= 0.0) f.r25 = std::exp(*l1 + f.beta * (1.0 / t0_kelvin - 1.0 / t1));
  }
  if (f.conversion == Conversion::steinhart_hart && !f.sh) {
    // The fit goes through the nominal curve at t_min, the middle and t_max (firmware.cpp).
    for (double t : {c.t_min, 0.5 * (c.t_min + c.t_max), c.t_max})
      if (!nominal_ln_resistance(se, t + kelvin_offset))
        r.fail("firmware.a", "the sensor's curve does not cover t_min, the middle and t_max to fit through; give "
                             "firmware.a, b and c");
  }
  if (se.kind == SensorKind::table) {
    if (c.t_min + kelvin_offset < se.table->t_min_kelvin() - 1e-9 || c.t_max + kelvin_offset > se.table->t_max_kelvin() + 1e-9) {
      // Allowed: temperatures outside the table are reported as such. Nothing to refuse.
    }
  }

  // Requirement.
  Requirement& q = d.requirement;
  q.window_min = r.number("requirement.window_min");
  q.window_max = r.number("requirement.window_max");
  q.max_error = r.positive("requirement.max_error");
  q.yield = r.number("requirement.yield");
  if (!(q.window_max > q.window_min))
    r.fail(r.set_one("requirement.window_max", "requirement.window_min"),
           "requirement.window_max must be above requirement.window_min");
  if (q.window_min < c.t_min)
    r.fail(r.set_one("requirement.window_min", "conditions.t_min"),
           "requirement.window_min must not be below conditions.t_min (" + s.get("conditions.t_min").value + ")");
  if (q.window_max > c.t_max)
    r.fail(r.set_one("requirement.window_max", "conditions.t_max"),
           "requirement.window_max must not be above conditions.t_max (" + s.get("conditions.t_max").value + ")");
  if (!(q.yield > 0.0 && q.yield <= 1.0)) r.fail("requirement.yield", "must be a fraction in (0, 100 %]");
  q.basis = r.word<Requirement::Basis>("requirement.basis", {{"worst-case", Requirement::Basis::worst_case},
                                                             {"linear", Requirement::Basis::linear},
                                                             {"monte-carlo", Requirement::Basis::monte_carlo}});

  // Monte Carlo.
  MonteCarloSettings& m = d.montecarlo;
  if (s.get("montecarlo.units").value == "auto") {
    m.units = 0;
  } else {
    const double u = r.number("montecarlo.units");
    if (!(u >= 1.0 && u <= 1e9 && u == std::floor(u))) r.fail("montecarlo.units", "must be a whole number from 1 to 1e9, or auto");
    m.units = static_cast<std::uint64_t>(u);
  }
  m.seed = static_cast<std::uint64_t>(r.integer("montecarlo.seed", 0, 9007199254740991LL));
  m.threads = static_cast<int>(r.integer("montecarlo.threads", 0, 1024));
  m.distribution = r.word<Distribution>("montecarlo.distribution", {{"normal", Distribution::normal},
                                                                    {"uniform", Distribution::uniform},
                                                                    {"triangular", Distribution::triangular},
                                                                    {"gapped", Distribution::gapped}});
  m.sigma_per_tol = r.positive("montecarlo.sigma_per_tol");
  m.coverage = r.number("montecarlo.coverage");
  if (!(m.coverage > 0.0 && m.coverage < 1.0)) r.fail("montecarlo.coverage", "must be a probability strictly between 0 and 100 %");
  m.noise_k = r.non_negative("montecarlo.noise_k");
  {
    const double cap = r.number("montecarlo.max_units");
    if (!(cap >= 1e3 && cap <= 1e9)) r.fail("montecarlo.max_units", "must be from 1000 to 1e9");
    m.max_units = static_cast<std::uint64_t>(cap);
  }

  // The active toleranced inputs. Every per-input override is read, also of
  // an input that is not active, so that a typo is refused wherever it is.
  auto distribution_of = [&](const std::string& key) {
    if (s.get(key + "_dist").value == "default") return m.distribution;
    return r.word<Distribution>(key + "_dist", {{"normal", Distribution::normal},
                                                {"uniform", Distribution::uniform},
                                                {"triangular", Distribution::triangular},
                                                {"gapped", Distribution::gapped}});
  };
  for (const KeySpec& k : scenario_schema())
    if (k.key.ends_with("_dist")) {
      const std::string key = k.key.substr(0, k.key.size() - 5);
      distribution_of(key);
      r.non_negative(key + "_gap");
    }
  auto add = [&](Source src, double bound) {
    if (bound <= 0.0) return;
    ToleranceInput in{src, bound, m.distribution, 0.0};
    const std::string key(info(src).key);
    in.distribution = distribution_of(key);
    in.gap = r.non_negative(key + "_gap");
    if (in.distribution == Distribution::gapped && !(in.gap < bound))
      r.fail(key + "_gap", "the gap must be smaller than the bound " + s.get(key).value);
    if (in.distribution != Distribution::gapped && in.gap > 0.0)
      r.fail(key + "_gap", "a gap needs the gapped distribution (" + key + "_dist = gapped)");
    d.inputs.push_back(in);
  };
  add(Source::r25, se.r25_tol);
  add(Source::beta, se.beta_tol);
  if (se.rtd_class) add(Source::rtd_class, 1.0);
  if (se.dissipation > 0.0) add(Source::dissipation, se.dissipation_tol);
  add(Source::r_fixed, dv.r_fixed_tol);
  if (c.board.kind != BoardKind::fixed || c.board.min != 25.0) add(Source::r_fixed_tempco, dv.r_fixed_tempco);
  if (dv.r_parallel) add(Source::r_parallel, dv.r_parallel_tol);
  if (!su.ratiometric) {
    add(Source::v_excitation, su.v_excitation_tol);
    add(Source::v_excitation_tempco, su.v_excitation_tempco);
    add(Source::v_reference, su.v_reference_tol);
    add(Source::v_reference_tempco, su.v_reference_tempco);
  }
  add(Source::adc_offset, a.offset);
  add(Source::adc_gain, a.gain_error);
  add(Source::adc_inl, a.inl);
  add(Source::adc_leakage, a.leakage);
  if (f.calibration != Calibration::none) add(Source::calibration_1, f.calibration_uncertainty);
  if (f.calibration == Calibration::two_point) add(Source::calibration_2, f.calibration_uncertainty);
  if (c.board.kind == BoardKind::range) {
    d.inputs.push_back({Source::board_temperature, c.board.half_width(), Distribution::uniform, 0.0});
  }
  return d;
}

namespace {

std::string general(double v, int digits) {
  char buf[40];
  std::snprintf(buf, sizeof buf, "%.*g", digits, v);
  return buf;
}

std::string celsius_list(const std::vector<double>& t) {
  std::string out;
  for (double v : t) out += (out.empty() ? "" : ", ") + general(v, 6);
  return out + " degC";
}

}  // namespace

std::map<std::string, ResolvedValue> resolved_values(const Scenario& s, const Design& d) {
  constexpr int digits = 6;               // enough for any part value and tolerance
  constexpr int coefficient_digits = 10;  // curve coefficients as the fit gives them
  // A base-unit value in the unit unit_symbol() prints.
  auto in_unit = [](double v, Quantity q) { return q == Quantity::ratio ? 100.0 * v : q == Quantity::tempco ? 1e6 * v : v; };
  std::map<std::string, ResolvedValue> out;
  for (const KeySpec& k : scenario_schema()) {
    const Setting& st = s.get(k.key);
    ResolvedValue r{st.value.empty() ? "(none)" : st.value, std::nullopt};
    if (k.key != "title" && !st.value.empty()) {
      try {
        const double v = parse_quantity(st.value, k.quantity, st.where);
        r.number = in_unit(v, k.quantity);
        r.text = k.quantity == Quantity::plain     ? general(v, coefficient_digits)
                 : k.quantity == Quantity::integer ? general(v, 17)
                                                   : format_quantity(v, k.quantity, digits);
      } catch (const input_error&) {
        // A word (none, sensor, fit, auto, a model name) or a list: it stands as written.
      }
    }
    out[k.key] = r;
  }
  // The keys whose words or lists the design resolved.
  const FirmwareSettings& f = d.firmware;
  if (d.sensor.kind == SensorKind::table) out["sensor.table_file"].text = d.sensor.table_file;
  const char* own = d.sensor.kind == SensorKind::beta ? " (the sensor's)" : " (through the curve at t_min, t_max)";
  if (s.get("firmware.r25").value == "sensor" && f.r25 > 0.0)
    out["firmware.r25"] = {format_quantity(f.r25, Quantity::resistance, digits) + own, f.r25};
  if (s.get("firmware.beta").value == "sensor" && f.beta > 0.0)
    out["firmware.beta"] = {format_quantity(f.beta, Quantity::beta_value, digits) + own, f.beta};
  if (f.conversion == Conversion::steinhart_hart && !f.sh) {
    const SteinhartHart fitted = Firmware(d).steinhart_hart();
    const char* note = " (fitted at t_min, the middle, t_max)";
    out["firmware.a"] = {general(fitted.a, coefficient_digits) + note, fitted.a};
    out["firmware.b"] = {general(fitted.b, coefficient_digits) + note, fitted.b};
    out["firmware.c"] = {general(fitted.c, coefficient_digits) + note, fitted.c};
  }
  if (!f.calibration_at.empty()) out["firmware.calibration_at"].text = celsius_list(f.calibration_at);
  const BoardTemperature& b = d.conditions.board;
  out["conditions.board"].text = b.kind == BoardKind::sensor  ? "sensor (the medium's true temperature)"
                                 : b.kind == BoardKind::fixed ? celsius_list({b.min})
                                                              : general(b.min, digits) + " .. " + celsius_list({b.max});
  return out;
}

std::vector<double> Conditions::temperatures() const {
  std::vector<double> t;
  const auto n = static_cast<long long>(std::floor((t_max - t_min) / t_step + 1e-9));
  for (long long i = 0; i <= n; ++i) t.push_back(t_min + static_cast<double>(i) * t_step);
  if (t_max - t.back() > 1e-9 * std::max(1.0, std::fabs(t_max))) t.push_back(t_max);
  return t;
}

}  // namespace thermargin
