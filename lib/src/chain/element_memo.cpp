#include "thermargin/chain/element_memo.hpp"

#include <bit>
#include <vector>

namespace thermargin {

namespace {

// The sources that act in the element stage (stage_of).
std::vector<std::size_t> element_sources() {
  std::vector<std::size_t> out;
  for (int s = 0; s < source_count; ++s)
    if (stage_of(static_cast<Source>(s)) == ChainStage::element) out.push_back(static_cast<std::size_t>(s));
  return out;
}

const std::vector<std::size_t>& element_source_list() {
  static const std::vector<std::size_t> list = element_sources();
  return list;
}

}  // namespace

ElementMemo::ElementMemo(const Chain& chain, double t_celsius) : chain_(&chain), t_(t_celsius), slots_(64, -1) {
  entries_.reserve(32);
}

// The element's sources in the key's first words (the rest stay 0).
ElementMemo::Key ElementMemo::key_of(const Deviations& dev) {
  Key k{};
  const std::vector<std::size_t>& element = element_source_list();
  for (std::size_t j = 0; j < element.size(); ++j) k[j] = std::bit_cast<std::uint64_t>(dev[element[j]]);
  return k;
}

// Cheap rather than strong: equal hashes are compared word by word anyway.
std::uint64_t ElementMemo::hash_of(const Key& k) {
  std::uint64_t h = 0;
  for (std::size_t j = 0; j < element_source_list().size(); ++j) h += std::rotl(k[j], static_cast<int>(j * 7 % 64));
  h ^= h >> 31;
  h *= 0x9e3779b97f4a7c15ULL;
  return h ^ (h >> 29);
}

void ElementMemo::grow() {
  slots_.assign(2 * slots_.size(), -1);
  const std::size_t mask = slots_.size() - 1;
  for (std::size_t e = 0; e < entries_.size(); ++e) {
    std::size_t i = entries_[e].hash & mask;
    while (slots_[i] >= 0) i = (i + 1) & mask;
    slots_[i] = static_cast<int>(e);
  }
}

const ElementMemo::Entry& ElementMemo::find(const Deviations& dev) {
  const Key k = key_of(dev);
  const std::uint64_t h = hash_of(k);
  const std::size_t mask = slots_.size() - 1;
  std::size_t i = h & mask;
  for (; slots_[i] >= 0; i = (i + 1) & mask) {
    const Entry& e = entries_[static_cast<std::size_t>(slots_[i])];
    if (e.hash == h && e.key == k) return e;
  }
  slots_[i] = static_cast<int>(entries_.size());
  entries_.push_back({k, h, chain_->element_stages(dev, t_)});
  if (2 * entries_.size() > slots_.size()) grow();
  return entries_.back();
}

Evaluation ElementMemo::evaluate(const Deviations& dev, const ReadingShift& shift, bool round_output) {
  return chain_->evaluate(find(dev).stages, dev, t_, shift, round_output);
}

}  // namespace thermargin
