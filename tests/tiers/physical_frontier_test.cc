// The physical choices of one tree (tiers/physical_frontier.h): against an
// exhaustive enumeration of every sample rate per leaf and (strategy, node
// count) per join, costed by the independent cluster reference
// (tests/support/cluster_reference.h, its own transcription of
// docs/cost-models.md); each returned plan's metrics recomputed by it; a
// cap per node keeps plans valid; a 1,000-relation tree gets a set.
#include "tiers/physical_frontier.h"

#include <gtest/gtest.h>

#include <cmath>

#include "core/cost/pareto.h"
#include "tests/support/cluster_reference.h"
#include "tests/support/physical_plans.h"
#include "tests/support/test_queries.h"
#include "tests/support/wide_queries.h"
#include "tiers/greedy.h"

namespace sliceplan {
namespace {

using testing::GraphShape;

bool Near(double a, double b) {
  return std::fabs(a - b) <= 1e-9 * std::max(std::fabs(a), std::fabs(b));
}

// Every physical plan of the tree, by brute force over its choices.
std::vector<ClusterCosts> Exhaustive(const Query& q, const WidePlan& tree,
                                     const ClusterParams& params) {
  std::vector<size_t> radix;
  for (const WideNode& w : tree.nodes) {
    radix.push_back(w.is_leaf() ? params.sample_rates.size() : 3 * params.node_counts.size());
  }
  std::vector<ClusterCosts> out;
  std::vector<size_t> digit(radix.size(), 0);
  while (true) {
    PhysicalPlan choices;
    choices.metrics.assign(radix.size(), {});  // the reference costs it
    for (size_t i = 0; i < radix.size(); ++i) {
      choices.sample_rate.push_back(tree.nodes[i].is_leaf() ? params.sample_rates[digit[i]] : 1);
      choices.strategy.push_back(kAllStrategies[digit[i] % 3]);
      choices.nodes.push_back(tree.nodes[i].is_leaf() ? 0 : params.node_counts[digit[i] / 3]);
    }
    const testing::RefCosts c =
        testing::RefCostsOf(q, params, testing::PlanWithChoices(tree, choices));
    out.push_back({c.latency, c.node_seconds, c.completeness});
    size_t k = 0;
    while (k < radix.size() && ++digit[k] == radix[k]) digit[k++] = 0;
    if (k == radix.size()) break;
  }
  return out;
}

TEST(PhysicalFrontierTest, EqualsTheExhaustiveFrontierOfTheTree) {
  const ClusterSearchConfig config = testing::SmallClusterConfig();
  for (uint64_t seed = 1; seed <= 6; ++seed) {
    for (GraphShape shape : {GraphShape::kChain, GraphShape::kStar, GraphShape::kRandom}) {
      const Query q = testing::MakeQuery(shape, 4, seed);
      const WideQuery w = WideQuery::FromExact(q);
      for (PlanShape plan_shape : {PlanShape::kBushy, PlanShape::kLeftDeep}) {
        const WidePlan tree = GreedyPlan(w, plan_shape);
        const std::vector<PhysicalPlan> got = PhysicalFrontier(w, tree, config);
        const std::vector<ClusterCosts> all = Exhaustive(q, tree, config.params);
        std::vector<ClusterCosts> want;
        for (size_t k : FrontierIndices(all, config.objectives)) want.push_back(all[k]);
        ASSERT_EQ(got.size(), want.size()) << "seed " << seed;
        for (size_t k = 0; k < got.size(); ++k) {
          EXPECT_TRUE(Near(got[k].costs().latency_s, want[k].latency_s)) << seed << " " << k;
          EXPECT_TRUE(Near(got[k].costs().node_seconds, want[k].node_seconds)) << seed;
          EXPECT_TRUE(Near(got[k].costs().completeness, want[k].completeness)) << seed;
          // Its metrics are its choices' (the reference recomputes them).
          const testing::RefCosts again =
              testing::RefCostsOf(q, config.params, testing::PlanWithChoices(tree, got[k]));
          EXPECT_TRUE(Near(again.latency, got[k].costs().latency_s));
          EXPECT_TRUE(Near(again.node_seconds, got[k].costs().node_seconds));
        }
      }
    }
  }
}

TEST(PhysicalFrontierTest, ACapKeepsValidMutuallyNonDominatedPlans) {
  ClusterSearchConfig config = testing::SmallClusterConfig();
  config.params.sample_rates = {1.0, 0.3, 0.1, 0.03};
  const Query q = testing::MakeQuery(GraphShape::kRandom, 9, 3);
  const WideQuery w = WideQuery::FromExact(q);
  const WidePlan tree = GreedyPlan(w, PlanShape::kBushy);
  const std::vector<PhysicalPlan> capped = PhysicalFrontier(w, tree, config, {.cap = 6});
  ASSERT_FALSE(capped.empty());
  std::vector<ClusterCosts> costs;
  for (const PhysicalPlan& p : capped) {
    const testing::RefCosts again =
        testing::RefCostsOf(q, config.params, testing::PlanWithChoices(tree, p));
    EXPECT_TRUE(Near(again.latency, p.costs().latency_s));
    EXPECT_TRUE(Near(again.completeness, p.costs().completeness));
    costs.push_back(p.costs());
  }
  EXPECT_EQ(FrontierIndices(costs, config.objectives).size(), costs.size());
}

TEST(PhysicalFrontierTest, AThousandRelationTreeGetsASet) {
  ClusterSearchConfig config = testing::SmallClusterConfig();
  const WideQuery w = testing::MakeWideQuery(testing::WideShape::kSnowflake, 1000, 2);
  const WidePlan tree = GreedyPlan(w, PlanShape::kBushy);
  const std::vector<PhysicalPlan> set = PhysicalFrontier(w, tree, config, {.cap = 8});
  ASSERT_FALSE(set.empty());
  for (const PhysicalPlan& p : set) {
    EXPECT_GT(p.costs().latency_s, 0);
    EXPECT_LT(p.costs().latency_s, 1e300);
    EXPECT_EQ(p.metrics.size(), tree.nodes.size());
  }
}

}  // namespace
}  // namespace sliceplan
