// The catalogue of bad input (docs/refusals.md, DEVELOPERS.md
// "Three kinds of failure"): every way a user can hand thermargin something
// it cannot use — a number, a scenario key or section, a combination of
// keys, a file, an R–T table, a fit data file, a grade catalogue, an option
// of any command — is refused before any work with
//
//   - exit status 2,
//   - exactly one line on stderr, "thermargin: ...", naming the file and
//     line and the key (or the column, or the option) and what would be
//     accepted (each case lists the pieces its line must hold),
//   - nothing on stdout, and no output file left behind (every case runs
//     with --output into an empty directory; only the case's own input
//     files may be there afterwards).
//
// The table is data: one row per case. The test prints how many cases ran,
// passed and failed; none is skipped: root reads through a file's
// permissions, so under root the case of an unreadable file runs the
// program as an unprivileged user (cli_run.hpp, unprivileged()). Crashes the
// fuzz targets found (fuzz/) are kept here as cases too.
#include <sys/stat.h>
#include <unistd.h>

#include <cmath>
#include <cstdio>
#include <cstdlib>
#include <filesystem>
#include <fstream>
#include <iostream>
#include <set>
#include <sstream>
#include <string>
#include <vector>

#include <gtest/gtest.h>

#include "cli_run.hpp"

namespace thermargin {
namespace {

namespace fs = std::filesystem;
using namespace std::string_literals;

// An input file a case puts beside the command before it runs.
struct Input {
  enum Kind { text, directory, unreadable } kind = text;
  std::string name;
  std::string content;
};
Input file(std::string name, std::string content) { return {Input::text, std::move(name), std::move(content)}; }
Input directory(std::string name) { return {Input::directory, std::move(name), {}}; }
Input unreadable(std::string name, std::string content) { return {Input::unreadable, std::move(name), std::move(content)}; }

struct Case {
  std::string what;                 // the bad input, in words
  std::string args;                 // after `thermargin`; --output is added unless given
  std::vector<Input> inputs;
  std::vector<std::string> names;   // what the one line must hold: file:line, key or option, what is accepted
};

// A valid catalogue and R–T table that cases lean on when something else is wrong.
const std::string good_catalogue =
    "slot,grade,unit_cost,settings\n"
    "thermistor,1%,0.12,sensor.r25_tol=1%;sensor.beta_tol=1%\n"
    "thermistor,3%,0.05,sensor.r25_tol=3%;sensor.beta_tol=2%\n";
const std::string good_table = "# degC, ohm (a 10k NTC, beta 3950)\n0,33.6k\n25,10k\n50,3.6k\n85,1.07k\n";
const std::string good_fit_data = "t,R\n0,32.65k\n25,10k\n50,3.6k\n85,1.1k\n100,680\n";

// A bad scenario: the same line must come from every command that reads a
// scenario, so the cases take turns among them.
Case scenario(std::string what, std::string ini, std::vector<std::string> names) {
  static int turn = 0;
  static const char* const commands[] = {"check bad.ini", "budget bad.ini --format json", "table bad.ini",
                                         "pick bad.ini --values=4k7,10k", "grades bad.ini --catalogue parts.csv"};
  Case c{std::move(what), commands[turn++ % 5], {file("bad.ini", std::move(ini))}, std::move(names)};
  if (c.args.starts_with("grades")) c.inputs.push_back(file("parts.csv", good_catalogue));
  return c;
}

// A bad R–T table named by a scenario (sensor.table_file).
Case table_file(std::string what, std::string csv, std::vector<std::string> names) {
  names.insert(names.begin(), {"sensor.table_file = table.csv (bad.ini:3)", "the table cannot be used"});
  return {std::move(what), "budget bad.ini --format csv",
          {file("bad.ini", "[sensor]\nmodel = table\ntable_file = table.csv\nr25_tol = 0\nbeta_tol = 0\n"),
           file("table.csv", std::move(csv))},
          std::move(names)};
}

// Bad data for `thermargin fit`.
Case fit_data(std::string what, std::string csv, std::vector<std::string> names) {
  return {std::move(what), "fit data.csv --format json", {file("data.csv", std::move(csv))}, std::move(names)};
}

// A bad grade catalogue for `thermargin grades`.
Case catalogue(std::string what, std::string csv, std::vector<std::string> names) {
  return {std::move(what), "grades --catalogue parts.csv --units=200", {file("parts.csv", std::move(csv))},
          std::move(names)};
}

// A bad option (the scenario is the built-in default unless the case gives files).
Case option(std::string what, std::string args, std::vector<std::string> names, std::vector<Input> inputs = {}) {
  return {std::move(what), std::move(args), std::move(inputs), std::move(names)};
}

std::vector<Case> numbers() {
  return {
      scenario("a negative resistance", "# the fixed resistor\n[divider]\nr_fixed = -10k\n",
               {"divider.r_fixed = -10k", "bad.ini:3", "must be > 0"}),
      scenario("a number with an unknown suffix", "[sensor]\nr25 = 10x\n",
               {"sensor.r25 = 10x", "bad.ini:2", "expected a resistance such as 10k"}),
      scenario("a decimal comma", "[supply]\nv_excitation = 3,3V\n",
               {"supply.v_excitation = 3,3V", "bad.ini:2", "expected a voltage such as 3.3"}),
      scenario("a number too large for a double", "[sensor]\nr25 = 1e999\n",
               {"sensor.r25 = 1e999", "bad.ini:2", "expected a resistance"}),
      scenario("a B value read as kilo-kelvin", "[sensor]\nbeta = 3950k\n",
               {"sensor.beta = 3950k", "bad.ini:2", "no finite resistance", "3950K"}),
      scenario("an RTD below its curve", "[sensor]\nmodel = rtd\n[conditions]\nt_min = -260\n",
               {"conditions.t_min = -260", "bad.ini:4", "IEC 60751", "-200 to 850 degC"}),
      scenario("an unused calibration point that is no number", "[firmware]\ncalibration_at = 2O\n",
               {"firmware.calibration_at = 2O", "bad.ini:2", "expected a temperature"}),
      scenario("an unknown distribution of an inactive input", "[adc]\nleakage_dist = gausian\n",
               {"adc.leakage_dist = gausian", "bad.ini:2", "normal | uniform | triangular | gapped"}),
      scenario("nan written as a value", "[sensor]\nbeta = nan\n", {"sensor.beta = nan", "bad.ini:2", "expected a B value in kelvin"}),
      scenario("inf written as a value", "[divider]\nr_fixed = inf\n",
               {"divider.r_fixed = inf", "bad.ini:2", "expected a resistance"}),
      scenario("a fraction where a whole number is needed", "[adc]\nbits = 12.5\n",
               {"adc.bits = 12.5", "bad.ini:2", "expected a whole number"}),
      scenario("a prefix on a percentage", "[sensor]\nr25_tol = 1m%\n",
               {"sensor.r25_tol = 1m%", "bad.ini:2", "expected a fraction such as 1%"}),
      scenario("a voltage where a resistance is needed", "[divider]\nr_fixed = 10kV\n",
               {"divider.r_fixed = 10kV", "bad.ini:2", "expected a resistance"}),
      scenario("an empty value", "[divider]\nr_fixed =\n", {"divider.r_fixed = (empty)", "bad.ini:2", "expected a resistance"}),
      scenario("a number of 70 digits", "[divider]\nr_fixed = " + std::string(70, '1') + "\n",
               {"divider.r_fixed = 111", "bad.ini:2", "expected a resistance"}),
      scenario("a negative dissipation constant", "[sensor]\ndissipation = -1mW/K\n",
               {"sensor.dissipation = -1mW/K", "bad.ini:2", "must be >= 0"}),
      scenario("negative noise", "[adc]\nnoise = -0.5\n", {"adc.noise = -0.5", "bad.ini:2", "must be >= 0"}),
      scenario("a duty above 100 %", "[divider]\nduty = 150%\n", {"divider.duty = 150%", "bad.ini:2", "(0, 1]"}),
      scenario("a tempco of 2 %/K", "[divider]\nr_fixed_tempco = 2%/K\n",
               {"divider.r_fixed_tempco = 2%/K", "bad.ini:2", "below 10000 ppm/K"}),
      scenario("a tolerance of 100 %", "[sensor]\nr25_tol = 100%\n",
               {"sensor.r25_tol = 100%", "bad.ini:2", "up to (not including) 100 %"}),
      scenario("0 bits", "[adc]\nbits = 0\n", {"adc.bits = 0", "bad.ini:2", "from 1 to 32"}),
      scenario("33 bits", "[adc]\nbits = 33\n", {"adc.bits = 33", "bad.ini:2", "from 1 to 32"}),
      scenario("an offset of half the ADC span", "[adc]\noffset = 2048\n",
               {"adc.offset = 2048", "bad.ini:2", "less than half the ADC span"}),
      scenario("a negative seed", "[montecarlo]\nseed = -1\n", {"montecarlo.seed = -1", "bad.ini:2", "from 0 to"}),
      scenario("2000 threads", "[montecarlo]\nthreads = 2000\n", {"montecarlo.threads = 2000", "bad.ini:2", "from 0 to 1024"}),
      scenario("a temperature below absolute zero", "[conditions]\nt_min = -300\n",
               {"conditions.t_min = -300", "bad.ini:2", "above absolute zero"}),
      scenario("a board range written high..low", "[conditions]\nboard = 50..10\n",
               {"conditions.board = 50..10", "bad.ini:2", "low..high with low < high"}),
      scenario("a board temperature that is a word", "[conditions]\nboard = warm\n",
               {"conditions.board = warm", "bad.ini:2", "expected a temperature in degC"}),
      scenario("a one-point lookup table", "[firmware]\ntable_points = 1\n",
               {"firmware.table_points = 1", "bad.ini:2", "from 2 to 65536"}),
      scenario("no Monte Carlo units", "[montecarlo]\nunits = 0\n", {"montecarlo.units = 0", "bad.ini:2", "from 1 to 1e9, or auto"}),
      scenario("half a unit", "[montecarlo]\nunits = 1.5\n", {"montecarlo.units = 1.5", "bad.ini:2", "whole number"}),
      scenario("a cap of 10 units", "[montecarlo]\nmax_units = 10\n", {"montecarlo.max_units = 10", "bad.ini:2", "from 1000 to 1e9"}),
      scenario("an error limit of 0", "[requirement]\nmax_error = 0\n", {"requirement.max_error = 0", "bad.ini:2", "must be > 0"}),
      scenario("a yield of 0", "[requirement]\nyield = 0\n", {"requirement.yield = 0", "bad.ini:2", "(0, 100 %]"}),
      scenario("0 standard deviations per tolerance", "[montecarlo]\nsigma_per_tol = 0\n",
               {"montecarlo.sigma_per_tol = 0", "bad.ini:2", "must be > 0"}),
      scenario("a step of 0", "[conditions]\nt_step = 0\n", {"conditions.t_step = 0", "bad.ini:2", "must be > 0"}),
      scenario("a calibration temperature that is a word", "[firmware]\ncalibration = offset\ncalibration_at = abc\n",
               {"firmware.calibration_at = abc", "bad.ini:3", "expected a temperature"}),
  };
}

std::vector<Case> keys_and_sections() {
  return {
      scenario("an unknown key", "[adc]\nresolution = 12\n", {"bad.ini:2", "unknown key 'adc.resolution'", "thermargin check --help"}),
      scenario("an unknown section", "title = x\n[adcs]\nbits = 12\n", {"bad.ini:2", "[adcs]", "accepted sections: sensor"}),
      scenario("a key outside any section", "bits = 12\n", {"bad.ini:1", "'bits'", "belong in a [section]"}),
      scenario("a key set twice", "[adc]\nbits = 12\n\nbits = 10\n", {"bad.ini:4", "'adc.bits' is set twice", "first on line 2"}),
      scenario("an unclosed section header", "[sensor\nr25 = 10k\n", {"bad.ini:1", "'[sensor'", "expected [section]"}),
      scenario("spaces inside the brackets", "[ sensor ]\nr25 = 10k\n", {"bad.ini:1", "'[ sensor ]'", "expected [sensor]"}),
      scenario("a ';' comment", "; the fixed resistor\n[divider]\n", {"bad.ini:1", "; the fixed resistor", "comments start with '#'"}),
      scenario("a line with no '='", "[sensor]\nr25 10k\n", {"bad.ini:2", "'r25 10k'", "expected 'key = value' or '[section]'"}),
      scenario("a value with no key", "[sensor]\n= 10k\n", {"bad.ini:2", "'=' but no key"}),
      scenario("an unknown sensor model", "[sensor]\nmodel = ptc\n",
               {"sensor.model = ptc", "bad.ini:2", "beta | steinhart-hart | table | rtd"}),
      scenario("a yes/no key that is neither", "[supply]\nratiometric = maybe\n",
               {"supply.ratiometric = maybe", "bad.ini:2", "true | yes | 1 | false | no | 0"}),
      scenario("an unknown quantiser", "[adc]\nquantizer = ceil\n", {"adc.quantizer = ceil", "bad.ini:2", "round | floor"}),
      scenario("an unknown distribution", "[montecarlo]\ndistribution = cauchy\n",
               {"montecarlo.distribution = cauchy", "bad.ini:2", "normal | uniform | triangular | gapped"}),
      scenario("an unknown per-input distribution", "[sensor]\nr25_tol_dist = lognormal\n",
               {"sensor.r25_tol_dist = lognormal", "bad.ini:2", "normal | uniform | triangular | gapped"}),
      scenario("an unknown placement", "[divider]\nplacement = middle\n", {"divider.placement = middle", "bad.ini:2", "low | high"}),
      scenario("an unknown full-scale convention", "[firmware]\nfull_scale = pow3\n",
               {"firmware.full_scale = pow3", "bad.ini:2", "pow2 | pow2-minus-1"}),
      scenario("an unknown verdict basis", "[requirement]\nbasis = best\n",
               {"requirement.basis = best", "bad.ini:2", "worst-case | linear | monte-carlo"}),
  };
}

std::vector<Case> combinations() {
  return {
      scenario("a window above the range", "[requirement]\nwindow_max = 90\n",
               {"requirement.window_max = 90", "bad.ini:2", "must not be above conditions.t_max (80)"}),
      scenario("a window below the range", "[conditions]\nt_min = 5\n",
               {"conditions.t_min = 5", "bad.ini:2", "must not be below conditions.t_min (5)"}),
      scenario("a window written high..low", "[requirement]\nwindow_min = 50\nwindow_max = 40\n",
               {"requirement.window_max = 40", "bad.ini:3", "must be above requirement.window_min"}),
      scenario("a calibration point outside the range", "[firmware]\ncalibration = offset\ncalibration_at = 200\n",
               {"firmware.calibration_at = 200", "bad.ini:3", "within conditions.t_min..t_max"}),
      scenario("two temperatures for an offset calibration", "[firmware]\ncalibration = offset\ncalibration_at = 20,30\n",
               {"firmware.calibration_at = 20,30", "bad.ini:3", "takes one temperature"}),
      scenario("a two-point calibration at one temperature", "[firmware]\ncalibration = two-point\ncalibration_at = 20,20\n",
               {"firmware.calibration_at = 20,20", "bad.ini:3", "must differ"}),
      scenario("an absolute reference without its voltage", "[supply]\nratiometric = false\n",
               {"supply.v_reference", "(default)", "needs its voltage set explicitly"}),
      scenario("a table model without a table", "[sensor]\nmodel = table\n",
               {"sensor.table_file = (empty) (default)", "needs a table file (CSV of degC, ohm)"}),
      scenario("averaging of zero", "[adc]\naveraging = 0\n", {"adc.averaging = 0", "bad.ini:2", "from 1 to 65536"}),
      scenario("a coverage of 100 %", "[montecarlo]\ncoverage = 100%\n",
               {"montecarlo.coverage = 100%", "bad.ini:2", "strictly between 0 and 100 %"}),
      scenario("t_min equal to t_max", "[conditions]\nt_min = 40\nt_max = 40\n",
               {"conditions.t_max = 40", "bad.ini:3", "must be above conditions.t_min (40)"}),
      scenario("t_min above t_max", "[conditions]\nt_min = 95\n", {"conditions.t_min = 95", "bad.ini:2", "below conditions.t_max (80)"}),
      scenario("a step giving a hundred million temperatures", "[conditions]\nt_step = 1u\n",
               {"conditions.t_step = 1u", "bad.ini:2", "temperatures; at most 100001 are analysed"}),
      scenario("a step too small to count in a long long", "[conditions]\nt_step = 1e-300\n",
               {"conditions.t_step = 1e-300", "bad.ini:2", "gives 1e+302 temperatures; at most 100001"}),
      scenario("a gap without the gapped distribution", "[sensor]\nr25_tol_gap = 0.5%\n",
               {"sensor.r25_tol_gap = 0.5%", "bad.ini:2", "needs the gapped distribution"}),
      scenario("a gap as wide as the tolerance", "[sensor]\nr25_tol_dist = gapped\nr25_tol_gap = 2%\n",
               {"sensor.r25_tol_gap = 2%", "bad.ini:3", "smaller than the bound 1%"}),
      scenario("one of three Steinhart-Hart coefficients", "[firmware]\nconversion = steinhart-hart\na = 1e-3\n",
               {"firmware.a = 1e-3", "bad.ini:3", "give all three of firmware.a, b, c, or none"}),
      scenario("a rising Steinhart-Hart curve", "[sensor]\nmodel = steinhart-hart\nb = -1e-4\n",
               {"sensor.b = -1e-4", "bad.ini:3", "B > 0 and C >= 0"}),
      scenario("a negative drift bound", "[sensor]\ndrift = -1%\n",
               {"sensor.drift = -1%", "bad.ini:2", "from 0 up to (not including) 100 %"}),
      scenario("a drift of 100 %", "[divider]\nr_fixed_drift = 100%\n",
               {"divider.r_fixed_drift = 100%", "bad.ini:2", "from 0 up to (not including) 100 %"}),
      scenario("a negative ADC offset drift", "[adc]\noffset_drift = -1\n",
               {"adc.offset_drift = -1", "bad.ini:2", "must be >= 0"}),
      scenario("a verdict at an unknown time", "[requirement]\nat = later\n",
               {"requirement.at = later", "bad.ini:2", "end-of-life", "delivery"}),
      // Parts as their datasheets state them (docs/model.md §1, §5, §7).
      scenario("a coverage factor on a uniform bound", "[divider]\nr_fixed_tol_dist = uniform\nr_fixed_tol_k = 2\n",
               {"divider.r_fixed_tol_k = 2", "bad.ini:3", "belongs to a normal or gapped bound"}),
      scenario("a coverage factor of 0", "[adc]\ngain_error_k = 0\n", {"adc.gain_error_k = 0", "bad.ini:2", "must be > 0"}),
      scenario("a calibration medium without self-heating",
               "[sensor]\ndissipation = 0\n[firmware]\ncalibration_dissipation = 15mW/K\n",
               {"firmware.calibration_dissipation = 15mW/K", "bad.ini:4", "needs self-heating on"}),
      scenario("an ADC gain drift of 1 %/K", "[adc]\ngain_tempco = 1%/K\n",
               {"adc.gain_tempco = 1%/K", "bad.ini:2", "below 10000 ppm/K"}),
      scenario("a negative ADC offset tempco", "[adc]\noffset_tempco = -0.01\n",
               {"adc.offset_tempco = -0.01", "bad.ini:2", "must be >= 0"}),
      scenario("an INL shape not in the list", "[adc]\ninl_shape = curve\n",
               {"adc.inl_shape = curve", "bad.ini:2", "bow | bound"}),
      scenario("an RTD construction not in the list", "[sensor]\nrtd_construction = thick-film\n",
               {"sensor.rtd_construction = thick-film", "bad.ini:2", "film | wire-wound"}),
  };
}

// The [response] section (docs/response.md), refused by every command that
// reads a scenario, `response` and `budget` among them.
std::vector<Case> response_section() {
  return {
      scenario("a time constant of 0", "[response]\ntime_constant = 0\n",
               {"response.time_constant = 0", "bad.ini:2", "must be > 0 s"}),
      scenario("a negative time constant", "[response]\ntime_constant = -5s\n",
               {"response.time_constant = -5s", "bad.ini:2", "must be > 0 s"}),
      scenario("a time constant in volts", "[response]\ntime_constant = 5V\n",
               {"response.time_constant = 5V", "bad.ini:2", "expected a time such as 8, 8s, 500ms"}),
      scenario("a reading period of 0", "[response]\nreading_period = 0ms\n",
               {"response.reading_period = 0ms", "bad.ini:2", "must be > 0 s"}),
      scenario("a moving average of no readings", "[response]\nfilter = moving-average\nfilter_length = 0\n",
               {"response.filter_length = 0", "bad.ini:3", "from 1 to 65536"}),
      scenario("an exponential filter with alpha 1.5", "[response]\nfilter = exponential\nfilter_alpha = 1.5\n",
               {"response.filter_alpha = 1.5", "bad.ini:3", "must be in (0, 1]"}),
      scenario("an exponential filter with alpha 0", "[response]\nfilter_alpha = 0\n",
               {"response.filter_alpha = 0", "bad.ini:2", "must be in (0, 1]"}),
      scenario("an unknown filter", "[response]\nfilter = median\n",
               {"response.filter = median", "bad.ini:2", "none | moving-average | exponential"}),
      scenario("a time-constant tolerance of 100 %", "[response]\ntime_constant_tol = 100%\n",
               {"response.time_constant_tol = 100%", "bad.ini:2", "up to (not including) 100 %"}),
      scenario("a ramp in volts per minute", "[response]\nramp = 2V/min\n",
               {"response.ramp = 2V/min", "bad.ini:2", "expected a rate of change such as 2, 2K/min"}),
      scenario("a ramp without a limit to meet", "[response]\nramp = 2\n",
               {"response.ramp = 2", "bad.ini:2", "needs a limit to meet", "set requirement.max_error"}),
      scenario("a settle limit of 0", "[response]\nsettle_to = 0\n", {"response.settle_to = 0", "bad.ini:2", "must be > 0 K"}),
      scenario("the dynamic error included without a [response] section", "[requirement]\ninclude_dynamic = true\n",
               {"requirement.include_dynamic = true", "bad.ini:2", "add a [response] section"}),
      scenario("the dynamic error added to a yield",
               "[requirement]\nbasis = monte-carlo\ninclude_dynamic = true\n[response]\ntime_constant = 5s\n",
               {"requirement.include_dynamic = true", "bad.ini:3", "use basis worst-case or linear"}),
      option("response with a ramp without a limit on the command line", "response --response.ramp=2K/min",
             {"response.ramp = 2K/min (command line)", "needs a limit to meet"}),
      option("response with a negative period on the command line", "response --response.reading_period=-1",
             {"response.reading_period = -1 (command line)", "must be > 0 s"}),
      option("response in XML", "response --format=xml", {"--format = xml (command line)", "text | csv | json"}),
      option("response report into a missing directory", "response --report=nowhere/r.html",
             {"--report = nowhere/r.html (command line)", "directory nowhere does not exist"}),
  };
}

std::vector<Case> files() {
  const std::string scenario_text = "[sensor]\nr25 = 10k\n";
  return {
      option("a scenario that does not exist", "check missing.ini", {"missing.ini", "cannot open: no such file"}),
      option("an empty scenario", "budget empty.ini", {"empty.ini", "is empty"}, {file("empty.ini", "  \n\n")}),
      option("an unreadable scenario", "check locked.ini", {"locked.ini", "permission denied or unreadable"},
             {unreadable("locked.ini", scenario_text)}),
      option("a binary scenario", "check data.ini", {"data.ini", "not a text file (it contains NUL bytes)"},
             {file("data.ini", "[sensor]\nr25 = 10k\0\x01\x02\n"s)}),
      option("a scenario line of 5000 characters", "table long.ini", {"long.ini:2", "longer than 4096 characters"},
             {file("long.ini", "[sensor]\nr25 = " + std::string(5000, '1') + "\n")}),
      option("a directory as the scenario", "check folder", {"folder", "it is a directory, expected a text file"},
             {directory("folder")}),
      option("a scenario over 16 MiB", "check huge.ini", {"huge.ini", "too large", "at most 16 MiB"},
             {file("huge.ini", std::string((16u << 20) + 1, '#'))}),
      option("two scenario files", "check a.ini b.ini", {"command line", "more than one input file", "one is accepted"},
             {file("a.ini", scenario_text), file("b.ini", scenario_text)}),
      option("a UTF-8 scenario whose value is not a number", "check bom.ini",
             {"sensor.r25 = 10 kΩx", "bom.ini:2", "expected a resistance"}, {file("bom.ini", "\xEF\xBB\xBF[sensor]\nr25 = 10 kΩx\n")}),
  };
}

std::vector<Case> tables() {
  return {
      option("a table that does not exist", "budget bad.ini",
             {"sensor.table_file = gone.csv (bad.ini:3)", "gone.csv: cannot open: no such file"},
             {file("bad.ini", "[sensor]\nmodel = table\ntable_file = gone.csv\n")}),
      table_file("an empty table", "\n", {"table.csv: is empty"}),
      table_file("a table of three points", "0,33.6k\n25,10k\n50,3.6k\n", {"at least 4 points", "found 3"}),
      table_file("a table out of order", "0,33.6k\n25,10k\n20,12k\n50,3.6k\n",
                 {"table.csv:3:1: temperatures must be strictly increasing (or strictly decreasing)"}),
      table_file("a table with a word for a resistance", "0,33.6k\n25,10k\n50,oops\n85,1.07k\n",
                 {"resistance = oops (table.csv:3:2)", "expected a resistance"}),
      table_file("a table with four columns", "0,33.6k,1,2\n25,10k\n50,3.6k\n85,1.07k\n",
                 {"table.csv:1", "expected 2 or 3 columns", "found 4"}),
      table_file("a negative resistance in a table", "0,33.6k\n25,-10k\n50,3.6k\n85,1.07k\n",
                 {"resistance = -10k (table.csv:2:2)", "must be a resistance > 0"}),
      table_file("a temperature given twice", "0,33.6k\n25,10k\n25,9k\n85,1.07k\n",
                 {"table.csv:3:1: duplicate temperature", "may appear once"}),
      table_file("a temperature below absolute zero in a table", "0,33.6k\n-300,10k\n50,3.6k\n85,1.07k\n",
                 {"temperature = -300 (table.csv:2:1)", "above absolute zero"}),
      table_file("a resistance that does not change", "0,33.6k\n25,10k\n50,10k\n85,1.07k\n",
                 {"table.csv:3:2: resistance must change strictly monotonically"}),
      table_file("an uncertainty on some lines only", "0,33.6k,1%\n25,10k\n50,3.6k\n85,1.07k\n",
                 {"table.csv:2:3: the uncertainty is missing here", "on every line or none"}),
      table_file("a binary table", "0,33.6k\n\0\0\0\n"s, {"table.csv", "not a text file"}),
      // Found by fuzz_rt_table and fuzz_fit: a carriage return inside a field split the message.
      table_file("a carriage return inside a value", "0,33.6k\n25,1\r0k\n50,3.6k\n85,1.07k\n",
                 {"resistance = 1\\r0k (table.csv:2:2)", "expected a resistance"}),
      table_file("a table whose R_min is above the nominal",
                 "t,r,r_min,r_max\n0,33.6k,32k,35k\n25,10k,10.2k,10.3k\n50,3.6k,3.5k,3.7k\n85,1.07k,1.04k,1.1k\n",
                 {"r_min = 10.2k (table.csv:3:3)", "not above the nominal resistance"}),
      table_file("a table whose R_max is below the nominal",
                 "t,r,r_min,r_max\n0,33.6k,32k,35k\n25,10k,9.9k,9.95k\n50,3.6k,3.5k,3.5k\n85,1.07k,1.04k,1.1k\n",
                 {"r_max = 9.95k (table.csv:3:4)", "not below the nominal resistance"}),
      table_file("a table tolerance of 100 %", "t,r,tol\n0,33.6k,1\n25,10k,100\n50,3.6k,1\n85,1.07k,1\n",
                 {"tolerance = 100 (table.csv:3:3)", "up to (not including) 100 %"}),
      // Found by fuzz_rt_table and fuzz_fit: a short line of a table with limits, and a
      // limit column named past the columns a line has, were read beyond the line's fields.
      table_file("a short line in a table with limits",
                 "t,r,r_min,r_max\n0,33.6k,32k,35k\n25\n50,3.6k,3.5k,3.7k\n85,1.07k,1.04k,1.1k\n",
                 {"table.csv:3", "expected 4 columns", "found 1"}),
      table_file("a tolerance column after the third",
                 "t,r,note,tol\n0,33.6k,a,1\n25,10k,b,1\n50,3.6k,c,1\n85,1.07k,d,1\n",
                 {"table.csv:1", "a tolerance column must be column 3"}),
      option("R25 and B tolerances beside a table with limits", "check bad.ini",
             {"sensor.r25_tol = 1% (bad.ini:4)", "the table already holds the unit spread"},
             {file("bad.ini", "[sensor]\nmodel = table\ntable_file = t.csv\nr25_tol = 1%\n"),
              file("t.csv", "t,r,tol\n0,33.6k,1\n25,10k,1\n50,3.6k,1\n85,1.07k,1\n")}),
      option("a table not covering 25 degC with tolerances", "check bad.ini",
             {"sensor.r25_tol = 1% (default)", "tolerances are defined at 25 degC", "or set the tolerances to 0"},
             {file("bad.ini", "[sensor]\nmodel = table\ntable_file = t.csv\n[conditions]\nt_min = 30\n[requirement]\nwindow_min = 30\n"),
              file("t.csv", "30,8k\n40,5.3k\n60,2.5k\n80,1.25k\n")}),
  };
}

std::vector<Case> fit() {
  return {
      option("fit with no data file", "fit", {"command line", "fit needs a data file", "thermargin fit DATA.csv"}),
      option("fit of a missing file", "fit none.csv", {"none.csv", "cannot open: no such file"}),
      option("fit of a directory", "fit folder", {"folder", "it is a directory"}, {directory("folder")}),
      fit_data("fit data with a word for a resistance", "0,32.65k\n25,10k\n50,oops\n85,1.1k\n",
               {"resistance = oops (data.csv:3:2)", "expected a resistance"}),
      fit_data("fit data of two points", "0,32.65k\n25,10k\n", {"data.csv:2", "only 2 data point(s)", "needs at least 3"}),
      fit_data("platinum RTD data of four points reaching below 0 degC", "-10,96.09\n0,100\n10,103.9\n20,107.79\n",
               {"data.csv:4", "Callendar-Van Dusen fit needs at least 5 points", "found 4"}),
      fit_data("fit data with a temperature twice", "0,32.65k\n25,10k\n25,9.9k\n50,3.6k\n",
               {"data.csv:3:1: duplicate temperature"}),
      // Found by fuzz_fit: a resistance of 1e308 ohm overflowed the least-squares beta fit into NaN coefficients.
      fit_data("fit data with a resistance hundreds of decades off",
               "10,1e308,2.9\n25,10k,0.29\n50,3.6k,0.29\n85,1.1k,0.29\n100,680,0.03\n",
               {"data.csv:1", "no finite coefficients", "1e+308 ohm at 10 degC", "mistyped value"}),
      fit_data("fit data with resistance rising", "0,32.65k\n25,10k\n50,11k\n85,1.1k\n",
               {"data.csv:3:2: resistance must change strictly monotonically"}),
      fit_data("fit data with the uncertainty on one line", "0,32.65k\n25,10k,0.1%\n50,3.6k\n85,1.1k\n",
               {"data.csv:1:3: the uncertainty is missing here"}),
      option("fit window written high..low", "fit data.csv --window=50..10",
             {"fit.window = 50..10 (command line)", "LOW..HIGH in degC with LOW <= HIGH"}, {file("data.csv", good_fit_data)}),
      option("fit with one beta temperature", "fit data.csv --beta-at=25",
             {"fit.beta_at = 25 (command line)", "2 temperatures in degC separated by commas"}, {file("data.csv", good_fit_data)}),
      option("fit at a temperature that is not a data point", "fit data.csv --sh-at=0,25,200",
             {"fit.sh_at = 0, 25, 200 (command line)", "temperatures (degC) of data points in data.csv"},
             {file("data.csv", good_fit_data)}),
      option("fit with a negative limit", "fit data.csv --limit=-1", {"fit.limit = -1 (command line)", "an error in K > 0"},
             {file("data.csv", good_fit_data)}),
      option("fit with no samples between points", "fit data.csv --between-samples=0",
             {"fit.between_samples = 0 (command line)", "from 1 to 100000"}, {file("data.csv", good_fit_data)}),
      option("a fit that would compare for hours", "fit many.csv --between-samples=100000",
             {"fit.between_samples = 100000 (command line)", "20000 intervals", "at most 5e+08"},
             {file("many.csv", [] {
                std::string csv;  // a beta curve every 10 mK: 20 001 points
                for (int i = 0; i <= 20000; ++i) {
                  const double t = -40.0 + 0.01 * i;
                  csv += std::to_string(t) + "," + std::to_string(1e4 * std::exp(3950.0 * (1.0 / (t + 273.15) - 1.0 / 298.15))) + "\n";
                }
                return csv;
              }())}),
      option("the four-term fit in a window of two points", "fit data.csv --extended --window=0..25",
             {"data.csv:3", "inside the fit window 0..25 degC", "needs at least 4"}, {file("data.csv", good_fit_data)}),
  };
}

std::vector<Case> catalogues() {
  const std::string head = "slot,grade,unit_cost,settings\n";
  return {
      option("grades without a catalogue", "grades", {"--catalogue (command line)", "missing", "e.g. --catalogue parts.csv"}),
      option("a catalogue that does not exist", "grades --catalogue none.csv", {"none.csv", "cannot open: no such file"}),
      catalogue("an empty catalogue", "", {"parts.csv", "is empty"}),
      catalogue("an unknown column", "slot,grade,price,settings\nx,a,1,sensor.r25_tol=1%\n",
                {"header = price (parts.csv:1:3)", "unknown column", "slot, grade, unit_cost, settings (required)"}),
      catalogue("a required column missing", "slot,grade,unit_cost\nx,a,1\n",
                {"parts.csv:1", "the required column 'settings' is missing"}),
      catalogue("a column given twice", "slot,grade,unit_cost,settings,slot\nx,a,1,sensor.r25_tol=1%,x\n",
                {"header = slot (parts.csv:1:5)", "each column appears once"}),
      catalogue("a negative cost", head + "x,a,-1,sensor.r25_tol=1%\n",
                {"unit_cost = -1 (parts.csv:2:3)", "cannot be negative", "plain decimal number >= 0"}),
      catalogue("a cost with a currency sign", head + "x,a,$1,sensor.r25_tol=1%\n",
                {"unit_cost = $1 (parts.csv:2:3)", "without a currency sign"}),
      catalogue("a quoted field never closed", head + "x,\"a,1,sensor.r25_tol=1%\n",
                {"parts.csv:2:2: a quoted field is never closed", "add the closing double quote"}),
      catalogue("a setting that is not key=value", head + "x,a,1,sensor.r25_tol\n",
                {"settings = sensor.r25_tol (parts.csv:2:4)", "a setting is key=value"}),
      catalogue("a setting of an unknown key", head + "x,a,1,sensor.r99=1\n",
                {"settings = sensor.r99=1 (parts.csv:2:4)", "names no scenario key"}),
      catalogue("a grade named twice in a slot", head + "x,a,1,sensor.r25_tol=1%\nx,a,2,sensor.r25_tol=2%\n",
                {"grade = a (parts.csv:3:2)", "already has this grade (line 2)"}),
      catalogue("a row short of a field", head + "x,a,1\n", {"parts.csv:2:4: the row has 3 fields and the header 4"}),
      catalogue("a header and no rows", head, {"parts.csv", "a header but no options"}),
      catalogue("a setting the scenario cannot take", head + "x,a,1,sensor.r25_tol=abc\n",
                {"sensor.r25_tol = abc (parts.csv:2:4)", "expected a fraction", "[set by grade 'a' of slot 'x', parts.csv:2:4]"}),
      // The [response] keys are validated like every other section's, a
      // catalogue's settings included (docs/response.md).
      catalogue("a grade setting a time constant of 0", head + "x,a,1,response.time_constant=0\n",
                {"response.time_constant = 0 (parts.csv:2:4)", "must be > 0 s", "[set by grade 'a' of slot 'x', parts.csv:2:4]"}),
      catalogue("a grade setting an unknown filter", head + "x,a,1,sensor.r25_tol=1%\nx,b,1,response.filter=median\n",
                {"response.filter = median (parts.csv:3:4)", "none | moving-average | exponential",
                 "[set by grade 'b' of slot 'x', parts.csv:3:4]"}),
      catalogue("a grade setting a ramp with no limit to meet", head + "x,a,1,response.ramp=2K/min\n",
                {"response.ramp = 2K/min (parts.csv:2:4)", "needs a limit to meet", "set requirement.max_error"}),
      catalogue("one key graded by two slots", head + "x,a,1,sensor.r25_tol=1%\ny,b,1,sensor.r25_tol=2%\n",
                {"settings = sensor.r25_tol=2% (parts.csv:3:4)", "already graded by slot 'x' (line 2)"}),
      catalogue("a row with no slot", head + ",a,1,sensor.r25_tol=1%\n", {"slot = (empty) (parts.csv:2:1)", "names its slot"}),
      catalogue("a quoted grade with a line break, named twice",
                head + "x,\"tight\nsorted\",1,sensor.r25_tol=1%\nx,\"tight\nsorted\",2,sensor.r25_tol=2%\n",
                {"grade = tight\\nsorted (parts.csv:4:2)", "already has this grade"}),
      catalogue("setup costs without a volume", "slot,grade,unit_cost,settings,setup_cost\nx,a,1,sensor.r25_tol=1%,100\n",
                {"--volume", "setup costs (parts.csv:2:5)", "e.g. --volume 10000"}),
      catalogue("a million combinations", [&] {
                  std::string csv = head;
                  for (int s = 0; s < 6; ++s)
                    for (int g = 0; g < 10; ++g) csv += "s" + std::to_string(s) + ",g" + std::to_string(g) + ",1,\n";
                  return csv;
                }(),
                {"parts.csv", "1000000 combinations", "at most 100000 are evaluated"}),
  };
}

std::vector<Case> options() {
  const std::vector<Input> with_catalogue{file("parts.csv", good_catalogue)};
  return {
      option("an unknown command", "simulate", {"unknown command 'simulate'", "budget, check, fit, grades, pick, response, table"}),
      option("an unknown option of check", "check --bogus", {"command line", "'--bogus'", "thermargin check --help"}),
      option("an argument to --help", "check --help=x", {"command line", "'--help' does not take any arguments"}),
      option("a key option without its value", "check --output out.txt --adc.bits",
             {"'--adc.bits' is missing", "thermargin check --help"}),
      option("a key option with a bad value", "check --adc.bits=40",
             {"adc.bits = 40 (command line)", "a whole number from 1 to 32"}),
      option("a key option with a line break", "check '--adc.bits=1\n2'",
             {"adc.bits = 1\\n2 (command line)", "expected a whole number"}),
      // Found by fuzz_number: a line break inside a value (fuzz/regressions/fuzz_number).
      option("a key option with a unit, a line break and a number", "check '--adc.offset=/K\n1e-3'",
             {"adc.offset = /K\\n1e-3 (command line)", "expected a number of ADC counts"}),
      option("budget in XML", "budget --format=xml", {"--format = xml (command line)", "text | csv | json"}),
      option("budget with an unknown corner method", "budget --corners=all",
             {"--corners = all (command line)", "auto | enumerate | directed"}),
      option("budget output into a missing directory", "budget --no-mc --output=nowhere/out.json",
             {"--output = nowhere/out.json (command line)", "the directory does not exist"}),
      option("budget output onto a directory", "budget --no-mc --output=folder", {"--output = folder (command line)", "is a directory"},
             {directory("folder")}),
      option("budget report into a missing directory", "budget --report=nowhere/r.html",
             {"--report = nowhere/r.html (command line)", "directory nowhere does not exist"}),
      option("budget plots under a missing directory", "budget --plots=nowhere/plots",
             {"--plots = nowhere/plots (command line)", "directory nowhere does not exist"}),
      option("pick report into a missing directory", "pick --report=nowhere/r.html",
             {"--report = nowhere/r.html (command line)", "directory nowhere does not exist"}),
      option("grades report onto a directory", "grades --report=folder",
             {"--report = folder (command line)", "is a directory; give a file name such as review.html"},
             {directory("folder")}),
      option("budget with units that are a word", "budget --montecarlo.units=many",
             {"montecarlo.units = many (command line)", "expected a number"}),
      option("pick from an unknown series", "pick --series=e7", {"--series = e7 (command line)", "e12 | e24 | e48 | e96 | e192"}),
      option("pick in a range written high..low", "pick --range=1M..1k",
             {"--range = 1M..1k (command line)", "LOW..HIGH with 0 < LOW < HIGH"}),
      option("pick among values with a word", "pick --values=4k7,abc", {"--values = abc (command line)", "expected a resistance"}),
      option("pick by an unknown objective", "pick --objective=cheapest",
             {"--objective = cheapest (command line)", "worst-case | linear | monte-carlo | sensitivity"}),
      option("pick showing no rows", "pick --top=0", {"--top = 0 (command line)", "a whole number >= 1"}),
      option("pick with values and a series", "pick --values=4k7 --series=e12",
             {"--series = e12 (command line)", "cannot be combined with --values"}),
      option("pick with a span above 100 %", "pick --min-span=150%", {"--min-span = 150% (command line)", "up to 100 %"}),
      option("pick with a grade that is a word", "pick --grade=abc", {"--grade = abc (command line)", "expected a fraction"}),
      option("pick with a negative current limit", "pick --max-current=-1mA",
             {"--max-current = -1mA (command line)", "a number > 0"}),
      option("pick verifying no units", "pick --mc-units=0", {"--mc-units = 0 (command line)", "a whole number >= 1"}),
      option("table of one point", "table --points=1", {"table.points = 1 (command line)", "at least 2"}),
      option("table of an unknown type", "table --type=int8", {"table.type = int8 (command line)", "int16 | int32"}),
      option("table with an unknown spacing", "table --spacing=log", {"table.spacing = log (command line)", "code | temperature"}),
      option("table emitted in an unknown form", "table --emit=h", {"table.emit = h (command line)", "c | csv"}),
      option("table emitted with a format", "table --emit=c --format=json",
             {"table.emit = c (command line)", "drop one of --emit and --format"}),
      option("table with a prefix that is not a C name", "table --prefix=1abc",
             {"table.prefix = 1abc (command line)", "a C identifier"}),
      option("table with a storage unit of 0", "table --unit=0", {"table.unit = 0 (command line)", "from 0.0001 to 1"}),
      option("table with a negative error limit", "table --max-error=-1", {"table.max_error = -1 (command line)", "> 0"}),
      option("fit in XML", "fit data.csv --format=xml", {"--format = xml (command line)", "text | csv | json"},
             {file("data.csv", good_fit_data)}),
      option("grades by an unknown measure", "grades --catalogue parts.csv --by=best",
             {"--by = best (command line)", "worst-case | linear | monte-carlo"}, with_catalogue),
      option("grades of no units", "grades --catalogue parts.csv --units=0",
             {"--units = 0 (command line)", "from 1 to 100000000"}, with_catalogue),
      option("a re-pick option without --re-pick", "grades --catalogue parts.csv --series=e12",
             {"--series = e12 (command line)", "applies only with --re-pick"}, with_catalogue),
      option("grades over a negative volume", "grades --catalogue parts.csv --volume=-5",
             {"--volume = -5 (command line)", "a number of units >= 1"}, with_catalogue),
  };
}

// The sampled node and the divider's drive (docs/model.md §14–§15).
std::vector<Case> acquisition() {
  return {
      scenario("a negative node capacitance", "[divider]\nc_node = -100n\n",
               {"divider.c_node = -100n", "bad.ini:2", "must be >= 0"}),
      scenario("a negative sampling capacitance", "[adc]\nc_sample = -10p\n",
               {"adc.c_sample = -10p", "bad.ini:2", "must be >= 0"}),
      scenario("a negative switch resistance", "[adc]\nr_switch = -1k\n",
               {"adc.r_switch = -1k", "bad.ini:2", "must be >= 0"}),
      scenario("a negative drive resistance", "[supply]\nr_drive = -20\n",
               {"supply.r_drive = -20", "bad.ini:2", "must be >= 0"}),
      scenario("a capacitance in the wrong unit", "[adc]\nc_sample = 10pV\n",
               {"adc.c_sample = 10pV", "bad.ini:2", "expected a capacitance such as 100n"}),
      scenario("an acquisition longer than the sample period", "[adc]\nc_sample = 10p\nsample_rate = 100k\nt_acq = 20us\n",
               {"adc.t_acq = 20us", "bad.ini:4", "must fit in the sample period"}),
      scenario("a settle time of zero with a node capacitor",
               "[divider]\nc_node = 100n\nsettle_time = 0\n[adc]\nc_sample = 10p\n",
               {"divider.settle_time = 0", "bad.ini:3", "from power-on to the first sample"}),
      scenario("an unknown precharge", "[adc]\nprecharge = previous\n",
               {"adc.precharge = previous", "bad.ini:2", "same | ground | reference | any"}),
      scenario("a precharge above the reference", "[adc]\nprecharge = 5V\n",
               {"adc.precharge = 5V", "bad.ini:2", "from 0 to the ADC reference"}),
  };
}

std::vector<Case> all_cases() {
  std::vector<Case> all;
  for (auto group : {numbers(), keys_and_sections(), combinations(), response_section(), files(), tables(), fit(), catalogues(),
                     options(), acquisition()})
    all.insert(all.end(), group.begin(), group.end());
  return all;
}

// Every path under `root`, relative to it, directories too.
std::set<std::string> tree(const fs::path& root) {
  std::set<std::string> names;
  for (const auto& e : fs::recursive_directory_iterator(root, fs::directory_options::skip_permission_denied))
    names.insert(fs::relative(e.path(), root).string());
  return names;
}

class BadInput : public ::testing::Test {
 protected:
  void SetUp() override {
    root_ = fs::temp_directory_path() / ("thermargin_bad_input_" + std::to_string(::getpid()));
    fs::remove_all(root_);
    fs::create_directories(root_);
  }
  void TearDown() override {
    std::error_code ec;
    for (const auto& e : fs::recursive_directory_iterator(root_, ec)) fs::permissions(e.path(), fs::perms::owner_all, ec);
    fs::remove_all(root_, ec);
  }

