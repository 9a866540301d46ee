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
#include <vector>

#include "thermargin/chain/chain.hpp"

namespace thermargin {

class ElementMemo {
 public:
  // The chain must outlive the memo.
  ElementMemo(const Chain& chain, double t_celsius);
  ElementMemo(const Chain&& chain, double t_celsius) = delete;

  // chain.evaluate(dev, t, shift, round_output), to the bit.
  Evaluation evaluate(const Deviations& dev, const ReadingShift& shift = {}, bool round_output = false);
  // The element stages computed so far: one per distinct unit's element sources.
  std::size_t element_solves() const { return entries_.size(); }

 private:
  // The element's sources of a unit as their bits (in the first words; the
  // rest 0).
  using Key = std::array<std::uint64_t, source_count>;
  struct Entry {
    Key key;
    std::uint64_t hash;
    ElementStages stages;
  };
  static Key key_of(const Deviations& dev);
  static std::uint64_t hash_of(const Key& k);
  // The entry of `k`, made when new.
  const Entry& find(const Deviations& dev);
  void grow();
  const Chain* chain_;
  double t_;
  std::vector<Entry> entries_;
  std::vector<int> slots_;  // open addressing: an index into entries_, −1 empty; a power of two long
};

}  // namespace thermargin
