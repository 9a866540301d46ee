// The caution every output carries. Temperature readings protect batteries,
// food, medicines and people; a number from this tool is an estimate.
#pragma once

#include <string_view>

namespace thermargin {

inline constexpr std::string_view caution =
    "CAUTION: this is an engineering estimate of a measurement chain, not a certification. Safety functions "
    "need independent protection, a qualified review, the applicable standards, local codes and licensed practice.";

inline constexpr std::string_view version = "0.1.0";

}  // namespace thermargin
