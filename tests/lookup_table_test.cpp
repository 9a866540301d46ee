// Tests of thermargin/tools/lookup_table.hpp and the `thermargin table` command:
// the emitted C header compiled by the system C compiler and run, the chain's
// `table` conversion against the emitted integers, the interpolation error
// against an independent NumPy computation of the beta inversion
// (/usr/bin/python3, Debian's python3-numpy), the smallest P for an error
// limit, and the refusal of bad settings. The scenarios are the project's
// invented demo designs.
#include "thermargin/tools/lookup_table.hpp"

#include <gtest/gtest.h>

#include <algorithm>
#include <cmath>
#include <cstdio>
#include <filesystem>
#include <fstream>
#include <nlohmann/json.hpp>
#include <sstream>
#include <string>
#include <utility>
#include <vector>

#include "cli_run.hpp"
#include "engine_fixture.hpp"
#include "thermargin/core/caution.hpp"
#include "thermargin/chain/chain.hpp"
#include "thermargin/chain/firmware.hpp"
#include "thermargin/input/scenario.hpp"

namespace thermargin {
namespace {

namespace fs = std::filesystem;
using testing::cli_json;
using testing::CliOutcome;
using testing::design_with;
using testing::Overrides;
using testing::run_cli;
using testing::run_shell;
using testing::shell_quote;

// The same linear interpolation evaluated by two programs (C here, C++ in the
// library, NumPy's interp) in double precision: they agree to about 1e-13 K
// for temperatures of order 100 °C; 1e-9 K is far below any storage unit.
constexpr double same_double_k = 1e-9;
// The header's integer interpolation rounds to the nearest stored unit: it
// may differ from the exact interpolation by half a unit (plus the double's
// own rounding, covered by same_double_k).
constexpr double half_unit = 0.5;
// exact_temperature(exact_code(t)) == t: the two directions are closed forms
// (or a 1e-12 K root find for the RTD), so 1e-9 K is generous.
constexpr double round_trip_k = 1e-9;

// A scratch directory for this test program, removed when it ends.
const fs::path& table_scratch() {
  static const testing::ScratchDir dir;
  return dir.path;
}

// A shipped scenario's path, "" for the built-in default; and the same as
// the command's argument.
std::string scenario_file(const std::string& name) { return name.empty() ? "" : testing::scenario_path(name); }
std::string scenario_arg(const std::string& name) { return name.empty() ? "" : shell_quote(testing::scenario_path(name)); }

// `thermargin table SCENARIO ARGS --format json`, and the design that the
// same settings (`overrides`) build in process.
struct TableRun {
  nlohmann::json json;
  Design design;
};
TableRun table_run(const std::string& scenario, const std::string& args, const Overrides& overrides) {
  return {cli_json("table " + scenario_arg(scenario) + " " + args), design_with(overrides, scenario_file(scenario))};
}

// Linear interpolation over the JSON rows, written here independently of
// LookupTable::temperature: the value a firmware computes from the emitted table.
std::optional<double> interpolate_rows(const nlohmann::json& rows, double code) {
  for (std::size_t k = 0; k + 1 < rows.size(); ++k) {
    const double c0 = rows[k]["code"].get<double>(), c1 = rows[k + 1]["code"].get<double>();
    if (code >= c0 && code <= c1) {
      const double t0 = rows[k]["temperature"].get<double>(), t1 = rows[k + 1]["temperature"].get<double>();
      return t0 + (code - c0) / (c1 - c0) * (t1 - t0);
    }
  }
  return std::nullopt;
}

// ---------------------------------------------------------------------------
// The chain's `table` conversion is the emitted table.

struct ChainCase {
  std::string scenario;  // empty: the built-in default
  std::string args;      // the same overrides on the command line
  Overrides overrides;
};
void PrintTo(const ChainCase& c, std::ostream* os) { *os << (c.scenario.empty() ? std::string("default") : c.scenario); }

class TableUsedByTheChain : public ::testing::TestWithParam<ChainCase> {};

TEST_P(TableUsedByTheChain, ConvertsEveryCodeAsTheEmittedValuesInterpolate) {
  const ChainCase& c = GetParam();
  const auto [j, d] = table_run(c.scenario, c.args, c.overrides);
  const Chain chain(d);
  ASSERT_EQ(d.firmware.conversion, Conversion::table);
  EXPECT_TRUE(j["used_by_chain"].get<bool>());

  const LookupTable& t = chain.firmware().table();
  const auto& rows = j["rows"];
  ASSERT_EQ(rows.size(), t.size());
  EXPECT_EQ(j["spacing"], t.spacing() == TableSpacing::code ? "code" : "temperature");
  for (std::size_t k = 0; k < t.size(); ++k) {
    EXPECT_EQ(rows[k]["code"].get<std::int64_t>(), t.code(k)) << "point " << k;
    EXPECT_EQ(rows[k]["stored"].get<std::int64_t>(), t.stored[k]) << "point " << k;
  }

  const auto first = rows.front()["code"].get<std::int64_t>(), last = rows.back()["code"].get<std::int64_t>();
  for (std::int64_t code = first; code <= last; ++code) {
    const auto want = interpolate_rows(rows, static_cast<double>(code));
    const auto got = chain.convert(static_cast<double>(code), false);
    ASSERT_TRUE(want && got) << "code " << code;
    ASSERT_NEAR(*got, *want, same_double_k) << "code " << code;
  }
  // Outside the emitted span the chain has no temperature, as the firmware has none.
  EXPECT_FALSE(chain.convert(static_cast<double>(first - 1), false));
  EXPECT_FALSE(chain.convert(static_cast<double>(last + 1), false));
}

INSTANTIATE_TEST_SUITE_P(
    Scenarios, TableUsedByTheChain,
    ::testing::Values(ChainCase{"", "--firmware.conversion=table", {{"firmware.conversion", "table"}}},
                      ChainCase{"battery_charge_guard.ini", "", {}},
                      ChainCase{"", "--firmware.conversion=table --firmware.table_points=17 --firmware.table_unit=0.1",
                                {{"firmware.conversion", "table"}, {"firmware.table_points", "17"}, {"firmware.table_unit", "0.1"}}},
                      // Spaced in temperature: the firmware searches the listed codes.
                      ChainCase{"incubator.ini", "--firmware.conversion=table --firmware.table_spacing=temperature",
                                {{"firmware.conversion", "table"}, {"firmware.table_spacing", "temperature"}}},
                      ChainCase{"", "--firmware.conversion=table --firmware.table_spacing=temperature --firmware.table_points=12",
                                {{"firmware.conversion", "table"}, {"firmware.table_spacing", "temperature"},
                                 {"firmware.table_points", "12"}}}));

TEST(TableUsedByTheChain, OnlyWhenTheChainsTableIsTheSame) {
  // The scenario converts with 33 points spaced in code: another count, unit
  // or spacing is a different table, which the budget does not analyse.
  const std::string base = "table --firmware.conversion=table ";
  EXPECT_TRUE(cli_json(base)["used_by_chain"].get<bool>());
  EXPECT_FALSE(cli_json(base + "--points 20")["used_by_chain"].get<bool>());
  EXPECT_FALSE(cli_json(base + "--unit 0.1")["used_by_chain"].get<bool>());
  EXPECT_FALSE(cli_json(base + "--spacing temperature")["used_by_chain"].get<bool>());
  EXPECT_TRUE(cli_json(base + "--firmware.table_spacing=temperature")["used_by_chain"].get<bool>());
  EXPECT_FALSE(cli_json("table")["used_by_chain"].get<bool>());  // the scenario converts exactly
  const CliOutcome r = run_cli(base + "--spacing temperature");
  EXPECT_NE(r.out.find("firmware.table_spacing = temperature"), std::string::npos) << r.out;
}

// ---------------------------------------------------------------------------
// The C header compiles and reproduces the tool's temperatures.

// Includes the header, and for every code of the table's span prints the
// header's integer interpolation and its own one in double from the arrays.
constexpr const char* c_program = R"C(
#include <stdio.h>
#include "probe_lut.h"

int main(void)
{
    uint32_t c;
    int32_t s = 0;
    unsigned long bytes = (unsigned long)sizeof probe_lut_stored;
#if !PROBE_LUT_SPACING_CODE
    bytes += (unsigned long)sizeof probe_lut_codes;
#endif
    printf("%lu %d %d\n", bytes, probe_lut_lookup(PROBE_LUT_FIRST_CODE - 1u, &s), probe_lut_lookup(PROBE_LUT_LAST_CODE + 1u, &s));
    for (c = PROBE_LUT_FIRST_CODE; c <= PROBE_LUT_LAST_CODE; ++c) {
        uint32_t k, x0, x1;
        double t;
        int rc = probe_lut_lookup(c, &s);
#if PROBE_LUT_SPACING_CODE
        k = (c - PROBE_LUT_FIRST_CODE) / PROBE_LUT_STEP;
        if (k > PROBE_LUT_POINTS - 2u) k = PROBE_LUT_POINTS - 2u;
        x0 = PROBE_LUT_FIRST_CODE + k * PROBE_LUT_STEP;
        x1 = x0 + PROBE_LUT_STEP;
#else
        k = 0u;
        while (k + 2u < PROBE_LUT_POINTS && probe_lut_codes[k + 1u] <= c) ++k;
        x0 = probe_lut_codes[k];
        x1 = probe_lut_codes[k + 1u];
#endif
        t = ((double)probe_lut_stored[k] + (double)(c - x0) / (double)(x1 - x0) *
             ((double)probe_lut_stored[k + 1u] - (double)probe_lut_stored[k])) * PROBE_LUT_UNIT_K;
        printf("%lu %d %ld %.17g\n", (unsigned long)c, rc, (long)s, t);
    }
    return 0;
}
)C";

struct HeaderCase {
  std::string name;
  std::string scenario;
  std::string args;
  Overrides overrides;
  TableSettings settings;  // what the args ask for, for the library's side
};
void PrintTo(const HeaderCase& c, std::ostream* os) { *os << c.name; }

class TableCHeader : public ::testing::TestWithParam<HeaderCase> {};

TEST_P(TableCHeader, CompilesAndReproducesTheToolsTemperaturesAtEveryCode) {
  const HeaderCase& c = GetParam();
  const fs::path dir = table_scratch() / c.name;
  fs::create_directories(dir);
  const CliOutcome emitted = run_cli("table " + scenario_arg(c.scenario) + " " + c.args +
                                     " --emit c --prefix probe_lut --output " + shell_quote((dir / "probe_lut.h").string()));
  ASSERT_EQ(emitted.status, 0) << emitted.err;
  const std::string header = testing::slurp(dir / "probe_lut.h");
  EXPECT_NE(header.find(std::string(caution.substr(0, 60))), std::string::npos) << "the caution is in the comment block";
  // The comment opens with the scenario's title, a comment end in it defused.
  std::string title = design_with(c.overrides, scenario_file(c.scenario)).title;
  for (std::size_t i; (i = title.find("*/")) != std::string::npos;) title.replace(i, 2, "* /");
  EXPECT_TRUE(header.starts_with("/* " + title + "\n")) << header.substr(0, 200);

  std::ofstream(dir / "main.c") << c_program;
  // Strict flags: firmware projects build with warnings as errors.
  const CliOutcome built = run_shell("cc -std=c99 -Wall -Wextra -Wconversion -pedantic -Werror -I " + shell_quote(dir.string()) +
                                     " -o " + shell_quote((dir / "probe").string()) + " " + shell_quote((dir / "main.c").string()));
  ASSERT_EQ(built.status, 0) << built.err << "\n" << header;
  const CliOutcome ran = run_shell(shell_quote((dir / "probe").string()));
  ASSERT_EQ(ran.status, 0) << ran.err;

  // The tool's temperatures: the chain's conversion when it uses the table,
  // the library's table otherwise.
  const Design d = design_with(c.overrides, scenario_file(c.scenario));
  const Chain chain(d);
  const TableResult tool = make_table(d, c.settings);
  const double unit = tool.table.unit;

  std::istringstream in(ran.out);
  unsigned long bytes = 0;
  int below = 0, above = 0;
  in >> bytes >> below >> above;
  EXPECT_EQ(bytes, tool.bytes()) << "the size the tool reports is what the compiler allocates";
  EXPECT_EQ(below, -1);
  EXPECT_EQ(above, 1);
  std::int64_t code = 0, expected_code = tool.table.code(0);
  int rc = 0;
  long stored = 0;
  double t = 0.0;
  std::size_t lines = 0;
  while (in >> code >> rc >> stored >> t) {
    ASSERT_EQ(code, expected_code++);
    const auto want = tool.used_by_chain ? chain.convert(static_cast<double>(code), false)
                                         : tool.table.temperature(static_cast<double>(code));
    ASSERT_TRUE(want.has_value()) << "code " << code;
    ASSERT_EQ(rc, 0) << "code " << code;
    ASSERT_NEAR(t, *want, same_double_k) << "code " << code;
    ASSERT_NEAR(static_cast<double>(stored) * unit, *want, half_unit * unit + same_double_k) << "code " << code;
    ++lines;
  }
  EXPECT_EQ(lines, static_cast<std::size_t>(tool.table.last_code() - tool.table.code(0) + 1));
}

TableSettings table_settings(int points, double unit, TableSpacing spacing, StorageType type) {
  TableSettings s;
  s.points = points;
  s.unit = unit;
  s.spacing = spacing;
  s.type = type;
  return s;
}

INSTANTIATE_TEST_SUITE_P(
    Designs, TableCHeader,
    ::testing::Values(
        HeaderCase{"default_code_int16", "", "--firmware.conversion=table",
                   {{"firmware.conversion", "table"}},
                   table_settings(33, 0.01, TableSpacing::code, StorageType::int16)},
        HeaderCase{"guard_temperature_int32", "battery_charge_guard.ini",
                   "--spacing temperature --type int32 --unit 0.1 --points 20 --title='Guard */ with a comment end'",
                   {{"title", "Guard */ with a comment end"}},
                   table_settings(20, 0.1, TableSpacing::temperature, StorageType::int32)},
        HeaderCase{"hot_plate_rtd_code_int32", "hot_plate_pt1000.ini", "--type int32 --points 40",
                   {},
                   table_settings(40, 0.01, TableSpacing::code, StorageType::int32)},
        // The scenario's firmware converts with this table spaced in temperature:
        // the header's search is compared with the chain's conversion.
        HeaderCase{"incubator_temperature_chain", "incubator.ini",
                   "--firmware.conversion=table --firmware.table_spacing=temperature",
                   {{"firmware.conversion", "table"}, {"firmware.table_spacing", "temperature"}},
                   table_settings(33, 0.01, TableSpacing::temperature, StorageType::int16)}),
    [](const auto& info) { return info.param.name; });

// ---------------------------------------------------------------------------
// The error against an independent computation.

// The model's contract (docs/model.md §1, §3, §6) written out in NumPy: the beta
// curve's codes at t_min and t_max, the firmware's exact inversion at every
// code between them, numpy.interp over the emitted rows.
constexpr const char* numpy_error = R"PY(
import json, math, sys
import numpy as np
p = json.load(open(sys.argv[1]))
T0 = 298.15
low = p['placement'] == 'low'
def code_of(t):
    R = p['r25'] * math.exp(p['beta'] * (1 / (t + 273.15) - 1 / T0)) + p['lead']
    ratio = R / (p['rf'] + R) if low else p['rf'] / (p['rf'] + R)
    return ratio * p['v_exc'] / p['v_ref'] * 2 ** p['bits']
lo, hi = sorted([code_of(p['t_min']), code_of(p['t_max'])])
codes = np.arange(math.ceil(lo), math.floor(hi) + 1, dtype=float)
rho = codes / p['fs'] * p['v_ref'] / p['v_exc']
rb = p['rf'] * rho / (1 - rho) if low else p['rf'] * (1 - rho) / rho
t_exact = 1 / (1 / T0 + np.log((rb - p['lead_comp']) / p['r25']) / p['beta']) - 273.15
out = []
for rows in p['tables']:
    xc = np.array([r['code'] for r in rows], dtype=float)
    yt = np.array([r['stored'] for r in rows], dtype=float) * p['unit']
    inside = (codes >= xc[0]) & (codes <= xc[-1])
    e = np.interp(codes[inside], xc, yt) - t_exact[inside]
    i = int(np.argmax(np.abs(e)))
    out.append({'max': float(abs(e[i])), 'at_code': int(codes[inside][i]), 'rms': float(np.sqrt(np.mean(e ** 2))),
                'uncovered': int((~inside).sum()), 'first': int(codes[0]), 'last': int(codes[-1])})
print(json.dumps(out))
)PY";

