// The fixed-resistor picker: which preferred value (series.hpp) to fit in
// the divider so that a design meets its requirement window best.
//
// Every candidate is the scenario with divider.r_fixed (and, when a pair is
// asked for, divider.r_parallel) set to that value and built through the
// scenario's own validation, so the candidate is exactly the design
// `thermargin budget` would analyse. Candidates are ranked by one objective
// over the requirement window — the worst-case max |error| (extreme-value
// analysis, worst_case.hpp), the linear-band max |error| (GUM, JCGM 100:2008
// §5.1.2, linear_budget.hpp), the Monte Carlo band (JCGM 101:2008,
// monte_carlo.hpp) or the smallest ADC sensitivity in LSB/K (largest wins) —
// and optional constraints on the nominal design (self-heating, divider
// current and power, ADC span use, sensitivity) move a candidate that
// violates one after every candidate that does not.
//
// The worst-case ranking is exact but does not enumerate every corner of
// every candidate: the two corners directed by the sensitivities are among
// all corners, so their error is a lower bound of the full worst case, and
// so is the full enumeration at some of the temperatures. Candidates are
// refined best first (bound, then the enumeration at the three temperatures
// where the bound is largest, then at more and more of the window) until
// the first N are exact and no bound can beat them (branch and bound; the
// top N are exactly what a full enumeration of every candidate would give).
//
// Beside the ranking, analytic guidance: the continuous optimum of the
// objective (Brent's method, Boost.Math brent_find_minima, on ln R between
// the best candidate's neighbours); the value of largest sensitivity at the
// window centre, R = R(Tm), from d/dR_f [R_f·R'/(R_f + R)²] = 0 (textbook
// result); and the three-point linearising value
// R = (R1R2 + R2R3 − 2R1R3)/(R1 + R3 − 2R2) for the window ends and centre
// (Pallàs-Areny & Webster, Sensors and Signal Conditioning, eq. 2.37, read
// in a secondary source). docs/pick.md explains the ranking to users.
#pragma once

#include <cstdint>
#include <functional>
#include <optional>
#include <string>
#include <string_view>
#include <vector>

#include "thermargin/chain/chain.hpp"
#include "thermargin/core/error.hpp"
#include "thermargin/core/number.hpp"
#include "thermargin/input/scenario.hpp"
#include "thermargin/tools/series.hpp"

