// libFuzzer target: the fit data reader and the fits (parse_rt_data,
// fit_rt_data). The first byte chooses the settings (the extended model, a
// window), the rest is the data file. Every fit returns finite residuals and
// error figures; data that cannot support a fit is refused.
#include <cstdint>
#include <string>

#include "fuzz_common.hpp"
#include "thermargin/tools/fit.hpp"
#include "thermargin/input/rt_data.hpp"

extern "C" int LLVMFuzzerTestOneInput(const std::uint8_t* data, std::size_t size) {
  using namespace thermargin;
  if (size == 0) return 0;
  const std::uint8_t choice = data[0];
  const std::string text = fuzz::text_of(data + 1, size - 1);
  return fuzz::run([&] {
    FitSettings s;
    s.extended = (choice & 1) != 0;
    if (choice & 2) {
      s.t_min = 0.0;
      s.t_max = 100.0;
    }
    if (choice & 4) s.limit = 0.01;
    s.between_samples = 4;  // the search between points, kept short per input
    const FitResult r = fit_rt_data(parse_rt_data(text, "fuzz_fit.csv"), s);
    if (r.fits.empty()) fuzz::finding("a fit result with no fits");
    if (r.recommendation.fit >= r.fits.size()) fuzz::finding("a recommendation that names no fit");
    for (const auto& f : r.fits) {
      for (const auto& c : f.coefficients) fuzz::check_finite(c.value, "coefficient");
      for (const auto& p : f.residuals) fuzz::check_finite(p.residual, "residual");
      fuzz::check_finite(f.max_residual, "max_residual");
      fuzz::check_finite(f.rms_residual, "rms_residual");
      fuzz::check_finite(f.worst_error, "worst_error");
    }
    (void)scenario_snippet(r, r.recommendation.fit);
  });
}
