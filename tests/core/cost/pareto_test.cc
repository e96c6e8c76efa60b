// FrontierIndices against the definition (docs/cost-models.md), checked
// by scanning every pair, for every objective subset, on random cost
// vectors with many ties: no kept plan is at least as good as another kept
// one on every selected objective (so of equal ones one is kept), and
// every plan left out has a kept plan at least as good.
#include "core/cost/pareto.h"

#include <random>
#include <set>

#include "gtest/gtest.h"

namespace sliceplan {
namespace {

TEST(ParetoTest, FrontierIndicesKeepExactlyTheNonDominatedPlans) {
  std::mt19937_64 rng(5);
  // Few distinct values, so ties on every objective are common.
  std::uniform_int_distribution<int> value(1, 12);
  for (int round = 0; round < 200; ++round) {
    std::vector<ClusterCosts> plans(1 + round % 60);
    for (ClusterCosts& p : plans) {
      p.latency_s = value(rng);
      p.node_seconds = value(rng) * 0.5;
      p.completeness = 1.0 / value(rng);
    }
    for (uint8_t mask = 1; mask < 8; ++mask) {
      const Objectives o{mask};
      const std::vector<size_t> got = FrontierIndices(plans, o);
      const std::set<size_t> kept(got.begin(), got.end());
      ASSERT_EQ(kept.size(), got.size());
      for (size_t i = 0; i < plans.size(); ++i) {
        for (size_t j : kept) {
          if (j == i) continue;
          if (kept.count(i) != 0) {
            EXPECT_FALSE(DominatesOrEquals(plans[j], plans[i], o))
                << "round " << round << " objectives " << int{mask} << ": " << j << " over " << i;
          }
        }
        if (kept.count(i) == 0) {
          bool covered = false;
          for (size_t j : kept) covered = covered || DominatesOrEquals(plans[j], plans[i], o);
          EXPECT_TRUE(covered) << "round " << round << " objectives " << int{mask} << ": " << i;
        }
      }
      // By increasing latency.
      for (size_t k = 1; k < got.size(); ++k) {
        EXPECT_LE(plans[got[k - 1]].latency_s, plans[got[k]].latency_s);
      }
    }
  }
}

}  // namespace
}  // namespace sliceplan
