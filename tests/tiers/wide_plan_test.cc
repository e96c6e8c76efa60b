// The wide plan: validity checks, C_out costing through the join forest
// against the exact engine's own costing, tree strings, cross products.
#include "tiers/wide_plan.h"

#include <gtest/gtest.h>

#include "core/model/plan.h"
#include "schedule/embedded_pool.h"
#include "tests/support/test_queries.h"
#include "tiers/join_forest.h"

namespace sliceplan {
namespace {

using testing::GraphShape;
using testing::MakeQuery;

WideQuery Wide(const Query& q) { return WideQuery::FromExact(q); }

TEST(JoinForestTest, CardinalityAppliesEachPredicateWhenItsLastTwoComponentsMerge) {
  // a(10) b(20) c(30); a-b 0.1; a-b-c 0.5 (a hyperedge).
  auto q = WideQuery::Create({{"a", 10, 1}, {"b", 20, 1}, {"c", 30, 1}},
                             {{{0, 1}, 0.1}, {{0, 1, 2}, 0.5}});
  ASSERT_TRUE(q.ok());
  JoinForest forest(*q);
  const int32_t bc = forest.Merge(forest.Find(1), forest.Find(2));
  EXPECT_DOUBLE_EQ(forest.Card(bc), 600);  // no predicate lies within {b, c}
  const int32_t all = forest.Merge(forest.Find(0), bc);
  EXPECT_DOUBLE_EQ(forest.Card(all), 6000 * 0.1 * 0.5);
  EXPECT_EQ(forest.Members(all), 3);
}

TEST(WidePlanTest, CostMatchesTheExactEnginesPlanCost) {
  for (const GraphShape shape : {GraphShape::kChain, GraphShape::kStar, GraphShape::kCycle,
                                 GraphShape::kRandom, GraphShape::kHyper}) {
    const Query q = MakeQuery(shape, 9, 3);
    SearchOptions options;
    auto exact = OptimizeEmbedded(q, options, 1, 1);
    ASSERT_TRUE(exact.ok()) << exact.status();
    WidePlan wide = FromExactPlan(exact->plan);
    ASSERT_TRUE(CheckWidePlan(wide, q.size()).ok());
    const double exact_cost = wide.cost();
    EXPECT_NEAR(CostWidePlan(wide, Wide(q)), exact_cost, 1e-12 * exact_cost)
        << testing::ShapeName(shape);
    EXPECT_EQ(WideTreeString(wide, Wide(q)), TreeString(exact->plan, q));
  }
}

TEST(WidePlanTest, CheckRefusesMalformedTrees) {
  WidePlan plan;
  AddLeaf(plan, 0);
  AddLeaf(plan, 0);
  AddJoin(plan, 0, 1);
  EXPECT_EQ(CheckWidePlan(plan, 2).code(), absl::StatusCode::kInternal);  // leaf 0 twice
  plan.nodes[1].relation = 1;
  EXPECT_TRUE(CheckWidePlan(plan, 2).ok());
  EXPECT_FALSE(CheckWidePlan(plan, 3).ok());  // relation 2 missing
  WidePlan bushy;
  for (int32_t r = 0; r < 4; ++r) AddLeaf(bushy, r);
  AddJoin(bushy, AddJoin(bushy, 0, 1), AddJoin(bushy, 2, 3));
  EXPECT_TRUE(CheckWidePlan(bushy, 4).ok());
  EXPECT_FALSE(CheckWidePlan(bushy, 4, /*left_deep=*/true).ok());
}

TEST(WidePlanTest, CrossProductsAreFound) {
  // Chain a-b-c: (a c) is a cross product, (a b) is not.
  auto q =
      WideQuery::Create({{"a", 10, 1}, {"b", 20, 1}, {"c", 30, 1}}, {{{0, 1}, 0.1}, {{1, 2}, 0.1}});
  ASSERT_TRUE(q.ok());
  WidePlan good, bad;
  for (WidePlan* p : {&good, &bad}) {
    for (int32_t r = 0; r < 3; ++r) AddLeaf(*p, r);
  }
  AddJoin(good, AddJoin(good, 0, 1), 2);
  AddJoin(bad, AddJoin(bad, 0, 2), 1);
  EXPECT_FALSE(HasCrossProduct(good, *q));
  EXPECT_TRUE(HasCrossProduct(bad, *q));
  EXPECT_EQ(WideTreeString(bad, *q), "((a c) b)");
}

}  // namespace
}  // namespace sliceplan
