// The linear uncertainty budget (GUM, JCGM 100:2008 §5.1.2).
//
// Per source i the sensitivity c_i = ∂error/∂p_i by central differences and
// the standard uncertainty u_i of its distribution (a ±a bound is a/k for a
// normal with k = sigma_per_tol, a/√3 rectangular §4.3.7, a/√6 triangular
// §4.3.9; quantisation 1/√12 LSB; noise σ/√M; output rounding
// resolution/√12; a board-temperature range rectangular over its full
// width). u_c² = Σ (c_i·u_i)² (eq. 10, uncorrelated inputs), and the band is
// centre ± k_p·u_c with k_p the normal quantile for the coverage probability.
// The centre is the nominal error, shifted by the floor quantiser's mean
// truncation of −½ LSB where it applies.
#pragma once

#include <functional>
#include <optional>
#include <string>
#include <string_view>
#include <vector>

#include "thermargin/chain/chain.hpp"

namespace thermargin {

// One line of a budget: a source's sensitivity, standard uncertainty and
// contribution |c|·u (in the output's unit).
struct BudgetTerm {
  std::string name;   // short name (sources.hpp)
  std::string label;  // what a reviewer reads
  double sensitivity = 0.0;  // output per unit of the source
  double u = 0.0;            // standard uncertainty of the source
  double contribution = 0.0; // |c|·u
  // The second-order variance of this row (K², JCGM 100 §5.1.2 note;
  // second_order.hpp): an input's own curvature terms, or all of a pair row.
  double second_order = 0.0;
  double reach = 0.0;  // pair rows: the interaction's own worst-case reach, K
  // The row's part of u_c²: (c·u)² plus its second-order terms.
  double variance() const { return contribution * contribution + second_order; }
};

// Whether a contributor's short name is a pair row ("a × b"), not a source.
inline bool is_pair_row(std::string_view name) { return name.find(" \u00d7 ") != std::string_view::npos; }

// The coverage factor k_p of a normal distribution for probability p (two-sided).
double coverage_factor(double p);

// The generic core: central-difference sensitivities of `model` to each
// input at the nominal point (all deviations 0), and the combined standard
// uncertainty. `model` returns nullopt where it cannot be evaluated; then
// the result is nullopt.
struct Propagation {
  double centre = 0.0;
  double u_c = 0.0;
  std::vector<BudgetTerm> terms;
};
std::optional<Propagation> propagate(const std::function<std::optional<double>(const Deviations&)>& model,
                                     const std::vector<ToleranceInput>& inputs, double sigma_per_tol);

struct LinearPoint {
  double t = 0.0;
  Status status = Status::ok;  // not ok: the budget could not be formed here
  double centre = 0.0;  // K
  double u_c = 0.0;     // K
  double low = 0.0, high = 0.0;  // K, centre ∓ k_p·u_c
  std::vector<BudgetTerm> terms;  // Design::inputs in order, then quantisation, noise, rounding (always)
  // The pairs of inputs with a non-negligible second-order term, each its
  // own row ("a × b"; sensitivity c_ij, u = u_i·u_j, contribution
  // |c_ij|·u_i·u_j; the slopes' products with the third derivatives are in
  // the inputs' own rows); u_c² is the sum of variance() over terms and
  // pairs.
  std::vector<BudgetTerm> pairs;
  int second_order_failed = 0;  // second-order terms left out: the chain had no value at a step
};

struct LinearBudget {
  double k_p = 3.0;
  std::vector<LinearPoint> points;
};

// `second` adds the second-order terms (the default; docs/engines.md);
// `first` is JCGM 100 eq. 10 alone, for engines that need only the
// sensitivities (the directed worst case).
enum class BudgetOrder { first, second };
LinearBudget linear_budget(const Chain& chain, const std::vector<double>& temperatures,
                           BudgetOrder order = BudgetOrder::second);

// The mean shift of the quantiser (LSB): 0 for round, −½ for floor.
double quantizer_mean(Quantizer q);

}  // namespace thermargin