nlohmann::json numpy_errors(const Design& d, const std::vector<nlohmann::json>& tables) {
  const fs::path dir = table_scratch() / "numpy";
  fs::create_directories(dir);
  nlohmann::json p{{"placement", d.divider.placement == Placement::low ? "low" : "high"},
                   {"r25", d.sensor.r25},
                   {"beta", d.sensor.beta},
                   {"rf", d.divider.r_fixed},
                   {"lead", d.sensor.lead_resistance},
                   {"lead_comp", d.firmware.lead_compensation},
                   {"v_exc", d.supply.ratiometric ? 1.0 : d.supply.v_excitation},
                   {"v_ref", d.supply.ratiometric ? 1.0 : d.supply.v_reference},
                   {"bits", d.adc.bits},
                   {"fs", d.firmware.full_scale == FullScale::pow2 ? d.adc_span() : d.adc_span() - 1.0},
                   {"t_min", d.conditions.t_min},
                   {"t_max", d.conditions.t_max},
                   {"unit", tables.front()["unit"]},
                   {"tables", nlohmann::json::array()}};
  for (const auto& t : tables) p["tables"].push_back(t["rows"]);
  std::ofstream(dir / "input.json") << p.dump();
  std::ofstream(dir / "error.py") << numpy_error;
  const CliOutcome r = run_shell(std::string(THERMARGIN_PYTHON) + " " + shell_quote((dir / "error.py").string()) + " " +
                                 shell_quote((dir / "input.json").string()));
  if (r.status != 0) throw std::runtime_error("NumPy second opinion failed: " + r.err);
  return nlohmann::json::parse(r.out);
}

