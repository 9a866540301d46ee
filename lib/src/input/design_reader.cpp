// build_design(): a scenario's text into a validated Design, one reader per
// section in the order of the schema, then the checks that need several
// sections (the curve over the range, the calibration points, the
// firmware's own curve, the requirement window), then the active toleranced
// inputs. Every refusal names the key, file and line (setting_reader.hpp).
#include <cctype>
#include <cmath>
#include <cstdio>
#include <filesystem>
#include <sstream>

#include "input/setting_reader.hpp"
#include "thermargin/chain/firmware.hpp"
#include "thermargin/chain/sensor.hpp"
#include "thermargin/chain/supply.hpp"
#include "thermargin/input/response_section.hpp"
#include "thermargin/input/rt_data.hpp"
#include "thermargin/input/scenario.hpp"

namespace thermargin {

std::vector<double> SettingReader::list(const std::string& key, Quantity q) const {
  const auto& st = at(key);
  std::vector<double> out;
  std::string item;
  std::istringstream in(st.value);
  while (std::getline(in, item, ',')) out.push_back(parse_quantity(item, q, st.where));
  return out;
}

namespace {

using R = SettingReader;

std::string resolve_path(const Scenario& s, const std::string& file) {
  namespace fs = std::filesystem;
  const Setting& st = s.get("sensor.table_file");
  if (fs::path(file).is_absolute() || st.where.kind != Origin::file) return file;
  return (fs::path(st.where.file).parent_path() / file).string();
}

// A table with limit columns holds the unit spread itself (docs/model.md):
// R25/B tolerances on top of it would count the spread twice. Their
// built-in defaults give way to the table; a value set in the scenario or
// on the command line is refused unless it is 0.
void require_no_tolerances_beside_limits(const R& r, SensorSettings& se) {
  for (const char* k : {"sensor.r25_tol", "sensor.beta_tol"})
    if (!r.is_default(k) && r.number(k) != 0.0)
      r.fail(k, "must be 0 with a table that carries its own limits (" + r.text("sensor.table_file") +
                    "): the table already holds the unit spread; set it to 0 or use a table without limit columns");
  se.r25_tol = se.beta_tol = 0.0;
}

void read_sensor_table(const R& r, SensorSettings& se) {
  const auto& tf = r.at("sensor.table_file");
  if (tf.value.empty()) r.fail("sensor.table_file", "model = table needs a table file (CSV of degC, ohm)");
  se.table_file = resolve_path(r.scenario(), tf.value);
  try {
    se.table.emplace(read_rt_data(se.table_file));
  } catch (const input_error& e) {
    reject(tf.where, tf.value, std::string("the table cannot be used: ") + e.what());
  }
  if (se.table->has_limits()) require_no_tolerances_beside_limits(r, se);
  if ((se.r25_tol > 0.0 || se.beta_tol > 0.0) && !se.table->covers(t0_kelvin))
    r.fail("sensor.r25_tol", "tolerances are defined at 25 degC, which the table does not cover; extend the table "
                             "or set the tolerances to 0");
}

void read_sensor(const R& r, SensorSettings& se) {
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
  if (se.kind == SensorKind::table) read_sensor_table(r, se);
  const auto cls = r.word<int>("sensor.rtd_class", {{"none", -1}, {"AA", 0}, {"A", 1}, {"B", 2}, {"C", 3}});
  if (cls >= 0 && se.kind == SensorKind::rtd) se.rtd_class = static_cast<RtdClass>(cls);
  se.dissipation = r.non_negative("sensor.dissipation");
  se.dissipation_tol = r.tolerance("sensor.dissipation_tol");
  se.lead_resistance = r.non_negative("sensor.lead_resistance");
  se.rtd_construction = r.word<RtdConstruction>(
      "sensor.rtd_construction", {{"film", RtdConstruction::film}, {"wire-wound", RtdConstruction::wire_wound}});
}

void read_divider(const R& r, DividerSettings& dv) {
  dv.placement = r.word<Placement>("divider.placement", {{"low", Placement::low}, {"high", Placement::high}});
  dv.r_fixed = r.positive("divider.r_fixed");
  dv.r_fixed_tol = r.tolerance("divider.r_fixed_tol");
  dv.r_fixed_tempco = r.non_negative("divider.r_fixed_tempco");
  if (dv.r_fixed_tempco >= 0.01) r.fail("divider.r_fixed_tempco", "must be below 10000 ppm/K");
  if (r.text("divider.r_parallel") != "none") dv.r_parallel = r.positive("divider.r_parallel");
  dv.r_parallel_tol = r.tolerance("divider.r_parallel_tol");
  if (!dv.r_parallel && dv.r_parallel_tol > 0.0) {
    r.note("divider.r_parallel_tol", "there is no parallel resistor (divider.r_parallel = none)");
    dv.r_parallel_tol = 0.0;
  }
  dv.duty = r.positive("divider.duty");
  if (dv.duty > 1.0) r.fail("divider.duty", "must be a fraction of time in (0, 1]");
  dv.c_node = r.non_negative("divider.c_node");
  if (const auto& st = r.at("divider.settle_time"); st.value != "always") {
    dv.settle_time = parse_quantity(st.value, Quantity::time, st.where);
    if (*dv.settle_time < 0.0) r.fail("divider.settle_time", "must be always, or a time >= 0 from power-on to the first sample");
  }
}

void read_supply(const R& r, SupplySettings& su) {
  su.ratiometric = r.boolean("supply.ratiometric");
  su.v_excitation = r.positive("supply.v_excitation");
  su.v_reference = r.positive("supply.v_reference");
  su.v_excitation_tol = r.tolerance("supply.v_excitation_tol");
  su.v_excitation_tempco = r.non_negative("supply.v_excitation_tempco");
  su.v_reference_tol = r.tolerance("supply.v_reference_tol");
  su.v_reference_tempco = r.non_negative("supply.v_reference_tempco");
  su.r_drive = r.non_negative("supply.r_drive");
  su.r_drive_tol = r.tolerance("supply.r_drive_tol");
  if (su.r_drive == 0.0 && su.r_drive_tol > 0.0) {
    r.note("supply.r_drive_tol", "the drive resistance is 0 (supply.r_drive)");
    su.r_drive_tol = 0.0;
  }
  if (su.ratiometric) {
    for (const char* k : {"supply.v_excitation_tol", "supply.v_excitation_tempco", "supply.v_reference_tol",
                          "supply.v_reference_tempco"})
      if (!r.is_default(k) && r.number(k) != 0.0)
        r.note(k, "supply.ratiometric = true, where the supply's errors cancel (make the supply absolute to use it)");
  } else if (r.is_default("supply.v_reference")) {
    r.fail("supply.v_reference", "an absolute reference (supply.ratiometric = false) needs its voltage set explicitly");
  }
}

// The acquisition (docs/model.md §14): read after the divider and the
// supply, whose node capacitor, settle time and reference it checks against.
void read_acquisition(const R& r, Design& d) {
  AdcSettings& a = d.adc;
  a.r_switch = r.non_negative("adc.r_switch");
  a.c_sample = r.non_negative("adc.c_sample");
  a.t_acq = r.positive("adc.t_acq");
  a.sample_rate = r.positive("adc.sample_rate");
  if (a.t_acq > 1.0 / a.sample_rate)
    r.fail(r.set_one("adc.t_acq", "adc.sample_rate"),
           "the acquisition time must fit in the sample period 1/adc.sample_rate (" + r.text("adc.sample_rate") + ")");
  const auto& pc = r.at("adc.precharge");
  static const std::pair<const char*, Precharge> words[] = {
      {"same", Precharge::same}, {"ground", Precharge::ground}, {"reference", Precharge::reference}, {"any", Precharge::any}};
  a.precharge = Precharge::voltage;
  for (const auto& [w, p] : words)
    if (pc.value == w) a.precharge = p;
  if (a.precharge == Precharge::voltage) {
    if (pc.value.empty() || !(std::isdigit(static_cast<unsigned char>(pc.value[0])) || pc.value[0] == '.' || pc.value[0] == '-'))
      r.fail("adc.precharge", "must be one of: same | ground | reference | any | a voltage such as 1.65V");
    a.v_precharge = parse_quantity(pc.value, Quantity::voltage, pc.where);
    if (a.v_precharge < 0.0 || a.v_precharge > d.supply.v_reference_nominal())
      r.fail("adc.precharge", "a precharge voltage must lie from 0 to the ADC reference");
  }
  if (!a.samples_settle()) return;
  if (a.r_switch == 0.0 && d.divider.c_node > 0.0)
    r.fail("adc.r_switch", "must be > 0 with a node capacitor (divider.c_node): the switch resistance from the ADC's datasheet");
  if (d.divider.settle_time && *d.divider.settle_time == 0.0 && d.divider.c_node > 0.0)
    r.fail("divider.settle_time", "a node capacitor (divider.c_node) starts at 0 V: give the time from power-on to the "
                                  "first sample (> 0), or always");
}
void read_adc(const R& r, Design& d) {
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
  a.offset_tempco = r.non_negative("adc.offset_tempco");
  a.gain_tempco = r.non_negative("adc.gain_tempco");
  if (a.gain_tempco >= 0.01) r.fail("adc.gain_tempco", "must be below 10000 ppm/K");
  a.inl_bound = r.word<bool>("adc.inl_shape", {{"bow", false}, {"bound", true}});
  read_acquisition(r, d);
}

// The firmware's settings as written; firmware.r25/beta = sensor and
// firmware.a, b, c = fit are resolved by resolve_firmware_curve() once the
// range is known.
void read_firmware(const R& r, const SensorSettings& se, FirmwareSettings& f) {
  f.conversion = r.word<Conversion>("firmware.conversion", {{"exact", Conversion::exact},
                                                            {"beta", Conversion::beta},
                                                            {"steinhart-hart", Conversion::steinhart_hart},
                                                            {"table", Conversion::table}});
  f.full_scale = r.word<FullScale>("firmware.full_scale", {{"pow2", FullScale::pow2}, {"pow2-minus-1", FullScale::pow2_minus_1}});
  const bool own_beta = se.kind == SensorKind::beta;
  f.r25 = r.text("firmware.r25") == "sensor" ? (own_beta ? se.r25 : 0.0) : r.positive("firmware.r25");
  f.beta = r.text("firmware.beta") == "sensor" ? (own_beta ? se.beta : 0.0) : r.positive("firmware.beta");
  const bool fit_a = r.text("firmware.a") == "fit", fit_b = r.text("firmware.b") == "fit",
             fit_c = r.text("firmware.c") == "fit";
  if (fit_a != fit_b || fit_b != fit_c)
    r.fail("firmware.a", "give all three of firmware.a, b, c, or none (fit = through the nominal curve)");
  if (!fit_a) f.sh = SteinhartHart{r.number("firmware.a"), r.number("firmware.b"), r.number("firmware.c")};
  f.table_points = static_cast<int>(r.integer("firmware.table_points", 2, 65536));
  f.table_unit = r.positive("firmware.table_unit");
  if (f.table_unit < 1e-4 || f.table_unit > 1.0) r.fail("firmware.table_unit", "must be from 0.0001 K to 1 K");
  f.table_spacing = r.word<TableSpacing>("firmware.table_spacing",
                                         {{"code", TableSpacing::code}, {"temperature", TableSpacing::temperature}});
  f.lead_compensation = r.non_negative("firmware.lead_compensation");
  f.drive_compensation = r.non_negative("firmware.drive_compensation");
  f.resolution = r.non_negative("firmware.resolution");
  f.calibration = r.word<Calibration>("firmware.calibration", {{"none", Calibration::none},
                                                               {"offset", Calibration::offset},
                                                               {"two-point", Calibration::two_point}});
  f.calibration_uncertainty = r.non_negative("firmware.calibration_uncertainty");
  if (r.text("firmware.calibration_dissipation") != "sensor")
    f.calibration_dissipation = r.non_negative("firmware.calibration_dissipation");
}

// As many temperatures as Conditions::temperatures() makes: every step from
// t_min, then t_max when the last step falls short of it. Counted in double:
// a tiny step gives more than a long long holds.
void check_temperature_count(const R& r, const Conditions& c) {
  const double steps = std::floor((c.t_max - c.t_min) / c.t_step + 1e-9);
  const bool t_max_added = c.t_max - (c.t_min + steps * c.t_step) > 1e-9 * std::max(1.0, std::fabs(c.t_max));
  const double count = steps + 1 + (t_max_added ? 1 : 0);
  if (count > 100001) {
    char text[32];
    std::snprintf(text, sizeof text, count < 1e15 ? "%.0f" : "%.3g", count);
    r.fail("conditions.t_step", std::string("gives ") + text + " temperatures; at most 100001 are analysed");
  }
}

void read_board(const R& r, BoardTemperature& board) {
  const auto& b = r.at("conditions.board");
  if (b.value == "sensor") {
    board.kind = BoardKind::sensor;
  } else if (const auto dots = b.value.find(".."); dots != std::string::npos) {
    board.kind = BoardKind::range;
    board.min = parse_quantity(b.value.substr(0, dots), Quantity::temperature, b.where);
    board.max = parse_quantity(b.value.substr(dots + 2), Quantity::temperature, b.where);
    if (!(board.max > board.min)) reject(b.where, b.value, "a range must be written low..high with low < high");
  } else {
    board.kind = BoardKind::fixed;
    board.min = board.max = parse_quantity(b.value, Quantity::temperature, b.where);
  }
  if (board.kind != BoardKind::sensor && board.min <= -kelvin_offset) reject(b.where, b.value, "must be above absolute zero");
}

void read_conditions(const R& r, Conditions& c) {
  c.t_min = r.number("conditions.t_min");
  c.t_max = r.number("conditions.t_max");
  c.t_step = r.positive("conditions.t_step");
  if (c.t_min <= -kelvin_offset) r.fail("conditions.t_min", "must be above absolute zero (-273.15 degC)");
  if (!(c.t_max > c.t_min)) {
    if (r.set_one("conditions.t_max", "conditions.t_min") == std::string("conditions.t_min"))
      r.fail("conditions.t_min", "must be below conditions.t_max (" + r.text("conditions.t_max") + ")");
    r.fail("conditions.t_max", "must be above conditions.t_min (" + r.text("conditions.t_min") + ")");
  }
  check_temperature_count(r, c);
  read_board(r, c.board);
}

// The nominal curve must give a usable resistance at both ends of the range
// (a table's ends are results instead: outside-sensor-table). A B value with
// a stray prefix, or an RTD analysed where its polynomial is no longer
// positive, would otherwise reach the engines as inf or nothing.
void check_curve_over_range(const R& r, const SensorSettings& se, const Conditions& c) {
  if (se.kind == SensorKind::table) return;
  for (const double t : {c.t_min, c.t_max}) {
    const auto l = nominal_ln_resistance(se, t + kelvin_offset);
    if (l && std::isfinite(*l) && std::exp(*l) > 0.0 && std::isfinite(std::exp(*l))) continue;
    const std::string at = " at " + r.text(t == c.t_min ? "conditions.t_min" : "conditions.t_max") + " degC";
    if (se.kind == SensorKind::beta)
      r.fail("sensor.beta", "gives the sensor no finite resistance" + at + "; a B value is some thousands of kelvin (3950 or 3950K)");
    if (se.kind == SensorKind::steinhart_hart)
      r.fail("sensor.a", "the Steinhart-Hart curve (sensor.a, b, c) gives no finite resistance" + at);
    r.fail(t == c.t_min ? "conditions.t_min" : "conditions.t_max",
           "the RTD's Callendar-Van Dusen curve has no positive resistance there; IEC 60751 defines it from -200 to 850 degC");
  }
}

// The calibration temperatures need the range. Read even when calibration is
// off, so that a typo is refused rather than waiting for the day it is
// switched on.
void read_calibration_points(const R& r, FirmwareSettings& f, const Conditions& c) {
  const std::vector<double> at = r.list("firmware.calibration_at", Quantity::temperature);
  if (f.calibration == Calibration::none) return;
  f.calibration_at = at;
  const std::size_t want = static_cast<std::size_t>(calibration_points(f.calibration));
  if (f.calibration_at.size() != want)
    r.fail("firmware.calibration_at", want == 1 ? "offset calibration takes one temperature" :
                                                   "two-point calibration takes two temperatures, t1,t2");
  for (double t : f.calibration_at)
    if (t < c.t_min || t > c.t_max) r.fail("firmware.calibration_at", "must lie within conditions.t_min..t_max");
  if (want == 2 && f.calibration_at[0] == f.calibration_at[1])
    r.fail("firmware.calibration_at", "the two calibration temperatures must differ");
}

// firmware.r25/beta = sensor on a sensor without a beta curve of its own,
// and firmware.a, b, c = fit: the firmware step derives them from the
// nominal curve (firmware.hpp); refused where the curve cannot give them.
void resolve_firmware_curve(const R& r, const SensorSettings& se, const Conditions& c, FirmwareSettings& f) {
  if (f.conversion == Conversion::beta && (f.r25 <= 0.0 || f.beta <= 0.0)) {
    const auto through = beta_through_curve(se, c.t_min, c.t_max);
    if (!through) r.fail("firmware.beta", "the sensor's curve does not cover t_min..t_max; give firmware.r25 and firmware.beta");
    if (f.beta <= 0.0) f.beta = through->beta;
    if (f.r25 <= 0.0) f.r25 = beta_curve_r25(se, c.t_min, f.beta);
  }
  if (f.conversion == Conversion::steinhart_hart && !f.sh) {
    // The fit goes through the nominal curve at t_min, the middle and t_max (firmware.cpp).
    for (double t : {c.t_min, 0.5 * (c.t_min + c.t_max), c.t_max})
      if (!nominal_ln_resistance(se, t + kelvin_offset))
        r.fail("firmware.a", "the sensor's curve does not cover t_min, the middle and t_max to fit through; give "
                             "firmware.a, b and c");
  }
}

void read_requirement(const R& r, const Conditions& c, Requirement& q) {
  q.window_min = r.number("requirement.window_min");
  q.window_max = r.number("requirement.window_max");
  q.max_error = r.positive("requirement.max_error");
  q.yield = r.number("requirement.yield");
  if (!(q.window_max > q.window_min))
    r.fail(r.set_one("requirement.window_max", "requirement.window_min"),
           "requirement.window_max must be above requirement.window_min");
  if (q.window_min < c.t_min)
    r.fail(r.set_one("requirement.window_min", "conditions.t_min"),
           "requirement.window_min must not be below conditions.t_min (" + r.text("conditions.t_min") + ")");
  if (q.window_max > c.t_max)
    r.fail(r.set_one("requirement.window_max", "conditions.t_max"),
           "requirement.window_max must not be above conditions.t_max (" + r.text("conditions.t_max") + ")");
  if (!(q.yield > 0.0 && q.yield <= 1.0)) r.fail("requirement.yield", "must be a fraction in (0, 100 %]");
  q.basis = r.word<Requirement::Basis>("requirement.basis", {{"worst-case", Requirement::Basis::worst_case},
                                                             {"linear", Requirement::Basis::linear},
                                                             {"monte-carlo", Requirement::Basis::monte_carlo}});
}

Distribution read_distribution(const R& r, const std::string& key) {
  return r.word<Distribution>(key, {{"normal", Distribution::normal},
                                    {"uniform", Distribution::uniform},
                                    {"triangular", Distribution::triangular},
                                    {"gapped", Distribution::gapped}});
}

void read_montecarlo(const R& r, MonteCarloSettings& m) {
  if (r.text("montecarlo.units") == "auto") {
    m.units = 0;
  } else {
    const double u = r.number("montecarlo.units");
    if (!(u >= 1.0 && u <= 1e9 && u == std::floor(u))) r.fail("montecarlo.units", "must be a whole number from 1 to 1e9, or auto");
    m.units = static_cast<std::uint64_t>(u);
  }
  m.seed = static_cast<std::uint64_t>(r.integer("montecarlo.seed", 0, 9007199254740991LL));
  m.threads = static_cast<int>(r.integer("montecarlo.threads", 0, 1024));
  m.distribution = read_distribution(r, "montecarlo.distribution");
  m.sigma_per_tol = r.positive("montecarlo.sigma_per_tol");
  m.coverage = r.number("montecarlo.coverage");
  if (!(m.coverage > 0.0 && m.coverage < 1.0)) r.fail("montecarlo.coverage", "must be a probability strictly between 0 and 100 %");
  m.noise_k = r.non_negative("montecarlo.noise_k");
  const double cap = r.number("montecarlo.max_units");
  if (!(cap >= 1e3 && cap <= 1e9)) r.fail("montecarlo.max_units", "must be from 1000 to 1e9");
  m.max_units = static_cast<std::uint64_t>(cap);
}

// The active toleranced inputs, in the order of the Source list. Every
// per-input override (<key>_dist, <key>_gap) is read, also of an input that
// is not active, so that a typo is refused wherever it is.
class InputCollector {
 public:
  InputCollector(const R& r, Design& d) : r_(r), d_(d) {
    for (const KeySpec& k : scenario_schema())
      if (k.key.ends_with("_dist")) {
        const std::string key = k.key.substr(0, k.key.size() - 5);
        distribution_of(key);
        r.non_negative(key + "_gap");
      }
    for (int i = 0; i < source_count; ++i) {
      const std::string key(info(static_cast<Source>(i)).key);
      if (find_key(key + "_k")) coverage_of(key, Distribution::normal);
    }
  }
  void add(Source src, double bound) {
    if (bound <= 0.0) return;
    const std::string key(info(src).key);
    ToleranceInput in{src, bound, distribution_of(key), r_.non_negative(key + "_gap")};
    // A datasheet's INL bound (adc.inl_shape = bound) is uniform unless adc.inl_dist says otherwise.
    if (src == Source::adc_inl && d_.adc.inl_bound && r_.text("adc.inl_dist") == "default")
      in.distribution = Distribution::uniform;
    in.k = coverage_of(key, in.distribution);
    if (in.distribution == Distribution::gapped && !(in.gap < bound))
      r_.fail(key + "_gap", "the gap must be smaller than the bound " + r_.text(key));
    if (in.distribution != Distribution::gapped && in.gap > 0.0)
      r_.fail(key + "_gap", "a gap needs the gapped distribution (" + key + "_dist = gapped)");
    d_.inputs.push_back(in);
  }

