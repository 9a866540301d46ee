// The error budget a design review signs off: the nominal error, the worst
// case, the linear budget and (when run) the Monte Carlo bands across the
// range; the contributor table per temperature and over the requirement
// window; and the verdict against the requirement with its margin.
//
// Contributor shares are each source's part of u_c² (JCGM 100:2008 §5.1.2);
// over the window, its part of the summed variance of the window's points.
// The dominant source is the one with the largest window share.
#pragma once

#include <optional>
#include <string>
#include <vector>

#include "thermargin/linear_budget.hpp"
#include "thermargin/monte_carlo.hpp"
#include "thermargin/nominal.hpp"
#include "thermargin/worst_case.hpp"

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

struct Verdict {
  bool pass = false;
  Requirement::Basis basis = Requirement::Basis::worst_case;
  double worst_abs_error = 0.0;  // K, largest |error| in the window by the basis
  double worst_at = 0.0;         // °C
  double margin = 0.0;           // K, limit − worst_abs_error (negative: fails)
  std::string reason;            // one sentence
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
  long long wc_corners = 0;
  int status_points = 0;  // points with a status other than ok (any engine)
  Verdict verdict;
};

struct BudgetOptions {
  bool monte_carlo = true;
  CornerMethod corners = CornerMethod::automatic;
  McProgress progress;  // optional callback
};

Budget run_budget(const Chain& chain, const BudgetOptions& options = {});

std::string_view to_string(Requirement::Basis b);

}  // namespace thermargin