struct ErrorCase {
  std::string name;
  std::string scenario;
  std::string args;
  Overrides overrides;
};
void PrintTo(const ErrorCase& c, std::ostream* os) { *os << c.name; }

class TableError : public ::testing::TestWithParam<ErrorCase> {};

TEST_P(TableError, AgreesWithNumPyInterpolationOfTheExactBetaInversion) {
  const ErrorCase& c = GetParam();
  const auto [j, d] = table_run(c.scenario, c.args, c.overrides);
  ASSERT_EQ(d.sensor.kind, SensorKind::beta);
  const nlohmann::json py = numpy_errors(d, {j}).at(0);
  EXPECT_EQ(j["range_codes"]["first"].get<std::int64_t>(), py["first"].get<std::int64_t>());
  EXPECT_EQ(j["range_codes"]["last"].get<std::int64_t>(), py["last"].get<std::int64_t>());
  EXPECT_EQ(j["interpolation_error"]["uncovered"].get<int>(), py["uncovered"].get<int>());
  EXPECT_NEAR(j["max_interpolation_error"].get<double>(), py["max"].get<double>(), same_double_k);
  EXPECT_EQ(j["max_interpolation_error_at_code"].get<std::int64_t>(), py["at_code"].get<std::int64_t>());
  EXPECT_NEAR(j["rms_interpolation_error"].get<double>(), py["rms"].get<double>(), same_double_k);
  // A check that could not fail would compare zeros: these tables err by millikelvin or more.
  EXPECT_GT(py["max"].get<double>(), 0.001);
}

