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

ElementMemo::ElementMemo(const Chain& chain, double t_celsius) : chain_(&chain), t_(t_celsius) {}

ElementMemo::Key ElementMemo::key_of(const Deviations& dev) {
  Key k{};
  for (std::size_t s : element_source_list()) k[s] = std::bit_cast<std::uint64_t>(dev[s]);
  return k;
}

// Cheap rather than strong: equal keys are compared word by word anyway.
std::size_t ElementMemo::KeyHash::operator()(const Key& k) const {
  std::uint64_t h = 0;
  for (std::size_t s = 0; s < k.size(); ++s) h += std::rotl(k[s], static_cast<int>(s * 7 % 64));
  h ^= h >> 31;
  h *= 0x9e3779b97f4a7c15ULL;
  return static_cast<std::size_t>(h ^ (h >> 29));
}

Evaluation ElementMemo::evaluate(const Deviations& dev, const ReadingShift& shift, bool round_output) {
  const Key k = key_of(dev);
  auto it = stages_.find(k);
  if (it == stages_.end()) it = stages_.emplace(k, chain_->element_stages(dev, t_)).first;
  return chain_->evaluate(it->second, dev, t_, shift, round_output);
}

}  // namespace thermargin
