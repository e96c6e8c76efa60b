// Merging slice answers: the least cost wins, ties go to the lowest slice
// index, a missing or repeated slice is refused.
#include "core/merge.h"

#include "gtest/gtest.h"

namespace sliceplan {
namespace {

SliceResult Answer(uint32_t index, uint32_t count, std::optional<double> cost) {
  SliceResult r;
  r.slice = {index, count};
  r.stats.splits = 10 + index;
  if (cost) {
    Plan plan;
    plan.nodes.push_back({RelSet{1}, -1, -1, 5, 0});
    plan.nodes.push_back({RelSet{2}, -1, -1, 7, 0});
    plan.nodes.push_back({RelSet{3}, 0, 1, 35, *cost});
    r.plan = plan;
  }
  return r;
}

TEST(MergeTest, LeastCostWinsAndStatsStayInIndexOrder) {
  std::vector<SliceResult> answers = {Answer(2, 4, 30.0), Answer(0, 4, 50.0),
                                      Answer(3, 4, std::nullopt), Answer(1, 4, 20.0)};
  auto merged = MergeSlices(std::move(answers), 4);
  ASSERT_TRUE(merged.ok()) << merged.status();
  EXPECT_EQ(merged->best_slice, 1u);
  EXPECT_DOUBLE_EQ(merged->plan.root().cost, 20.0);
  ASSERT_EQ(merged->slices.size(), 4u);
  for (uint32_t i = 0; i < 4; ++i) {
    EXPECT_EQ(merged->slices[i].slice.index, i);
    EXPECT_EQ(merged->slices[i].stats.splits, 10 + i);
    EXPECT_FALSE(merged->slices[i].plan.has_value());
  }
}

TEST(MergeTest, TiesGoToTheLowestSlice) {
  auto merged = MergeSlices({Answer(1, 2, 20.0), Answer(0, 2, 20.0)}, 2);
  ASSERT_TRUE(merged.ok());
  EXPECT_EQ(merged->best_slice, 0u);
}

TEST(MergeTest, RefusesMissingOrRepeatedSlices) {
  EXPECT_EQ(MergeSlices({Answer(0, 2, 1.0)}, 2).status().code(),
            absl::StatusCode::kInvalidArgument);
  EXPECT_EQ(MergeSlices({Answer(0, 2, 1.0), Answer(0, 2, 2.0)}, 2).status().code(),
            absl::StatusCode::kInvalidArgument);
}

TEST(MergeTest, NoPlanInAnySliceIsNotFound) {
  auto merged = MergeSlices({Answer(0, 2, std::nullopt), Answer(1, 2, std::nullopt)}, 2);
  EXPECT_EQ(merged.status().code(), absl::StatusCode::kNotFound);
}

}  // namespace
}  // namespace sliceplan