INSTANTIATE_TEST_SUITE_P(
    Designs, TableError,
    ::testing::Values(ErrorCase{"default_code", "", "", {}},
                      ErrorCase{"default_temperature", "", "--spacing temperature --points 25", {}},
                      ErrorCase{"default_pow2_minus_1", "", "--firmware.full_scale=pow2-minus-1 --points 12",
                                {{"firmware.full_scale", "pow2-minus-1"}}},
                      ErrorCase{"guard_code_high_side_absolute", "battery_charge_guard.ini", "--points 9 --unit 0.1", {}},
                      ErrorCase{"guard_temperature", "battery_charge_guard.ini", "--spacing temperature --points 40", {}}),
    [](const auto& info) { return info.param.name; });

// ---------------------------------------------------------------------------
// --max-error chooses the smallest P.

struct LimitCase {
  std::string name;
  std::string scenario;
  std::string args;
  double limit;
};
void PrintTo(const LimitCase& c, std::ostream* os) { *os << c.name; }

class TableMaxError : public ::testing::TestWithParam<LimitCase> {};

TEST_P(TableMaxError, ReturnsTheSmallestPointCountAndOneFewerFails) {
  const LimitCase& c = GetParam();
  const std::string base = "table " + scenario_arg(c.scenario) + " " + c.args;
  char limit[32];
  std::snprintf(limit, sizeof limit, "%g", c.limit);
  const nlohmann::json chosen = cli_json(base + " --max-error " + limit);
  const int p = chosen["points"].get<int>();
  ASSERT_GT(p, 2) << "the limit should need more than two points to be a test";
  EXPECT_LE(chosen["max_interpolation_error"].get<double>(), c.limit);

  // The same P asked for directly is the same table; P − 1 misses the limit.
  const nlohmann::json at_p = cli_json(base + " --points " + std::to_string(p));
  const nlohmann::json fewer = cli_json(base + " --points " + std::to_string(p - 1));
  EXPECT_EQ(at_p["rows"], chosen["rows"]);
  EXPECT_LE(at_p["max_interpolation_error"].get<double>(), c.limit);
  EXPECT_GT(fewer["max_interpolation_error"].get<double>(), c.limit);
  EXPECT_EQ(chosen["one_fewer"]["max_abs"].get<double>(), fewer["max_interpolation_error"].get<double>());

  // And NumPy agrees on both sides of the limit.
  const Design d = design_with({}, scenario_file(c.scenario));
  const nlohmann::json py = numpy_errors(d, {at_p, fewer});
  EXPECT_LE(py[0]["max"].get<double>(), c.limit + same_double_k);
  EXPECT_GT(py[1]["max"].get<double>(), c.limit - same_double_k);
}

