// What the picker's files share (picker.cpp ranks and reports; the
// candidate's evaluation, the search, the winner from a start value, the
// guidance and the options each have a file): one candidate's state through
// the ranking and the run's context. Not public API.
#pragma once

#include <cstddef>
#include <cstdint>
#include <functional>
#include <limits>
#include <memory>
#include <optional>
#include <string>
#include <tuple>
#include <utility>
#include <vector>

#include "picker_bounds.hpp"
#include "thermargin/chain/chain.hpp"
#include "thermargin/input/life.hpp"
#include "thermargin/input/scenario.hpp"
#include "thermargin/tools/picker.hpp"

namespace thermargin::picker_detail {

// Refinements of the worst case (settle) and candidates screened per round
// (pick_winner) go in batches of at most this many candidates whatever the
// thread count, so the work done (and every number reported) does not
// depend on the machine.
inline constexpr std::size_t full_batch = 4;
// Brent stops when ln R is known to 2^(1−bits)·|ln R|: about 3e-4 (0.03 %
// in R) for kilohms, a fortieth of the 1.2 % step of E192.
inline constexpr int brent_bits = 16;
inline constexpr std::uintmax_t brent_max_iterations = 60;
// Stands for an unreadable window inside Brent's arithmetic (which needs
// finite values to fit its parabolas).
inline constexpr double brent_penalty = 1e30;
// Temperatures at which a worst-case bound is tightened by the full
// enumeration before a candidate is evaluated in full.
inline constexpr std::size_t probe_count = 3;
// Candidates of the reduced pair search refined around this many pairs.
inline constexpr std::size_t pair_refine_count = 3;

// A value as text that reads back to the same bits.
std::string number_text(double v);

struct Candidate {
  double r_fixed = 0.0;
  std::optional<double> r_parallel;
  bool operator<(const Candidate& o) const {
    return std::make_pair(r_fixed, r_parallel.value_or(inf)) < std::make_pair(o.r_fixed, o.r_parallel.value_or(inf));
  }
};

struct Context {
  Scenario base;  // the grade applied
  Design design;  // the base design, validated once
  PickOptions options;
  bool pair = false;
  int threads = 1;
  std::vector<double> window;  // the analysed temperatures inside the requirement window
  std::vector<double> range;   // every analysed temperature
  std::vector<double> sample;  // a few window temperatures, ascending: where pre_screen bounds the worst case
  std::uint64_t mc_objective_units = 0, mc_verify_units = 0;
  std::vector<double> values;  // the r_fixed candidates, ascending
};

// A candidate's design and its chain (which points into the design): the
// design the verdict is judged on, at end of life when drift is set and
// requirement.at says so (life.hpp), so that candidates rank on that basis.
struct Built {
  Design design;
  Chain chain;
  explicit Built(Design d) : design(design_for_verdict(d)), chain(design) {}
  Built(const Built&) = delete;
  Built& operator=(const Built&) = delete;
};

// The nominal chain over the range and the window: what the constraints
// and the sensitivity objective read.
struct NominalProfile {
  Status range_status = Status::ok;   // thermal runaway anywhere in the range
  Status window_status = Status::ok;  // the nominal reading in the window
  double min_sensitivity = 0.0, max_self_heating = 0.0, max_current = 0.0, max_power = 0.0, span = 0.0;
  bool settling = false;         // the ADC's sampling capacitor is modelled (docs/model.md §14)
  double max_settling_lsb = 0.0;  // the largest |settled − node| in LSB over the window, either precharge rail
};

// One candidate through the ranking.
struct State {
  Candidate c;
  std::unique_ptr<Built> built;
  PickRow row;
  std::vector<std::string> constraints;  // violated constraints (nominal)
  bool exact = false;         // score is the full objective
  double score = inf;         // objective in minimisation form (−LSB/K for sensitivity); inf: unreadable
  // Worst case before the full evaluation: a lower bound of score, from the
  // directed corners, then tightened by the full enumeration at more and
  // more of the window's temperatures (refine()).
  double bound = 0.0;
  std::vector<double> pending;  // °C, not yet enumerated, in the order they will be
  double enumerated = 0.0;      // K, the largest |error| the enumeration has found so far
  std::vector<double> directed_at;  // K, the directed bound at each window temperature
  bool certain_unreadable = false;
  // Pre-screened only (pre_screen): `bound` is the directed bound at a few
  // window temperatures, a lower bound of the screen's, and the rest of the
  // screen is still to do (finish_screen). bound_key is then a lower bound
  // of the key the screen gives.
  bool screened = true;
  Status nominal_window_status = Status::ok;  // the nominal reading in the window (NominalProfile)
};

using Key = std::tuple<int, double, double, double>;

// Where the screen forms a worst-case candidate's lower bound: by default at
// every window temperature (with the linear budget every row shows); in
// pick_winner's search at a few (the row's linear figures are then filled
// for the winner only, by complete_row).
struct Focus {
  std::vector<double> temps;  // °C, where the bound is formed
  std::vector<double> rest;   // °C, the other window temperatures, in the order to enumerate them
};

// The objective at one candidate, evaluated in full on its own (Brent, the
// guidance neighbours, objective_at): the threads split its temperatures.
struct Scored {
  Status status = Status::ok;
  double value = 0.0;  // objective unit
  double score = inf;  // minimisation form; inf when unreadable
};

// --- One candidate (picker_candidate.cpp) ----------------------------------

std::unique_ptr<Built> build(const Context& ctx, const Candidate& c);
NominalProfile nominal_profile(const Built& b, const Context& ctx);
void set_status(State& s, Status st);
void finish_row(State& s);
void set_score(State& s, Objective o, double value);
Key exact_key(const State& s, bool objective_only);
Key bound_key(const State& s, bool objective_only);
// The first pass over a candidate: its nominal profile and constraints, and
// the objective itself, except the worst case, which gets its lower bound
// (at the focus's temperatures when one is given).
void screen(State& s, const Context& ctx, const Focus* focus = nullptr);
// The screen in two steps: the nominal part and a lower bound of the worst
// case's directed bound at ctx.sample (screened = false), then the rest; the
// state is then what screen(s, ctx) gives. Other objectives, and candidates
// the first step settles, are screened in full by pre_screen.
void pre_screen(State& s, const Context& ctx);
void finish_screen(State& s, const Context& ctx);
// One step of a screened candidate towards its full worst case; whether it
// is now enumerated in full.
bool refine(State& s, const Context& ctx);
// The objective at one candidate, evaluated in full on its own.
Scored score_candidate(const Context& ctx, const Candidate& c);
// The figures a shown row has that its objective did not need.
void complete_row(State& s, const Context& ctx);

// --- The search (picker_search.cpp) -----------------------------------------

// Best-first branch and bound until the n best keys are known exactly;
// returns the candidates enumerated in full.
std::size_t settle(std::vector<State>& st, std::size_t n, bool objective_only, const Context& ctx);
// Every candidate screened and settled (the whole list, every pair, or the
// reduced pair search); counts what was evaluated in full into `result`.
std::vector<State> search_candidates(const Context& ctx, std::size_t wanted, const std::function<void(double)>& screen_progress,
                                     PickResult& result);

// --- The options and the run's context (picker_options.cpp) -----------------

Context make_context(const Scenario& scenario, const PickOptions& options);

// --- The guidance beside the ranking (picker_guidance.cpp) ------------------

void add_guidance(PickResult& result, std::vector<State>& st, const std::vector<std::size_t>& idx, const Context& ctx);

}  // namespace thermargin::picker_detail
