// Checks of the command-line program as a user meets it (README.md, docs/):
// bad input is one line on stderr naming the file, the line and the key and
// what would be accepted, the exit status is 2, and --output leaves no file
// behind; good input exits 0 with the documented JSON fields; points that
// cannot be read carry a status, never a number.
#include <filesystem>
#include <fstream>
#include <sstream>
#include <string>
#include <vector>

#include <gtest/gtest.h>
#include <nlohmann/json.hpp>

#include "cli_run.hpp"
#include "thermargin/core/caution.hpp"
#include "thermargin/input/scenario.hpp"

namespace thermargin {
namespace {

namespace fs = std::filesystem;

const fs::path cli_source_dir(THERMARGIN_SOURCE_DIR);
const std::string chain_data = (cli_source_dir / "tests/data/chain").string();

using Outcome = testing::CliOutcome;
using testing::slurp;

// Each test in a scratch directory of its own.
class Cli : public ::testing::Test {
 protected:
  void SetUp() override { fs::create_directories(work()); }
  fs::path work() const { return dir_.path / "work"; }

  // Runs `thermargin ARGS` in the scratch directory's work/ folder, stdout
  // and stderr captured outside it (so that work/ holds only what the program wrote).
  Outcome run(const std::string& args) {
    return testing::run_shell("cd " + testing::shell_quote(work().string()) + " && " + testing::cli_command(args));
  }
  void write(const std::string& name, const std::string& text) { std::ofstream(work() / name) << text; }
  std::vector<std::string> work_files() const { return dir_.names("work"); }
  testing::ScratchDir dir_;
};

struct CliBadInput {
  const char* what;
  std::string ini;
  std::string line;  // "bad.ini:N" the message must name
  std::string key;   // the key (or section) it must name
};

std::vector<CliBadInput> bad_inputs() {
  return {
      {"negative resistance", "# fixed resistor\n[divider]\nr_fixed = -10k\n", "bad.ini:3", "divider.r_fixed"},
      {"zero resistance", "[sensor]\nr25 = 0\n", "bad.ini:2", "sensor.r25"},
      {"zero RTD resistance", "[sensor]\nmodel = rtd\nr0 = 0R\n", "bad.ini:3", "sensor.r0"},
      {"tolerance of 100 %", "[sensor]\nr25_tol = 100%\n", "bad.ini:2", "sensor.r25_tol"},
      {"tolerance over 100 %", "[divider]\nr_fixed_tol = 150 %\n", "bad.ini:2", "divider.r_fixed_tol"},
      {"0 bits", "[adc]\nbits = 0\n", "bad.ini:2", "adc.bits"},
      {"33 bits", "[adc]\nbits = 33\n", "bad.ini:2", "adc.bits"},
      {"unknown model", "[sensor]\nmodel = ptc\n", "bad.ini:2", "sensor.model"},
      {"unknown key", "[adc]\nresolution = 12\n", "bad.ini:2", "adc.resolution"},
      {"unknown section", "title = x\n[adcs]\nbits = 12\n", "bad.ini:2", "[adcs]"},
      {"malformed number", "[supply]\nv_excitation = 3,3V\n", "bad.ini:2", "supply.v_excitation"},
      {"missing table", "[sensor]\nmodel = table\ntable_file = missing.csv\n", "bad.ini:3", "sensor.table_file"},
      {"binary table", "[sensor]\nmodel = table\ntable_file = " + chain_data + "/bad_binary.csv\n", "bad.ini:3",
       "sensor.table_file"},
      {"non-monotonic table", "[sensor]\nmodel = table\ntable_file = " + chain_data + "/bad_nonmonotonic.csv\n",
       "bad.ini:3", "bad_nonmonotonic.csv:5"},
      {"table of three points", "[sensor]\nmodel = table\ntable_file = " + chain_data + "/bad_three_points.csv\n",
       "bad.ini:3", "sensor.table_file"},
      {"t_min equal to t_max", "[conditions]\nt_min = 40\nt_max = 40\n", "bad.ini:3", "conditions.t_max"},
      {"t_min above the default t_max", "[conditions]\nt_min = 95\n", "bad.ini:2", "conditions.t_min"},
  };
}

TEST_F(Cli, BadInputIsOneLineNamingFileLineAndKeyExitTwoAndNoOutputFile) {
  for (const CliBadInput& b : bad_inputs()) {
    SCOPED_TRACE(b.what);
    write("bad.ini", b.ini);
    for (const char* command : {"check bad.ini --output result.txt", "budget bad.ini --format json --output result.json"}) {
      const Outcome r = run(command);
      EXPECT_EQ(r.status, 2) << command;
      ASSERT_FALSE(r.err.empty()) << command;
      EXPECT_EQ(r.err.find('\n'), r.err.size() - 1) << "exactly one line: " << r.err;
      EXPECT_NE(r.err.find(b.line), std::string::npos) << r.err;
      EXPECT_NE(r.err.find(b.key), std::string::npos) << r.err;
      EXPECT_TRUE(r.out.empty()) << r.out;
      EXPECT_EQ(work_files(), std::vector<std::string>{"bad.ini"}) << "nothing written beside the input";
    }
  }
}

TEST_F(Cli, BadCommandLineValueNamesTheOptionAndTheCommandLine) {
  const Outcome r = run("check --adc.bits=40 --output result.txt");
  EXPECT_EQ(r.status, 2);
  EXPECT_EQ(r.err, "thermargin: adc.bits = 40 (command line): must be a whole number from 1 to 32\n");
  EXPECT_TRUE(work_files().empty());
}

TEST_F(Cli, UnreadableScenarioIsOneLine) {
  const Outcome r = run("check missing.ini");
  EXPECT_EQ(r.status, 2);
  EXPECT_EQ(r.err, "thermargin: missing.ini: cannot open: no such file\n");
}

TEST_F(Cli, CheckPrintsEveryKeyWithItsValueUnitAndOrigin) {
  const std::string file = (cli_source_dir / "scenarios/default.ini").string();
  const Outcome r = run("check '" + file + "' --format csv --divider.r_fixed=4k7");
  ASSERT_EQ(r.status, 0) << r.err;
  EXPECT_TRUE(r.err.empty()) << r.err;
  std::istringstream in(testing::csv_without_comments(r.out));
  std::string line;
  std::getline(in, line);
  EXPECT_EQ(line, "key,value,unit,origin,resolved");
  std::size_t rows = 0;
  while (std::getline(in, line)) ++rows;
  EXPECT_EQ(rows, scenario_schema().size());
  EXPECT_NE(r.out.find("divider.r_fixed,4k7,ohm,command line,4700\n"), std::string::npos);
  EXPECT_NE(r.out.find("sensor.r25,10k,ohm," + file + ":"), std::string::npos);
  // A ratio written as a bare fraction resolves in the unit column's %: duty 1 is 100 %.
  const std::size_t duty = r.out.find("\ndivider.duty,1,%," + file + ":");
  ASSERT_NE(duty, std::string::npos);
  const std::string duty_row = r.out.substr(duty + 1, r.out.find('\n', duty + 1) - duty - 1);
  EXPECT_TRUE(duty_row.ends_with(",100")) << duty_row;
}

TEST_F(Cli, CheckAndBudgetCsvStartWithTheCautionLineAsEveryCsvDoes) {
  // Every output keeps the caution; in CSV it is the first line, a `#`
  // comment, then the header, as in pick, grades, fit, table and response
  // (picker_test.cpp, grades_test.cpp, fit_cli_test.cpp, lookup_table_test.cpp,
  // response_cli_test.cpp). The budget with a sampling capacitor too: its
  // CSV gains a last column, acquisition_error_K, on the header, not on the caution.
  const std::string caution_line = "# " + std::string(caution) + "\n";
  const std::string budget = "budget --no-mc --conditions.t_step=10 --format csv";
  std::string sampled_header;
  for (const auto& [args, header] : {std::pair<std::string, std::string>{"check --format csv", "key,value,unit,origin,resolved"},
                                     {budget, "t_degC,in_window,status,v_node_V,"},
                                     {budget + " --adc.c_sample=15p --adc.t_acq=1u", "t_degC,in_window,status,v_node_V,"}}) {
    const Outcome r = run(args);
    ASSERT_EQ(r.status, 0) << args << ": " << r.err;
    EXPECT_EQ(r.out.rfind(caution_line + header, 0), 0u) << args << ":\n" << r.out.substr(0, 300);
    sampled_header = r.out.substr(caution_line.size(), r.out.find('\n', caution_line.size()) - caution_line.size());
  }
  EXPECT_TRUE(sampled_header.ends_with(",acquisition_error_K")) << sampled_header;  // the last case's
}

TEST_F(Cli, BudgetJsonCarriesTheInterfaceFields) {
  const Outcome r = run("budget --format json --output budget.json --montecarlo.units=2000");
  ASSERT_EQ(r.status, 0) << r.err;
  EXPECT_TRUE(r.out.empty());
  EXPECT_TRUE(r.err.empty()) << "no progress output when stderr is not a terminal: " << r.err;
  ASSERT_EQ(work_files(), std::vector<std::string>{"budget.json"});
  const auto j = nlohmann::json::parse(slurp(work() / "budget.json"));
  EXPECT_EQ(j["command"], "budget");
  EXPECT_EQ(j["units"]["temperature"], "degC");
  EXPECT_EQ(j["units"]["error"], "K");
  ASSERT_EQ(j["points"].size(), 201u);  // -20..80 °C in 0.5 K steps
  EXPECT_EQ(j["points"][0]["t"], -20.0);
  for (const auto& p : j["points"])
    for (const char* field : {"t", "code", "sensitivity", "self_heating", "nominal"}) EXPECT_TRUE(p.contains(field)) << field;
  EXPECT_TRUE(j["window"]["verdict"] == "pass" || j["window"]["verdict"] == "fail");
  EXPECT_TRUE(j.contains("caution"));
}

TEST_F(Cli, SaturatedPointsAreFlaggedAndCarryNoError) {
  // docs/model.md §5 and §8: points that saturate the ADC carry "saturated": true and no
  // error fields. 10k/10k from 3.3 V into a 1.0 V reference saturates while
  // the NTC is above 4.35 kΩ, below about 45 °C.
  const Outcome r = run("budget --format json --supply.ratiometric=false --supply.v_reference=1.0V "
                    "--montecarlo.units=2000");
  ASSERT_EQ(r.status, 0) << r.err;
  const auto j = nlohmann::json::parse(r.out);
  int saturated = 0, read = 0;
  for (const auto& p : j["points"]) {
    if (p.value("saturated", false)) {
      ++saturated;
      for (const char* field : {"nominal", "wc_low", "wc_high", "rss_low", "rss_high", "mc_low", "mc_high"})
        EXPECT_FALSE(p.contains(field)) << p["t"] << " " << field;
      EXPECT_LT(p["t"].get<double>(), 46.0);
    } else if (p.contains("nominal")) {
      ++read;
      EXPECT_GT(p["t"].get<double>(), 44.0);
    }
  }
  EXPECT_GT(saturated, 100);
  EXPECT_GT(read, 50);
}

TEST_F(Cli, RunawayPointsCarryTheStatusAndNoNumber) {
  const Outcome r = run("budget --format json --sensor.r25=100 --divider.r_fixed=1 --supply.v_excitation=50V "
                    "--sensor.dissipation=0.1mW/K --montecarlo.units=2000");
  ASSERT_EQ(r.status, 0) << r.err;
  const auto j = nlohmann::json::parse(r.out);
  for (const auto& p : j["points"]) {
    EXPECT_EQ(p["status"], "thermal-runaway") << p["t"];
    EXPECT_FALSE(p.contains("nominal")) << p["t"];
    EXPECT_FALSE(p.contains("self_heating")) << p["t"];
  }
}

// Every shipped scenario through `check` and `budget`: the ctest entries
// scenario.<name>.figures (tests/CMakeLists.txt), which also hold its figures.

}  // namespace
}  // namespace thermargin
