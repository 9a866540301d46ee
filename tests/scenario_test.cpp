// Checks of scenarios (scenario.hpp, docs/scenarios.md): scenarios/default.ini is
// the built-in default design key for key; files record each key's line;
// the command line overrides a file; malformed files are refused with file
// and line; checks between two keys name the one that was set; every
// shipped scenario builds and explains itself; the demo R–T table follows
// the Steinhart–Hart curve its comment states.
#include "thermargin/input/scenario.hpp"

#include <algorithm>
#include <cmath>
#include <cstdio>
#include <filesystem>
#include <fstream>
#include <regex>
#include <set>
#include <sstream>
#include <string>

#include <gtest/gtest.h>

#include "cli_run.hpp"
#include "thermargin/chain/ntc.hpp"
#include "thermargin/input/rt_data.hpp"
#include "thermargin/core/text_file.hpp"

namespace thermargin {
namespace {

namespace fs = std::filesystem;

const fs::path source_dir(THERMARGIN_SOURCE_DIR);

// Per-input overrides: _dist, _gap and the coverage factor _k of a toleranced key.
bool is_override(const std::string& key) {
  return key.ends_with("_dist") || key.ends_with("_gap") ||
         (key.ends_with("_k") && find_key(key.substr(0, key.size() - 2)) != nullptr);
}

// A scratch directory per test, removed afterwards.
class ScenarioFile : public ::testing::Test {
 protected:
  std::string write(const std::string& name, const std::string& text) { return dir_.write(name, text); }
  // The message of the input_error loading and building `text` raises.
  std::string refusal(const std::string& text) {
    const std::string path = write("bad.ini", text);
    try {
      Scenario s;
      s.load_file(path);
      build_design(s);
    } catch (const input_error& e) {
      return e.what();
    }
    return "";
  }
  testing::ScratchDir dir_;
};

TEST(DefaultScenario, FileHoldsTheBuiltInDesignKeyForKey) {
  // docs/scenarios.md: scenarios/default.ini holds the same values as the built-in
  // default, and a test keeps the two identical.
  const Scenario built_in;
  Scenario file;
  file.load_file((source_dir / "scenarios/default.ini").string());
  for (const auto& k : scenario_schema()) {
    EXPECT_EQ(file.get(k.key).value, built_in.get(k.key).value) << k.key;
    // Every key the file can show, it does show (only the table file, which
    // the default design has none of, and the per-input overrides are absent).
    if (!is_override(k.key) && k.key != "sensor.table_file")
      EXPECT_EQ(file.get(k.key).where.kind, Origin::file) << k.key << " is missing from default.ini";
  }
  // Resolved, the two are the same design.
  const Design a = build_design(built_in), b = build_design(file);
  EXPECT_EQ(a.title, b.title);
  EXPECT_EQ(a.inputs.size(), b.inputs.size());
  for (std::size_t i = 0; i < a.inputs.size() && i < b.inputs.size(); ++i) {
    EXPECT_EQ(a.inputs[i].source, b.inputs[i].source);
    EXPECT_EQ(a.inputs[i].bound, b.inputs[i].bound);
  }
}

TEST(Schema, EveryToleranceSourceIsAKey) {
  for (int i = 0; i < source_count; ++i) EXPECT_NE(find_key(info(static_cast<Source>(i)).key), nullptr) << i;
  for (int i = 0; i < reading_source_count; ++i)
    EXPECT_NE(find_key(info(static_cast<ReadingSource>(i)).key), nullptr) << i;
}

TEST_F(ScenarioFile, ToIniWritesAFileThatReadsBackTheSame) {
  const Scenario built_in;
  Scenario back;
  back.load_file(write("saved.ini", to_ini(built_in, true)));
  for (const auto& k : scenario_schema()) EXPECT_EQ(back.get(k.key).value, built_in.get(k.key).value) << k.key;
}

TEST_F(ScenarioFile, RecordsTheFileAndLineOfEveryKey) {
  const std::string path = write("lines.ini",
                                 "# a comment\n"
                                 "title = Lines\n"
                                 "\n"
                                 "[divider]\n"
                                 "r_fixed = 4k7   # inline comment\n"
                                 "[adc]\n"
                                 "bits = 10\n");
  Scenario s;
  s.load_file(path);
  EXPECT_EQ(s.get("divider.r_fixed").value, "4k7");
  EXPECT_EQ(s.get("divider.r_fixed").where.line, 5);
  EXPECT_EQ(s.get("divider.r_fixed").where.origin(), path + ":5");
  EXPECT_EQ(s.get("adc.bits").where.line, 7);
  EXPECT_EQ(s.get("title").where.line, 2);
  EXPECT_EQ(s.get("adc.offset").where.kind, Origin::built_in);
  EXPECT_EQ(build_design(s).divider.r_fixed, 4.7e3);
}

TEST_F(ScenarioFile, CommandLineOverridesTheFile) {
  Scenario s;
  s.load_file(write("o.ini", "[divider]\nr_fixed = 4k7\n"));
  s.set("divider.r_fixed", "2k2", Where{Origin::command_line, "", 0, "divider.r_fixed"});
  EXPECT_EQ(build_design(s).divider.r_fixed, 2.2e3);
  EXPECT_EQ(s.get("divider.r_fixed").where.origin(), "command line");
}

// A program that builds its design in code (no INI text) gets the same
// checks as a file, and a refusal says where the value came from.
TEST(DesignInCode, ValuesSetByAProgramAreCheckedAsAFileIs) {
  Scenario s;
  s.set("divider.r_fixed", "4k7");
  s.set("sensor.r25", "47k");
  const Design d = build_design(s);
  EXPECT_EQ(d.divider.r_fixed, 4.7e3);
  EXPECT_EQ(d.sensor.r25, 47e3);
  EXPECT_EQ(s.get("divider.r_fixed").where.origin(), "set by the program");
  s.set("divider.r_fixed", "-10k");
  try {
    build_design(s);
    ADD_FAILURE() << "a negative resistor was accepted";
  } catch (const input_error& e) {
    EXPECT_EQ(std::string(e.what()), "divider.r_fixed = -10k (set by the program): must be > 0");
  }
  EXPECT_THROW(s.set("divider.r_fixd", "1k"), input_error);
}

TEST(DesignInCode, ResponseKeysAreCheckedWithEveryOtherSection) {
  // The [response] section is not part of the Design, but build_design()
  // validates it like any other section (docs/refusals.md), so a program
  // that sets a bad value hears of it at once.
  Scenario s;
  s.set("response.filter_alpha", "0.5");
  EXPECT_NO_THROW(build_design(s));
  s.set("response.filter_alpha", "1.5");
  try {
    build_design(s);
    ADD_FAILURE() << "an exponential filter's alpha of 1.5 was accepted";
  } catch (const input_error& e) {
    EXPECT_EQ(std::string(e.what()).rfind("response.filter_alpha = 1.5 (set by the program): must be in (0, 1]", 0), 0u)
        << e.what();
  }
}

TEST_F(ScenarioFile, ToleratesAByteOrderMarkAndWindowsLineEnds) {
  Scenario s;
  s.load_file(write("bom.ini", "\xEF\xBB\xBFtitle = BOM\r\n[sensor]\r\nr25 = 4k7\r\n"));
  EXPECT_EQ(s.get("title").value, "BOM");
  EXPECT_EQ(s.get("sensor.r25").where.line, 3);
  EXPECT_EQ(build_design(s).sensor.r25, 4.7e3);
}

TEST_F(ScenarioFile, RefusesMalformedFilesWithFileAndLine) {
  EXPECT_NE(refusal("[sensors]\n").find("bad.ini:1: unknown section [sensors]"), std::string::npos);
  EXPECT_NE(refusal("[sensor]\nr26 = 1k\n").find("bad.ini:2: unknown key 'sensor.r26'"), std::string::npos);
  EXPECT_NE(refusal("r25 = 1k\n").find("bad.ini:1: unknown key 'r25'"), std::string::npos);
  EXPECT_NE(refusal("[sensor]\nr25 10k\n").find("bad.ini:2: expected 'key = value'"), std::string::npos);
  EXPECT_NE(refusal("[sensor]\nr25 = 1k\nr25 = 2k\n").find("bad.ini:3: key 'sensor.r25' is set twice"), std::string::npos);
  EXPECT_NE(refusal("[sensor\n").find("bad.ini:1: malformed section header"), std::string::npos);
  EXPECT_NE(refusal("[ sensor ]\n").find("bad.ini:1: malformed section header"), std::string::npos);
  EXPECT_NE(refusal("; old-style comment\n").find("bad.ini:1:"), std::string::npos);
  EXPECT_NE(refusal("").find("is empty"), std::string::npos);
}

TEST_F(ScenarioFile, RefusesBadValuesNamingKeyFileLineAndWhatIsAccepted) {
  // docs/refusals.md, "How a refusal looks": "divider.r_fixed = -10k (my.ini:12): must be > 0".
  const std::string at = " (" + (dir_.path / "bad.ini").string() + ":2): ";
  EXPECT_EQ(refusal("[divider]\nr_fixed = -10k\n"), "divider.r_fixed = -10k" + at + "must be > 0");
  EXPECT_EQ(refusal("[sensor]\nr25 = 0\n"), "sensor.r25 = 0" + at + "must be > 0");
  EXPECT_EQ(refusal("[divider]\nr_fixed_tol = 100%\n"),
            "divider.r_fixed_tol = 100%" + at + "must be a tolerance from 0 up to (not including) 100 %");
  EXPECT_EQ(refusal("[adc]\nbits = 33\n"), "adc.bits = 33" + at + "must be a whole number from 1 to 32");
  EXPECT_EQ(refusal("[adc]\nbits = 0\n"), "adc.bits = 0" + at + "must be a whole number from 1 to 32");
  EXPECT_EQ(refusal("[sensor]\nmodel = pt100\n"),
            "sensor.model = pt100" + at + "must be one of: beta | steinhart-hart | table | rtd");
  EXPECT_EQ(refusal("[divider]\nr_fixed = 10kk\n"),
            "divider.r_fixed = 10kk" + at + "expected a resistance such as 10k, 4k7, 2.2M, 470R or 10kohm");
}

TEST_F(ScenarioFile, ABValueWithItsKelvinUnitIsReadInKelvin) {
  // Datasheets print B25/50 = 3950 K (IEC 60539-1): `K` is the unit, not kilo.
  Scenario s;
  s.load_file(write("b.ini", "[sensor]\nbeta = 3950K\n[firmware]\nbeta = 3435 K\n"));
  const Design d = build_design(s);
  EXPECT_EQ(d.sensor.beta, 3950.0);
  EXPECT_EQ(d.firmware.beta, 3435.0);
}

TEST_F(ScenarioFile, ACurveWithoutAFiniteResistanceOverTheRangeIsRefused) {
  // A B value typed with a prefix (3950k = 3.95 MK): exp(B(1/T - 1/T0)) overflows at -20 degC.
  const std::string beta = refusal("[sensor]\nbeta = 3950k\n");
  EXPECT_NE(beta.find("sensor.beta = 3950k (" + (dir_.path / "bad.ini").string() + ":2)"), std::string::npos) << beta;
  EXPECT_NE(beta.find("no finite resistance at -20 degC"), std::string::npos) << beta;
  // IEC 60751's Callendar-Van Dusen curve for a Pt100 is 18.52 ohm at -200 degC
  // and crosses zero near -245 degC (1 + A t + B t^2 + C (t - 100) t^3 < 0 at -260).
  const std::string rtd = refusal("[sensor]\nmodel = rtd\n[conditions]\nt_min = -260\n"
                                  "[requirement]\nwindow_min = -100\nwindow_max = 0\n");
  EXPECT_NE(rtd.find("conditions.t_min = -260"), std::string::npos) << rtd;
  EXPECT_NE(rtd.find("no positive resistance"), std::string::npos) << rtd;
  EXPECT_EQ(refusal("[sensor]\nmodel = rtd\n[conditions]\nt_min = -200\n"
                    "[requirement]\nwindow_min = -100\nwindow_max = 0\n"),
            "");
}

TEST_F(ScenarioFile, MalformedValuesAreRefusedEvenWhereTheyAreNotUsed) {
  // Calibration is off and the leakage bound is 0: a typo still stops the run.
  EXPECT_NE(refusal("[firmware]\ncalibration = none\ncalibration_at = 2O\n").find("firmware.calibration_at = 2O"),
            std::string::npos);
  EXPECT_NE(refusal("[adc]\nleakage = 0\nleakage_dist = gausian\n").find("adc.leakage_dist = gausian"),
            std::string::npos);
  EXPECT_NE(refusal("[adc]\nleakage = 0\nleakage_gap = -1n\n").find("adc.leakage_gap = -1n"), std::string::npos);
}

TEST_F(ScenarioFile, AFileWithoutATitleIsNamedByItsFileName) {
  // The built-in title describes the default circuit, not this file's.
  Scenario s;
  s.load_file(write("pt100_oven.ini", "[sensor]\nmodel = rtd\n"));
  EXPECT_EQ(build_design(s).title, "pt100_oven.ini");
  EXPECT_EQ(s.get("title").where.kind, Origin::file);
  s.set("title", "Oven", Where{Origin::command_line, "", 0, "title"});
  EXPECT_EQ(build_design(s).title, "Oven");
}

TEST_F(ScenarioFile, ResolvedValuesShowEveryKeyAsTheDesignReadsIt) {
  Scenario s;
  s.load_file(write("r.ini",
                    "[sensor]\nmodel = steinhart-hart\n"
                    "[divider]\nr_fixed = 4k7\nduty = 1\nr_fixed_tempco = 25ppm/C\n"
                    "[firmware]\nconversion = steinhart-hart\ncalibration = two-point\ncalibration_at = 0,50\n"
                    "[conditions]\nboard = 10..40\n"));
  const auto v = resolved_values(s, build_design(s));
  for (const auto& k : scenario_schema()) EXPECT_EQ(v.count(k.key), 1u) << k.key;
  EXPECT_EQ(v.at("divider.r_fixed").text, "4.7 kohm");
  EXPECT_EQ(v.at("divider.duty").text, "100 %");  // a bare ratio is a fraction
  EXPECT_EQ(v.at("divider.duty").number, 100.0);  // in the unit unit_symbol() names: %
  EXPECT_EQ(v.at("divider.r_fixed").number, 4.7e3);
  EXPECT_NEAR(*v.at("divider.r_fixed_tempco").number, 25.0, 1e-12);  // ppm/K
  EXPECT_FALSE(v.at("sensor.model").number);
  EXPECT_EQ(v.at("divider.r_fixed_tempco").text, "25 ppm/K");
  EXPECT_EQ(v.at("sensor.r25_tol").text, "1 %");
  EXPECT_EQ(v.at("sensor.dissipation").text, "1.5 mW/K");
  EXPECT_EQ(v.at("adc.bits").text, "12");
  EXPECT_EQ(v.at("sensor.model").text, "steinhart-hart");
  EXPECT_EQ(v.at("firmware.calibration_at").text, "0, 50 degC");
  EXPECT_EQ(v.at("conditions.board").text, "10 .. 40 degC");
  // The default fit goes through three points of the sensor's own
  // Steinhart-Hart curve, so it gives back the widely published 10 kOhm
  // coefficients the sensor has (common practice): A = 1.129148e-3,
  // B = 2.34125e-4, C = 8.76741e-8, to the 3x3 solve's rounding.
  constexpr double fit_relative_tolerance = 1e-9;
  EXPECT_NEAR(*v.at("firmware.a").number / 1.129148e-3, 1.0, fit_relative_tolerance) << v.at("firmware.a").text;
  EXPECT_NEAR(*v.at("firmware.b").number / 2.34125e-4, 1.0, fit_relative_tolerance) << v.at("firmware.b").text;
  EXPECT_NEAR(*v.at("firmware.c").number / 8.76741e-8, 1.0, fit_relative_tolerance) << v.at("firmware.c").text;
  EXPECT_NE(v.at("firmware.a").text.find("fitted"), std::string::npos);
  // A beta sensor's own B value stands behind firmware.beta = sensor.
  Scenario b;
  b.set("sensor.beta", "3435K", Where{Origin::command_line, "", 0, "sensor.beta"});
  const auto w = resolved_values(b, build_design(b));
  EXPECT_EQ(w.at("sensor.beta").text, "3435 K");
  EXPECT_EQ(w.at("firmware.beta").text, "3435 K (the sensor's)");
  EXPECT_EQ(w.at("firmware.beta").number, 3435.0);
  EXPECT_EQ(w.at("firmware.r25").text, "10 kohm (the sensor's)");
  EXPECT_EQ(w.at("firmware.a").text, "fit");  // not used by the beta conversion
}

TEST_F(ScenarioFile, ChecksBetweenTwoKeysNameTheOneThatWasSet) {
  // Only t_min is in the file: the refusal points at its line, not at the
  // default t_max.
  const std::string t_min = refusal("[conditions]\nt_min = 90\n");
  EXPECT_NE(t_min.find("conditions.t_min = 90 (" + (dir_.path / "bad.ini").string() + ":2)"), std::string::npos) << t_min;
  const std::string t_max = refusal("[conditions]\nt_max = -30\n");
  EXPECT_NE(t_max.find("conditions.t_max = -30"), std::string::npos) << t_max;
  const std::string both = refusal("[conditions]\nt_min = 50\nt_max = 50\n");
  EXPECT_NE(both.find("conditions.t_max = 50"), std::string::npos) << both;
  const std::string window = refusal("[conditions]\nt_min = 10\n");  // the default window starts at 0
  EXPECT_NE(window.find("conditions.t_min = 10"), std::string::npos) << window;
}

TEST_F(ScenarioFile, TableFileIsFoundBesideTheScenario) {
  fs::copy_file(source_dir / "tests/data/chain/ntc10k_sh_5K.csv", dir_.path / "probe.csv");
  Scenario s;
  s.load_file(write("t.ini", "[sensor]\nmodel = table\ntable_file = probe.csv\n"));
  const Design d = build_design(s);
  ASSERT_TRUE(d.sensor.table);
  EXPECT_EQ(d.sensor.table->t_min_kelvin(), -40 + kelvin_offset);
}

TEST_F(ScenarioFile, TableToleranceNeeds25CInTheTable) {
  // The NTC spread is defined about 25 °C (docs/model.md §1): a table without it
  // cannot carry an R25 or beta tolerance.
  std::ofstream(dir_.path / "cold.csv") << "t,r\n-40,336097\n-30,177000\n-20,97070\n-10,55330\n0,32650\n";
  const std::string message = refusal("[sensor]\nmodel = table\ntable_file = cold.csv\n"
                                      "[conditions]\nt_min = -40\nt_max = 0\n"
                                      "[requirement]\nwindow_min = -40\nwindow_max = 0\n");
  EXPECT_NE(message.find("sensor.r25_tol"), std::string::npos) << message;
  EXPECT_NE(message.find("25 degC"), std::string::npos) << message;
  EXPECT_EQ(refusal("[sensor]\nmodel = table\ntable_file = cold.csv\nr25_tol = 0\nbeta_tol = 0\n"
                    "[conditions]\nt_min = -40\nt_max = 0\n"
                    "[requirement]\nwindow_min = -40\nwindow_max = 0\n"
                    "[firmware]\nconversion = exact\n"),
            "");
}

TEST_F(ScenarioFile, FittedConversionsNeedTheCurveAtTheirFitPoints) {
  // docs/model.md §6: the default beta goes through t_min and t_max, the
  // default Steinhart–Hart through t_min, the middle and t_max; a table
  // sensor that misses them is refused rather than left unable to convert.
  const std::string table = (source_dir / "tests/data/chain/ntc10k_sh_0_50.csv").string();
  const std::string beta = refusal("[sensor]\nmodel = table\ntable_file = " + table + "\n[firmware]\nconversion = beta\n");
  EXPECT_NE(beta.find("firmware.beta"), std::string::npos) << beta;
  const std::string sh =
      refusal("[sensor]\nmodel = table\ntable_file = " + table + "\n[firmware]\nconversion = steinhart-hart\n");
  EXPECT_NE(sh.find("firmware.a"), std::string::npos) << sh;
  EXPECT_EQ(refusal("[sensor]\nmodel = table\ntable_file = " + table +
                    "\n[firmware]\nconversion = steinhart-hart\n[conditions]\nt_min = 0\nt_max = 50\n"
                    "[requirement]\nwindow_max = 50\n"),
            "");
}

// --- the shipped scenarios --------------------------------------------------

std::vector<fs::path> shipped_scenarios() {
  std::vector<fs::path> out;
  for (const auto& e : fs::directory_iterator(source_dir / "scenarios"))
    if (e.path().extension() == ".ini" && e.path().filename() != "default.ini") out.push_back(e.path());
  std::sort(out.begin(), out.end());
  return out;
}

TEST(ShippedScenarios, AtLeastFourBesidesTheDefault) { EXPECT_GE(shipped_scenarios().size(), 4u); }

TEST(ShippedScenarios, EveryOneBuildsHasATitleAndExplainsItself) {
  const std::string docs = read_text_file((source_dir / "docs/scenarios.md").string());
  for (const fs::path& p : shipped_scenarios()) {
    SCOPED_TRACE(p.filename().string());
    Scenario s;
    s.load_file(p.string());
    const Design d = build_design(s);
    EXPECT_EQ(s.get("title").where.kind, Origin::file);
    EXPECT_NE(d.title, Scenario().get("title").value);
    const std::string text = read_text_file(p.string());
    int comments = 0;
    for (std::size_t at = text.find("\n#"); at != std::string::npos; at = text.find("\n#", at + 1)) ++comments;
    EXPECT_GE(comments, 8) << "explain the design choices in comments";
    EXPECT_NE(text.find("nvented"), std::string::npos) << "say that the part values are invented";
    // Every section is written out, nothing left to the default design by accident.
    for (const char* section : {"[sensor]", "[divider]", "[supply]", "[adc]", "[firmware]", "[conditions]", "[requirement]"})
      EXPECT_NE(text.find(section), std::string::npos) << section;
    EXPECT_NE(docs.find(p.filename().string()), std::string::npos) << "docs/scenarios.md describes it";
  }
}

TEST(ShippedScenarios, DemoTableFollowsTheSteinhartHartCurveItsCommentStates) {
  // The CSV says it was generated from 1/T = A + B ln R + C (ln R)³ with the
  // A, B, C in its comment and printed to 0.1 Ω: every point within 0.05 Ω.
  const std::string path = (source_dir / "scenarios/incubator_ntc47k.csv").string();
  const std::string text = read_text_file(path);
  std::smatch m;
  ASSERT_TRUE(std::regex_search(text, m, std::regex(R"(A = ([-0-9.e+]+), B = ([-0-9.e+]+), C = ([-0-9.e+]+))")));
  const SteinhartHart sh{std::stod(m[1]), std::stod(m[2]), std::stod(m[3])};
  const RtData data = read_rt_data(path);
  ASSERT_GE(data.points.size(), 10u);
  constexpr double printed_digits = 0.05 + 1e-6;  // Ω, half the last printed digit (coefficients to 11 digits)
  for (const auto& p : data.points)
    EXPECT_NEAR(p.r_ohm, std::exp(ln_resistance(sh, p.t_celsius + kelvin_offset)), printed_digits) << p.t_celsius;
}

// Issue 18: a key that the design's other choices make irrelevant is a
// note, not a refusal (the value is not used); a typo, an unknown key and
// an out-of-range value stay refusals (tests/bad_input_test.cpp).
TEST_F(ScenarioFile, AKeyTheDesignMakesIrrelevantIsANoteNotARefusal) {
  const std::string path = write("ratio.ini",
                                 "[supply]\nratiometric = true\nv_reference_tol = 1%\nv_excitation_tempco = 50ppm\n"
                                 "v_reference_drift = 0.1%\nr_drive_tol = 20%\n[divider]\nr_parallel_tol = 1%\n");
  Scenario s;
  s.load_file(path);
  const Design d = build_design(s);
  ASSERT_EQ(d.notes.size(), 5u);
  const std::vector<std::pair<std::string, std::string>> expected{
      {":4: supply.v_excitation_tempco = 50ppm", "ratiometric"}, {":3: supply.v_reference_tol = 1%", "ratiometric"},
      {":6: supply.r_drive_tol = 20%", "supply.r_drive"}, {":8: divider.r_parallel_tol = 1%", "no parallel resistor"},
      {":5: supply.v_reference_drift = 0.1%", "ratiometric"}};
  for (const auto& [where, why] : expected) {
    const std::string& key = where;  // clang 14 cannot capture a structured binding in a lambda
    const auto n = std::find_if(d.notes.begin(), d.notes.end(), [&](const std::string& x) { return x.find(key) != std::string::npos; });
    ASSERT_NE(n, d.notes.end()) << where;
    EXPECT_NE(n->find(why), std::string::npos) << *n;
    EXPECT_NE(n->find("is not used"), std::string::npos) << *n;
  }
  // Not used: no supply, drive or parallel-resistor input is active.
  for (const auto& in : d.inputs)
    for (const char* name : {"v_reference", "v_excitation_tempco", "r_drive", "r_parallel"})
      EXPECT_NE(info(in.source).name, name);
  // `check` says so in its text and its JSON; an out-of-range value is still refused.
  const auto out = testing::run_cli("check " + testing::shell_quote(path));
  ASSERT_EQ(out.status, 0) << out.err;
  EXPECT_NE(out.out.find("Notes: keys set that this design's choices make irrelevant"), std::string::npos) << out.out;
  EXPECT_EQ(testing::cli_json("check " + testing::shell_quote(path))["notes"].size(), 5u);
  EXPECT_EQ(testing::run_cli("check " + testing::shell_quote(path) + " --supply.v_reference_tol=200%").status, 2);
}

TEST(CheckText, ShowsTheKeysOfThisDesignAndThoseSetAndEveryKeyWithAll) {
  // The default design is a beta NTC on a ratiometric supply without a
  // sampling capacitor: no RTD, Steinhart-Hart or absolute-supply key by
  // default; one set on the command line is shown; --all shows them all.
  const auto plain = testing::run_cli("check");
  ASSERT_EQ(plain.status, 0) << plain.err;
  for (const char* absent : {"\ncvd_a ", "\nv_reference_tol ", "\nt_acq ", "\ntable_file "})
    EXPECT_EQ(plain.out.find(absent), std::string::npos) << absent;
  for (const char* present : {"[sensor]\n", "\nr25 ", "\nbeta_tol ", "[montecarlo]\n", "The active error sources"})
    EXPECT_NE(plain.out.find(present), std::string::npos) << present;
  EXPECT_NE(testing::run_cli("check --sensor.cvd_a=3.9e-3").out.find("\ncvd_a "), std::string::npos);
  const auto all = testing::run_cli("check --all");
  for (const auto& k : scenario_schema()) {
    if (k.key == "title" || is_override(k.key)) continue;
    EXPECT_NE(all.out.find("\n" + k.key.substr(k.key.find('.') + 1) + " "), std::string::npos) << k.key;
  }
}

}  // namespace
}  // namespace thermargin
