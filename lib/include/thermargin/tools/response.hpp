// Following a changing temperature (`thermargin response`, docs/response.md):
// the sensor's thermal time constant and the firmware's filter, on a ramp
// and after a step, with the noise the filter leaves, against the
// requirement.
//
// The model is the exact discrete-time one. The medium changes from a steady
// start at t = 0; the sensor is a first-order lag dT_s/dt = (T_m − T_s)/τ
// (IEC 60539-1's thermal time constant: 63.2 % of a step), solved in closed
// form and read every T_r seconds at t_k = k·T_r; the firmware filters the
// readings (input/response_section.hpp: none, a moving average of N, an
// exponential filter with α). Closed forms (textbook discrete-time signal
// processing; first-order response, common practice):
//   - on a ramp of r K/s the sensor lags by r·τ after its transient, and at
//     the reading instants exactly so; the moving average delays a ramp by
//     D = (N − 1)/2·T_r, the exponential filter by D = (1 − α)/α·T_r; so the
//     reported temperature lags by r·(τ + D);
//   - the filter scales white noise's standard deviation by 1/√N
//     (moving average) or √(α/(2 − α)) (exponential);
//   - after a step ΔT the error e_k = ΔT − y_k is a closed-form sum of
//     geometric sequences in k (none: ΔT·q^k, q = exp(−T_r/τ)), falling
//     monotonically; the settling time is the first reading k from which
//     e_k ≤ settle_to, found exactly by a search over whole k on the closed
//     form (no time stepping).
// The slowest sensor of the tolerance, τ·(1 + tol), is used throughout.
//
// The static error comes from the budget's worst case over the requirement
// window (engines/budget.hpp), with the budget's own noise half-width at
// each temperature (± noise_k·σ/√M through the conversion) replaced by that
// half-width times the filter's noise factor: noise enters the worst case
// as an interval on the reading, to first order a shift of each band end.
#pragma once

#include <cstddef>
#include <optional>
#include <string>
#include <vector>

#include "thermargin/core/progress.hpp"

#include "thermargin/chain/chain.hpp"
#include "thermargin/engines/budget.hpp"
#include "thermargin/input/response_section.hpp"

namespace thermargin {

// --- closed forms -----------------------------------------------------------

// The filter's delay on a ramp, in readings: 0, (N − 1)/2, (1 − α)/α.
double filter_delay_readings(const Filter& f);
// The standard deviation of white noise after the filter over before:
// 1, 1/√N, √(α/(2 − α)).
double noise_factor(const Filter& f);
// The steady lag of the reported temperature on a ramp of `rate` K/s: r·(τ + D), K.
double ramp_lag(double tau, double period, const Filter& f, double rate);

// --- the exact discrete-time model --------------------------------------------

// Step error after k ≥ 0 readings: ΔT − y_k, the medium having stepped by
// `step` at reading 0 (the sensor still reads the old temperature there).
double step_error(double tau, double period, const Filter& f, double step, long long k);
// The first reading from which every reading is within `settle_to` of the
// new temperature (0 when settle_to ≥ step).
long long settling_readings(double tau, double period, const Filter& f, double step, double settle_to);

// The reported temperature at the readings k = 0 .. count − 1: the sensor
// sampled exactly, then the filter run over the readings, every earlier
// reading at the steady start (0).
std::vector<double> sensor_on_ramp(double tau, double period, double rate, std::size_t count);
std::vector<double> sensor_after_step(double tau, double period, double step, std::size_t count);
std::vector<double> apply_filter(const Filter& f, const std::vector<double>& readings);

// "none", "moving average N = 8", "exponential alpha = 0.125 (1/8)".
std::string describe(const Filter& f);
// The CLI's and CSV's word: "none", "moving-average", "exponential".
std::string kind_word(FilterKind k);

// --- the analysis -------------------------------------------------------------

struct ResponseRow {
  Filter filter;
  bool chosen = false;          // the scenario's filter
  double delay_s = 0.0;         // D, the filter's delay on a ramp
  double lag_s = 0.0;           // τ_max + D
  double ramp_error = 0.0;      // K, r·(τ_max + D)
  long long settling_readings = 0;
  double settling_s = 0.0;      // settling_readings · T_r
  double noise_factor = 1.0;
  double noise_band = 0.0;      // K, the filtered noise half-width, largest in the window
  double static_max_abs = 0.0;  // K, the window's worst case with the filtered noise
  double total_max_abs = 0.0;   // K, static + ramp error, largest in the window
  double total_at = 0.0;        // °C, where
  double margin = 0.0;          // K, limit − total
  bool readable = true;         // every window temperature read at every corner
  bool meets = false;
};

// When no filter meets the requirement: what would (each alone, the rest as
// stated; absent where that change cannot help).
struct WhatWouldMeet {
  bool static_alone_exceeds = false;       // no filter, sensor or ramp helps
  bool unreadable = false;                 // some window temperature cannot be read at some corner
  std::optional<double> ramp_per_minute;   // K/min, the fastest ramp some filter meets
  std::optional<double> time_constant;     // s, nominal τ (its tolerance kept) some filter meets
  std::size_t ramp_row = 0, time_constant_row = 0;  // the rows (filters) that do
  std::optional<int> averaging;            // adc.averaging that meets with no filter (≤ 65536)
};

struct ResponseAnalysis {
  ResponseSettings settings;
  double limit = 0.0;                 // requirement.max_error, K
  double window_min = 0.0, window_max = 0.0;
  double static_wc_max_abs = 0.0;     // the budget's worst case (unfiltered noise), K
  double noise_band_unfiltered = 0.0; // K, largest in the window
  std::vector<ResponseRow> rows;      // none, moving averages, exponential filters (and the scenario's own)
  std::size_t chosen = 0;             // index of the scenario's filter
  std::optional<std::size_t> recommended;  // the row that meets with the most margin
  WhatWouldMeet what_would;           // filled when nothing meets
};

// The filters compared: none; moving averages N = 2, 4, …, 256; exponential
// filters α = 1/2, 1/4, …, 1/256; and `own` where it is none of these.
std::vector<Filter> filter_sweep(const Filter& own);

// Runs the budget (no Monte Carlo) on the chain and every filter of the
// sweep; `progress` (core/progress.hpp) hears the share done: the budget
// first, then the sweep's filters.
ResponseAnalysis analyse_response(const Chain& chain, const ResponseSettings& settings,
                                  const ProgressCallback& progress = {});
// The same on a budget already run on the chain's design.
ResponseAnalysis analyse_response(const Design& design, const Budget& budget, const ResponseSettings& settings,
                                  const ProgressCallback& progress = {});

// The rows drawn in the pictures: the scenario's filter and its neighbours
// in its family (half and twice the length, twice and half α; none's are
// the lightest moving average and exponential filter), in row order.
std::vector<std::size_t> pictured_rows(const ResponseAnalysis& a);

// One sentence: the recommendation, or that none meets and what would.
std::string recommendation_text(const ResponseAnalysis& a);

// --- budget's dynamic line ----------------------------------------------------

// The dynamic error at the stated ramp with the scenario's filter: r·(τ_max + D), K.
double dynamic_error(const ResponseSettings& s);
// The verdict with the dynamic error added to its worst |error| (basis
// worst-case or linear): margin, pass and reason follow.
Verdict with_dynamic_error(Verdict v, const Requirement& requirement, double dynamic);

}  // namespace thermargin
