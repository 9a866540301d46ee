// The second-order terms of the linear budget (JCGM 100:2008 §5.1.2, the
// note to eq. 10), for independent inputs:
//
//   u_c² = Σ_i c_i² u_i² + Σ_i Σ_j [½ c_ij² + c_i·c_ijj] u_i² u_j²
//
// c_ij and c_ijj the second and third partial derivatives at the nominal
// point. For i ≠ j the two ordered terms of a pair add to
// [c_ij² + c_i·c_ijj + c_j·c_iij]·u_i²·u_j², which holds for any
// distributions of the two (only their independence and zero means are
// used). c_ij²·u_i²·u_j² is the variance of the product term c_ij·x_i·x_j
// itself, never negative: that is the pair's own row in the contributor
// table. c_i·c_ijj·u_i²·u_j² is the covariance of input i's linear term with
// the cubic ½c_ijj·x_i·x_j² (its slope bending with x_j), of either sign:
// it goes to input i's own row. The diagonal
// i = j is written by the GUM for normal inputs; here it takes the input's
// own fourth moment E[x⁴] = κ·u⁴ (κ = 3 normal, 9/5 uniform, 12/5
// triangular): [¼(κ − 1)·c_ii² + (κ/3)·c_i·c_iii]·u_i⁴, which is the
// GUM's [½ c_ii² + c_i·c_iii]·u_i⁴ for κ = 3, and is added to the input's
// own row.
//
// Derivatives by central differences with steps h_i = step_fraction·u_i
// (docs/engines.md says why this size).
#pragma once

#include <cstddef>
#include <functional>
#include <optional>
#include <vector>

#include "thermargin/input/sources.hpp"

namespace thermargin {

using DeviationModel = std::function<std::optional<double>(const Deviations&)>;

// The central-difference step as a fraction of the input's standard
// uncertainty.
inline constexpr double second_order_step_fraction = 0.25;

// E[x⁴]/u⁴ of a ± bound under its distribution (3 normal, 9/5 uniform,
// 12/5 triangular; gapped: the normal's fourth moment on gap ≤ |x| ≤ bound).
double kurtosis(const ToleranceInput& in, double sigma_per_tol);

struct PairTerm {
  std::size_t i = 0, j = 0;  // indices into the inputs, i < j
  double c_ij = 0.0;         // ∂²f/∂x_i∂x_j
  double c_ijj = 0.0;        // ∂³f/∂x_i∂x_j²
  double c_iij = 0.0;        // ∂³f/∂x_i²∂x_j
  double variance = 0.0;     // c_ij²·u_i²·u_j², the pair's row
  double reach = 0.0;        // the interaction alone with both at their bounds: max |f(±a_i, ±a_j) − f(±a_i, 0) − f(0, ±a_j) + f(0, 0)|
};

struct SecondOrder {
  // Per input, its row's second-order terms: [¼(κ − 1)c_ii² + (κ/3)c_i·c_iii]·u_i⁴
  // plus Σ_j c_i·c_ijj·u_i²·u_j² over every pair differentiated.
  std::vector<double> own;
  std::vector<PairTerm> pairs;   // the pairs whose term is not negligible
  int pairs_evaluated = 0;       // pairs differentiated (not skipped by structure)
  int failed = 0;                // pairs or inputs left out: the model had no value at a step
};

// Which pairs (and, with i == j, which inputs' own curvature) are zero by the
// model's structure and need no evaluation.
using StructurallyZero = std::function<bool(Source, Source)>;

// `c` and `u` are the first-order sensitivities and standard uncertainties
// (in the order of `inputs`), `f0` the model at the nominal point. A pair's
// row is kept when its variance ≥ negligible (K²).
SecondOrder second_order_terms(const DeviationModel& model, const std::vector<ToleranceInput>& inputs,
                               const std::vector<double>& c, const std::vector<double>& u, double f0,
                               double sigma_per_tol, const StructurallyZero& zero, double negligible);

}  // namespace thermargin
