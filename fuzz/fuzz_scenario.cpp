// libFuzzer target: the scenario reader and the design it validates
// (Scenario::load_file, build_design), then the nominal chain at the range's
// ends and middle. The reader takes a path, so each input is written to a
// file of this process first.
#include <unistd.h>

#include <cstdint>
#include <cstdio>
#include <fstream>
#include <string>

#include "fuzz_common.hpp"
#include "thermargin/chain/chain.hpp"
#include "thermargin/engines/nominal.hpp"
#include "thermargin/input/scenario.hpp"

namespace {

const std::string& scratch_file() {
  static const std::string path = "/tmp/thermargin_fuzz_scenario_" + std::to_string(::getpid()) + ".ini";
  return path;
}

}  // namespace

extern "C" int LLVMFuzzerTestOneInput(const std::uint8_t* data, std::size_t size) {
  using namespace thermargin;
  {
    std::ofstream out(scratch_file(), std::ios::binary | std::ios::trunc);
    out.write(reinterpret_cast<const char*>(data), static_cast<std::streamsize>(size));
  }
  return fuzz::run([&] {
    Scenario s;
    s.load_file(scratch_file());
    const Design d = build_design(s);
    const Chain chain(d);
    const auto& c = d.conditions;
    for (const double t : {c.t_min, 0.5 * (c.t_min + c.t_max), c.t_max}) {
      const NominalPoint p = nominal_point(chain, t);
      // A reading is a number or a status, never a NaN behind an ok.
      if (p.status == Status::ok) {
        fuzz::check_finite(p.error, "nominal error");
        fuzz::check_finite(p.code, "nominal code");
      }
    }
  });
}