INSTANTIATE_TEST_SUITE_P(Limits, TableMaxError,
                         ::testing::Values(LimitCase{"default_code_50mK", "", "", 0.05},
                                           LimitCase{"default_code_20mK", "", "", 0.02},
                                           LimitCase{"default_temperature_50mK", "", "--spacing temperature", 0.05},
                                           LimitCase{"guard_code_10mK", "battery_charge_guard.ini", "", 0.01}),
                         [](const auto& info) { return info.param.name; });

TEST(TableMaxError, ALimitBelowTheStorageRoundingIsRefused) {
  const fs::path out = table_scratch() / "unreachable.h";
  const CliOutcome r = run_cli("table --max-error 0.001 --emit c --output " + shell_quote(out.string()));
  EXPECT_EQ(r.status, 2);
  EXPECT_NE(r.err.find("table.max_error = 0.001 K (command line): cannot be met"), std::string::npos) << r.err;
  EXPECT_FALSE(fs::exists(out));
}

// ---------------------------------------------------------------------------
// The library's pieces.

TEST(TableSpacing, TemperaturePointsAreTheCodesNearestEquallySpacedTemperatures) {
  const Design d = design_with({});
  const Firmware fw(d);
  const LookupTable t = build_lookup_table(fw, 30, 0.01, TableSpacing::temperature);
  ASSERT_EQ(t.size(), 30u);
  const double t0 = *fw.exact_temperature(static_cast<double>(t.code(0)));
  const double t1 = *fw.exact_temperature(static_cast<double>(t.last_code()));
  for (std::size_t k = 0; k < t.size(); ++k) {
    if (k > 0) ASSERT_GT(t.code(k), t.code(k - 1));
    const double wanted = t0 + (t1 - t0) * static_cast<double>(k) / 29.0;
    const double c = static_cast<double>(t.code(k));
    // Nearest code: the wanted temperature lies within half a code of it.
    const double lsb = std::max(std::abs(*fw.exact_temperature(c + 1.0) - *fw.exact_temperature(c)),
                                std::abs(*fw.exact_temperature(c) - *fw.exact_temperature(c - 1.0)));
    EXPECT_LE(std::abs(*fw.exact_temperature(c) - wanted), 0.5 * lsb + round_trip_k) << "point " << k;
    EXPECT_EQ(t.stored[k], std::llround(*fw.exact_temperature(c) / 0.01));
  }
}

