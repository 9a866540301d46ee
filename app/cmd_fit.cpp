// `thermargin fit DATA.csv`: beta and Steinhart–Hart coefficients fitted to
// resistance–temperature points, their residuals in kelvin, the
// recommendation and the lines to paste into a scenario file.
#include <nlohmann/json.hpp>
#include <cmath>
#include <cstdio>
#include <sstream>
#include <tuple>
#include <utility>

#include "cli.hpp"
#include "commands.hpp"
#include "thermargin/report/fit_output.hpp"
#include "thermargin/core/caution.hpp"
#include "thermargin/tools/fit.hpp"
#include "thermargin/input/rt_data.hpp"

namespace thermargin::cli {

namespace {

// "-40..125" as the fit window; the message names fit.window as the library does.
std::pair<double, double> parse_window(const std::string& text) {
  const Where where = command_line("fit.window");
  const std::string accepted = "must be LOW..HIGH in degC with LOW <= HIGH, e.g. --window=-40..125";
  const auto dots = text.find("..");
  if (dots == std::string::npos) reject(where, text, accepted);
  try {
    const double lo = parse_quantity(text.substr(0, dots), Quantity::temperature, where);
    const double hi = parse_quantity(text.substr(dots + 2), Quantity::temperature, where);
    if (!(lo <= hi)) reject(where, text, accepted);
    return {lo, hi};
  } catch (const input_error&) {
    reject(where, text, accepted);
  }
}

// "25,85" as a list of temperatures for fit.beta_at or fit.sh_at.
std::vector<double> parse_temperatures(const std::string& text, const std::string& key, std::size_t count) {
  const Where where = command_line(key);
  const std::string accepted = "must be " + std::to_string(count) + " temperatures in degC separated by commas, e.g. " +
                               (count == 2 ? "25,85" : "0,25,50");
  std::vector<double> out;
  std::size_t start = 0;
  try {
    while (true) {
      const auto comma = text.find(',', start);
      out.push_back(parse_quantity(text.substr(start, comma - start), Quantity::temperature, where));
      if (comma == std::string::npos) break;
      start = comma + 1;
    }
  } catch (const input_error&) {
    reject(where, text, accepted);
  }
  if (out.size() != count) reject(where, text, accepted);
  return out;
}

}  // namespace

int run_fit(int argc, char** argv) {
  po::options_description own("fit options");
  own.add_options()("window", po::value<std::string>(), "LOW..HIGH in degC: the points that take part [the whole file]")(
      "beta-at", po::value<std::string>(), "T1,T2: data temperatures of the two-point beta [25,85 if both present, else the window's ends]")(
      "sh-at", po::value<std::string>(), "T1,T2,T3: data temperatures of the three-point Steinhart-Hart [ends and middle]")(
      "limit", po::value<std::string>(), "K: the worst error a recommended model may have [0.1]")(
      "extended", "also fit the four-term form 1/T = A + B ln R + C ln^2 R + D ln^3 R")(
      "between-samples", po::value<std::string>(), "points compared inside each interval between data points [32]");
  if (help_requested("fit", argc, argv, "DATA.csv [options]", own, false, false)) return 0;
  const Invocation inv = parse("fit", argc, argv, own, false, false);
  if (inv.file.empty())
    reject_at("command line", 0, "fit needs a data file: thermargin fit DATA.csv (columns degC, ohm[, uncertainty])");
  const auto& vm = inv.vm;

  FitSettings s;
  if (vm.count("window")) std::tie(s.t_min, s.t_max) = parse_window(vm["window"].as<std::string>());
  if (vm.count("beta-at")) s.beta_at = parse_temperatures(vm["beta-at"].as<std::string>(), "fit.beta_at", 2);
  if (vm.count("sh-at")) s.sh_at = parse_temperatures(vm["sh-at"].as<std::string>(), "fit.sh_at", 3);
  if (vm.count("limit"))
    s.limit = parse_quantity(vm["limit"].as<std::string>(), Quantity::temperature_difference, command_line("fit.limit"));
  s.extended = vm.count("extended") > 0;
  if (vm.count("between-samples")) {
    const std::string text = vm["between-samples"].as<std::string>();
    const double n = parse_quantity(text, Quantity::integer, command_line("fit.between_samples"));
    if (!(n >= 1.0 && n <= 100000.0)) reject(command_line("fit.between_samples"), text, "must be a whole number from 1 to 100000");
    s.between_samples = static_cast<int>(n);
  }

  const RtData data = read_rt_data(inv.file);
  const FitResult result = fit_rt_data(data, s);
  const std::string snippet = scenario_snippet(result, result.recommendation.fit);
  FitExtras extras;
  if (rises_with_temperature(data)) extras.rtd = fit_rtd_data(data, s);
  extras.spread = fit_spread(data, s);
  extras.limit = s.limit;
  std::string text;
  if (inv.format == Format::json) text = fit_json(result, snippet, extras);
  else if (inv.format == Format::csv) text = fit_csv(result);
  else text = fit_text(result, snippet, extras);
  emit(inv, text);
  return 0;
}

}  // namespace thermargin::cli
