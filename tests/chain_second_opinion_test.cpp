// `thermargin budget` against an independent model of the whole chain:
// tests/reference/chain_model.py and chain_engines.py, written with NumPy and
// SciPy from docs/model.md and docs/engines.md, reading each scenario INI
// with its own parser and never reading a figure of the program's
// (docs/checks.md lists this and every other outside source of the suite).
//
// One Python process answers for each test's batch: every scenario in
// scenarios/ and every generated design in tests/data/second_opinion/
// (which together cover each option: the script reports what each design
// uses and a test holds the union to the list below), and the designs of
// the Monte Carlo check one source at a time. A feature the model does not
// compute is reported by it per design ("not_covered"), printed, counted and
// held to expected_not_covered() (empty today), never skipped silently.
//
// Tolerances (docs/checks.md derives them):
// - nominal and self-heating: 1e-9 K beyond the program's self-heating solver
//   tolerance (1e-9 K, docs/model.md §2); 1e-9 K where nothing self-heats;
// - worst case: 1e-6 K;
// - linear band (with the second-order terms of JCGM 100:2008 §5.1.2 as
//   docs/engines.md writes them) and each source's contribution: 0.5 % of
//   the band's half-width; each contributor row's share (pair rows too);
// - the end-of-life design's window (docs/model.md §11) and the RTD class's
//   extrapolation marks (§1);
// - Monte Carlo: the band ends, mean, standard deviation and yield within the
//   intervals the script derives from both sample sizes (order-statistic and
//   binomial bounds for quantiles and yield, the large-sample F test for the
//   variance, z = 4.5); at end of life the yield and the window's largest
//   |band end| (mc_max_abs), the program's only end-of-life band figure;
// - one source at a time: every toleranced input alone (every bound of the
//   list, the board range, the RTD class, an R–T table's spread, the
//   precharge of a multiplexed ADC and each drift over life at end of life).
#include <algorithm>
#include <cmath>
#include <filesystem>
#include <map>
#include <set>
#include <string>
#include <vector>

#include <gtest/gtest.h>
#include <nlohmann/json.hpp>

#include "cli_run.hpp"
#include "source_tree.hpp"

