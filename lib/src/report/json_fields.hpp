// JSON fields every writer shapes the same way (not public API): a number
// that may not be finite, an optional number, and a Monte Carlo run's yield.
#pragma once

#include <nlohmann/json.hpp>
#include <cmath>
#include <optional>

#include "thermargin/engines/monte_carlo.hpp"

namespace thermargin::json_fields {

// A number, or null where it is not finite (no "NaN" in JSON).
template <class Json = nlohmann::json>
Json finite(double v) {
  return std::isfinite(v) ? Json(v) : Json(nullptr);
}

// An optional number, or null where it is missing or not finite.
template <class Json = nlohmann::json>
Json finite(const std::optional<double>& v) {
  return v ? finite<Json>(*v) : Json(nullptr);
}

// An optional value, or null.
template <class Json = nlohmann::json, class T>
Json optional(const std::optional<T>& v) {
  return v ? Json(*v) : Json(nullptr);
}

// A Monte Carlo run's largest error and yield with its 95 % interval, in
// this order: mc_max_abs, yield, yield_low, yield_high, failures_per_million.
template <class Json>
void add_yield(Json& j, const McSummary& mc) {
  j["mc_max_abs"] = mc.max_abs;
  j["yield"] = mc.yield;
  j["yield_low"] = mc.yield_low;
  j["yield_high"] = mc.yield_high;
  j["failures_per_million"] = mc.failures_per_million;
}

}  // namespace thermargin::json_fields