namespace thermargin {

enum class Objective {
  worst_case,   // smallest worst-case max |error| over the window (K)
  linear,       // smallest linear-band max |error| over the window (K)
  monte_carlo,  // smallest Monte Carlo band max |error| over the window (K)
  sensitivity,  // largest smallest |ADC sensitivity| over the window (LSB/K)
};
std::string_view to_string(Objective o);  // "worst-case"
std::optional<Objective> objective_from_name(std::string_view name);
std::string_view objective_names();  // for messages
inline bool maximised(Objective o) { return o == Objective::sensitivity; }

// Optional limits on the nominal design. Each is checked on the nominal
// chain (every deviation zero, the board at the middle of its range).
struct PickConstraints {
  std::optional<double> max_self_heating;  // K, element rise anywhere in conditions.t_min..t_max
  std::optional<double> max_current;       // A, divider current while powered, anywhere in the range
  std::optional<double> max_power;         // W, V_excitation × that current
  std::optional<double> min_span;          // fraction of 2^N: (code_max − code_min)/2^N over the window
  std::optional<double> min_sensitivity;   // LSB/K, smallest |d code/dT| over the window
  bool settles = false;  // the reading settles to within ½ LSB over the window (when adc.c_sample > 0; docs/model.md §14)
};

struct PickOptions {
  // Candidates: the series' values within [range_low, range_high], or the
  // explicit `values` when given (then series and range are not used).
  Series series = Series::e96;
  double range_low = 1e3, range_high = 1e6;  // Ω
  std::vector<double> values;                // Ω
  Objective objective = Objective::worst_case;
  // The grade of the resistors picked; none: the scenario's
  // divider.r_fixed_tol / r_fixed_tempco (and r_parallel_tol for a pair).
  // series_grade: the tolerance IEC 60063 pairs with `series`
  // (series_tolerance; candidates from a series only), unless `tolerance`.
  std::optional<double> tolerance;  // ± relative
  bool series_grade = false;
  std::optional<double> tempco;     // ± 1/K (fixed resistor only)
  PickConstraints constraints;
  // Also pick a resistor across the sensor branch (divider.r_parallel) from
  // the same candidates plus "none" (reduced search for long lists: see
  // docs/pick.md).
  bool parallel = false;
  int top = 10;     // rows returned, best first
  int verify = 0;   // re-check this many of the top rows by Monte Carlo
  // Monte Carlo units per candidate; 0: the scenario's montecarlo.units,
  // capped at mc_objective_cap (objective) or mc_verify_cap (verify).
  std::uint64_t mc_units = 0;
  int threads = -1;  // -1: the scenario's montecarlo.threads; 0: all cores
  bool guidance = true;
  std::function<void(double fraction_done)> progress;  // called from worker threads, serialised
};

inline constexpr std::uint64_t mc_objective_cap = 2000;
inline constexpr std::uint64_t mc_verify_cap = 10000;
// Candidate lists longer than this get the reduced pair search.
inline constexpr std::size_t full_pair_search_limit = 40;

// A Monte Carlo re-check of one row (JCGM 101:2008; yield as in monte_carlo.hpp).
struct McCheck {
  std::uint64_t units = 0;
  bool readable = true;      // every reading in the window converted
  double max_abs = 0.0;      // K, largest |endpoint| of the coverage bands in the window
  double yield = 0.0, yield_low = 0.0, yield_high = 0.0;  // 95 % Clopper–Pearson
};

struct PickRow {
  double r_fixed = 0.0;              // Ω
  std::optional<double> r_parallel;  // Ω across the sensor branch; none: absent
  std::optional<Series> series;      // the coarsest series holding r_fixed
  // The objective's engine in the window (and the nominal chain over the
  // range for thermal runaway): ok, or the first status that stopped it.
  Status status = Status::ok;
  double objective = 0.0;  // K or LSB/K; meaningful when status is ok
  std::optional<double> wc_max_abs, rss_max_abs, mc_max_abs;  // K over the window (when evaluated)
  double min_sensitivity = 0.0;   // LSB/K over the window (nominal)
  double max_self_heating = 0.0;  // K over the range (nominal)
  double max_current = 0.0;       // A over the range, while the divider is powered
  double max_power = 0.0;         // W, V_excitation × max_current
  double span = 0.0;              // fraction of 2^N used over the window
  std::string dominant;           // short name of the largest window contributor (linear budget)
  // Why the row ranks after the feasible ones, in this order: the status
  // (saturated, thermal-runaway, ...), then max-self-heating, max-current,
  // max-power, min-span, min-sensitivity. Empty: feasible.
  std::vector<std::string> rejected_by;
  std::optional<McCheck> verify;
  bool feasible() const { return rejected_by.empty(); }
};

// A guidance value and the candidates either side of it (the series
// neighbours, or the nearest given values), with their objective values.
struct GuidanceValue {
  std::optional<double> r;  // Ω; none: no positive value exists (or not computed)
  std::optional<double> objective;  // at r (continuous optimum only)
  std::optional<double> below, above;  // Ω
  std::optional<double> below_objective, above_objective;
};

struct Guidance {
  // Continuous optimum of the objective alone (constraints ignored),
  // searched between the neighbours of the best candidate by the objective.
  GuidanceValue optimum;
  int evaluations = 0;  // objective evaluations Brent used
  // Largest sensitivity at the window centre: R = R_branch(Tm).
  double t_centre = 0.0;  // °C
  GuidanceValue max_sensitivity;
  // Three-point linearisation through window_min, the centre and window_max.
  GuidanceValue linearising;
};

struct PickResult {
  Objective objective = Objective::worst_case;
  std::string candidates_label;  // "E96, 1 kohm..1 Mohm" or "4 given values"
  std::size_t candidates = 0;    // r_fixed values (pairs with --parallel)
  std::size_t within_constraints = 0;  // candidates that meet every optional constraint
  std::size_t evaluated_in_full = 0;  // candidates whose objective was computed exactly
  bool pair_search = false;
  bool reduced_pair_search = false;
  // More than max_enumerated_inputs toleranced inputs: the worst case is the
  // engine's search from the sensitivity-directed corners, not every corner.
  bool corners_directed = false;
  double tolerance = 0.0, tempco = 0.0;  // the fixed resistor's grade used
  std::uint64_t mc_objective_units = 0, mc_verify_units = 0;
  double window_min = 0.0, window_max = 0.0;  // °C
  std::vector<PickRow> rows;  // best first: feasible by objective, then rejected
  // Winner's advantage over the runner-up in the objective's unit (K less,
  // or LSB/K more); none when there is no readable runner-up.
  std::optional<double> margin;
  Guidance guidance;
  const PickRow& winner() const { return rows.front(); }
};

// Ranks the candidates for a scenario. Throws input_error (before any work)
// for bad options: a range with low ≥ high, no candidate, a non-positive
// limit, top < 1, ...
PickResult pick(const Scenario& scenario, const PickOptions& options);

// The winning fixed resistor (Ω) for a scenario: pick() with top = 1, no
// guidance and no verification. For other engines (grades --re-pick).
double best_fixed_resistor(const Scenario& scenario, const PickOptions& options);

// The row pick() ranks first (top = 1, no guidance, no verification),
// searched outward from `start` (Ω; a guess such as a similar design's
// winner; the answer does not depend on it, only the work does). With the
// worst-case objective, every corner enumerated and no pair, it screens only
// candidates that might win: the start value; then, in rounds, a few
// corners of the best candidate so far (witnesses, at the temperatures where
// the start's bound is largest and the window's ends) evaluated on every
// candidate not yet screened — each a lower bound of that candidate's worst
// case, which rules it out once it passes the best worst case so far — and
// the few with the smallest bounds that remain screened at those
// temperatures and joined to the branch and bound, until every candidate is
// screened or ruled out. It returns the same row as pick() over the whole
// list. Otherwise (or when no screened candidate is feasible) it is pick()
// over the whole list. For other engines (grades --re-pick).
PickRow pick_winner(const Scenario& scenario, const PickOptions& options, double start);

// The three-point linearising resistor for branch resistances R1, R2, R3 at
// three equally spaced temperatures; none when no positive value exists.
std::optional<double> linearising_resistor(double r1, double r2, double r3);

// The nominal branch resistance (element + leads, ∥ r_parallel) at t °C,
// without self-heating; none outside a table sensor's range.
std::optional<double> nominal_branch_resistance(const Design& d, double t_celsius);

// The objective of one candidate value (Ω) with the scenario's own
// r_parallel: the full evaluation a ranking uses (K, or LSB/K for
// sensitivity); none when the window cannot be read.
std::optional<double> objective_at(const Scenario& scenario, const PickOptions& options, double r_fixed);

// Readers for the options as written on a command line; each rejects bad
// text naming `where` (the option).
struct ResistanceRange {
  double low = 0.0, high = 0.0;
};
ResistanceRange parse_range(std::string_view text, const Where& where);   // "1k..1M"
std::vector<double> parse_values(std::string_view text, const Where& where);  // "4k7,10k,22k"
Series parse_series(std::string_view text, const Where& where);
Objective parse_objective(std::string_view text, const Where& where);
struct Grade {
  double tolerance = 0.0;
  bool series = false;  // "series": the series' own tolerance (series_tolerance)
  std::optional<double> tempco;
};
Grade parse_grade(std::string_view text, const Where& where);  // "0.1%", "0.1%,25ppm", "series" or "series,25ppm"
// A positive limit of quantity q ("5mA", "0.05K").
double parse_limit(std::string_view text, Quantity q, const Where& where);

}  // namespace thermargin
