// The Monte Carlo engine's random numbers, shared by the vectorised kernel
// (monte_carlo_kernel.cpp, monte_carlo_reading.cpp) and the scalar reference
// (monte_carlo_scalar.cpp): the counter layout of each stream and the
// normals drawn from it. Not public API.
#pragma once

#include <bit>
#include <cmath>
#include <cstdint>
#include <numbers>

#if defined(__AVX2__)
#include <immintrin.h>
#endif

#include "thermargin/engines/random.hpp"

namespace thermargin::mc_detail {

inline constexpr int block_size = 256;  // units per block: a multiple of every SIMD width
inline constexpr std::uint32_t unit_stream = 0xFFFFFFFFu;  // the units' stream (docs/engines.md)

// Plain arithmetic (no library calls) so that the vectorised loop and the
// scalar path give identical bits.

// ln u for u in (0, 1]: exponent from the bits, mantissa by the atanh series
// 2(s + s³/3 + … + s¹¹/11), s = (m − 1)/(m + 1), m ∈ [√½, √2): |error| < 1e-12.
// The exponent is a 32-bit integer: AVX2 has no vector conversion of a
// 64-bit integer to double (AVX-512DQ has), and with one the loops that call
// this (normals_block) stay scalar on an AVX2 machine (docs/engines.md, Speed).
inline double plain_log(double u) {
  std::uint64_t bits = std::bit_cast<std::uint64_t>(u);
  const auto e0 = static_cast<std::int32_t>((bits >> 52) & 0x7FF) - 1023;
  bits = (bits & 0x000FFFFFFFFFFFFFull) | 0x3FF0000000000000ull;
  double m = std::bit_cast<double>(bits);
  const bool big = m > std::numbers::sqrt2;
  m = big ? m * 0.5 : m;
  const double e = static_cast<double>(e0) + (big ? 1.0 : 0.0);
  const double s = (m - 1.0) / (m + 1.0), s2 = s * s;
  const double series =
      s * (2.0 + s2 * (2.0 / 3 + s2 * (2.0 / 5 + s2 * (2.0 / 7 + s2 * (2.0 / 9 + s2 * (2.0 / 11 + s2 * (2.0 / 13)))))));
  return e * std::numbers::ln2 + series;
}

// cos(2πv) for |v| < 2^28, by reduction to |θ| ≤ π/4 and Taylor series to θ¹⁴.
inline double plain_cos_2pi(double v) {
  const double q = std::floor(4.0 * v + 0.5);
  const double theta = 2.0 * std::numbers::pi * (v - 0.25 * q);
  const double t2 = theta * theta;
  const double c = 1.0 + t2 * (-1.0 / 2 + t2 * (1.0 / 24 + t2 * (-1.0 / 720 + t2 * (1.0 / 40320 + t2 * (-1.0 / 3628800 + t2 * (1.0 / 479001600 + t2 * (-1.0 / 87178291200.0)))))));
  const double s = theta * (1.0 + t2 * (-1.0 / 6 + t2 * (1.0 / 120 + t2 * (-1.0 / 5040 + t2 * (1.0 / 362880 + t2 * (-1.0 / 39916800 + t2 * (1.0 / 6227020800.0)))))));
  // Quadrant k = q mod 4 selects c, −s, −c, s: from q's integer (a whole
  // number, |q| < 2^30), branch-free. The same value as the arithmetic
  // selection sign·(odd·s + (1 − odd)·c) with odd and sign from floors
  // that this replaced (faster, docs/engines.md, Speed): ±1 times r is ±r
  // exactly, and 1·s + 0·c is s and 0·s + 1·c is c, as c ≥ cos(π/4) and s
  // is never −0 (θ = 2π·(+0) where v − q/4 vanishes).
  const auto k = static_cast<std::int32_t>(q) & 3;
  const double r = (k & 1) != 0 ? s : c;
  return ((k + 1) & 2) != 0 ? -r : r;
}

// (double)x for a 32-bit word, by a signed conversion (AVX2 has one, not an
// unsigned one) and 2^31 added back: both steps exact, so the same value.
inline double word_to_double(std::uint32_t x) {
  return static_cast<double>(static_cast<std::int32_t>(x ^ 0x80000000u)) + 2147483648.0;
}

inline double uniform32(std::uint32_t x) { return (word_to_double(x) + 0.5) * 0x1.0p-32; }

// A standard normal from two 32-bit words (Box–Muller, cosine branch).
inline double normal_from(std::uint32_t a, std::uint32_t b) {
  return std::sqrt(-2.0 * plain_log(uniform32(a))) * plain_cos_2pi(uniform32(b));
}

// Reading streams: counter (unit lo, unit hi, reading, j), four words a call.
// Call 0: words 0–1 the noise of sample 0, word 2 the board temperature,
// word 3 what another channel left on the sampling capacitor (precharge = any).
// Call k ≥ 1: words 0–1 sample 2k − 1, words 2–3 sample 2k. One call per
// reading serves the common case of no averaging.
inline Philox4x32Counter reading_words(const Philox4x32Key& key, std::uint64_t unit, std::uint32_t reading,
                                       std::uint32_t j) {
  return philox4x32_10({static_cast<std::uint32_t>(unit), static_cast<std::uint32_t>(unit >> 32), reading, j}, key);
}

inline std::uint32_t noise_call(int s) { return static_cast<std::uint32_t>((s + 1) / 2); }
inline bool noise_high_words(int s) { return s > 0 && s % 2 == 0; }

inline double noise_sample(const Philox4x32Key& key, std::uint64_t unit, std::uint32_t reading, int s) {
  const auto w = reading_words(key, unit, reading, noise_call(s));
  return noise_high_words(s) ? normal_from(w[2], w[3]) : normal_from(w[0], w[1]);
}

// The four words of reading-stream call j for a whole block, the same
// numbers as reading_words(): Philox on 32-bit lanes, eight units at a time.
struct BlockWords {
  alignas(64) std::uint32_t w[4][block_size];
};

inline constexpr std::uint32_t philox_m0 = 0xD2511F53u, philox_m1 = 0xCD9E8D57u;
inline constexpr std::uint32_t philox_w0 = 0x9E3779B9u, philox_w1 = 0xBB67AE85u;

#if defined(__AVX2__)
// Philox's multiply of eight 32-bit lanes by m, its high and low words: the
// even lanes' and the odd lanes' 64-bit products (vpmuludq), blended. GCC
// vectorises the plain loop below with a widening and narrowing shuffle
// around every multiply, which made Philox a quarter of the kernel's time on
// AVX2 (docs/engines.md, Speed).
inline void philox_mulhilo8(__m256i a, __m256i m, __m256i& hi, __m256i& lo) {
  const __m256i even = _mm256_mul_epu32(a, m);
  const __m256i odd = _mm256_mul_epu32(_mm256_srli_epi64(a, 32), m);
  hi = _mm256_blend_epi32(_mm256_srli_epi64(even, 32), odd, 0xAA);
  lo = _mm256_blend_epi32(even, _mm256_slli_epi64(odd, 32), 0xAA);
}

// Ten rounds on eight counters whose first two words are in w[0..1][u..u+7].
inline void philox_rounds8(std::uint32_t k0, std::uint32_t k1, std::uint32_t c2_all, std::uint32_t c3_all,
                           BlockWords& out, int u) {
  const __m256i m0 = _mm256_set1_epi32(static_cast<int>(philox_m0)), m1 = _mm256_set1_epi32(static_cast<int>(philox_m1));
  __m256i c0 = _mm256_load_si256(reinterpret_cast<const __m256i*>(&out.w[0][u]));
  __m256i c1 = _mm256_load_si256(reinterpret_cast<const __m256i*>(&out.w[1][u]));
  __m256i c2 = _mm256_set1_epi32(static_cast<int>(c2_all)), c3 = _mm256_set1_epi32(static_cast<int>(c3_all));
  for (int round = 0; round < 10; ++round) {
    __m256i hi0, lo0, hi1, lo1;
    philox_mulhilo8(c0, m0, hi0, lo0);
    philox_mulhilo8(c2, m1, hi1, lo1);
    c0 = _mm256_xor_si256(_mm256_xor_si256(hi1, c1), _mm256_set1_epi32(static_cast<int>(k0)));
    c2 = _mm256_xor_si256(_mm256_xor_si256(hi0, c3), _mm256_set1_epi32(static_cast<int>(k1)));
    c1 = lo1;
    c3 = lo0;
    k0 += philox_w0;
    k1 += philox_w1;
  }
  _mm256_store_si256(reinterpret_cast<__m256i*>(&out.w[0][u]), c0);
  _mm256_store_si256(reinterpret_cast<__m256i*>(&out.w[1][u]), c1);
  _mm256_store_si256(reinterpret_cast<__m256i*>(&out.w[2][u]), c2);
  _mm256_store_si256(reinterpret_cast<__m256i*>(&out.w[3][u]), c3);
}
#endif

inline void reading_words_block(const Philox4x32Key& key, std::uint64_t first, std::uint32_t reading, std::uint32_t j,
                                BlockWords& out) {
#if defined(__AVX2__)
  for (int u = 0; u < block_size; ++u) {
    const std::uint64_t unit = first + static_cast<std::uint64_t>(u);
    out.w[0][u] = static_cast<std::uint32_t>(unit);
    out.w[1][u] = static_cast<std::uint32_t>(unit >> 32);
  }
  for (int u = 0; u < block_size; u += 8) philox_rounds8(key[0], key[1], reading, j, out, u);
#else
  for (int u = 0; u < block_size; ++u) {
    const std::uint64_t unit = first + static_cast<std::uint64_t>(u);
    std::uint32_t c0 = static_cast<std::uint32_t>(unit), c1 = static_cast<std::uint32_t>(unit >> 32), c2 = reading, c3 = j;
    std::uint32_t k0 = key[0], k1 = key[1];
#pragma GCC unroll 10
    for (int round = 0; round < 10; ++round) {
      const std::uint64_t p0 = static_cast<std::uint64_t>(philox_m0) * c0;
      const std::uint64_t p1 = static_cast<std::uint64_t>(philox_m1) * c2;
      const std::uint32_t n0 = static_cast<std::uint32_t>(p1 >> 32) ^ c1 ^ k0;
      const std::uint32_t n2 = static_cast<std::uint32_t>(p0 >> 32) ^ c3 ^ k1;
      c1 = static_cast<std::uint32_t>(p1);
      c3 = static_cast<std::uint32_t>(p0);
      c0 = n0;
      c2 = n2;
      k0 += philox_w0;
      k1 += philox_w1;
    }
    out.w[0][u] = c0;
    out.w[1][u] = c1;
    out.w[2][u] = c2;
    out.w[3][u] = c3;
  }
#endif
}

inline void normals_block(const std::uint32_t* a, const std::uint32_t* b, double sigma, double* out) {
  for (int u = 0; u < block_size; ++u) out[u] = sigma * normal_from(a[u], b[u]);
}

}  // namespace thermargin::mc_detail
