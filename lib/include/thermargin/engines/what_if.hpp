// What would help: the requirement window's worst case and linear band with
// one error source improved at a time, everything else as designed.
//
// The contributor table says which sources are large; this says how much
// the design gains by buying the better part. For the sources that lead the
// window's contributor table by share of the variance or by their own
// worst-case half-width, each is re-run through the worst-case and linear
// engines over the window's temperatures twice: with its bound halved (the
// next better grade, roughly) and with it removed (an ideal part: the
// ceiling of what improving it can give). Reading-level sources change
// their settings instead: ADC noise (adc.noise), output rounding
// (firmware.resolution). Quantisation is left out: a finer ADC changes
// every error given in LSB too, which is a different design, not one part.
//
// Without the source the worst case visits half the corners, so the run
// costs about 1.5 worst-case runs over the window per source tried. Where
// enumerating every corner of every run would exceed `max_evaluations`
// chain evaluations (or beyond 16 active inputs), the what-if uses directed
// corners and says so.
#pragma once

#include <string>
#include <string_view>
#include <vector>

#include "thermargin/engines/budget.hpp"

namespace thermargin {

struct WhatIfFigures {
  double wc_max_abs = 0.0;   // K, largest |worst-case error| in the window
  double rss_max_abs = 0.0;  // K, largest |linear band end| in the window
  bool readable = true;      // every window temperature could be read at every corner
};

struct WhatIfRow {
  std::string name, label;  // the source (sources.hpp names)
  std::string key;          // the scenario key that sets it
  WhatIfFigures halved, removed;
};

struct WhatIf {
  WhatIfFigures as_designed;  // the same engines over the same window, nothing changed
  bool directed = false;      // corners directed by sensitivities
  std::vector<WhatIfRow> rows;  // most helpful first (by the verdict's basis, removed then halved)
};

struct WhatIfOptions {
  int sources = 4;                 // leaders tried by share and by half-width each (union)
  double max_evaluations = 2e7;    // chain evaluations of the whole what-if before directing corners
  int threads = -1;                // the worst case's; -1: the scenario's montecarlo.threads, 0: all cores
};

// The figure the verdict reads (the linear band for requirement.basis =
// linear, else the worst case: the what-if does not re-run Monte Carlo).
double basis_figure(const WhatIfFigures& f, Requirement::Basis basis);

// Which change brings the verdict's figure within requirement.max_error:
// "halved" (then removing does too), "removed", or "" for neither. Always ""
// for a Monte Carlo verdict, which is on the yield.
std::string_view enough(const WhatIfRow& row, const Requirement& requirement);

// Whether the rows are judged against the limit: the design as designed
// misses requirement.max_error by the verdict's basis (never for a Monte
// Carlo verdict).
bool judged_against_limit(const WhatIf& w, const Requirement& requirement);

// enough() as a reader's phrase: "if halved", "only if removed" or "no".
std::string_view enough_phrase(const WhatIfRow& row, const Requirement& requirement);

// `budget` is run_budget(chain)'s result: its window contributor table
// chooses the sources tried.
WhatIf what_if(const Chain& chain, const Budget& budget, const WhatIfOptions& options = {});

}  // namespace thermargin
