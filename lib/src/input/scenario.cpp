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
#include "thermargin/core/text.hpp"
#include "thermargin/core/number.hpp"

namespace po = boost::program_options;

namespace thermargin {
namespace {

using Q = Quantity;

// Every key a scenario file names, section by section, in the order of the
// help and the documentation.
std::vector<KeySpec> section_keys() {
  return {
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
      {"sensor.drift", Q::ratio, "0", "+/- change of the element's resistance over life (end of life only)"},
      {"sensor.rtd_construction", Q::plain, "film", "RTD construction, for its class's validity range (IEC 60751): film | wire-wound"},
      {"divider.placement", Q::plain, "low", "low (sensor node-to-ground) | high (sensor excitation-to-node)"},
      {"divider.r_fixed", Q::resistance, "10k", "fixed resistor"},
      {"divider.r_fixed_tol", Q::ratio, "1%", "+/- tolerance of the fixed resistor"},
      {"divider.r_fixed_tempco", Q::tempco, "100ppm", "+/- tempco of the fixed resistor at board temperature"},
      {"divider.r_parallel", Q::resistance, "none", "resistor across the sensor branch; none = absent"},
      {"divider.r_parallel_tol", Q::ratio, "0", "+/- tolerance of the parallel resistor"},
      {"divider.duty", Q::ratio, "1", "fraction of time the divider is powered (self-heating)"},
      {"divider.r_fixed_drift", Q::ratio, "0", "+/- drift of the fixed resistor over life (end of life only)"},
      {"divider.c_node", Q::capacitance, "0", "capacitor from the ADC node to ground; 0 = none"},
      {"divider.settle_time", Q::plain, "always", "always (powered continuously) | time from power-on to the first sample, e.g. 2ms"},
      {"supply.ratiometric", Q::plain, "true", "true: the ADC reference is the excitation; false: absolute"},
      {"supply.v_excitation", Q::voltage, "3.3V", "divider excitation voltage"},
      {"supply.v_excitation_tol", Q::ratio, "0", "+/- initial tolerance (absolute only)"},
      {"supply.v_excitation_tempco", Q::tempco, "0", "+/- tempco at board temperature (absolute only)"},
      {"supply.v_reference", Q::voltage, "3.3V", "ADC reference voltage (absolute only)"},
      {"supply.v_reference_tol", Q::ratio, "0", "+/- initial tolerance (absolute only)"},
      {"supply.v_reference_tempco", Q::tempco, "0", "+/- tempco at board temperature (absolute only)"},
      {"supply.v_reference_drift", Q::ratio, "0", "+/- long-term drift of the reference over life (absolute only)"},
      {"supply.v_reference_hysteresis", Q::ratio, "0", "+/- thermal hysteresis of the reference (absolute only, end of life)"},
      {"supply.v_excitation_drift", Q::ratio, "0", "+/- drift of the excitation over life (absolute only)"},
      {"supply.r_drive", Q::resistance, "0", "resistance of the pin or switch that drives the divider's top"},
      {"supply.r_drive_tol", Q::ratio, "0", "+/- tolerance of the drive resistance"},
      {"adc.bits", Q::integer, "12", "resolution in bits, 1..32"},
      {"adc.quantizer", Q::plain, "round", "round (nearest) | floor (truncate)"},
      {"adc.offset", Q::lsb, "2", "+/- offset error in LSB"},
      {"adc.gain_error", Q::ratio, "0.2%", "+/- gain error"},
      {"adc.inl", Q::lsb, "1", "+/- integral non-linearity, peak of the bow, in LSB"},
      {"adc.noise", Q::lsb, "0.5", "input-referred noise in LSB rms"},
      {"adc.averaging", Q::integer, "1", "samples averaged per reading"},
      {"adc.leakage", Q::current, "0", "+/- pin leakage current"},
      {"adc.offset_drift", Q::lsb, "0", "+/- offset drift over life in LSB (end of life only)"},
      {"adc.gain_drift", Q::ratio, "0", "+/- gain drift over life (end of life only)"},
      {"adc.r_switch", Q::resistance, "1k", "sampling switch resistance"},
      {"adc.c_sample", Q::capacitance, "0", "sampling capacitor; 0 = an ideal sampler (no settling)"},
      {"adc.t_acq", Q::time, "1us", "acquisition time: how long the switch is closed"},
      {"adc.sample_rate", Q::frequency, "10kHz", "this channel's sample rate (averaged samples follow at 1/rate)"},
      {"adc.precharge", Q::plain, "same", "what C_s holds before an acquisition: same | ground | reference | any | a voltage"},
      {"adc.offset_tempco", Q::lsb_per_kelvin, "0", "+/- offset drift in LSB/K at board temperature (from 25 degC)"},
      {"adc.gain_tempco", Q::tempco, "0", "+/- gain drift at board temperature (from 25 degC)"},
      {"adc.inl_shape", Q::plain, "bound", "bound (+/- adc.inl at every code) | bow (zero at both ends, adc.inl at mid-scale)"},
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
      {"firmware.drive_compensation", Q::resistance, "0", "drive resistance the firmware assumes in the divider's top"},
      {"firmware.resolution", Q::temperature_difference, "0.1", "output resolution in K; 0 = none"},
      {"firmware.calibration", Q::plain, "none", "none | offset | two-point"},
      {"firmware.calibration_at", Q::plain, "25", "calibration temperature(s) in degC: t or t1,t2"},
      {"firmware.calibration_uncertainty", Q::temperature_difference, "0.1", "+/- error of the calibration reference"},
      {"firmware.calibration_dissipation", Q::dissipation, "sensor",
       "dissipation constant in the calibration medium (a stirred bath: larger); sensor = as in service"},
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
      {"requirement.at", Q::plain, "end-of-life", "the budget the verdict uses when drift is set: end-of-life | delivery"},
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
}

// Per-input distribution overrides beside each toleranced key.
void add_distribution_keys(std::vector<KeySpec>& s) {
  std::set<std::string> done;
  for (int i = 0; i < source_count; ++i) {
    const std::string key(info(static_cast<Source>(i)).key);
    if (key == "conditions.board" || key == "adc.precharge" || !done.insert(key).second) continue;
    s.push_back({key + "_dist", Q::plain, "default", "distribution of " + key + ": default | normal | uniform | triangular | gapped"});
    s.push_back({key + "_gap", info(static_cast<Source>(i)).quantity == Q::plain ? Q::plain : info(static_cast<Source>(i)).quantity,
                 "0", "gapped: the inner band sorted out of " + key});
  }
}

// Per-input coverage factors of a normal bound, after every other key:
// a calibration certificate's ±U is stated with k = 2 (JCGM 100 §6).
void add_coverage_keys(std::vector<KeySpec>& s) {
  std::set<std::string> done;
  for (int i = 0; i < source_count; ++i) {
    const std::string key(info(static_cast<Source>(i)).key);
    if (key == "conditions.board" || !done.insert(key).second) continue;
    const bool certificate = key == "firmware.calibration_uncertainty";
    s.push_back({key + "_k", Q::plain, certificate ? "2" : "default",
                 "coverage factor of a normal " + key + " (sigma = bound/k); default = montecarlo.sigma_per_tol" +
                     (certificate ? "; 2: a certificate's expanded uncertainty (JCGM 100 section 6)" : "")});
  }
}

std::vector<KeySpec> make_schema() {
  std::vector<KeySpec> s = section_keys();
  add_distribution_keys(s);
  add_coverage_keys(s);
  return s;
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


namespace {

std::string celsius_list(const std::vector<double>& t) {
  std::string out;
  for (double v : t) out += (out.empty() ? "" : ", ") + significant(v, 6);
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
        r.text = k.quantity == Quantity::plain     ? significant(v, coefficient_digits)
                 : k.quantity == Quantity::integer ? significant(v, 17)
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
    out["firmware.a"] = {significant(fitted.a, coefficient_digits) + note, fitted.a};
    out["firmware.b"] = {significant(fitted.b, coefficient_digits) + note, fitted.b};
    out["firmware.c"] = {significant(fitted.c, coefficient_digits) + note, fitted.c};
  }
  if (!f.calibration_at.empty()) out["firmware.calibration_at"].text = celsius_list(f.calibration_at);
  const BoardTemperature& b = d.conditions.board;
  out["conditions.board"].text = b.kind == BoardKind::sensor  ? "sensor (the medium's true temperature)"
                                 : b.kind == BoardKind::fixed ? celsius_list({b.min})
                                                              : significant(b.min, digits) + " .. " + celsius_list({b.max});
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
