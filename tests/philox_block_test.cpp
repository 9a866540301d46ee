// Tests of the Monte Carlo kernel's block random numbers
// (lib/src/engines/monte_carlo_streams.hpp, not public API): the words a
// whole block draws at once (reading_words_block: AVX2 intrinsics where the
// build has AVX2, a plain loop otherwise) are, word for word, the scalar
// Philox4x32-10 of each unit's counter (reading_words), and the block's
// normals are the scalar normal_from of the same words. The scalar Philox
// itself is held to Random123's known-answer vectors (Salmon et al., SC'11;
// monte_carlo_test.cpp). This file is built like the kernel's files
// (-march=native in a native build, tests/CMakeLists.txt), so on an AVX2
// machine it exercises the intrinsics path.
#include <gtest/gtest.h>

#include <cstdint>
#include <vector>

#include "engines/monte_carlo_streams.hpp"

namespace thermargin {
namespace {

using mc_detail::block_size;

TEST(PhiloxBlock, EveryWordIsTheScalarPhiloxOfItsUnitsCounter) {
  // Keys of Random123's known-answer vectors; blocks at the start, across the
  // 2^32 carry of the unit counter, and at the top of the 64-bit range.
  const std::vector<Philox4x32Key> keys{{0, 0}, {0xffffffff, 0xffffffff}, {0xa4093822, 0x299f31d0}};
  const std::vector<std::uint64_t> firsts{0, 0xffffff80ull, 0xffffffffffffff00ull, 123456789012ull};
  int compared = 0;
  for (const auto& key : keys)
    for (std::uint64_t first : firsts)
      for (std::uint32_t reading : {0u, 7u, 0xffffffffu})
        for (std::uint32_t j : {0u, 1u, 2u}) {
          mc_detail::BlockWords b;
          mc_detail::reading_words_block(key, first, reading, j, b);
          for (int u = 0; u < block_size; ++u) {
            const auto w = mc_detail::reading_words(key, first + static_cast<std::uint64_t>(u), reading, j);
            for (int k = 0; k < 4; ++k) {
              ASSERT_EQ(b.w[k][u], w[static_cast<std::size_t>(k)])
                  << "key " << key[0] << " unit " << first + static_cast<std::uint64_t>(u) << " reading " << reading
                  << " call " << j << " word " << k;
              ++compared;
            }
          }
        }
  EXPECT_EQ(compared, 3 * 4 * 3 * 3 * block_size * 4);
}

TEST(PhiloxBlock, BlockNormalsAreTheScalarNormalsOfTheSameWords) {
  mc_detail::BlockWords b;
  mc_detail::reading_words_block({0x243f6a88, 0x85a308d3}, 1000, 3, 0, b);
  alignas(64) double block[block_size];
  const double sigma = 0.75;
  mc_detail::normals_block(b.w[0], b.w[1], sigma, block);
  for (int u = 0; u < block_size; ++u) {
    const double scalar = sigma * mc_detail::normal_from(b.w[0][u], b.w[1][u]);
    EXPECT_EQ(block[u], scalar) << "unit " << u;  // the same bits: the kernel equals the scalar chain
  }
}

}  // namespace
}  // namespace thermargin
