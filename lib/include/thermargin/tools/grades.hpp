// Part grades against cost: every combination of the options in a catalogue
// (catalogue.hpp, one option per slot) applied to a scenario, evaluated by
// the engines, priced, and set against the requirement.
//
// Each combination is the scenario with its options' settings applied
// (keys an option does not set keep the scenario's value) and built through
// the scenario's own validation, so it is exactly the design `thermargin
// budget` would analyse with those overrides. Over the requirement window it
// gets the worst-case max |error| (extreme-value analysis, worst_case.hpp),
// the linear-band max |error| (GUM, JCGM 100:2008 §5.1.2, linear_budget.hpp)
// and, where it can matter, the Monte Carlo yield with its 95 %
// Clopper–Pearson interval (JCGM 101:2008, monte_carlo.hpp). Every
// combination's Monte Carlo run uses the same seed and unit count: the units
// are drawn from counter-based streams keyed by unit index and input, so all
// combinations see the same underlying random numbers (common random
// numbers) and a yield does not change when rows are added to the catalogue.
//
// Cost per unit = Σ unit costs + Σ setup costs / volume. With a reject cost
// C (scrap or rework of a unit that fails), the cost per good unit is
// cost/yield + C·(1 − yield)/yield: building N units costs N·cost + N·(1 −
// yield)·C and yields N·yield good ones.
//
// The cost/accuracy front (Pareto front) holds the combinations that no
// other combination beats on both cost and error (cost ≤ and error ≤ with
// one of them <). The recommendation is the cheapest combination that meets
// the requirement: its error at the requirement's basis within the limit
// over the window and its Monte Carlo yield at or above the required yield.
//
// Screening (the rule docs/grades.md gives users): worst case and linear
// budget run for every combination; Monte Carlo runs only where the
// combination can still meet the requirement. With a worst-case or linear
// basis that is where the basis error is within the limit (exact: the error
// part of the requirement is deterministic). With a Monte Carlo basis a
// pilot of the first units runs first and the rest only when the pilot's
// one-sided 99.9 % Clopper–Pearson upper bound of the yield reaches the
// required yield. `mc_all` (and an error measure of monte-carlo, which needs
// every combination's band) runs every combination in full.
//
// Threads take whole combinations; each combination's engines run on one
// thread, so results do not depend on the thread count.
#pragma once

#include <cstdint>
#include <functional>
#include <optional>
#include <string>
#include <string_view>
#include <vector>

#include "thermargin/core/progress.hpp"
#include "thermargin/input/catalogue.hpp"
#include "thermargin/engines/monte_carlo.hpp"
#include "thermargin/tools/picker.hpp"
#include "thermargin/input/scenario.hpp"
#include "thermargin/engines/worst_case.hpp"

namespace thermargin {

// What "error" means for the front.
enum class ErrorMeasure { worst_case, linear, monte_carlo };
std::string_view to_string(ErrorMeasure m);  // "worst-case"
ErrorMeasure parse_error_measure(std::string_view text, const Where& where);

struct GradesOptions {
  ErrorMeasure by = ErrorMeasure::worst_case;
  // Units over which setup costs are spread; required when the catalogue
  // has a setup cost (an assumed volume would decide the answer silently).
  std::optional<double> volume;
  std::optional<double> reject_cost;  // per failed unit; enables cost per good unit
  std::uint64_t units = 10000;        // Monte Carlo units per combination
  bool mc_all = false;                // no screening: Monte Carlo for every combination
  int threads = -1;                   // -1: the scenario's montecarlo.threads; 0: all cores
  CornerMethod corners = CornerMethod::automatic;
  // Re-pick the fixed resistor for every combination first (picker.hpp),
  // with these options (series, range, objective; the resistor's grade is
  // the combination's own).
  bool re_pick = false;
  PickOptions pick;
  // The share of the designs evaluated and the best combination so far
  // ("best so far: thermistor 1%, resistor 0.1%: 0.420 K, 1.93 per unit,
  // meets"), serialised; core/progress.hpp draws it.
  ProgressCallback progress;
};

// Series steps either side of the anchor that a re-pick searches first
// (the window moves while the winner sits at its edge; docs/grades.md).
inline constexpr int re_pick_half_width = 8;

// Pilot units for the Monte Carlo screen on a Monte Carlo basis.
inline constexpr std::uint64_t mc_pilot_units = 1000;
inline constexpr double mc_pilot_alpha = 0.001;  // one-sided 99.9 %

struct GradeRow {
  std::vector<int> choice;  // option index per slot (Catalogue::slots order)
  std::size_t index = 0;    // the combination's position in catalogue order
  double unit_cost = 0.0;   // Σ unit costs + Σ setup costs / volume
  double setup_per_unit = 0.0;
  std::optional<double> r_fixed;  // Ω, the re-picked fixed resistor

