// What `thermargin fit` prints: the fits of R-T data (fit.hpp) as text for a
// person, CSV for a spreadsheet and JSON for a program. `snippet` is the
// scenario lines of the recommended fit (scenario_snippet). Presentation
// only. Every output keeps the caution.
#pragma once

#include <optional>
#include <string>

#include "thermargin/tools/fit.hpp"

namespace thermargin {

// What a fit reports beside the NTC fits: the platinum fit of data that rise
// with temperature, and the R25/B tolerances that cover a table's limits.
struct FitExtras {
  std::optional<RtdFit> rtd;
  SpreadFit spread;
  double limit = 0.1;  // K, the settings' limit the RTD fit is judged against
};

std::string fit_text(const FitResult& result, const std::string& snippet, const FitExtras& extras = {});
std::string fit_csv(const FitResult& result);  // one line per model and method
std::string fit_json(const FitResult& result, const std::string& snippet,
                     const FitExtras& extras = {});  // two-space indent, final newline

}  // namespace thermargin
