// Pareto sub-plans shared across trees (tiers/shared_subplans.h): with an
// empty cache a tree's set is exactly PhysicalFrontier's; with a cache
// filled by other trees every plan PhysicalFrontier finds for a tree alone
// is matched or dominated by one of the shared evaluation (nothing is
// lost, uncapped and exact); every plan built from mixed sub-trees is a
// valid tree whose every figure the coordinator's independent recount
// accepts, left-deep where the trees were and free of cross products
// where they were.
#include "tiers/shared_subplans.h"

#include <gtest/gtest.h>

#include <algorithm>
#include <random>

#include "core/cost/pareto.h"
#include "tests/support/physical_plans.h"
#include "tests/support/wide_queries.h"
#include "tiers/anytime_part.h"
#include "tiers/greedy.h"

namespace sliceplan {
namespace {

// Random bushy (or left-deep) trees over the query: relations joined in a
// random order, each new relation with the current tree (left-deep) or
// pairs of random forests (bushy).
WidePlan RandomTree(const WideQuery& q, uint64_t seed, bool left_deep) {
  std::mt19937_64 rng(seed);
  std::vector<int32_t> order(static_cast<size_t>(q.size()));
  for (int32_t i = 0; i < q.size(); ++i) order[static_cast<size_t>(i)] = i;
  std::shuffle(order.begin(), order.end(), rng);
  WidePlan plan;
  std::vector<int32_t> forest;
  for (int32_t r : order) forest.push_back(AddLeaf(plan, r));
  if (left_deep) {
    int32_t top = forest[0];
    for (size_t k = 1; k < forest.size(); ++k) top = AddJoin(plan, top, forest[k]);
  } else {
    while (forest.size() > 1) {
      const size_t a = rng() % forest.size();
      const int32_t x = forest[a];
      forest.erase(forest.begin() + static_cast<std::ptrdiff_t>(a));
      const size_t b = rng() % forest.size();
      forest[b] = AddJoin(plan, x, forest[b]);
    }
  }
  CostWidePlan(plan, q);
  return plan;
}

ClusterSearchConfig Config() { return testing::SmallClusterConfig(); }

TEST(SharedSubplansTest, AnEmptyCacheGivesPhysicalFrontiersSet) {
  const WideQuery q = testing::MakeWideQuery(testing::WideShape::kTreeWithCycles, 9, 2);
  const ClusterSearchConfig config = Config();
  for (uint64_t seed = 1; seed <= 5; ++seed) {
    const WidePlan tree = RandomTree(q, seed, false);
    SubPlanCache cache(q, config, 0);
    const auto shared = cache.Evaluate(tree);
    const std::vector<PhysicalPlan> alone = PhysicalFrontier(q, tree, config);
    ASSERT_EQ(shared.size(), alone.size()) << seed;
    for (size_t i = 0; i < alone.size(); ++i) {
      EXPECT_EQ(shared[i]->costs.latency_s, alone[i].costs().latency_s) << seed << " " << i;
      EXPECT_EQ(shared[i]->costs.node_seconds, alone[i].costs().node_seconds);
      EXPECT_EQ(shared[i]->costs.completeness, alone[i].costs().completeness);
    }
  }
}

TEST(SharedSubplansTest, ACachedEvaluationLosesNothingOfTheTreeAlone) {
  const WideQuery q = testing::MakeWideQuery(testing::WideShape::kTreeWithCycles, 9, 3);
  const ClusterSearchConfig config = Config();
  SubPlanCache cache(q, config, 0);
  for (uint64_t seed = 1; seed <= 12; ++seed) {
    const WidePlan tree = RandomTree(q, seed, false);
    const auto shared = cache.Evaluate(tree);
    for (const PhysicalPlan& p : PhysicalFrontier(q, tree, config)) {
      bool matched = false;
      for (const auto& s : shared) {
        matched = matched || DominatesOrEquals(s->costs, p.costs(), config.objectives);
      }
      EXPECT_TRUE(matched) << "tree " << seed << ": a plan of the tree alone was lost";
    }
  }
}

TEST(SharedSubplansTest, MixedPlansAreValidAndEveryFigureRecounts) {
  for (const bool left_deep : {false, true}) {
    const WideQuery q = testing::MakeWideQuery(testing::WideShape::kSnowflake, 14, 4);
    SearchOptions options;
    options.cost = CostModelKind::kCluster;
    options.cluster = Config();
    options.shape = left_deep ? PlanShape::kLeftDeep : PlanShape::kBushy;
    SubPlanCache cache(q, options.cluster, 8);
    AnytimeAnswer answer;
    for (uint64_t seed = 1; seed <= 30; ++seed) {
      for (const auto& plan : cache.Evaluate(RandomTree(q, seed, left_deep))) {
        const FrontierPlan flat = SubPlanCache::Flatten(*plan);
        answer.frontier.push_back(WithPhysicalChoices(*flat.tree, flat.physical));
      }
    }
    EXPECT_GT(cache.cached_subplans(), 0u);
    const absl::Status s = CheckAnytimeAnswer(q, options, answer);
    EXPECT_TRUE(s.ok()) << s;
  }
}

TEST(SharedSubplansTest, TreesWithoutCrossProductsGivePlansWithout) {
  const WideQuery q = testing::MakeWideQuery(testing::WideShape::kTree, 16, 5);
  SearchOptions options;
  options.cost = CostModelKind::kCluster;
  options.cluster = Config();
  options.cross_products = false;
  SearchControl control;
  // The anytime search's own walk, which keeps only trees without.
  const AnytimeAnswer answer = RunAnytimePart(q, options, {0, 1}, control, {}, 300);
  ASSERT_FALSE(answer.frontier.empty());
  const absl::Status s = CheckAnytimeAnswer(q, options, answer);
  EXPECT_TRUE(s.ok()) << s;
}

}  // namespace
}  // namespace sliceplan
