// Merging slice answers: the least cost wins, ties go to the lowest slice
// index, a missing or repeated slice is refused; Pareto sets merge into the
// non-dominated union (docs/cost-models.md); partial merges and saturated
// answers. Expected values are worked out by hand beside each test.
#include "core/merge.h"

#include "core/model/value_range.h"
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

// A one-join cluster plan with the given root metrics.
Plan ClusterPlan(double latency, double node_seconds, double completeness) {
  Plan plan;
  plan.nodes.push_back({RelSet{1}, -1, -1, 5, 0});
  plan.nodes.push_back({RelSet{2}, -1, -1, 7, 0});
  plan.nodes.push_back({RelSet{3}, 0, 1, 35, latency});
  plan.nodes.back().metrics = {latency, node_seconds, completeness};
  return plan;
}

SliceResult FrontierAnswer(uint32_t index, uint32_t count, std::vector<Plan> frontier) {
  SliceResult r;
  r.slice = {index, count};
  r.frontier = std::move(frontier);
  r.plan = r.frontier.front();
  return r;
}

// Slice 0 holds (1, 10, 1) and (5, 2, 1); slice 1 holds (3, 3, 1), which
// neither beats, and (6, 2, 1), which (5, 2, 1) beats, and a copy of
// (1, 10, 1), equal on every metric (kept once). The union, filtered by
// exact dominance, is (1, 10), (3, 3), (5, 2) by increasing latency.
TEST(MergeTest, FrontiersMergeIntoTheNonDominatedUnion) {
  auto merged = MergeSlices(
      {FrontierAnswer(0, 2, {ClusterPlan(1, 10, 1), ClusterPlan(5, 2, 1)}),
       FrontierAnswer(1, 2, {ClusterPlan(1, 10, 1), ClusterPlan(3, 3, 1), ClusterPlan(6, 2, 1)})},
      2);
  ASSERT_TRUE(merged.ok()) << merged.status();
  ASSERT_EQ(merged->frontier.size(), 3u);
  const double want[][2] = {{1, 10}, {3, 3}, {5, 2}};
  for (size_t i = 0; i < 3; ++i) {
    EXPECT_EQ(merged->frontier[i].root().metrics.latency_s, want[i][0]);
    EXPECT_EQ(merged->frontier[i].root().metrics.node_seconds, want[i][1]);
  }
  EXPECT_EQ(merged->plan.root().metrics.latency_s, 1);
}

// On two objectives (latency, node-seconds) completeness no longer keeps a
// slower, more complete plan on the frontier.
TEST(MergeTest, FrontierOnASubsetOfObjectives) {
  Objectives two;
  two.mask = Objectives::kLatency | Objectives::kNodeSeconds;
  auto merged =
      MergeSlices({FrontierAnswer(0, 1, {ClusterPlan(2, 2, 0.5), ClusterPlan(3, 3, 1)})}, 1, two);
  ASSERT_TRUE(merged.ok());
  ASSERT_EQ(merged->frontier.size(), 1u);
  EXPECT_EQ(merged->frontier[0].root().metrics.completeness, 0.5);
  auto all = MergeSlices({FrontierAnswer(0, 1, {ClusterPlan(2, 2, 0.5), ClusterPlan(3, 3, 1)})}, 1);
  ASSERT_TRUE(all.ok());
  EXPECT_EQ(all->frontier.size(), 2u);
}

TEST(MergeTest, SolvedSubsetMergesToItsBest) {
  auto merged = MergeSolvedSlices({Answer(3, 4, 30.0), Answer(1, 4, 40.0)}, 4);
  ASSERT_TRUE(merged.ok()) << merged.status();
  EXPECT_EQ(merged->plan.root().cost, 30.0);
  EXPECT_EQ(merged->best_slice, 3u);
  EXPECT_EQ(merged->slices.size(), 2u);
  EXPECT_EQ(MergeSolvedSlices({Answer(4, 4, 1.0)}, 4).status().code(),
            absl::StatusCode::kInvalidArgument);  // index past the count
}

TEST(MergeTest, SaturatedBestIsOutOfRange) {
  auto merged = MergeSlices({Answer(0, 2, kValueCeiling), Answer(1, 2, kValueCeiling)}, 2);
  EXPECT_EQ(merged.status().code(), absl::StatusCode::kOutOfRange);
  auto fine = MergeSlices({Answer(0, 2, kValueCeiling), Answer(1, 2, 12.0)}, 2);
  ASSERT_TRUE(fine.ok());
  EXPECT_EQ(fine->plan.root().cost, 12.0);
}

}  // namespace
}  // namespace sliceplan
