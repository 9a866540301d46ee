// thermargin: how accurate a resistive temperature sensor really is once it
// sits in a divider read by an ADC. This file only dispatches commands and
// turns failures into exit statuses: 2 bad input, 1 internal error.
#include <cstring>
#include <exception>
#include <iostream>
#include <string>

#include "commands.hpp"
#include "thermargin/core/caution.hpp"
#include "thermargin/core/error.hpp"

namespace {

void usage(std::ostream& out) {
  out << "thermargin " << thermargin::version
      << " - accuracy of a thermistor or RTD read through a divider and an ADC\n\n"
         "Usage: thermargin COMMAND [FILE] [options]\n\n"
         "Commands:\n"
         "  budget [FILE]   error bands across the range (nominal, worst case, linear budget, Monte Carlo),\n"
         "                  the contributors and the verdict against the requirement\n"
         "  fit DATA.csv    fit beta and Steinhart-Hart (NTC) or Callendar-Van Dusen (RTD) coefficients to R-T points;\n"
         "                  residuals, recommendation, scenario lines; a table's R_min/R_max as R25 and B tolerances\n"
         "  table [FILE]    the firmware's lookup table (C header or CSV) with its interpolation error and size\n"
         "  pick [FILE]     rank preferred fixed-resistor values (E12..E192) by worst case, band or sensitivity\n"
         "  grades [FILE] --catalogue CSV   part grades against cost: accuracy, yield and price of every\n"
         "                  combination, the cost/accuracy front and the cheapest that meets the requirement\n"
         "  response [FILE] following a changing temperature: the sensor's time constant and the firmware's\n"
         "                  filter on a ramp and a step, the noise left, the filter that meets the requirement\n"
         "  check [FILE]    read and validate a scenario; print every resolved value, its unit and origin\n\n"
         "With no FILE the built-in default design is analysed (scenarios/default.ini holds the same values).\n"
         "Every scenario key is also an option: --divider.r_fixed=4k7 overrides the file.\n"
         "`thermargin COMMAND --help` lists a command's options.\n\n"
      << thermargin::caution << "\n";
}

}  // namespace

int main(int argc, char** argv) {
  if (argc < 2 || !std::strcmp(argv[1], "--help") || !std::strcmp(argv[1], "-h") || !std::strcmp(argv[1], "help")) {
    usage(std::cout);
    return argc < 2 ? 2 : 0;
  }
  if (!std::strcmp(argv[1], "--version")) {
    std::cout << "thermargin " << thermargin::version << "\n";
    return 0;
  }
  const std::string command = argv[1];
  try {
    if (command == "budget") return thermargin::cli::run_budget(argc - 1, argv + 1);
    if (command == "check") return thermargin::cli::run_check(argc - 1, argv + 1);
    if (command == "fit") return thermargin::cli::run_fit(argc - 1, argv + 1);
    if (command == "table") return thermargin::cli::run_table(argc - 1, argv + 1);
    if (command == "pick") return thermargin::cli::run_pick(argc - 1, argv + 1);
    if (command == "grades") return thermargin::cli::run_grades(argc - 1, argv + 1);
    if (command == "response") return thermargin::cli::run_response(argc - 1, argv + 1);
    std::cerr << "thermargin: unknown command '" << command << "'; accepted: budget, check, fit, grades, pick, response, table (see thermargin --help)\n";
    return 2;
  } catch (const thermargin::input_error& e) {
    std::cerr << "thermargin: " << e.what() << "\n";
    return 2;
  } catch (const std::exception& e) {
    std::cerr << "thermargin: internal error: " << e.what() << "\n";
    return 1;
  }
}
