// The Monte Carlo kernel's pieces (docs/engines.md, "The kernel"): a block
// of units drawn once, then read at each temperature of the sweep in
// structure-of-arrays form. monte_carlo_kernel.cpp draws and calibrates the
// block, monte_carlo_reading.cpp reads it stage by stage, monte_carlo.cpp
// runs the blocks on threads. Not public API.
#pragma once

#include <cstdint>
#include <memory>
#include <vector>

#include "monte_carlo_streams.hpp"
#include "monte_carlo_table.hpp"
#include "thermargin/chain/acquisition.hpp"
#include "thermargin/chain/chain.hpp"
#include "thermargin/chain/rtd.hpp"
#include "thermargin/engines/conversion_cache.hpp"

namespace thermargin::mc_detail {

// What every block of a run shares: the design's constants and the
// firmware's conversion of every possible reading, computed once a run.
struct RunConstants {
  const Chain* chain;
  const Design* d;
  Philox4x32Key key;
  double span, max_code;
  int m;                             // averaging
  double noise;                      // LSB rms
  // Reported temperature by sample sum; NaN: no solution (conversion_table).
  std::shared_ptr<const std::vector<double>> conversion;
  bool table_conversion = false;
  bool beta_fast = false;            // beta sensor: ln R in closed form
  double ln_r25 = 0.0, beta = 0.0;
  double ln_r0 = 0.0;                // ln R_nom(T0) for the NTC stretch
  std::vector<int> active;           // unit-level sources drawn per unit (not the board)
  int cal_points = 0;
  AcquisitionModel acquisition{};    // the sampled node (docs/model.md §14)
  bool precharge_any = false;        // the start of C_s drawn per reading
  bool rtd = false;                  // an RTD: its curve and class spread vectorised
  ClassLine rtd_line{};              // its class's bound (0 without a class)
  // An R–T table: its interpolants as arrays the block's loops read
  // (monte_carlo_table.hpp), vectorised like the RTD's curve; null for
  // every other sensor.
  std::shared_ptr<const TablePieces> table{};
};

// The table of every possible reading's conversion when the firmware has at
// most 2^22 readings (a sum of M samples in [0, M·(2^N − 1)]), from `cache`
// when one is given.
RunConstants make_constants(const Chain& chain, ConversionCache* cache = nullptr);

// That table: the firmware's conversion, rounded to its output resolution,
// of every sum k of `m` samples (reading k/m); NaN where there is no solution.
// A function of the firmware and m alone (the conversion cache's key).
std::vector<double> conversion_table(const Firmware& fw, int m);

// The units of one block: their deviations, drawn once, kept across the
// temperature sweep.
struct BlockUnits {
  std::uint64_t first = 0;
  int count = 0;
  alignas(64) double dev[source_count][block_size];
  // Each unit's ln(1 + δR) and ln(1 + drift) (SensorUnit's shift_ and
  // drift_shift_: a table or Steinhart–Hart sensor reads them apart), and
  // their sum, as a beta NTC takes it.
  alignas(64) double ln_r25[block_size];
  alignas(64) double ln_drift[block_size];
  alignas(64) double ln_shift[block_size];
  alignas(64) double cal_reported[2][block_size];
  alignas(64) double cal_reference[2][block_size];
  alignas(64) std::uint8_t cal_ok[block_size];
  // The last self-heating rise of each unit: the next temperature's solve
  // starts there (the sweep moves in small steps), saving iterations.
  alignas(64) double rise_guess[block_size];
  // Per unit and constant over the sweep, so taken once a block: the
  // self-heating gain duty/δ of a reading in service (δ with its deviation)
  // and a beta sensor's B with its deviation.
  alignas(64) double heat_gain[block_size];
  alignas(64) double beta_unit[block_size];
};

// Draws units first..first+block_size−1 into `b` (count of them are used).
void draw_block(const RunConstants& c, BlockUnits& b, std::uint64_t first, int count);

// Reported temperatures (before calibration) of the block's readings at the
// true temperature t (°C) from reading stream `reading`; a status per unit
// (0: a value). A calibration reading self-heats in the calibration medium
// where one is set. monte_carlo_reading.cpp, one function per stage.
void read_block(const RunConstants& c, BlockUnits& b, double t, std::uint32_t reading, double* reported,
                std::uint8_t* status, bool calibration = false);

// The calibration readings of every unit of the block, into b.cal_*.
void calibrate_block(const RunConstants& c, BlockUnits& b);

// The block's errors at t (K); NaN where a reading has no value (status set).
void errors_block(const RunConstants& c, BlockUnits& b, double t, std::uint32_t t_index, double* err,
                  std::uint8_t* status);

// The block's errors at every temperature: errors[u + t_index*count].
void simulate_block_with(const RunConstants& c, const std::vector<double>& temperatures, std::uint64_t first_unit,
                         int count, std::vector<double>& errors);

}  // namespace thermargin::mc_detail
