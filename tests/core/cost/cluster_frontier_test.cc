// The staircase rule and its two containers: what is kept, what is
// dropped, and in what order, checked against hand-made points.
#include "core/cost/cluster_frontier.h"

#include <vector>

#include "gtest/gtest.h"

namespace sliceplan {
namespace {

ClusterEntry Point(int64_t level, double latency, double node_seconds) {
  ClusterEntry e;
  e.level = level;
  e.costs = {latency, node_seconds, 1};
  return e;
}

std::vector<std::pair<double, double>> Points(const std::vector<ClusterEntry>& v) {
  std::vector<std::pair<double, double>> out;
  for (const ClusterEntry& e : v) out.emplace_back(e.costs.latency_s, e.costs.node_seconds);
  return out;
}

const Objectives kBoth = ParseObjectives("latency_s,node_seconds").value();

TEST(StaircaseRuleTest, ExactInsertionKeepsOnlyTheUndominated) {
  const StaircaseRule rule(kBoth, 1.0);
  std::vector<ClusterEntry> v;
  for (const auto& [lat, ns] : std::vector<std::pair<double, double>>{
           {3, 3}, {1, 5}, {5, 1}, {2, 4}, {4, 4}, {2, 4}, {0.5, 6}}) {
    rule.Insert(v, 0, v.size(), Point(0, lat, ns));
  }
  // (4, 4) is dominated by (3, 3); the second (2, 4) equals the first.
  using P = std::pair<double, double>;
  EXPECT_EQ(Points(v), (std::vector<P>{{0.5, 6}, {1, 5}, {2, 4}, {3, 3}, {5, 1}}));
  // A point better on both drops the run it dominates and takes its place.
  rule.Insert(v, 0, v.size(), Point(0, 1.5, 2));
  EXPECT_EQ(Points(v), (std::vector<P>{{0.5, 6}, {1, 5}, {1.5, 2}, {5, 1}}));
  EXPECT_TRUE(rule.Covers(v.data(), v.data() + v.size(), 1.5, 2));
  EXPECT_FALSE(rule.Covers(v.data(), v.data() + v.size(), 1.4, 2));
}

TEST(StaircaseRuleTest, AlphaCoversNearbyPointsAndMaskedObjectivesCountAsZero) {
  const StaircaseRule rule(kBoth, 1.1);
  std::vector<ClusterEntry> v;
  rule.Insert(v, 0, 0, Point(0, 1.0, 1.0));
  // 1.0 <= 1.1 * 0.95 and 1.0 <= 1.1 * 0.95: covered, not kept.
  rule.Insert(v, 0, v.size(), Point(0, 0.95, 0.95));
  EXPECT_EQ(v.size(), 1u);
  // 1.0 > 1.1 * 0.9: kept, and it dominates the first exactly.
  rule.Insert(v, 0, v.size(), Point(0, 0.9, 0.9));
  ASSERT_EQ(v.size(), 1u);
  EXPECT_EQ(v[0].costs.latency_s, 0.9);

  const StaircaseRule latency_only(ParseObjectives("latency_s").value(), 1.0);
  std::vector<ClusterEntry> w;
  latency_only.Insert(w, 0, 0, Point(0, 2, 1));
  latency_only.Insert(w, 0, w.size(), Point(0, 1, 100));  // node-seconds not asked for
  ASSERT_EQ(w.size(), 1u);
  EXPECT_EQ(w[0].costs.latency_s, 1);
}

TEST(LevelFrontierTest, LevelsAreSeparateAndComeOutInLevelOrder) {
  const StaircaseRule rule(kBoth, 1.0);
  LevelFrontier f;
  f.Insert(rule, Point(7, 2, 2));
  f.Insert(rule, Point(3, 5, 5));  // another level: kept although worse
  f.Insert(rule, Point(7, 1, 3));
  f.Insert(rule, Point(3, 6, 6));  // dominated within level 3
  EXPECT_EQ(f.size(), 3u);
  EXPECT_TRUE(f.Covers(rule, 3, 5, 5));
  EXPECT_FALSE(f.Covers(rule, 5, 100, 100));  // no level 5
  std::vector<ClusterEntry> flat;
  f.AppendTo(flat);
  using P = std::pair<double, double>;
  EXPECT_EQ(Points(flat), (std::vector<P>{{5, 5}, {1, 3}, {2, 2}}));
  EXPECT_EQ(flat[0].level, 3);
  // The flat form finds the same answers by binary search.
  FlatFrontier flat_frontier(flat);
  EXPECT_TRUE(flat_frontier.Covers(rule, 7, 1, 3));
  EXPECT_FALSE(flat_frontier.Covers(rule, 7, 0.5, 3));
  flat_frontier.Insert(rule, Point(5, 9, 9));
  flat_frontier.Insert(rule, Point(7, 0.5, 2.5));
  EXPECT_EQ(Points(flat), (std::vector<P>{{5, 5}, {9, 9}, {0.5, 2.5}, {2, 2}}));

  // Cleared, it starts empty and reuses its vectors.
  f.Clear();
  EXPECT_EQ(f.size(), 0u);
  f.At(4).Insert(rule, Point(4, 1, 1));
  std::vector<ClusterEntry> again;
  f.AppendTo(again);
  ASSERT_EQ(again.size(), 1u);
  EXPECT_EQ(again[0].level, 4);
}

}  // namespace
}  // namespace sliceplan