TEST(TableSpacing, ExactCodeInvertsTheExactConversionForEverySensorModel) {
  const std::vector<std::string> files{"", "fermentation_probe.ini", "hot_plate_pt1000.ini", "incubator.ini",
                                       "battery_charge_guard.ini", "cold_store_logger.ini"};
  for (const auto& f : files) {
    const Design d = design_with({}, scenario_file(f));
    const Firmware fw(d);
    for (double t = d.conditions.t_min; t <= d.conditions.t_max; t += 0.5 * (d.conditions.t_max - d.conditions.t_min) / 7) {
      const auto code = fw.exact_code(t);
      ASSERT_TRUE(code) << f << " at " << t;
      const auto back = fw.exact_temperature(*code);
      ASSERT_TRUE(back) << f << " at " << t;
      EXPECT_NEAR(*back, t, round_trip_k) << f;
    }
  }
}

TEST(TableSize, CountsTheStoredValuesAndTheCodesWhenSpacedInTemperature) {
  const Design d = design_with({});
  TableSettings s = table_settings(21, 0.01, TableSpacing::code, StorageType::int16);
  EXPECT_EQ(make_table(d, s).bytes(), 21u * sizeof(std::int16_t));
  s.type = StorageType::int32;
  EXPECT_EQ(make_table(d, s).bytes(), 21u * sizeof(std::int32_t));
  s.spacing = TableSpacing::temperature;
  EXPECT_EQ(make_table(d, s).bytes(), 21u * (sizeof(std::int32_t) + sizeof(std::uint16_t)));  // 12-bit codes
}