  // Runs one case in its own empty directory; returns what is wrong (empty: it passed).
  std::vector<std::string> run(const Case& c, std::size_t index) {
    const fs::path dir = root_ / std::to_string(index);
    const fs::path work = dir / "work";
    fs::create_directories(work);
    std::set<std::string> expected;
    bool locked = false;  // an input the program must find unreadable
    for (const Input& in : c.inputs) {
      expected.insert(in.name);
      if (in.kind == Input::directory) {
        fs::create_directories(work / in.name);
        continue;
      }
      std::ofstream(work / in.name, std::ios::binary) << in.content;
      if (in.kind == Input::unreadable) {
        fs::permissions(work / in.name, fs::perms::none);
        locked = true;
      }
    }
    std::string args = c.args;
    if (args.find("--output") == std::string::npos) args += " --output out.txt";
    // Root reads through permissions: an unreadable input is run as an unprivileged user.
    const std::string command =
        locked ? testing::unprivileged(testing::cli_command(args), work) : testing::cli_command(args);
    const auto [status, out, err] = testing::run_shell("cd " + testing::shell_quote(work.string()) + " && " + command);

    std::vector<std::string> wrong;
    if (status != 2) wrong.push_back("exit status " + std::to_string(status) + ", expected 2");
    if (err.empty() || err.find('\n') != err.size() - 1) wrong.push_back("stderr is not exactly one line");
    if (!err.starts_with("thermargin: ")) wrong.push_back("stderr does not start with 'thermargin: '");
    for (const std::string& piece : c.names)
      if (err.find(piece) == std::string::npos) wrong.push_back("the line does not name '" + piece + "'");
    if (!out.empty()) wrong.push_back("stdout is not empty: " + out.substr(0, 200));
    const std::set<std::string> left = tree(work);
    if (left != expected) {
      std::string names;
      for (const auto& n : left)
        if (!expected.count(n)) names += " " + n;
      wrong.push_back("files left behind:" + names);
    }
    if (!wrong.empty()) wrong.insert(wrong.begin(), "stderr was: " + err.substr(0, 500));
    if (std::getenv("THERMARGIN_SHOW_REFUSALS")) std::cout << "[" << c.what << "] " << err;
    return wrong;
  }

  fs::path root_;
};

TEST_F(BadInput, EveryCaseExitsTwoWithOneLineNamingWhereAndWhatIsAcceptedAndLeavesNoFile) {
  const std::vector<Case> cases = all_cases();
  ASSERT_GE(cases.size(), 60u);
  std::set<std::string> names;
  for (const Case& c : cases) EXPECT_TRUE(names.insert(c.what).second) << "two cases called '" << c.what << "'";

  int passed = 0, failed = 0;
  for (std::size_t i = 0; i < cases.size(); ++i) {
    const auto wrong = run(cases[i], i);
    if (wrong.empty()) {
      ++passed;
      continue;
    }
    ++failed;
    std::string report;
    for (const auto& w : wrong) report += "\n  " + w;
    ADD_FAILURE() << "case '" << cases[i].what << "': thermargin " << cases[i].args << report;
  }
  std::cout << "bad-input catalogue: " << cases.size() << " cases, " << passed << " passed, " << failed << " failed\n";
  EXPECT_EQ(passed, static_cast<int>(cases.size()));
}

}  // namespace
}  // namespace thermargin