 private:
  // `<key>_k`: 0 for default (montecarlo.sigma_per_tol). Set on a bound
  // that is not normal it would mean nothing: refused.
  double coverage_of(const std::string& key, Distribution dist) const {
    const std::string k = key + "_k";
    if (r_.text(k) == "default") return 0.0;
    const double v = r_.positive(k);
    if (!r_.is_default(k) && (dist == Distribution::uniform || dist == Distribution::triangular))
      r_.fail(k, "a coverage factor belongs to a normal or gapped bound, and " + key + "_dist is " +
                     std::string(to_string(dist)) + "; remove it or make the bound normal");
    return v;
  }
  Distribution distribution_of(const std::string& key) const {
    if (r_.text(key + "_dist") == "default") return d_.montecarlo.distribution;
    return read_distribution(r_, key + "_dist");
  }
  const R& r_;
  Design& d_;
};

void collect_inputs(const R& r, Design& d) {
  InputCollector in(r, d);
  const SensorSettings& se = d.sensor;
  const DividerSettings& dv = d.divider;
  const SupplySettings& su = d.supply;
  const AdcSettings& a = d.adc;
  const FirmwareSettings& f = d.firmware;
  const BoardTemperature& board = d.conditions.board;
  in.add(Source::r25, se.r25_tol);
  in.add(Source::beta, se.beta_tol);
  if (se.rtd_class) in.add(Source::rtd_class, 1.0);
  if (se.dissipation > 0.0) in.add(Source::dissipation, se.dissipation_tol);
  in.add(Source::r_fixed, dv.r_fixed_tol);
  if (board_moves_fixed_resistor_tempco(board)) in.add(Source::r_fixed_tempco, dv.r_fixed_tempco);
  if (dv.r_parallel) in.add(Source::r_parallel, dv.r_parallel_tol);
  if (!su.ratiometric) {
    in.add(Source::v_excitation, su.v_excitation_tol);
    in.add(Source::v_excitation_tempco, su.v_excitation_tempco);
    in.add(Source::v_reference, su.v_reference_tol);
    in.add(Source::v_reference_tempco, su.v_reference_tempco);
  }
  in.add(Source::adc_offset, a.offset);
  in.add(Source::adc_gain, a.gain_error);
  in.add(Source::adc_inl, a.inl);
  in.add(Source::adc_leakage, a.leakage);
  if (f.calibration != Calibration::none) in.add(Source::calibration_1, f.calibration_uncertainty);
  if (f.calibration == Calibration::two_point) in.add(Source::calibration_2, f.calibration_uncertainty);
  // The board temperature is uniform over its range, whatever the default distribution.
  if (board.kind == BoardKind::range)
    d.inputs.push_back({Source::board_temperature, board.half_width(), Distribution::uniform, 0.0});
  // The ADC's drift acts through the board temperature's distance from
  // 25 degC, as the fixed resistor's tempco does.
  if (board_moves_fixed_resistor_tempco(board)) {
    in.add(Source::adc_offset_tempco, a.offset_tempco);
    in.add(Source::adc_gain_tempco, a.gain_tempco);
  }
  in.add(Source::r_drive, su.r_drive_tol);
  // What another channel left on the sampling capacitor: uniform over
  // [0, V_ref] (docs/model.md §14), whatever the default distribution.
  if (a.samples_settle() && a.precharge == Precharge::any)
    d.inputs.push_back({Source::adc_precharge, 0.5 * su.v_reference_nominal(), Distribution::uniform, 0.0});
}

// Over the product's life (life.hpp): each drift a ± bound below 100 %
// (the offset's in LSB), active only in the end-of-life design. The
// supply's drifts, like its tolerances, have no effect on a ratiometric one.
void read_drift(const R& r, Design& d) {
  d.sensor.drift = r.tolerance("sensor.drift");
  d.divider.r_fixed_drift = r.tolerance("divider.r_fixed_drift");
  d.supply.v_reference_drift = r.tolerance("supply.v_reference_drift");
  d.supply.v_reference_hysteresis = r.tolerance("supply.v_reference_hysteresis");
  d.supply.v_excitation_drift = r.tolerance("supply.v_excitation_drift");
  d.adc.offset_drift = r.non_negative("adc.offset_drift");
  d.adc.gain_drift = r.tolerance("adc.gain_drift");
  if (d.adc.offset + d.adc.offset_drift >= d.adc_span() / 2)
    r.fail("adc.offset_drift", "adc.offset plus its drift must be less than half the ADC span");
  if (d.supply.ratiometric)
    for (const char* k : {"supply.v_reference_drift", "supply.v_reference_hysteresis", "supply.v_excitation_drift"})
      if (r.number(k) != 0.0)
        r.note(k, "supply.ratiometric = true, where the supply's errors cancel (make the supply absolute to use it)");
  d.requirement.at = r.word<Requirement::At>(
      "requirement.at", {{"end-of-life", Requirement::At::end_of_life}, {"delivery", Requirement::At::delivery}});
}

// The drift inputs, kept apart from the inputs at delivery (Design::drift_inputs).
void collect_drift_inputs(const R& r, Design& d) {
  const std::size_t delivered = d.inputs.size();
  InputCollector in(r, d);
  in.add(Source::sensor_drift, d.sensor.drift);
  in.add(Source::r_fixed_drift, d.divider.r_fixed_drift);
  if (!d.supply.ratiometric) {
    in.add(Source::v_excitation_drift, d.supply.v_excitation_drift);
    in.add(Source::v_reference_drift, d.supply.v_reference_drift);
    in.add(Source::v_reference_hysteresis, d.supply.v_reference_hysteresis);
  }
  in.add(Source::adc_offset_drift, d.adc.offset_drift);
  in.add(Source::adc_gain_drift, d.adc.gain_drift);
  d.drift_inputs.assign(d.inputs.begin() + static_cast<std::ptrdiff_t>(delivered), d.inputs.end());
  d.inputs.resize(delivered);
}

// A table with limit columns: the unit's factor z in [−1, 1] between the
// nominal curve and the limits is an input (sensor.hpp).
void collect_table_spread(const R& r, Design& d) {
  const SensorSettings& se = d.sensor;
  if (se.kind == SensorKind::table && se.table->has_limits()) InputCollector(r, d).add(Source::table_spread, 1.0);
}

}  // namespace

Design build_design(const Scenario& s) {
  const R r(s);
  Design d;
  d.title = s.get("title").value;
  read_sensor(r, d.sensor);
  read_divider(r, d.divider);
  read_supply(r, d.supply);
  read_adc(r, d);
  read_firmware(r, d.sensor, d.firmware);
  read_conditions(r, d.conditions);
  check_curve_over_range(r, d.sensor, d.conditions);
  read_calibration_points(r, d.firmware, d.conditions);
  if (d.firmware.calibration_dissipation && !(d.sensor.dissipation > 0.0))
    r.fail("firmware.calibration_dissipation", "the calibration medium's dissipation needs self-heating on (sensor.dissipation > 0)");
  resolve_firmware_curve(r, d.sensor, d.conditions, d.firmware);
  read_requirement(r, d.conditions, d.requirement);
  read_montecarlo(r, d.montecarlo);
  // The [response] section is not part of the design (only `response` and
  // budget's dynamic line read it), but it is validated with every other
  // section, so that a bad key is refused whoever set it: the scenario, the
  // command line, a catalogue's setting or a program's Scenario::set.
  (void)read_response_section(s);
  collect_inputs(r, d);
  collect_table_spread(r, d);
  read_drift(r, d);
  collect_drift_inputs(r, d);
  d.notes = r.notes();
  return d;
}

}  // namespace thermargin
