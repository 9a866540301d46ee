// Evaluations of one chain at one temperature that share their element
// stages. The element stage (the sensor, its self-heating and the parts the
// element's temperature depends on: the costly part of an evaluation) reads
// only the element's sources of a unit (stage_of, chain.hpp), and so do the
// calibration points' element stages. Two units whose element sources are
// equal, bit for bit, therefore have the same element stages: the memo
// computes them once and evaluates each unit from them, which is
// Chain::evaluate to the bit (Chain::evaluate(const ElementStages&, ...)).
// An engine that evaluates many units differing in a few sources at one
// temperature (the linear budget's finite differences, a corner read at
// several reading shifts) saves the element's solves of all but the first.
#pragma once

#include <array>
#include <cstddef>
#include <cstdint>
#include <unordered_map>

#include "thermargin/chain/chain.hpp"

namespace thermargin {

class ElementMemo {
 public:
  // The chain must outlive the memo.
  ElementMemo(const Chain& chain, double t_celsius);
  ElementMemo(const Chain&& chain, double t_celsius) = delete;

  // chain.evaluate(dev, t, shift, round_output), to the bit.
  Evaluation evaluate(const Deviations& dev, const ReadingShift& shift = {}, bool round_output = false);

 private:
  // The element's sources of a unit as their bits, every other source 0.
  using Key = std::array<std::uint64_t, source_count>;
  struct KeyHash {
    std::size_t operator()(const Key& k) const;
  };
  static Key key_of(const Deviations& dev);
  const Chain* chain_;
  double t_;
  std::unordered_map<Key, ElementStages, KeyHash> stages_;
};

}  // namespace thermargin
