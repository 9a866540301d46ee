// The firmware's conversion of every possible reading, shared between the
// Monte Carlo runs of one caller (a `grades` run's combinations), made once
// for each distinct key. The table is a function of the firmware alone
// (which reads only its FirmwareInputs, firmware_inputs.hpp) and of the
// samples averaged per reading, so runs with equal keys would make the same
// table to the bit (docs/engines.md, "The conversion shared between runs").
// The cache belongs to its caller and lives as long as it does; it is
// thread-safe: the first thread to ask for a key makes its table, a thread
// that asks while it is being made waits for it.
#pragma once

#include <cstddef>
#include <functional>
#include <future>
#include <memory>
#include <mutex>
#include <utility>
#include <vector>

#include "thermargin/chain/firmware_inputs.hpp"

namespace thermargin {

// What a run's conversion table depends on: the firmware's inputs (the ADC's
// span among them) and the samples averaged per reading.
struct ConversionKey {
  FirmwareInputs firmware;
  int averaging = 1;
  bool operator==(const ConversionKey&) const = default;
};

class ConversionCache {
 public:
  using Table = std::shared_ptr<const std::vector<double>>;
  // The table for `key`, made by `make` the first time the key is asked for
  // (an exception from `make` reaches every thread that asked).
  Table get(const ConversionKey& key, const std::function<std::vector<double>()>& make);
  // The distinct tables made so far.
  std::size_t size() const;

 private:
  mutable std::mutex mutex_;
  std::vector<std::pair<ConversionKey, std::shared_future<Table>>> entries_;
};

}  // namespace thermargin
