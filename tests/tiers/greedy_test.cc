// Greedy operator ordering: a small example worked by hand, validity and
// "never below the optimum" on every small shape, and valid plans for
// thousands of relations.
#include "tiers/greedy.h"

#include <gtest/gtest.h>

#include "tests/support/reference_dp.h"
#include "tests/support/test_queries.h"
#include "tests/support/wide_queries.h"

namespace sliceplan {
namespace {

using testing::GraphShape;

// a(10) b(100) c(1000) d(50); a-b 0.01, b-c 0.001, c-d 0.01, b-d 0.1.
WideQuery HandExample() {
  auto q = WideQuery::Create({{"a", 10, 1}, {"b", 100, 1}, {"c", 1000, 1}, {"d", 50, 1}},
                             {{{0, 1}, 0.01}, {{1, 2}, 0.001}, {{2, 3}, 0.01}, {{1, 3}, 0.1}});
  EXPECT_TRUE(q.ok());
  return *q;
}

TEST(GreedyTest, BushyFollowsTheHandWorkedSteps) {
  // Pairs: ab 10, bc 100, cd 500, bd 500: join a-b (10). Then ab-c
  // 10*1000*0.001 = 10, ab-d 10*50*0.1 = 50, c-d 500: join ab-c (10).
  // Last abc-d 10*50*0.01*0.1 = 0.5. C_out = 10 + 10 + 0.5.
  const WideQuery q = HandExample();
  const WidePlan plan = GreedyPlan(q, PlanShape::kBushy);
  ASSERT_TRUE(CheckWidePlan(plan, 4).ok());
  EXPECT_DOUBLE_EQ(plan.cost(), 20.5);
  ASSERT_EQ(plan.nodes.size(), 7u);
  EXPECT_DOUBLE_EQ(plan.nodes[4].cardinality, 10);   // a-b
  EXPECT_DOUBLE_EQ(plan.nodes[5].cardinality, 10);   // ab-c
  EXPECT_DOUBLE_EQ(plan.nodes[6].cardinality, 0.5);  // abc-d
}

TEST(GreedyTest, BushyPrefersTheSmallestResultOverALeftDeepChain) {
  // a(1000)-b(10) 0.1 = 1000; c(1000)-d(10) 0.1 = 1000; b-c 0.5 = 5000.
  // GOO joins a-b, then c-d (1000 against ab-c's 5e5), then the two.
  auto q = WideQuery::Create({{"a", 1000, 1}, {"b", 10, 1}, {"c", 1000, 1}, {"d", 10, 1}},
                             {{{0, 1}, 0.1}, {{2, 3}, 0.1}, {{1, 2}, 0.5}});
  ASSERT_TRUE(q.ok());
  const WidePlan plan = GreedyPlan(*q, PlanShape::kBushy);
  EXPECT_FALSE(CheckWidePlan(plan, 4, /*left_deep=*/true).ok());
  EXPECT_DOUBLE_EQ(plan.cost(), 1000 + 1000 + 500000);
}

TEST(GreedyTest, LeftDeepAddsTheRelationOfLeastResult) {
  // Start a-b (10); then c gives 10 (1000 * 0.001), d gives 50: c; then d.
  const WidePlan plan = GreedyPlan(HandExample(), PlanShape::kLeftDeep);
  ASSERT_TRUE(CheckWidePlan(plan, 4, /*left_deep=*/true).ok());
  EXPECT_DOUBLE_EQ(plan.cost(), 20.5);
  const WideNode& root = plan.root();
  EXPECT_EQ(plan.nodes[root.right].relation, 3);                   // d last
  EXPECT_EQ(plan.nodes[plan.nodes[root.left].right].relation, 2);  // c before it
}

TEST(GreedyTest, NeverCheaperThanTheOptimumAndFreeOfCrossProductsOnConnectedGraphs) {
  for (const GraphShape shape : {GraphShape::kChain, GraphShape::kCycle, GraphShape::kStar,
                                 GraphShape::kClique, GraphShape::kRandom, GraphShape::kHyper}) {
    for (const int n : {2, 5, 9, 12}) {
      for (uint64_t seed = 1; seed <= 3; ++seed) {
        const Query q = testing::MakeQuery(shape, n, seed);
        const WideQuery w = WideQuery::FromExact(q);
        const WidePlan bushy = GreedyPlan(w, PlanShape::kBushy);
        const WidePlan deep = GreedyPlan(w, PlanShape::kLeftDeep);
        ASSERT_TRUE(CheckWidePlan(bushy, n).ok());
        ASSERT_TRUE(CheckWidePlan(deep, n, true).ok());
        EXPECT_FALSE(HasCrossProduct(bushy, w)) << testing::ShapeName(shape) << n;
        EXPECT_FALSE(HasCrossProduct(deep, w)) << testing::ShapeName(shape) << n;
        const double best = testing::DpBestBushy(q, false);
        const double best_deep = testing::DpBestLeftDeep(q, false);
        EXPECT_GE(bushy.cost(), best * (1 - 1e-12)) << testing::ShapeName(shape) << n;
        EXPECT_GE(deep.cost(), best_deep * (1 - 1e-12)) << testing::ShapeName(shape) << n;
        EXPECT_GE(bushy.cost(), testing::DpBestBushy(q, true) * (1 - 1e-12));
      }
    }
  }
}

TEST(GreedyTest, DisconnectedGraphsGetCrossProductsOfTheSmallestComponents) {
  // a-b joined (card 5), c (7) and d (3) alone: a-b first, then the two
  // smallest components, d and ab (15), then c (105).
  auto q =
      WideQuery::Create({{"a", 10, 1}, {"b", 5, 1}, {"c", 7, 1}, {"d", 3, 1}}, {{{0, 1}, 0.1}});
  ASSERT_TRUE(q.ok());
  const WidePlan plan = GreedyPlan(*q, PlanShape::kBushy);
  ASSERT_TRUE(CheckWidePlan(plan, 4).ok());
  EXPECT_DOUBLE_EQ(plan.cost(), 5 + 15 + 105);
}

TEST(GreedyTest, ThousandsOfRelationsGetValidPlans) {
  using testing::WideShape;
  for (const WideShape shape : {WideShape::kTree, WideShape::kSnowflake, WideShape::kTreeWithCycles,
                                WideShape::kTreeWithHyperedges}) {
    for (const int n : {1000, 5000}) {
      const WideQuery q = testing::MakeWideQuery(shape, n, 7);
      for (const PlanShape plan_shape : {PlanShape::kBushy, PlanShape::kLeftDeep}) {
        const WidePlan plan = GreedyPlan(q, plan_shape);
        ASSERT_TRUE(CheckWidePlan(plan, n, plan_shape == PlanShape::kLeftDeep).ok())
            << testing::WideShapeName(shape) << " " << n;
        EXPECT_FALSE(HasCrossProduct(plan, q)) << testing::WideShapeName(shape) << " " << n;
        EXPECT_GT(plan.cost(), 0);
        EXPECT_LT(plan.cost(), 1e300);
      }
    }
  }
}

// Out of time, the bushy greedy plan still comes back whole: the joins it
// chose, then the rest along the predicates (no cross product on a
// connected graph), reported as cut.
TEST(GreedyTest, ADeadlineCutsTheChoiceNotThePlan) {
  using testing::WideShape;
  for (const WideShape shape : {WideShape::kTreeWithCycles, WideShape::kTreeWithHyperedges}) {
    const int n = 3000;
    const WideQuery q = testing::MakeWideQuery(shape, n, 5);
    GreedyReport report;
    const WidePlan cut =
        GreedyPlan(q, PlanShape::kBushy, std::chrono::steady_clock::now(), &report);
    ASSERT_TRUE(CheckWidePlan(cut, n).ok()) << testing::WideShapeName(shape);
    EXPECT_FALSE(HasCrossProduct(cut, q)) << testing::WideShapeName(shape);
    EXPECT_TRUE(report.cut);
    EXPECT_LT(report.greedy_joins, n - 1);
    GreedyReport whole;
    const WidePlan full = GreedyPlan(q, PlanShape::kBushy, std::nullopt, &whole);
    ASSERT_TRUE(CheckWidePlan(full, n).ok());
    EXPECT_FALSE(whole.cut);
    EXPECT_EQ(whole.greedy_joins, n - 1);
  }
}

}  // namespace
}  // namespace sliceplan