// ---------------------------------------------------------------------------
// Outputs.

TEST(TableOutput, EveryFormatCarriesTheCautionAndTheSameRows) {
  const nlohmann::json j = cli_json("table --points 9");
  EXPECT_EQ(j["command"], "table");
  EXPECT_EQ(j["caution"].get<std::string>(), std::string(caution));
  for (const std::string args : {"table --points 9", "table --points 9 --format csv", "table --points 9 --emit csv",
                                 "table --points 9 --emit c"}) {
    const CliOutcome r = run_cli(args);
    ASSERT_EQ(r.status, 0) << args << ": " << r.err;
    EXPECT_NE(r.out.find(std::string(caution.substr(0, 40))), std::string::npos) << args;
  }
  // The emitted CSV, read as the data files of this project are (`#` comments),
  // holds the JSON rows.
  const CliOutcome csv = run_cli("table --points 9 --emit csv");
  std::istringstream in(csv.out);
  std::string line;
  std::vector<std::string> data;
  while (std::getline(in, line))
    if (!line.starts_with("#")) data.push_back(line);
  ASSERT_EQ(data.size(), 1 + j["rows"].size());
  EXPECT_EQ(data[0], "code,temperature_degC,stored");
  for (std::size_t k = 0; k < j["rows"].size(); ++k) {
    std::istringstream row(data[k + 1]);
    std::string code, temp, stored;
    std::getline(row, code, ',');
    std::getline(row, temp, ',');
    std::getline(row, stored, ',');
    EXPECT_EQ(std::stoll(code), j["rows"][k]["code"].get<std::int64_t>());
    EXPECT_EQ(std::stoll(stored), j["rows"][k]["stored"].get<std::int64_t>());
    EXPECT_NEAR(std::stod(temp), j["rows"][k]["temperature"].get<double>(), same_double_k);
  }
}

// ---------------------------------------------------------------------------
// Bad input: one line naming the setting, exit status 2, no output file.

// The arguments after `thermargin table`.
using TableBadCase = testing::RefusalCase;

class TableBadInput : public ::testing::TestWithParam<TableBadCase> {};

