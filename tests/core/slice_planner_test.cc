// The slice-count choice: small searches stay whole, large ones get as
// many slices as minimise ceil(P / W) * work per slice, within the memo
// limit.
#include "core/slice_planner.h"

#include <bit>
#include <cmath>

#include "core/slicing/search_estimate.h"
#include "gtest/gtest.h"
#include "tests/support/test_queries.h"

namespace sliceplan {
namespace {

using testing::GraphShape;

TEST(SlicePlannerTest, SmallSearchStaysWhole) {
  EXPECT_EQ(ChooseSliceCount(testing::MakeQuery(GraphShape::kChain, 8, 1), {}, 16), 1u);
  SearchOptions connected;
  connected.cross_products = false;
  EXPECT_EQ(ChooseSliceCount(testing::MakeQuery(GraphShape::kChain, 60, 1), connected, 16), 1u);
}

TEST(SlicePlannerTest, OneRoundOfSlicesForPowerOfTwoPools) {
  const Query q = testing::MakeQuery(GraphShape::kRandom, 20, 1);
  // Bushy: ceil(P/W) (21/27)^k is least at P = W for W a power of two.
  EXPECT_EQ(ChooseSliceCount(q, {}, 1), 1u);
  EXPECT_EQ(ChooseSliceCount(q, {}, 2), 2u);
  EXPECT_EQ(ChooseSliceCount(q, {}, 4), 4u);
  EXPECT_EQ(ChooseSliceCount(q, {}, 8), 8u);
  // Three workers: two slices in one round (0.78) beat four in two (1.21).
  EXPECT_EQ(ChooseSliceCount(q, {}, 3), 2u);
}

TEST(SlicePlannerTest, MemoLimitForcesMoreSlices) {
  const Query q = testing::MakeQuery(GraphShape::kRandom, 24, 1);
  SearchOptions options;
  // 2^24 x 12 bytes = 192 MiB unsliced; 7 2^21 x 12 = 168 MiB; 49 2^18 x 12
  // = 147 MiB.
  options.memo_limit_bytes = uint64_t{150} << 20;
  EXPECT_EQ(ChooseSliceCount(q, options, 1), 4u);
}

// The planner's model of wall time: ceil(P / W) rounds of one slice's
// splits. The P it picks is never predicted slower than a smaller P on the
// same pool (an over-sliced run did 16 times the work of P = 16 once).
TEST(SlicePlannerTest, NeverPicksAPSlowerThanASmallerOne) {
  const auto predicted = [](int n, PlanShape shape, int k, int w) {
    return std::ceil(std::ldexp(1.0, k) / w) * DenseSplits(n, shape, k, true);
  };
  for (PlanShape shape : {PlanShape::kBushy, PlanShape::kLeftDeep}) {
    for (int n : {14, 18, 21, 24}) {
      const Query q = testing::MakeQuery(GraphShape::kChain, n, 1);
      for (int w : {1, 2, 3, 8, 64, 1024}) {
        const uint32_t p = ChooseSliceCount(q, {shape, true, CostModelKind::kCout}, w);
        const int k = std::countr_zero(p);
        for (int smaller = 0; smaller < k; ++smaller) {
          EXPECT_LT(predicted(n, shape, k, w), predicted(n, shape, smaller, w))
              << "n=" << n << " W=" << w << " P=" << p << " vs " << (1 << smaller);
        }
      }
    }
  }
}

TEST(SlicePlannerTest, LargeConnectedSearchGetsASlicePerWorker) {
  SearchOptions connected;
  connected.cross_products = false;
  const Query clique = testing::MakeQuery(GraphShape::kClique, 18, 1);
  EXPECT_EQ(ChooseSliceCount(clique, connected, 4), 4u);
  EXPECT_EQ(ChooseSliceCount(clique, connected, 3), 4u);
}

}  // namespace
}  // namespace sliceplan
