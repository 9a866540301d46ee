#include "cli.hpp"

#include <cmath>
#include <cstdio>
#include <filesystem>
#include <iostream>
#include <sstream>


#include "thermargin/report/budget_report.hpp"  // check_report_path, check_plots_directory
#include "thermargin/core/caution.hpp"
#include "thermargin/core/error.hpp"
#include "thermargin/input/response_section.hpp"

namespace thermargin::cli {

namespace {

po::options_description common_options(bool has_report, bool has_verdict) {
  po::options_description o("Common options");
  o.add_options()("help,h", "show this help")("format", po::value<std::string>()->default_value("text"),
                                                "text | csv | json")(
      "output,o", po::value<std::string>(), "write to FILE instead of standard output (whole or not at all)")(
      "quiet,q", "no progress line on standard error (it is shown only when standard error is a terminal)");
  if (has_report)
    o.add_options()("report", po::value<std::string>(), "also write a self-contained HTML report to FILE")(
        "plots", po::value<std::string>(),
        "also write the report's charts as standalone SVG files into DIR (created when its parent exists)");
  if (has_verdict) o.add_options()("strict", "exit with status 3 when the verdict fails");
  return o;
}

po::options_description key_options() {
  po::options_description o("Scenario keys (each overrides the file; see `thermargin check` for values and units)");
  for (const auto& k : scenario_schema()) {
    if (k.key.ends_with("_dist") || k.key.ends_with("_gap")) continue;
    o.add_options()(k.key.c_str(), po::value<std::string>(), (k.help + " [" + k.default_value + "]").c_str());
  }
  return o;
}

po::options_description hidden_key_options() {
  po::options_description o;
  for (const auto& k : scenario_schema())
    if (k.key.ends_with("_dist") || k.key.ends_with("_gap")) o.add_options()(k.key.c_str(), po::value<std::string>());
  return o;
}

// The destination of --output, checked when the options are read and again
// when writing, so that no long run ends in "cannot write".
void check_output(const std::string& output) {
  namespace fs = std::filesystem;
  const fs::path target(output);
  const fs::path dir = target.has_parent_path() ? target.parent_path() : fs::path(".");
  std::error_code ec;
  if (!fs::is_directory(dir, ec)) throw input_error("--output = " + output + " (command line): the directory does not exist");
  if (fs::is_directory(target, ec)) throw input_error("--output = " + output + " (command line): is a directory");
}

}  // namespace

bool help_requested(const std::string& command, int argc, char** argv, const std::string& usage,
                    const po::options_description& own, bool takes_scenario, bool has_report, bool has_verdict) {
  for (int i = 1; i < argc; ++i) {
    const std::string a = argv[i];
    if (a == "--help" || a == "-h") {
      std::cout << "Usage: thermargin " << command << " " << usage << "\n\n";
      if (!own.options().empty()) std::cout << own << "\n";
      std::cout << common_options(has_report, has_verdict) << "\n";
      if (takes_scenario) std::cout << key_options() << "\n";
      std::cout << caution << "\n";
      return true;
    }
  }
  return false;
}

Invocation parse(const std::string& command, int argc, char** argv, const po::options_description& own,
                 bool takes_scenario, bool has_report, bool has_verdict) {
  Invocation inv;
  inv.command = command;
  po::options_description all;
  all.add(common_options(has_report, has_verdict)).add(own);
  if (takes_scenario) all.add(key_options()).add(hidden_key_options());
  po::options_description positional_holder;
  positional_holder.add_options()("input-file", po::value<std::vector<std::string>>());
  all.add(positional_holder);
  po::positional_options_description pos;
  pos.add("input-file", -1);
  po::parsed_options parsed(&all);
  try {
    parsed = po::command_line_parser(argc, argv).options(all).positional(pos).run();
    po::store(parsed, inv.vm);
    po::notify(inv.vm);
  } catch (const po::error& e) {
    throw input_error(std::string("command line: ") + e.what() + "; see `thermargin " + command + " --help`");
  }
  if (inv.vm.count("input-file")) {
    const auto& files = inv.vm["input-file"].as<std::vector<std::string>>();
    if (files.size() > 1) throw input_error("command line: more than one input file given ('" + files[1] + "'); one is accepted");
    inv.file = files.front();
  }
  const std::string fmt = inv.vm["format"].as<std::string>();
  if (fmt == "text") inv.format = Format::text;
  else if (fmt == "csv") inv.format = Format::csv;
  else if (fmt == "json") inv.format = Format::json;
  else throw input_error("--format = " + fmt + " (command line): must be one of: text | csv | json");
  if (inv.vm.count("output")) {
    inv.output = inv.vm["output"].as<std::string>();
    check_output(inv.output);
  }
  if (inv.vm.count("report")) {
    inv.report = inv.vm["report"].as<std::string>();
    check_report_path("--report", inv.report);
  }
  if (inv.vm.count("plots")) {
    inv.plots = inv.vm["plots"].as<std::string>();
    check_plots_directory("--plots", inv.plots);
  }
  inv.strict = inv.vm.count("strict") > 0;
  inv.quiet = inv.vm.count("quiet") > 0;
  if (takes_scenario) {
    if (!inv.file.empty()) inv.scenario.load_file(inv.file);
    for (const auto& opt : parsed.options) {
      if (opt.position_key != -1 || opt.value.empty()) continue;
      if (find_key(opt.string_key))
        inv.scenario.set(opt.string_key, opt.value.front(), command_line(opt.string_key));
    }
    // The [response] section is read apart from build_design(): refused here,
    // before any work, whichever command was given the scenario.
    read_response_section(inv.scenario);
  }
  return inv;
}

void emit(const Invocation& inv, const std::string& text) {
  if (inv.output.empty()) {
    std::cout << text;
    std::cout.flush();
    return;
  }
  check_output(inv.output);
  write_file_atomically(inv.output, text);
}

}  // namespace thermargin::cli
