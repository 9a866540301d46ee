// `thermargin budget` as a user runs it: byte-identical output whatever the
// thread count, different seeds giving different draws, the adaptive run
// length, the verdict and --strict's exit status.
#include <algorithm>
#include <cmath>
#include <map>
#include <sstream>
#include <string>
#include <vector>

#include <gtest/gtest.h>
#include <nlohmann/json.hpp>

#include "cli_run.hpp"
#include "source_tree.hpp"

namespace thermargin {
namespace {

using CliRun = testing::CliOutcome;

CliRun budget(const std::string& args) { return testing::run_cli("budget " + args); }

// The text with every run of white space (a wrapped line's break and indent) as one space.
std::string flattened(const std::string& text) {
  std::string out;
  for (char c : text)
    if (c == ' ' || c == '\n') {
      if (!out.empty() && out.back() != ' ') out += ' ';
    } else {
      out += c;
    }
  return out;
}

const std::string quick = " --montecarlo.units=3000 --conditions.t_step=2 --format json";

TEST(BudgetCli, OutputIsByteIdenticalForOneTwoAndEightThreads) {
  const CliRun one = budget(quick + " --montecarlo.threads=1");
  const CliRun two = budget(quick + " --montecarlo.threads=2");
  const CliRun eight = budget(quick + " --montecarlo.threads=8");
  ASSERT_EQ(one.status, 0);
  EXPECT_EQ(one.out, two.out);
  EXPECT_EQ(one.out, eight.out);
}

TEST(BudgetCli, DifferentSeedsDrawDifferentUnits) {
  const CliRun a = budget(quick + " --montecarlo.seed=1");
  const CliRun b = budget(quick + " --montecarlo.seed=2");
  ASSERT_EQ(a.status, 0);
  ASSERT_EQ(b.status, 0);
  const auto ja = nlohmann::json::parse(a.out), jb = nlohmann::json::parse(b.out);
  int differing = 0;
  for (std::size_t i = 0; i < ja["points"].size(); ++i)
    differing += ja["points"][i]["mc_mean"] != jb["points"][i]["mc_mean"];
  EXPECT_GT(differing, 0);
  // The deterministic engines do not depend on the seed.
  EXPECT_EQ(ja["window"]["wc_max_abs"], jb["window"]["wc_max_abs"]);
}

TEST(BudgetCli, AdaptiveRunStopsWhenTheBandsAreStableAndSaysHowManyUnits) {
  // JCGM 101 §7.9: batches of max(100/(1 − p), 10⁴) units; at p = 95 %,
  // 10⁴ units a batch, so the count is a multiple of it, at least two batches.
  // (Without output rounding: a 0.1 K-stepped output makes the endpoints jump
  // between steps and needs millions of units to settle.)
  const CliRun r = budget(" --montecarlo.units=auto --montecarlo.coverage=95% --conditions.t_step=5"
                          " --firmware.resolution=0 --format json");
  ASSERT_EQ(r.status, 0);
  const auto j = nlohmann::json::parse(r.out);
  const auto units = j["window"]["mc_units"].get<std::uint64_t>();
  EXPECT_TRUE(j["window"]["mc_adaptive"].get<bool>());
  EXPECT_TRUE(j["window"]["mc_converged"].get<bool>());
  EXPECT_GE(units, 20000u);
  EXPECT_EQ(units % 10000, 0u);
  EXPECT_LT(units, 10000000u);
}

TEST(BudgetCli, StrictTurnsAFailingVerdictIntoExitThree) {
  // docs/engines.md (Verdict): a failing verdict exits 0, or 3 with --strict.
  const std::string failing = " --requirement.max_error=0.05 --no-mc --format json";
  const CliRun plain = budget(failing);
  ASSERT_EQ(plain.status, 0);
  EXPECT_EQ(nlohmann::json::parse(plain.out)["window"]["verdict"], "fail");
  EXPECT_EQ(budget(failing + " --strict").status, 3);
  const CliRun loose = budget(" --requirement.max_error=5 --no-mc --strict --format json");
  EXPECT_EQ(loose.status, 0);
  EXPECT_EQ(nlohmann::json::parse(loose.out)["window"]["verdict"], "pass");
}

TEST(BudgetCli, JsonCarriesTheInterfaceFields) {
  const CliRun r = budget(quick);
  ASSERT_EQ(r.status, 0);
  const auto j = nlohmann::json::parse(r.out);
  EXPECT_EQ(j["command"], "budget");
  for (const char* key : {"t", "code", "sensitivity", "self_heating", "nominal", "wc_low", "wc_high", "rss_low",
                          "rss_high", "mc_low", "mc_high", "mc_median", "contributions"})
    EXPECT_TRUE(j["points"][10].contains(key)) << key;
  for (const char* key : {"min", "max", "wc_max_abs", "rss_max_abs", "mc_max_abs", "yield", "yield_low", "yield_high",
                          "dominant", "verdict"})
    EXPECT_TRUE(j["window"].contains(key)) << key;
  EXPECT_TRUE(j.contains("caution"));
}

// 17 active inputs, one more than are enumerated in full: the default
// design's 9 (R25, beta, dissipation, R_fixed, its tempco, the board range,
// ADC offset, gain, INL), an absolute reference (excitation and reference,
// each with tolerance and tempco), a parallel resistor's tolerance, the
// pin's leakage and a two-point calibration's two references.
const std::string seventeen_inputs =
    " --supply.ratiometric=false --supply.v_reference=3.0 --supply.v_excitation_tol=1% --supply.v_excitation_tempco=50ppm"
    " --supply.v_reference_tol=0.5% --supply.v_reference_tempco=25ppm --divider.r_parallel=100k"
    " --divider.r_parallel_tol=1% --adc.leakage=20n --firmware.calibration=two-point --firmware.calibration_at=5,35"
    " --firmware.calibration_uncertainty=0.05 --conditions.t_min=0 --conditions.t_max=40 --conditions.t_step=20 --requirement.window_max=40 --no-mc";

TEST(BudgetCli, BeyondSixteenActiveInputsTheCornersAreDirectedAndEveryOutputSaysSo) {
  // docs/engines.md: full enumeration up to 16 active inputs; beyond, corners
  // directed by the sensitivities, and the output says so.
  const auto directed = testing::cli_json("budget" + seventeen_inputs);
  EXPECT_EQ(directed["window"]["active_inputs"], 17);
  EXPECT_EQ(directed["window"]["wc_method"], "directed corners");
  EXPECT_NE(directed["window"]["wc_method_detail"].get<std::string>().find("17 active inputs, more than the 16"),
            std::string::npos);
  const CliRun text = budget(seventeen_inputs);
  ASSERT_EQ(text.status, 0) << text.err;
  const std::string flat = flattened(text.out);  // the table's cell wraps
  EXPECT_NE(flat.find("corners directed by the sensitivities' signs"), std::string::npos) << text.out;
  EXPECT_NE(flat.find("17 active inputs, more than the 16 enumerated in full"), std::string::npos) << text.out;
  // And the directed corners find the band every corner gives (2^17 of them).
  const auto full = testing::cli_json("budget" + seventeen_inputs + " --corners=enumerate");
  EXPECT_EQ(full["window"]["wc_method"], "full enumeration");
  EXPECT_EQ(full["window"]["wc_corners"], 131072);
  ASSERT_EQ(full["points"].size(), directed["points"].size());
  for (std::size_t i = 0; i < full["points"].size(); ++i) {
    const auto &a = directed["points"][i], &b = full["points"][i];
    ASSERT_TRUE(b.contains("wc_low")) << b["t"];
    EXPECT_NEAR(a["wc_low"].get<double>(), b["wc_low"].get<double>(), 1e-9) << b["t"];
    EXPECT_NEAR(a["wc_high"].get<double>(), b["wc_high"].get<double>(), 1e-9) << b["t"];
  }
}

TEST(BudgetCli, ContributorTablesPerTemperatureAndForTheWindowAreSharesOfTheCombinedVariance) {
  // JCGM 100:2008 §5.1.2 eq. (10) and its note: u_c² = Σ (c_i·u_i)² + the
  // second-order terms, so a row's share is its variance / u_c², the
  // variance being (c_i·u_i)² from the interface's "contributions" field
  // (u_i·|c_i| in K) plus the row's second-order terms ("variances", K²;
  // a pair row has only those); the shares add up to 100 % at every
  // temperature and over the window, largest first, the first one named
  // dominant.
  const auto j = testing::cli_json("budget " + testing::shell_quote(testing::scenario_path("cold_store_logger.ini")) +
                                   " --no-mc");
  int checked = 0;
  for (const auto& p : j["points"]) {
    ASSERT_TRUE(p.contains("contributors")) << p["t"];
    double var = 0.0, sum = 0.0, previous = 2.0;
    for (const auto& [name, v] : p["variances"].items()) var += v.get<double>();
    EXPECT_NEAR(std::sqrt(var), p["u_c"].get<double>(), 1e-12) << p["t"];
    ASSERT_EQ(p["contributors"].size(), p["variances"].size());
    for (const auto& c : p["contributors"]) {
      const double v = p["variances"][c["source"].get<std::string>()];
      EXPECT_NEAR(c["share"].get<double>(), v / var, 1e-12) << p["t"] << " " << c["source"];
      EXPECT_LE(c["share"].get<double>(), previous);
      EXPECT_GE(c["half_width"].get<double>(), 0.0);
      previous = c["share"];
      sum += c["share"].get<double>();
    }
    EXPECT_NEAR(sum, 1.0, 1e-12) << p["t"];
    ++checked;
  }
  EXPECT_EQ(checked, 81);
  double window = 0.0, previous = 2.0;
  for (const auto& c : j["window"]["contributors"]) {
    EXPECT_LE(c["share"].get<double>(), previous);
    previous = c["share"];
    window += c["share"].get<double>();
  }
  EXPECT_NEAR(window, 1.0, 1e-12);
  EXPECT_EQ(j["window"]["dominant"], j["window"]["contributors"][0]["source"]);

  // The CSV carries the same table per temperature: a share and a
  // half-width column per source; the printed shares add up to 100 %.
  const CliRun csv = budget(testing::shell_quote(testing::scenario_path("cold_store_logger.ini")) + " --no-mc --format csv");
  ASSERT_EQ(csv.status, 0);
  std::istringstream in(testing::csv_without_comments(csv.out));
  std::string line;
  std::getline(in, line);
  std::vector<std::string> head;
  for (std::stringstream h(line); std::getline(h, line, ',');) head.push_back(line);
  std::vector<std::size_t> shares;
  for (std::size_t i = 0; i < head.size(); ++i)
    if (head[i].starts_with("share_")) shares.push_back(i);
  EXPECT_EQ(shares.size(), j["window"]["contributors"].size());
  EXPECT_NE(std::find(head.begin(), head.end(), "half_width_r25_K"), head.end());
  int rows = 0;
  while (std::getline(in, line)) {
    std::vector<std::string> cells;
    for (std::stringstream c(line); std::getline(c, line, ',');) cells.push_back(line);
    double sum = 0.0;
    for (std::size_t i : shares) sum += std::stod(cells.at(i));
    EXPECT_NEAR(sum, 1.0, 1e-6 * static_cast<double>(shares.size())) << cells[0];  // printed to 6 decimals
    ++rows;
  }
  EXPECT_EQ(rows, 81);

  // The text's first screen names the dominant source first among the
  // leading sources; --detail adds the shares per temperature after it.
  const std::string file = testing::shell_quote(testing::scenario_path("cold_store_logger.ini"));
  const CliRun text = budget(file + " --no-mc");
  const std::string label = j["window"]["contributors"][0]["label"];
  const auto leading = text.out.find("Leading sources over the window");
  ASSERT_NE(leading, std::string::npos);
  const auto rule = text.out.find("\n-", leading);  // the first row follows the header's rule
  ASSERT_NE(rule, std::string::npos);
  EXPECT_EQ(text.out.substr(text.out.find('\n', rule + 1) + 1, label.size()), label);
  EXPECT_EQ(text.out.find("Per temperature"), std::string::npos) << "the tables per temperature are behind --detail";
  const CliRun detail = budget(file + " --no-mc --detail");
  EXPECT_LT(detail.out.find("Leading sources over the window"), detail.out.find("Per temperature"));
  EXPECT_NE(detail.out.find("each source's share of the combined variance"), std::string::npos);
}

TEST(BudgetCli, SensitivityViewIsTheDividersSlopeInCountsAndMillivolts) {
  // A beta NTC at the bottom of a ratiometric divider, without self-heating:
  // x = 2^N·R/(R_f + R), so dx/dT = 2^N·R_f·R'/(R_f + R)² with R' = −B·R/T²
  // (beta equation, IEC 60539-1; the derivative by hand), dV/dT the same
  // with V_exc for 2^N (docs/model.md §5: 1 LSB = V_ref/2^N), and one LSB is
  // 1/|dx/dT| kelvin.
  const auto j = testing::cli_json("budget --sensor.dissipation=0 --no-mc");
  const double r25 = 10e3, beta = 3950.0, rf = 10e3, span = 4096.0, v = 3.3;
  double weakest = 1e300, weakest_at = 0.0;
  for (const auto& p : j["points"]) {
    const double t = p["t"].get<double>(), T = t + 273.15;
    const double r = r25 * std::exp(beta * (1.0 / T - 1.0 / 298.15)), dr = -beta * r / (T * T);
    const double slope = rf * dr / ((rf + r) * (rf + r));
    constexpr double central_difference = 1e-6;  // relative, h = 0.01 K
    EXPECT_NEAR(p["sensitivity"].get<double>(), span * slope, central_difference * span * std::fabs(slope)) << t;
    EXPECT_NEAR(p["mv_per_k"].get<double>(), 1e3 * v * slope, central_difference * 1e3 * v * std::fabs(slope)) << t;
    EXPECT_NEAR(p["lsb_in_k"].get<double>(), 1.0 / std::fabs(span * slope), 1e-5 / std::fabs(span * slope)) << t;
    if (p["in_window"].get<bool>() && std::fabs(span * slope) < weakest) {
      weakest = std::fabs(span * slope);
      weakest_at = t;
    }
  }
  // The summary names where the divider is starved: the smallest |LSB/K| in
  // the window (the default window 0..60 °C: at 60 °C).
  EXPECT_EQ(j["window"]["weakest_sensitivity"]["t"].get<double>(), weakest_at);
  EXPECT_EQ(weakest_at, 60.0);
  EXPECT_NEAR(j["window"]["weakest_sensitivity"]["lsb_per_k"].get<double>(), weakest, 1e-6 * weakest);
}

TEST(BudgetCli, VerdictGivesItsBasisMarginAndWhereTheMarginIsSmallest) {
  // docs/engines.md (Verdict): the verdict uses the requirement's basis;
  // the margin is the limit minus the largest |error| of that band in the
  // window, found here from the per-temperature bands themselves.
  for (const std::string basis : {"worst-case", "linear"}) {
    SCOPED_TRACE(basis);
    const auto j = testing::cli_json("budget --no-mc --requirement.basis=" + basis);
    const std::string lo = basis == "linear" ? "rss_low" : "wc_low", hi = basis == "linear" ? "rss_high" : "wc_high";
    double worst = -1.0, at = 0.0;
    for (const auto& p : j["points"]) {
      if (!p["in_window"].get<bool>()) continue;
      const double m = std::max(std::fabs(p[lo].get<double>()), std::fabs(p[hi].get<double>()));
      if (m > worst) {
        worst = m;
        at = p["t"];
      }
    }
    const auto& w = j["window"];
    EXPECT_EQ(w["basis"], basis);
    EXPECT_DOUBLE_EQ(w["worst_abs_error"].get<double>(), worst);
    EXPECT_DOUBLE_EQ(w["worst_at"].get<double>(), at);
    EXPECT_DOUBLE_EQ(w["margin"].get<double>(), w["limit"].get<double>() - worst);
    EXPECT_EQ(w["verdict"], worst <= w["limit"].get<double>() ? "pass" : "fail");
  }
  const CliRun text = budget(" --no-mc --requirement.basis=linear");
  const std::string flat = flattened(text.out);  // the text wraps at 100 columns
  EXPECT_NE(flat.find("linear-budget error up to"), std::string::npos);
  EXPECT_NE(flat.find("verdict basis linear (requirement.basis)"), std::string::npos);
  EXPECT_NE(flat.find("smallest margin at"), std::string::npos);
}


namespace detail_text {

// The tables of a text: each header line followed by its rule of dash
// groups ("------  ---"); the rule gives each column's span, which reads
// the cells of every row below it until a blank line or a line that is no
// table row.
struct TextTable {
  std::vector<std::string> header;
  std::vector<std::vector<std::string>> rows;
};

std::string trimmed(const std::string& s) {
  const auto a = s.find_first_not_of(' ');
  return a == std::string::npos ? "" : s.substr(a, s.find_last_not_of(' ') - a + 1);
}

// A pair row's name ("a × b") with its two-byte sign as one byte, so that
// byte offsets are display columns.
std::string one_byte_signs(std::string s) {
  for (std::size_t at; (at = s.find("\u00d7")) != std::string::npos;) s.replace(at, 2, "x");
  return s;
}

std::vector<TextTable> budget_tables(const std::string& text) {
  std::vector<std::string> lines;
  std::istringstream in(one_byte_signs(text));
  for (std::string l; std::getline(in, l);) lines.push_back(l);
  std::vector<TextTable> out;
  for (std::size_t i = 1; i < lines.size(); ++i) {
    const std::string& rule = lines[i];
    if (rule.empty() || rule.find_first_not_of("- ") != std::string::npos || rule[0] != '-') continue;
    std::vector<std::pair<std::size_t, std::size_t>> spans;
    for (std::size_t a = 0; a < rule.size();) {
      const std::size_t b = std::min(rule.find(' ', a), rule.size());
      spans.emplace_back(a, b);
      a = rule.find_first_not_of(' ', b);
      if (a == std::string::npos) break;
    }
    auto cells = [&](const std::string& line) {
      std::vector<std::string> c;
      for (std::size_t k = 0; k < spans.size(); ++k) {
        const std::size_t from = k ? spans[k - 1].second : 0;
        const std::size_t to = k + 1 < spans.size() ? spans[k].second : std::string::npos;
        c.push_back(from < line.size() ? trimmed(line.substr(from, to == std::string::npos ? to : to - from)) : "");
      }
      return c;
    };
    TextTable t{cells(lines[i - 1]), {}};
    for (std::size_t j = i + 1; j < lines.size() && !lines[j].empty() && lines[j][0] != '('; ++j) t.rows.push_back(cells(lines[j]));
    out.push_back(std::move(t));
  }
  return out;
}

std::vector<std::string> csv_cells(const std::string& line) {
  std::vector<std::string> c;
  std::string cell;
  std::istringstream in(line);
  while (std::getline(in, cell, ',')) c.push_back(cell);
  if (!line.empty() && line.back() == ',') c.emplace_back();
  return c;
}

int decimals(const std::string& s) {
  const auto dot = s.find('.');
  return dot == std::string::npos ? 0 : static_cast<int>(s.size() - dot - 1);
}

}  // namespace detail_text

TEST(BudgetCli, DetailCarriesEveryPerTemperatureValueTheCsvHas) {
  // The text's tables per temperature are headed by the CSV's column names
  // (shares in percent: share_<source>_pct); every CSV cell of every row
  // must be in the --detail text, to the text's last digit. A design that
  // saturates at the cold end, so that rows with a status are among them.
  const std::string args = " --conditions.t_min=-20 --conditions.t_step=5 --montecarlo.units=2000"
                           " --supply.ratiometric=false --supply.v_reference=2.5 --requirement.window_min=5";
  const CliRun csv = budget(args + " --format csv"), text = budget(args + " --detail");
  ASSERT_EQ(csv.status, 0) << csv.err;
  ASSERT_EQ(text.status, 0) << text.err;
  // column name -> (t -> cell) from the text
  std::map<std::string, std::map<std::string, std::string>> shown;
  for (const auto& t : detail_text::budget_tables(text.out)) {
    if (t.header.empty() || t.header[0] != "t_degC") continue;
    for (const auto& row : t.rows) {
      std::string when = row[0];
      const bool outside = !when.empty() && when.back() == '*';
      if (outside) when.pop_back();
      shown["in_window"][when] = outside ? "0" : "1";
      for (std::size_t k = 1; k < row.size(); ++k) shown[t.header[k]][when] = row[k];
    }
  }
  std::istringstream in(testing::csv_without_comments(csv.out));
  std::string line;
  std::getline(in, line);
  const auto head = detail_text::csv_cells(line);
  int compared = 0, rows = 0;
  while (std::getline(in, line)) {
    const auto cells = detail_text::csv_cells(line);
    ASSERT_EQ(cells.size(), head.size()) << line;
    ++rows;
    for (std::size_t k = 1; k < head.size(); ++k) {
      std::string name = detail_text::one_byte_signs(head[k]);
      double scale = 1.0;
      if (name.starts_with("share_")) name += "_pct", scale = 100.0;
      ASSERT_TRUE(shown.count(name)) << "no column " << name << " in the --detail text";
      const std::string got = shown[name].count(cells[0]) ? shown[name][cells[0]] : "";
      if (cells[k].empty() || name == "dominant" || name == "status") {
        EXPECT_EQ(got, detail_text::one_byte_signs(cells[k])) << name << " at " << cells[0];
        continue;
      }
      ASSERT_FALSE(got.empty()) << name << " at " << cells[0];
      // Both are one value rounded: to the text's digits and to the CSV's.
      const double tolerance = 0.5 * std::pow(10.0, -detail_text::decimals(got)) +
                               0.5 * scale * std::pow(10.0, -detail_text::decimals(cells[k])) + 1e-12;
      EXPECT_NEAR(std::stod(got), scale * std::stod(cells[k]), tolerance) << name << " at " << cells[0];
      ++compared;
    }
  }
  EXPECT_EQ(rows, 21);  // -20 .. 80 degC (the default t_max) in steps of 5
  EXPECT_GT(compared, 100);
}

TEST(BudgetCli, AVerdictOnAWindowThatSaturatesSaysWhereApartFromTheErrorWhereItReads) {
  // 10k/10k from 3.3 V into an absolute 2.5 V reference: the node is above
  // the reference while the NTC is above 31.25 kOhm (3.3·R/(R + 10k) = 2.5;
  // Ohm's law), below 1.39 degC for the default R25 = 10 kOhm, B = 3950 K
  // part (IEC 60539-1's beta equation, computed below): the window from
  // -10 degC saturates at its cold end.
  const std::string args = " --conditions.t_min=-20 --requirement.window_min=-10 --supply.ratiometric=false"
                           " --supply.v_reference=2.5 --montecarlo.units=2000";
  const auto j = testing::cli_json("budget" + args);
  const auto& w = j["window"];
  EXPECT_EQ(w["verdict"], "fail");
  ASSERT_TRUE(w.contains("unreadable"));
  const auto& first = w["unreadable"][0];
  EXPECT_EQ(first["status"], "saturated");
  EXPECT_EQ(first["from"].get<double>(), -10.0);  // the window's first temperature
  EXPECT_TRUE(first["every_unit"].get<bool>());
  // The run ends at the last temperature of the 0.5 K grid below the
  // crossing; the element's self-heating (under 0.2 K here) moves it colder.
  const double crossing = 1.0 / (1.0 / 298.15 + std::log(31.25e3 / 10e3) / 3950.0) - 273.15;
  EXPECT_LE(first["to"].get<double>(), crossing);
  EXPECT_GT(first["to"].get<double>(), crossing - 0.5 - 0.2);
  // The error where every unit reads is the worst case over those temperatures only.
  double readable = 0.0;
  for (const auto& p : j["points"])
    if (p["in_window"].get<bool>() && p.contains("wc_low") && !p.contains("wc_failed_corners") && !p.contains("status"))
      readable = std::max({readable, std::fabs(p["wc_low"].get<double>()), std::fabs(p["wc_high"].get<double>())});
  EXPECT_DOUBLE_EQ(w["readable_max_abs"].get<double>(), readable);
  // The text says both, apart, and no margin beside a window that cannot be read.
  const CliRun text = budget(args);
  const auto verdict = text.out.find("VERDICT: FAIL inside the window, the ADC saturates");
  ASSERT_NE(verdict, std::string::npos) << text.out;
  const std::string head = text.out.substr(verdict, text.out.find("\nWindow") - verdict);
  EXPECT_NE(head.find("from -10.00 to"), std::string::npos) << head;
  EXPECT_NE(head.find("where every unit reads, the worst-case error is up to"), std::string::npos) << head;
  EXPECT_EQ(head.find("margin"), std::string::npos) << head;
}
}  // namespace
}  // namespace thermargin