namespace thermargin {
namespace {

namespace fs = std::filesystem;
using nlohmann::json;

constexpr double solver_tolerance = 1e-9;     // K, self-heating iteration (docs/model.md §2)
constexpr double nominal_tolerance = 1e-9;    // K, beyond the solver's
constexpr double worst_case_tolerance = 1e-6; // K
constexpr double linear_tolerance = 0.005;    // of the linear band's half-width

// Monte Carlo sizes: small enough for a few seconds of NumPy per batch; the
// acceptance intervals come from these sizes (docs/checks.md).
constexpr int program_units = 20000;
constexpr int model_units = 20000;
constexpr int per_source_units = 40000;
// The coverage of the Monte Carlo runs: at 95 % each band end has enough
// units in its tail (2.5 % of 20 000 = 500) for a two-sided order-statistic bound.
constexpr const char* mc_coverage = "--montecarlo.coverage=95%";

struct Run {
  std::string name;
  std::string path;
  std::vector<std::string> overrides;
  bool deterministic = true;
  bool mc = false;
  int units = program_units;
};

// The generated designs of tests/data/second_opinion (each option of the
// model in at least one; TheDesignsCoverEveryOption holds that).
std::vector<std::string> generated_design_files() {
  std::vector<std::string> out;
  for (const auto& e : fs::directory_iterator(testing::source_path("tests/data/second_opinion")))
    if (e.path().extension() == ".ini" && e.path().stem() != "per_source_base") out.push_back(e.path().string());
  return out;
}

// The shipped scenarios (source_tree.hpp: a sanitizer build's covering
// subset) and the generated designs.
std::vector<std::string> design_files() {
  std::vector<std::string> out = testing::scenario_files();
  for (const auto& f : generated_design_files()) out.push_back(f);
  std::sort(out.begin(), out.end());
  return out;
}

// The bounds the one-source-at-a-time check switches off (every other is 0).
const std::vector<std::pair<std::string, std::string>>& per_source_bounds() {
  static const std::vector<std::pair<std::string, std::string>> keys = {
      {"r25", "sensor.r25_tol"},
      {"beta", "sensor.beta_tol"},
      {"dissipation", "sensor.dissipation_tol"},
      {"r_fixed", "divider.r_fixed_tol"},
      {"r_fixed_tempco", "divider.r_fixed_tempco"},
      {"r_parallel", "divider.r_parallel_tol"},
      {"v_excitation", "supply.v_excitation_tol"},
      {"v_excitation_tempco", "supply.v_excitation_tempco"},
      {"v_reference", "supply.v_reference_tol"},
      {"v_reference_tempco", "supply.v_reference_tempco"},
      {"adc_offset", "adc.offset"},
      {"adc_gain", "adc.gain_error"},
      {"adc_inl", "adc.inl"},
      {"adc_leakage", "adc.leakage"},
      {"noise", "adc.noise"},
      {"calibration", "firmware.calibration_uncertainty"},
      {"adc_offset_tempco", "adc.offset_tempco"},
      {"adc_gain_tempco", "adc.gain_tempco"},
      {"r_drive", "supply.r_drive_tol"},
  };
  return keys;
}

// The drifts over life (docs/model.md §11), each alone on the base design: zero
// at delivery, so each shows in the end-of-life design only.
const std::vector<std::pair<std::string, std::string>>& per_source_drifts() {
  static const std::vector<std::pair<std::string, std::string>> keys = {
      {"sensor_drift", "--sensor.drift=1%"},
      {"r_fixed_drift", "--divider.r_fixed_drift=1%"},
      {"v_excitation_drift", "--supply.v_excitation_drift=1%"},
      {"v_reference_drift", "--supply.v_reference_drift=1%"},
      {"v_reference_hysteresis", "--supply.v_reference_hysteresis=1%"},
      {"adc_offset_drift", "--adc.offset_drift=20"},
      {"adc_gain_drift", "--adc.gain_drift=0.2%"},
  };
  return keys;
}

bool is_drift_run(const Run& r) {
  for (const auto& [name, option] : per_source_drifts())
    if (r.name == "one source: " + name) return true;
  return false;
}

std::vector<Run> per_source_runs() {
  const std::string dir = testing::source_path("tests/data/second_opinion/");
  const std::string base = dir + "per_source_base.ini";
  std::vector<Run> out;
  // Every bound of the list 0 but `on` ("" for none) and those `extra` sets
  // (an option may be given once); the calibration only where its reference is
  // the source (it would hide the others).
  auto alone = [&](const std::string& name, const std::string& design, const std::string& on,
                   std::vector<std::string> extra) {
    Run r{"one source: " + name, design, extra, false, true, per_source_units};
    auto set_by_extra = [&](const std::string& key) {
      return std::any_of(extra.begin(), extra.end(),
                         [&](const std::string& o) { return o.starts_with("--" + key + "="); });
    };
    for (const auto& [n, key] : per_source_bounds())
      if (key != on && !set_by_extra(key)) r.overrides.push_back("--" + key + "=0");
    if (on != "firmware.calibration_uncertainty") r.overrides.push_back("--firmware.calibration=none");
    r.overrides.push_back(mc_coverage);
    out.push_back(r);
  };
  for (const auto& [name, key] : per_source_bounds()) alone(name, base, key, {});
  // The board range acts through a tempco: the fixed resistor's, with its own spread off (uniform ±0).
  alone("board temperature", base, "divider.r_fixed_tempco",
        {"--conditions.board=0..80", "--divider.r_fixed_tempco_dist=uniform", "--divider.r_fixed_tempco=100ppm"});
  // The RTD's class factor: the Pt100 design with every other bound off.
  alone("rtd_class", dir + "rtd_offset_beta.ini", "",
        {"--firmware.resolution=0", "--conditions.t_step=50"});
  // The spread of an R–T table's tolerance column (docs/model.md §12), the
  // board held at 25 degC.
  alone("table_spread", dir + "table_limits_tol.ini", "", {"--conditions.board=25", "--conditions.t_step=50"});
  // Another channel's voltage left on the sampling capacitor (precharge = any,
  // §14), drawn per reading; no output rounding.
  alone("adc_precharge", dir + "sampled_node_switched_any.ini", "",
        {"--firmware.resolution=0", "--conditions.t_step=35"});
  // Each drift at end of life. 1 LSB of noise gives the delivery units a
  // spread to compare: with none, every unit reads alike, and the statistics
  // of a constant would be compared at the resolution of the program's
  // fixed-point sums (about 1e-5 K on the standard deviation).
  for (const auto& [name, option] : per_source_drifts()) alone(name, base, "", {option, "--adc.noise=1"});
  return out;
}

// The runs of each test. Each test asks the model only for its own part, in
// one Python process: ctest runs every test in a process of its own.
enum class Part { deterministic, monte_carlo, one_source, design_only };

std::vector<Run> runs_of(Part part) {
  if (part == Part::one_source) return per_source_runs();
  std::vector<Run> runs;
  for (const auto& f : design_files()) {
    const std::string name = fs::path(f).filename().string();
    if (part == Part::deterministic) runs.push_back({name, f, {}, true, false});
    // Temperatures 5 K apart keep the NumPy simulation to seconds.
    if (part == Part::monte_carlo)
      runs.push_back({name + " (Monte Carlo)", f, {mc_coverage, "--conditions.t_step=5"}, false, true});
    if (part == Part::design_only) runs.push_back({name, f, {}, false, false});
  }
  return runs;
}

// The model's answer for each run (one Python process for the batch).
std::vector<json> model_answers(const std::vector<Run>& runs) {
  json batch{{"program_units", program_units}, {"units", model_units}, {"seed", 20}, {"designs", json::array()}};
  for (const auto& r : runs)
    batch["designs"].push_back({{"name", r.name}, {"path", r.path}, {"overrides", r.overrides},
                                {"deterministic", r.deterministic}, {"mc", r.mc},
                                {"program_units", r.units}, {"units", r.units}});
  testing::ScratchDir dir;
  const std::string file = dir.write("batch.json", batch.dump());
  const testing::CliOutcome py =
      testing::run_shell(testing::reference_command("chain_second_opinion.py", testing::shell_quote(file)));
  if (py.status != 0) throw std::runtime_error("chain_second_opinion.py failed: " + py.err);
  const json parsed = json::parse(py.out);
  std::vector<json> out;
  for (const auto& d : parsed["designs"]) out.push_back(d);
  if (out.size() != runs.size()) throw std::runtime_error("chain_second_opinion.py answered for another batch");
  for (std::size_t k = 0; k < runs.size(); ++k)
    if (out[k]["name"] != runs[k].name) throw std::runtime_error("chain_second_opinion.py answered out of order");
  return out;
}

json program(const Run& r) {
  std::string args = "budget " + testing::shell_quote(r.path);
  for (const auto& o : r.overrides) args += " " + testing::shell_quote(o);
  args += r.mc ? " --montecarlo.threads=2 --montecarlo.units=" + std::to_string(r.units) : " --no-mc";
  return testing::cli_json(args);
}

bool uses_self_heating(const json& model) {
  for (const auto& o : model["options"])
    if (o == "source=dissipation") return true;
  return false;
}

struct Counts {
  int points = 0, statuses = 0, nominal = 0, worst_case = 0, linear = 0, contributions = 0, shares = 0, mc = 0;
  int uncovered_points = 0;  // points of a design whose figures the model does not compute
  int end_of_life = 0;       // end-of-life window figures compared
  int rtd_marks = 0;         // points whose RTD-class extrapolation mark was compared
};

// The end-of-life design's window (docs/model.md §11): its largest worst-case
// and linear |error| and its number of corners, against the model's own
// end-of-life design.
void compare_end_of_life(const json& got, const json& want, Counts& n) {
  if (!want.contains("end_of_life")) return;
  ASSERT_TRUE(got["window"].contains("end_of_life"));
  const json& g = got["window"]["end_of_life"];
  const json& w = want["end_of_life"];
  EXPECT_EQ(g["wc_corners"].get<long long>(), w["wc_corners"].get<long long>());
  EXPECT_NEAR(g["wc_max_abs"].get<double>(), w["wc_max_abs"].get<double>(), worst_case_tolerance);
  EXPECT_NEAR(g["rss_max_abs"].get<double>(), w["rss_max_abs"].get<double>(),
              linear_tolerance * w["rss_half_width"].get<double>());
  n.end_of_life += 3;
}

// What the model does not compute, as it says per design ("not_covered"):
// printed in the test's output, counted, and held to this list, so that a
// feature left out is never a silent skip (docs/checks.md, "Not covered").
const std::set<std::string>& expected_not_covered() {
  static const std::set<std::string> list = {
  };
  return list;
}

std::string base_name(const std::string& run_name) { return run_name.substr(0, run_name.find(' ')); }

// The design's not-covered features, "design: feature [figures]", printed.
std::vector<std::string> not_covered(const Run& run, const json& want) {
  std::vector<std::string> out;
  for (const auto& n : want["not_covered"]) {
    std::string figures;
    for (const auto& f : n["figures"]) figures += (figures.empty() ? "" : " ") + f.get<std::string>();
    out.push_back(base_name(run.name) + ": " + n["feature"].get<std::string>() + " [" + figures + "]");
    std::printf("NOT COVERED by the second opinion: %s (%s)\n", out.back().c_str(), run.name.c_str());
  }
  return out;
}

bool points_not_covered(const json& want) {
  for (const auto& n : want["not_covered"])
    for (const auto& f : n["figures"])
      if (f == "points") return true;
  return false;
}

// The model's share of a contributor row; a pair row "a × b" in either order.
double model_share(const json& want, const std::string& source, std::size_t i) {
  const auto& shares = want["shares"];
  if (shares.contains(source)) return shares[source][i].get<double>();
  const std::string times = " \u00d7 ";
  const auto at = source.find(times);
  if (at != std::string::npos) {
    const std::string swapped = source.substr(at + times.size()) + times + source.substr(0, at);
    if (shares.contains(swapped)) return shares[swapped][i].get<double>();
  }
  ADD_FAILURE() << "the model has no row " << source;
  return NAN;
}

void compare_deterministic(const Run& run, const json& got, const json& want, Counts& n) {
  SCOPED_TRACE(run.name);
  const auto& pts = got["points"];
  ASSERT_EQ(pts.size(), want["t"].size());
  if (points_not_covered(want)) {
    n.points += static_cast<int>(pts.size());
    n.uncovered_points += static_cast<int>(pts.size());
    return;
  }
  const double nominal_tol = nominal_tolerance + (uses_self_heating(want) ? solver_tolerance : 0.0);
  EXPECT_EQ(got["window"]["wc_corners"].get<long long>(), want["wc_corners"].get<long long>());
  compare_end_of_life(got, want, n);
  for (std::size_t i = 0; i < pts.size(); ++i) {
    const json& p = pts[i];
    SCOPED_TRACE("t = " + p["t"].dump());
    ++n.points;
    ASSERT_NEAR(p["t"].get<double>(), want["t"][i].get<double>(), 1e-9);
    // The RTD class used beyond its rated range (IEC 60751:2008 by construction, docs/model.md §1).
    if (!want["rtd_class_extrapolated"].is_null()) {
      EXPECT_EQ(p.value("rtd_class_extrapolated", false), want["rtd_class_extrapolated"][i].get<bool>());
      ++n.rtd_marks;
    }
    const std::string status = want["status"][i];
    if (status != "ok") {
      EXPECT_EQ(p.value("status", std::string("ok")), status);
      EXPECT_FALSE(p.contains("nominal"));
      ++n.statuses;
      continue;
    }
    ASSERT_TRUE(p.contains("nominal")) << p.dump();
    EXPECT_NEAR(p["nominal"].get<double>(), want["nominal"][i].get<double>(), nominal_tol);
    EXPECT_NEAR(p["self_heating"].get<double>(), want["self_heating"][i].get<double>(), nominal_tol);
    ++n.nominal;
    const long long failed = want["wc_failed_corners"][i].get<long long>();
    EXPECT_EQ(p.value("wc_failed_corners", 0LL), failed);
    if (!want["wc_low"][i].is_null()) {
      EXPECT_NEAR(p["wc_low"].get<double>(), want["wc_low"][i].get<double>(), worst_case_tolerance);
      EXPECT_NEAR(p["wc_high"].get<double>(), want["wc_high"][i].get<double>(), worst_case_tolerance);
      ++n.worst_case;
    }
    const double low = want["rss_low"][i], high = want["rss_high"][i];
    const double tol = linear_tolerance * 0.5 * (high - low);
    EXPECT_NEAR(p["rss_low"].get<double>(), low, tol);
    EXPECT_NEAR(p["rss_high"].get<double>(), high, tol);
    ++n.linear;
    std::set<std::string> names;
    for (const auto& [name, values] : want["contributions"].items()) {
      names.insert(name);
      ASSERT_TRUE(p["contributions"].contains(name)) << name;
      EXPECT_NEAR(p["contributions"][name].get<double>(), values[i].get<double>(), tol) << name;
      ++n.contributions;
    }
    EXPECT_EQ(p["contributions"].size(), names.size()) << p["contributions"].dump();
    // Each row's share of u_c² (the contributor table), from the model's rows with
    // their second-order parts (docs/engines.md): within 2 × 0.5 % + (0.5 %)².
    for (const auto& c : p["contributors"]) {
      EXPECT_NEAR(c["share"].get<double>(), model_share(want, c["source"], i),
                  2 * linear_tolerance + linear_tolerance * linear_tolerance)
          << c["source"];
      ++n.shares;
    }
  }
}

void expect_within(const json& p, const json& interval, const char* field, int& count) {
  ASSERT_TRUE(p.contains(field)) << field;
  const double v = p[field], lo = interval[0].is_null() ? -INFINITY : interval[0].get<double>(),
               hi = interval[1].is_null() ? INFINITY : interval[1].get<double>();
  EXPECT_GE(v, lo) << field << " below the model's interval [" << lo << ", " << hi << "]";
  EXPECT_LE(v, hi) << field << " above the model's interval [" << lo << ", " << hi << "]";
  ++count;
}

void compare_monte_carlo(const Run& run, const json& got, const json& want, Counts& n) {
  SCOPED_TRACE(run.name);
  const auto& pts = got["points"];
  if (points_not_covered(want)) {
    n.uncovered_points += static_cast<int>(pts.size());
    return;
  }
  ASSERT_EQ(pts.size(), want["mc"].size());
  EXPECT_EQ(got["window"]["mc_units"].get<long long>(), run.units);
  for (std::size_t i = 0; i < pts.size(); ++i) {
    SCOPED_TRACE("t = " + pts[i]["t"].dump());
    const json& w = want["mc"][i];
    ASSERT_TRUE(w.contains("mc_low")) << "the model has no valid units here";
    for (const char* f : {"mc_low", "mc_high", "mc_mean", "mc_stddev"}) expect_within(pts[i], w[f], f, n.mc);
  }
  expect_within(got["window"], want["yield_interval"], "yield", n.mc);
  // The end-of-life design's yield and largest |band end| over the window
  // (docs/model.md §11: the program shows no end-of-life band per temperature),
  // where drifts are set.
  if (want.contains("end_of_life_yield_interval")) {
    expect_within(got["window"]["end_of_life"], want["end_of_life_yield_interval"], "yield", n.end_of_life);
    expect_within(got["window"]["end_of_life"], want["end_of_life_mc_max_abs_interval"], "mc_max_abs", n.end_of_life);
  }
}

TEST(ChainSecondOpinion, NominalWorstCaseAndLinearBudgetOnEveryScenarioAndGeneratedDesign) {
  const auto runs = runs_of(Part::deterministic);
  const auto answers = model_answers(runs);
  Counts n;
  int designs = 0;
  std::set<std::string> uncovered;
  for (std::size_t k = 0; k < runs.size(); ++k) {
    compare_deterministic(runs[k], program(runs[k]), answers[k], n);
    for (const auto& u : not_covered(runs[k], answers[k])) uncovered.insert(u);
    ++designs;
  }
  EXPECT_EQ(designs, static_cast<int>(design_files().size()));
  EXPECT_EQ(designs, static_cast<int>(testing::scenario_files().size() + generated_design_files().size()));
  EXPECT_GE(designs, 19);  // 13 scenarios (7 in a sanitizer build) and 12 generated designs
  // What is not covered is exactly the documented list, nothing more.
  EXPECT_EQ(uncovered, expected_not_covered());
  EXPECT_EQ(n.end_of_life, 3 * 2);  // the two designs with drifts: corners, worst case, linear
  EXPECT_GT(n.rtd_marks, 0);
  // Every point was compared (a value, or the same status) or is a documented uncovered one.
  EXPECT_EQ(n.nominal + n.statuses + n.uncovered_points, n.points);
  EXPECT_EQ(n.linear, n.nominal);
  EXPECT_GT(n.worst_case, 0.9 * n.nominal);
  EXPECT_GT(n.contributions, 5 * n.linear);
  EXPECT_GE(n.shares, n.contributions);  // every input's row, and the pair rows above 1e-4 of u_c²
  std::printf("compared %d points of %d designs: %d nominal, %d worst case, %d linear bands, %d contributions, "
              "%d shares, %d statuses, %d end-of-life window figures, %d RTD-class marks; %d points NOT COVERED "
              "(listed above)\n",
              n.points, designs, n.nominal, n.worst_case, n.linear, n.contributions, n.shares, n.statuses,
              n.end_of_life, n.rtd_marks, n.uncovered_points);
}

TEST(ChainSecondOpinion, MonteCarloBandMeanSpreadAndYieldOnEveryScenarioAndGeneratedDesign) {
  const auto runs = runs_of(Part::monte_carlo);
  const auto answers = model_answers(runs);
  Counts n;
  int designs = 0, points = 0, compared_designs = 0;
  for (std::size_t k = 0; k < runs.size(); ++k) {
    const json got = program(runs[k]);
    compare_monte_carlo(runs[k], got, answers[k], n);
    not_covered(runs[k], answers[k]);
    points += static_cast<int>(got["points"].size());
    if (!points_not_covered(answers[k])) ++compared_designs;
    ++designs;
  }
  EXPECT_EQ(designs, static_cast<int>(design_files().size()));
  EXPECT_EQ(designs - compared_designs, 0);  // none is left out by points (expected_not_covered)
  // Four statistics a point, the yield a design, of every design the model covers.
  EXPECT_EQ(n.mc, 4 * (points - n.uncovered_points) + compared_designs);
  EXPECT_EQ(n.end_of_life, 2 * 2);  // the end-of-life yield and mc_max_abs of the two designs with drifts
  std::printf("Monte Carlo: %d statistics and %d end-of-life yields and largest band ends compared; %d points of %d "
              "designs NOT COVERED (listed above)\n",
              n.mc, n.end_of_life, n.uncovered_points, designs - compared_designs);
}

TEST(ChainSecondOpinion, MonteCarloOneSourceAtATimeSeesEverySourcesSpread) {
  const auto runs = runs_of(Part::one_source);
  const auto answers = model_answers(runs);
  Counts n;
  std::set<std::string> seen;
  int points = 0, visible = 0;
  for (std::size_t k = 0; k < runs.size(); ++k) {
    const json got = program(runs[k]);
    compare_monte_carlo(runs[k], got, answers[k], n);
    points += static_cast<int>(got["points"].size());
    seen.insert(runs[k].name);
    // The source is seen: its spread is at least twice the quantiser's alone
    // (1/√12 LSB over the slope, from the model), so that a missing term
    // moves the spread far outside the ±2 % the comparison allows. A drift
    // is seen at end of life, where its spread is also at least twice the
    // delivery spread (the noise's) it adds to.
    const bool drift = is_drift_run(runs[k]);
    const auto& mc = answers[k]["mc"];
    const auto& seen_in = drift ? answers[k]["end_of_life_mc"] : mc;
    ASSERT_EQ(seen_in.size(), mc.size()) << runs[k].name;
    for (std::size_t i = 0; i < mc.size(); ++i) {
      double floor = answers[k]["quantisation_sd"][i].get<double>();
      if (drift) floor = std::max(floor, mc[i]["mc_stddev_model"].get<double>());
      EXPECT_GT(seen_in[i]["mc_stddev_model"].get<double>(), 2.0 * floor)
          << runs[k].name << " at " << got["points"][i]["t"];
      ++visible;
    }
  }
  EXPECT_EQ(visible, points);
  // Every source of the list, the board range, the RTD class, the table's
  // spread, the precharge and each drift.
  EXPECT_EQ(seen.size(), per_source_bounds().size() + 4 + per_source_drifts().size());
  EXPECT_EQ(n.mc, 4 * points + static_cast<int>(seen.size()));
  EXPECT_EQ(n.end_of_life, 2 * static_cast<int>(per_source_drifts().size()));  // yield and mc_max_abs of each drift
}

TEST(ChainSecondOpinion, LookupTableIsTheModelsOnEveryDesignThatUsesOne) {
  // `thermargin table` emits the table the chain reads (docs/table.md); the
  // model builds its own from docs/model.md §6 (code span, spacing in code or
  // in temperature, storage as integers of the unit).
  const auto runs = runs_of(Part::design_only);
  const auto answers = model_answers(runs);
  int designs = 0, points = 0;
  for (std::size_t k = 0; k < runs.size(); ++k) {
    if (!answers[k].contains("table")) continue;
    SCOPED_TRACE(runs[k].name);
    const json got = testing::cli_json("table " + testing::shell_quote(runs[k].path));
    const json& want = answers[k]["table"];
    ASSERT_EQ(got["rows"].size(), want["codes"].size());
    for (std::size_t i = 0; i < want["codes"].size(); ++i) {
      EXPECT_EQ(got["rows"][i]["code"].get<double>(), want["codes"][i].get<double>()) << i;
      EXPECT_EQ(got["rows"][i]["stored"].get<double>(), want["stored"][i].get<double>()) << i;
      ++points;
    }
    ++designs;
  }
  EXPECT_EQ(designs, 3);  // the battery guard, a beta NTC in code and a Pt1000 in temperature
  EXPECT_GT(points, 3 * 16);
}

TEST(ChainSecondOpinion, TheDesignsCoverEveryOption) {
  // The generated designs alone (not the scenarios, not the one-source runs).
  const auto runs = runs_of(Part::design_only);
  const auto answers = model_answers(runs);
  std::set<std::string> used;
  int generated = 0;
  for (std::size_t k = 0; k < runs.size(); ++k) {
    if (runs[k].path.find("tests/data/second_opinion") == std::string::npos) continue;
    ++generated;
    for (const auto& o : answers[k]["options"]) used.insert(o.get<std::string>());
  }
  EXPECT_EQ(generated, 12);
  const std::vector<std::string> every = {
      "sensor.model=beta", "sensor.model=steinhart-hart", "sensor.model=table", "sensor.model=rtd",
      "divider.placement=low", "divider.placement=high", "supply.ratiometric=true", "supply.ratiometric=false",
      "adc.quantizer=round", "adc.quantizer=floor", "adc.averaging", "firmware.conversion=exact",
      "firmware.conversion=beta", "firmware.conversion=steinhart-hart", "firmware.conversion=table",
      "firmware.table_spacing=code", "firmware.table_spacing=temperature", "firmware.calibration=none",
      "firmware.calibration=offset", "firmware.calibration=two-point", "firmware.full_scale=pow2",
      "firmware.full_scale=pow2-minus-1", "firmware.resolution", "firmware.lead_compensation",
      "conditions.board=sensor", "conditions.board=fixed", "conditions.board=range", "sensor.lead_resistance",
      "divider.r_parallel", "divider.duty", "distribution=normal", "distribution=uniform",
      "distribution=triangular", "distribution=gapped", "source=r25", "source=beta", "source=rtd_class",
      "source=dissipation", "source=r_fixed", "source=r_fixed_tempco", "source=r_parallel", "source=v_excitation",
      "source=v_excitation_tempco", "source=v_reference", "source=v_reference_tempco", "source=adc_offset",
      "source=adc_gain", "source=adc_inl", "source=adc_leakage", "source=calibration_1", "source=calibration_2",
      "source=board_temperature",
      // The options merged after the first version of the model (docs/model.md §5, §7, §12, §15, coverage factors).
      "adc.inl_shape=bound", "firmware.calibration_dissipation", "firmware.drive_compensation", "sensor.table_limits",
      "coverage_factor=r_fixed", "source=adc_offset_tempco", "source=adc_gain_tempco", "source=r_drive",
      "source=table_spread", "adc.c_sample", "divider.c_node", "divider.settle_time", "adc.precharge=same",
      "adc.precharge=any", "adc.precharge=ground", "source=adc_precharge", "drift=sensor.drift",
      "drift=divider.r_fixed_drift", "drift=supply.v_excitation_drift", "drift=supply.v_reference_drift",
      "drift=supply.v_reference_hysteresis", "drift=adc.offset_drift", "drift=adc.gain_drift",
      "sensor.rtd_construction=film", "sensor.rtd_construction=wire-wound"};
  int checked = 0;
  for (const auto& o : every) {
    EXPECT_TRUE(used.count(o)) << o << " is exercised by no design";
    ++checked;
  }
  EXPECT_EQ(checked, 77);
}

}  // namespace
}  // namespace thermargin
