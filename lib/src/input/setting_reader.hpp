// Typed reads of a scenario's settings (not public API): each read parses
// the key's text in its quantity and applies one range rule, and every
// refusal names the key, its file and line (error.hpp). The design reader
// (design_reader.cpp) reads one section per function with it; a command
// with a section of its own reads it the same way.
#pragma once

#include <initializer_list>
#include <string>
#include <utility>
#include <vector>

#include "thermargin/core/error.hpp"
#include "thermargin/core/number.hpp"
#include "thermargin/input/scenario.hpp"

namespace thermargin {

class SettingReader {
 public:
  explicit SettingReader(const Scenario& s) : s_(s) {}

  const Scenario& scenario() const { return s_; }
  const Setting& at(const std::string& key) const { return s_.get(key); }
  const std::string& text(const std::string& key) const { return at(key).value; }
  bool is_default(const std::string& key) const { return at(key).where.kind == Origin::built_in; }

  double number(const std::string& key) const {
    const auto& st = at(key);
    return parse_quantity(st.value, find_key(key)->quantity, st.where);
  }
  double positive(const std::string& key) const {
    const double v = number(key);
    if (!(v > 0.0)) fail(key, "must be > 0");
    return v;
  }
  double non_negative(const std::string& key) const {
    const double v = number(key);
    if (v < 0.0) fail(key, "must be >= 0");
    return v;
  }
  double tolerance(const std::string& key) const {
    const double v = number(key);
    if (v < 0.0 || v >= 1.0) fail(key, "must be a tolerance from 0 up to (not including) 100 %");
    return v;
  }
  long long integer(const std::string& key, long long lo, long long hi) const {
    const double v = number(key);
    if (v < static_cast<double>(lo) || v > static_cast<double>(hi))
      fail(key, "must be a whole number from " + std::to_string(lo) + " to " + std::to_string(hi));
    return static_cast<long long>(v);
  }
  template <class E>
  E word(const std::string& key, std::initializer_list<std::pair<const char*, E>> choices) const {
    const auto& st = at(key);
    std::string list;
    for (const auto& c : choices) {
      if (st.value == c.first) return c.second;
      list += (list.empty() ? "" : " | ") + std::string(c.first);
    }
    fail(key, "must be one of: " + list);
  }
  bool boolean(const std::string& key) const {
    return word<bool>(key, {{"true", true}, {"yes", true}, {"1", true}, {"false", false}, {"no", false}, {"0", false}});
  }
  // A comma-separated list of numbers in quantity q.
  std::vector<double> list(const std::string& key, Quantity q) const;
  // Of two keys checked against each other, the one to name in a message:
  // `preferred`, unless only `other` was set (a default has no line to show).
  const char* set_one(const char* preferred, const char* other) const {
    return is_default(preferred) && !is_default(other) ? other : preferred;
  }
  [[noreturn]] void fail(const std::string& key, const std::string& why) const {
    const auto& st = at(key);
    reject(st.where, st.value, why);
  }
  // A key set that the design's other choices make irrelevant: a note
  // (Design::notes, `thermargin check` prints them), not a refusal; the
  // value is not used. "scenario.ini:12: supply.v_reference_tol = 1% is not
  // used: <why>".
  void note(const std::string& key, const std::string& why) const {
    const auto& st = at(key);
    notes_.push_back(st.where.origin() + ": " + key + " = " + st.value + " is not used: " + why);
  }
  const std::vector<std::string>& notes() const { return notes_; }

 private:
  const Scenario& s_;
  mutable std::vector<std::string> notes_;
};

}  // namespace thermargin
