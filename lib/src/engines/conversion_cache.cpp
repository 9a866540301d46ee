#include "thermargin/engines/conversion_cache.hpp"

#include <exception>

namespace thermargin {

ConversionCache::Table ConversionCache::get(const ConversionKey& key, const std::function<std::vector<double>()>& make) {
  std::promise<Table> made;
  std::shared_future<Table> table;
  bool first = false;
  {
    const std::lock_guard<std::mutex> lock(mutex_);
    for (const auto& [k, t] : entries_)
      if (k == key) table = t;
    if (!table.valid()) {
      first = true;
      table = made.get_future().share();
      entries_.emplace_back(key, table);
    }
  }
  // Made outside the lock, so that other keys are not held up.
  if (first) {
    try {
      made.set_value(std::make_shared<const std::vector<double>>(make()));
    } catch (...) {
      made.set_exception(std::current_exception());
    }
  }
  return table.get();
}

std::size_t ConversionCache::size() const {
  const std::lock_guard<std::mutex> lock(mutex_);
  return entries_.size();
}

}  // namespace thermargin
