// Counter-based random numbers for the Monte Carlo engine.
//
// Philox4x32-10 (Salmon, Moraes, Dror & Shaw, "Parallel random numbers: as
// easy as 1, 2, 3", SC'11): a keyed bijection of a 128-bit counter, so the
// numbers for (unit, temperature, sample) are computed directly from those
// indices. Results therefore depend only on the seed and the number of units,
// never on how the work is split between threads.
//
// Draws of a ± bound follow docs/engines.md: normal (σ = bound/sigma_per_tol,
// untruncated), uniform, triangular, and gapped (a normal within the bound
// with the inner band |δ| < gap removed).
#pragma once

#include <array>
#include <cmath>
#include <cstdint>

#include "thermargin/input/sources.hpp"

namespace thermargin {

using Philox4x32Counter = std::array<std::uint32_t, 4>;
using Philox4x32Key = std::array<std::uint32_t, 2>;

inline Philox4x32Counter philox4x32_10(Philox4x32Counter c, Philox4x32Key k) {
  constexpr std::uint32_t m0 = 0xD2511F53u, m1 = 0xCD9E8D57u;  // round multipliers
  constexpr std::uint32_t w0 = 0x9E3779B9u, w1 = 0xBB67AE85u;  // Weyl key increments
  for (int round = 0; round < 10; ++round) {
    const std::uint64_t p0 = static_cast<std::uint64_t>(m0) * c[0];
    const std::uint64_t p1 = static_cast<std::uint64_t>(m1) * c[2];
    c = {static_cast<std::uint32_t>(p1 >> 32) ^ c[1] ^ k[0], static_cast<std::uint32_t>(p1),
         static_cast<std::uint32_t>(p0 >> 32) ^ c[3] ^ k[1], static_cast<std::uint32_t>(p0)};
    k[0] += w0;
    k[1] += w1;
  }
  return c;
}

// A double in (0, 1) from 64 random bits (53 used).
inline double unit_double(std::uint32_t hi, std::uint32_t lo) {
  const std::uint64_t bits = (static_cast<std::uint64_t>(hi) << 32 | lo) >> 11;
  return (static_cast<double>(bits) + 0.5) * 0x1.0p-53;
}

// A float in (0, 1) from 32 random bits (24 used).
inline float unit_float(std::uint32_t x) { return (static_cast<float>(x >> 8) + 0.5f) * 0x1.0p-24f; }

inline Philox4x32Key philox_key(std::uint64_t seed) {
  return {static_cast<std::uint32_t>(seed), static_cast<std::uint32_t>(seed >> 32)};
}

// One draw of a toleranced input from two uniforms in (0, 1) and, for the
// normal family, the Box–Muller transform (Box & Muller, Ann. Math. Stat.
// 29, 1958). `second` receives the pair's other normal when useful.
double draw_deviation(const ToleranceInput& in, double sigma_per_tol, double u1, double u2);

}  // namespace thermargin
