// The slice-count choice: small searches stay whole, large ones get as
// many slices as minimise ceil(P / W) * work per slice, within the memo
// limit.
#include "core/slice_planner.h"

#include "gtest/gtest.h"
#include "tests/support/test_queries.h"

namespace sliceplan {
namespace {

using testing::GraphShape;

TEST(SlicePlannerTest, SmallSearchStaysWhole) {
  EXPECT_EQ(ChooseSliceCount(testing::MakeQuery(GraphShape::kChain, 8, 1), {}, 16), 1u);
  SearchOptions connected;
  connected.cross_products = false;
  EXPECT_EQ(ChooseSliceCount(testing::MakeQuery(GraphShape::kChain, 60, 1), connected, 16),
            1u);
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

TEST(SlicePlannerTest, LargeConnectedSearchGetsASlicePerWorker) {
  SearchOptions connected;
  connected.cross_products = false;
  const Query clique = testing::MakeQuery(GraphShape::kClique, 18, 1);
  EXPECT_EQ(ChooseSliceCount(clique, connected, 4), 4u);
  EXPECT_EQ(ChooseSliceCount(clique, connected, 3), 4u);
}

}  // namespace
}  // namespace sliceplan