  // Over the requirement window. An engine's figure is absent when some
  // reading there cannot be converted (status and where).
  Status status = Status::ok;
  double status_at = 0.0;  // °C, the first window temperature with the status
  std::optional<double> wc_max_abs, rss_max_abs;  // K

  bool mc_run = false;
  std::string mc_skipped;  // why Monte Carlo did not run in full (empty when it did)
  std::optional<McSummary> mc;  // the full run, or the pilot when the screen stopped it
  std::optional<double> cost_per_good_unit;  // with a reject cost and a yield > 0

  std::optional<double> error;  // K by the chosen measure; none: not available
  bool within_limit = false;    // the requirement's basis error is within the limit (monte-carlo basis: n/a, true)
  bool on_front = false;
  bool meets_requirement = false;
  std::string verdict;  // one phrase: "meets the requirement" or why not
  // Its RTD class is used beyond the range IEC 60751 rates it for (one
  // sentence; empty otherwise): marked, never refused.
  std::string rtd_class_note;
  bool end_of_life = false;  // judged at end of life: drift set (scenario or grade) and requirement.at = end-of-life
};

struct GradesResult {
  ErrorMeasure by = ErrorMeasure::worst_case;
  Requirement requirement;  // the scenario's
  std::optional<double> volume, reject_cost;
  std::uint64_t units = 0;
  std::size_t mc_full = 0, mc_pilot_only = 0;  // combinations with a full run, stopped by the pilot
  std::optional<double> anchor_r_fixed;         // re-pick: the scenario's own pick (the search's start)
  std::vector<std::string> slots;
  std::vector<std::vector<std::string>> grades;  // per slot, the grade names
  std::vector<GradeRow> rows;                    // cheapest first (then smaller error, then catalogue order)
  std::vector<std::size_t> front;                // indices into rows, cheapest first
  std::optional<std::size_t> recommendation;     // index into rows
  // The scenario's current parts: per slot, the option whose every setting
  // equals the scenario's value (none: no option matches).
  std::vector<std::optional<int>> current;
  std::optional<std::size_t> current_row;  // index into rows when every slot matched
  // What the recommendation saves against the current parts (negative: costs
  // more), per good unit when a reject cost is given and both have a yield,
  // else per unit built; none without a current row or a recommendation.
  std::optional<double> saving;
  bool saving_per_good_unit = false;
  std::string summary;  // what the recommendation changes and saves, one paragraph

  std::string choice_text(const GradeRow& r) const;  // "thermistor = 1%, adc = ext"
  // The figure the recommendation ranks by: cost per good unit with a reject cost, else unit cost.
  std::optional<double> ranking_cost(const GradeRow& r) const;
};

// Checks every option against the scenario (its settings applied alone
// build a valid design), then every combination, before any work; the first
// failure is an input_error naming the catalogue's file, line and column.
void validate_grades(const Scenario& scenario, const Catalogue& catalogue, const GradesOptions& options);

// Validates, then evaluates every combination.
GradesResult evaluate_grades(const Scenario& scenario, const Catalogue& catalogue, const GradesOptions& options);

// The Pareto front of (cost, error) points: flags, true where no other point
// has cost ≤ and error ≤ with one of them strictly smaller. A point without
// an error is never on the front. Costs closer than a relative 1e-9 count
// as equal (sums of decimal prices).
std::vector<bool> pareto_front(const std::vector<double>& cost, const std::vector<std::optional<double>>& error);

// Cost per good unit: cost/yield + reject_cost·(1 − yield)/yield; none for yield 0.
std::optional<double> cost_per_good_unit(double unit_cost, double yield, double reject_cost);

// A money amount for messages: two to four decimals, trailing zeros dropped.
std::string money(double v);

}  // namespace thermargin
