// The error budget a design review signs off: the nominal error, the worst
// case, the linear budget and (when run) the Monte Carlo bands across the
// range; the contributor table per temperature and over the requirement
// window; and the verdict against the requirement with its margin.
//
// Contributor shares are each source's part of u_c² (JCGM 100:2008 §5.1.2);
// over the window, its part of the summed variance of the window's points.
// The dominant source is the one with the largest window share.
#pragma once

#include <memory>
#include <optional>
#include <string>
#include <vector>

#include "thermargin/engines/linear_budget.hpp"
#include "thermargin/engines/monte_carlo.hpp"
#include "thermargin/engines/nominal.hpp"
#include "thermargin/input/scenario.hpp"
#include "thermargin/engines/worst_case.hpp"

namespace thermargin {

struct Contributor {
  std::string name, label;
  double share = 0.0;       // fraction of the combined variance
  double half_width = 0.0;  // K, its own worst-case half-width (largest in the window)
};

struct BudgetPoint {
  double t = 0.0;
  bool in_window = false;
  NominalPoint nominal;
  WorstCasePoint wc;
  LinearPoint linear;
  std::optional<McPoint> mc;
  std::vector<Contributor> contributors;  // sorted, largest share first
};

// A run of consecutive temperatures that cannot be read (unreadable.hpp).
struct UnreadableRun {
  double from = 0.0, to = 0.0;  // °C, the run's first and last temperature
  Status status = Status::ok;   // what happens at its first temperature
  bool nominal = false;         // the nominal unit itself cannot read there (not only some units)
  bool in_window = false;       // the run lies in the requirement window
};

struct Verdict {
  bool pass = false;
  Requirement::Basis basis = Requirement::Basis::worst_case;
  double worst_abs_error = 0.0;  // K, largest |error| in the window by the basis
  double worst_at = 0.0;         // °C
  double margin = 0.0;           // K, limit − worst_abs_error (negative: fails)
  std::string reason;            // one sentence
  // The two ways to fail, apart: where the window cannot be read (the runs
  // inside it, empty when every window temperature reads) and, where it
  // reads, the basis engine's largest |error| (NaN when none reads; equal
  // to worst_abs_error when every temperature reads).
  std::vector<UnreadableRun> unreadable;
  double readable_max_abs = 0.0;  // K
  double readable_at = 0.0;       // °C
  // The budget the verdict was judged on (requirement.at); end of life only
  // when drift is set (life.hpp).
  Requirement::At at = Requirement::At::delivery;
};

struct EndOfLife;

// Where the divider is starved: the smallest |ADC counts per kelvin| in the
// requirement window (nominal chain), with its millivolts per kelvin and the
// temperature step of one LSB there.
struct WeakestSensitivity {
  bool found = false;       // some window temperature could be read
  double t = 0.0;           // °C
  double lsb_per_k = 0.0;   // |LSB/K|
  double mv_per_k = 0.0;    // |mV/K|
  double lsb_in_k = 0.0;    // K
};

struct Budget {
  std::vector<BudgetPoint> points;
  std::vector<Contributor> window_contributors;  // sorted
  std::string dominant;                          // label of the largest
  double wc_max_abs = 0.0, rss_max_abs = 0.0;    // K, in the window
  double wc_max_at = 0.0, rss_max_at = 0.0;      // °C
  std::optional<McSummary> mc;
  double k_p = 3.0;
  bool wc_directed = false;
  int active_inputs = 0;
  long long wc_corners = 0;
  WeakestSensitivity weakest;
  int status_points = 0;  // points with a status other than ok (any engine)
  Verdict verdict;
  // The leaders over the window (up to three short names): by share of u_c²
  // and by own worst-case reach (half-width); a source can lead one list
  // and not the other (a tempco over a wide board range: small variance,
  // large reach at the board's ends).
  std::vector<std::string> leaders_by_share, leaders_by_reach;
  bool leaders_differ = false;
  // Over the product's life (life.hpp): the same budget of the end-of-life
  // design, when any drift is set; the verdict above is then the one of the
  // budget requirement.at names.
  std::shared_ptr<const EndOfLife> end_of_life;
};

struct EndOfLife {
  Design design;  // the delivery design with the drift inputs active
  Budget budget;  // its budget (its own end_of_life empty)
  Verdict delivery_verdict;  // the verdict the delivery budget alone gives
};

// Why the linear band fails the JCGM 101 §8 validation at a point, in one
// phrase (empty where it is validated or there is no Monte Carlo):
// saturation, the output rounding, a non-normal product of inputs (a pair
// row's share), or otherwise the output's shape.
std::string validation_failure_reason(const BudgetPoint& p, const Design& d);

struct BudgetOptions {
  bool monte_carlo = true;
  CornerMethod corners = CornerMethod::automatic;
  McProgress progress;  // optional callback
  int threads = -1;     // the engines'; -1: the scenario's montecarlo.threads, 0: all cores
};

Budget run_budget(const Chain& chain, const BudgetOptions& options = {});

// What the budget's engines may be asked to do in one run. Beyond, the run
// would take hours (the Monte Carlo engine simulates about 50 million ADC
// samples a second on one core of the development machine, the worst case
// about 2.5 million corner evaluations; docs/refusals.md).
inline constexpr double max_monte_carlo_samples = 2e11;      // units x temperatures x samples per reading
inline constexpr double max_worst_case_evaluations = 1e10;   // corners x temperatures
inline constexpr double monte_carlo_samples_per_second = 5e7;
inline constexpr double worst_case_evaluations_per_second = 2.5e6;

// Refuses, before any work, a run beyond those limits with its size and a
// time estimate: the Monte Carlo request names montecarlo.units (or
// montecarlo.max_units, the cap of auto) where the scenario set it, an
// enumeration of every corner names --corners.
void require_feasible(const Design& design, const Scenario& scenario, const BudgetOptions& options);

std::string_view to_string(Requirement::Basis b);

// How the worst case was formed, in words for the output: "full enumeration
// of 2^9 = 512 corners" or "corners directed by the sensitivities' signs:
// 17 active inputs, more than the 16 enumerated in full".
std::string corner_method_text(const Budget& b);

}  // namespace thermargin