TEST_P(TableBadInput, IsOneLineWithStatusTwoAndLeavesNoFile) {
  const TableBadCase& c = GetParam();
  const fs::path dir = table_scratch() / ("bad_" + c.name);
  fs::create_directories(dir);
  const fs::path out = dir / "lut.h";
  const CliOutcome r = run_cli("table " + c.args + " --output " + shell_quote(out.string()));
  testing::expect_refused_in_one_line(r, c.message, dir);
}

INSTANTIATE_TEST_SUITE_P(
    Settings, TableBadInput,
    ::testing::Values(
        // 96 °C at the table's first code is 96020 thousandths: beyond int16's 32767.
        TableBadCase{"int16_overflow", "--unit 0.001 --emit c", "table.type = int16 (default): the point at code"},
        TableBadCase{"int16_overflow_named", "--unit 0.001 --type int16 --emit csv", "outside int16's -32768..32767"},
        TableBadCase{"one_point", "--points 1 --emit c", "table.points = 1 (command line)"},
        TableBadCase{"more_points_than_codes", "--points 60000 --emit c", "table.points = 60000 (command line): at most"},
        TableBadCase{"unknown_emit", "--emit rust", "table.emit = rust (command line): must be one of: c | csv"},
        TableBadCase{"emit_and_format", "--emit c --format json", "table.emit = c (command line)"},
        TableBadCase{"unknown_type", "--type int8 --emit c", "table.type = int8 (command line)"},
        TableBadCase{"unknown_spacing", "--spacing log --emit c", "table.spacing = log (command line)"},
        TableBadCase{"unit_too_fine", "--unit 1e-6 --emit c", "table.unit = 1e-06 (command line)"},
        TableBadCase{"bad_prefix", "--prefix 9lives --emit c", "table.prefix = 9lives (command line)"},
        TableBadCase{"scenario_points", "--firmware.table_points=1 --emit c", "firmware.table_points = 1 (command line)"}),
    [](const auto& info) { return info.param.name; });

TEST(TableCli, SaysWhatTheAdcCannotShowWithTheTemperaturesLost) {
  // 10k/10k beta NTC (R25 = 10 kOhm, B = 3950 K) from 3.3 V into an absolute
  // 2.5 V reference: code 4095 of 4096 (firmware.full_scale = pow2) is the
  // node at 2.5 V·4095/4096, so R = 10k·x/(1 − x) with x = 2.5/3.3·4095/4096
  // (Ohm's law) and T = 1/(1/298.15 + ln(R/R25)/B) (IEC 60539-1's beta
  // equation). Below that temperature the reading is past the top rail.
  const std::string args = "table --conditions.t_min=-20 --supply.ratiometric=false --supply.v_reference=2.5";
  const auto j = testing::cli_json(args);
  const double x = 2.5 / 3.3 * 4095.0 / 4096.0, r = 10e3 * x / (1.0 - x);
  const double rail = 1.0 / (1.0 / 298.15 + std::log(r / 10e3) / 3950.0) - 273.15;
  ASSERT_EQ(j["lost_to_saturation"].size(), 1u);
  const auto& lost = j["lost_to_saturation"][0];
  EXPECT_EQ(lost["rail"], "top");
  EXPECT_DOUBLE_EQ(lost["from"].get<double>(), -20.0);
  EXPECT_NEAR(lost["to"].get<double>(), rail, 1e-6);  // the exact conversion, solved to 1e-9 or better
  // A point of the widened table past code 4095 is named.
  ASSERT_FALSE(j["points_beyond_adc"].empty());
  for (const auto& k : j["points_beyond_adc"]) EXPECT_GT(j["rows"][k.get<std::size_t>()]["code"].get<long long>(), 4095);
  const std::string text = testing::cli_output(args);
  EXPECT_NE(text.find("The range is cut short by saturation: from -20.00 to "), std::string::npos) << text;
  EXPECT_NE(text.find("lie beyond the ADC's codes 0..4095"), std::string::npos) << text;
  // A design read wholly inside the ADC's range says neither.
  const auto plain = testing::cli_json("table");
  EXPECT_FALSE(plain.contains("lost_to_saturation"));
  EXPECT_FALSE(plain.contains("points_beyond_adc"));
}

}  // namespace
}  // namespace thermargin
