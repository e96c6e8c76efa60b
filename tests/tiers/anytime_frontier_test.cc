// The anytime frontier search (tiers/anytime_frontier.h): its set is
// mutually non-dominated and every plan's metrics are its choices' (the
// independent cluster reference recomputes them); at small n its
// approximation factor against the exact frontier (the exact engine's
// Pareto search, itself checked against the exhaustive reference in
// cluster_frontier_test) stays under a stated bound; without cross
// products no plan has one; a 1,000-relation query gets valid trees.
#include "tiers/anytime_frontier.h"

#include <gtest/gtest.h>

#include <cmath>

#include "core/cost/pareto.h"
#include "core/slice_solver.h"
#include "tests/support/cluster_reference.h"
#include "tests/support/physical_plans.h"
#include "tests/support/test_queries.h"
#include "tests/support/wide_queries.h"

namespace sliceplan {
namespace {

using testing::GraphShape;

std::vector<ClusterCosts> CostsOf(const std::vector<FrontierPlan>& plans) {
  std::vector<ClusterCosts> out;
  for (const FrontierPlan& p : plans) out.push_back(p.physical.costs());
  return out;
}

// The exact frontier by the engine's exact Pareto search.
std::vector<ClusterCosts> ExactFrontier(const Query& q, const ClusterSearchConfig& config,
                                        PlanShape shape, bool cross) {
  SearchOptions options;
  options.cost = CostModelKind::kCluster;
  options.cluster = config;
  options.shape = shape;
  options.cross_products = cross;
  SearchControl control;
  auto r = SolveSlice(q, options, {0, 1}, control);
  EXPECT_TRUE(r.ok()) << r.status();
  std::vector<ClusterCosts> out;
  for (const Plan& p : r->frontier) out.push_back(p.root().metrics);
  return out;
}

TEST(AnytimeFrontierTest, ItsSetIsNonDominatedAndCostedByItsChoices) {
  const ClusterSearchConfig config = testing::SmallClusterConfig();
  const Query q = testing::MakeQuery(GraphShape::kRandom, 8, 2);
  const WideQuery w = WideQuery::FromExact(q);
  SearchControl control;
  AnytimeFrontierOptions options;
  options.max_moves = 200;
  const AnytimeFrontierResult r = AnytimeFrontier(w, config, options, control);
  ASSERT_FALSE(r.frontier.empty());
  EXPECT_EQ(r.trees, 201u - r.moves_refused);
  const std::vector<ClusterCosts> costs = CostsOf(r.frontier);
  EXPECT_EQ(FrontierIndices(costs, config.objectives).size(), costs.size());
  for (const FrontierPlan& p : r.frontier) {
    ASSERT_TRUE(CheckWidePlan(*p.tree, 8).ok());
    const testing::RefCosts again =
        testing::RefCostsOf(q, config.params, testing::PlanWithChoices(*p.tree, p.physical));
    EXPECT_NEAR(again.latency, p.physical.costs().latency_s, 1e-9 * again.latency);
    EXPECT_NEAR(again.node_seconds, p.physical.costs().node_seconds, 1e-9 * again.node_seconds);
    EXPECT_DOUBLE_EQ(again.completeness, p.physical.costs().completeness);
  }
}

// The stated bound: after 300 moves with 32 plans kept per tree node,
// every exact frontier plan of these 7-relation queries is 1.4-covered
// (bushy, cross products allowed; measured worst 1.33, mean 1.18:
// bench/anytime_frontier_bench). A regression guard, not the target: the
// shared sub-plan sets that would close the gap are still to come.
TEST(AnytimeFrontierTest, CoversTheExactFrontierWithinTheStatedBoundAtSmallN) {
  const ClusterSearchConfig config = testing::SmallClusterConfig();
  for (uint64_t seed = 1; seed <= 4; ++seed) {
    for (GraphShape shape : {GraphShape::kChain, GraphShape::kStar, GraphShape::kRandom}) {
      const Query q = testing::MakeQuery(shape, 7, seed);
      const WideQuery w = WideQuery::FromExact(q);
      SearchControl control;
      AnytimeFrontierOptions options;
      options.max_moves = 300;
      options.cap_per_node = 32;
      options.seed = seed;
      const AnytimeFrontierResult r = AnytimeFrontier(w, config, options, control);
      const double alpha = testing::CoverFactor(CostsOf(r.frontier),
                                                ExactFrontier(q, config, PlanShape::kBushy, true));
      EXPECT_LE(alpha, 1.4) << testing::ShapeName(shape) << " seed " << seed;
    }
  }
}

TEST(AnytimeFrontierTest, NoCrossProductWhereTheyAreExcluded) {
  const ClusterSearchConfig config = testing::SmallClusterConfig();
  for (PlanShape shape : {PlanShape::kBushy, PlanShape::kLeftDeep}) {
    const Query q = testing::MakeQuery(GraphShape::kChain, 9, 5);
    const WideQuery w = WideQuery::FromExact(q);
    SearchControl control;
    AnytimeFrontierOptions options;
    options.shape = shape;
    options.cross_products = false;
    options.max_moves = 200;
    const AnytimeFrontierResult r = AnytimeFrontier(w, config, options, control);
    ASSERT_FALSE(r.frontier.empty());
    EXPECT_GT(r.moves_refused, 0u);  // a chain refuses many moves
    // Every move was made: the search never stops short of its budget.
    EXPECT_EQ(r.trees - 1 + r.moves_refused, 200u) << (shape == PlanShape::kBushy);
    for (const FrontierPlan& p : r.frontier) {
      EXPECT_FALSE(HasCrossProduct(*p.tree, w));
      EXPECT_TRUE(CheckWidePlan(*p.tree, 9, shape == PlanShape::kLeftDeep).ok());
    }
  }
}

TEST(AnytimeFrontierTest, AThousandRelationsGetValidTreesByTheDeadline) {
  const ClusterSearchConfig config = testing::SmallClusterConfig();
  const WideQuery w = testing::MakeWideQuery(testing::WideShape::kTreeWithCycles, 1000, 3);
  SearchControl control(nullptr, std::chrono::steady_clock::now() + std::chrono::milliseconds(500));
  AnytimeFrontierOptions options;
  const auto start = std::chrono::steady_clock::now();
  const AnytimeFrontierResult r = AnytimeFrontier(w, config, options, control);
  EXPECT_LT(std::chrono::steady_clock::now() - start, std::chrono::seconds(3));
  ASSERT_FALSE(r.frontier.empty());
  EXPECT_GT(r.trees, 1u);
  for (const FrontierPlan& p : r.frontier) ASSERT_TRUE(CheckWidePlan(*p.tree, 1000).ok());
}

}  // namespace
}  // namespace sliceplan
