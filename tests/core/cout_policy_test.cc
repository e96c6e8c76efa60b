// The cout model on a hand-computed example (docs/cost-models.md: C_out(leaf) =
// 0, C_out(L join R) = card(L u R) + C_out(L) + C_out(R)).
#include "core/cout_policy.h"

#include "gtest/gtest.h"
#include "schedule/embedded_pool.h"
#include "tests/support/test_queries.h"

namespace sliceplan {
namespace {

// berths (100 rows) - cranes (1000) - moves (10000), selectivities
// berths-cranes 0.01, cranes-moves 0.001:
//   card(berths cranes) = 100 * 1000 * 0.01 = 1000
//   card(cranes moves)  = 1000 * 10000 * 0.001 = 10000
//   card(berths moves)  = 100 * 10000 = 1e6 (cross product)
//   card(all)           = 100 * 1000 * 10000 * 0.01 * 0.001 = 10000
// Trees: ((berths cranes) moves) = 1000 + 10000 = 11000
//        ((cranes moves) berths) = 10000 + 10000 = 20000
//        ((berths moves) cranes) = 1e6 + 10000 = 1010000
Query Example() {
  return testing::MakeQueryOrDie(
      {{"berths", 100, 100}, {"cranes", 1000, 100}, {"moves", 10000, 100}},
      {{0b011, 0.01}, {0b110, 0.001}});
}

TEST(CoutPolicyTest, HandComputedOptimum) {
  auto r = OptimizeEmbedded(Example(), {}, 1, 1);
  ASSERT_TRUE(r.ok());
  EXPECT_DOUBLE_EQ(r->plan.root().cost, 11000);
  EXPECT_DOUBLE_EQ(r->plan.root().cardinality, 10000);
  EXPECT_EQ(TreeString(r->plan, Example()), "((berths cranes) moves)");
}

TEST(CoutPolicyTest, JoinCostAddsOutputCardinalityToInputs) {
  EXPECT_DOUBLE_EQ(CoutJoin(1000, 0, 0), 1000);
  EXPECT_DOUBLE_EQ(CoutJoin(10000, 1000, 0), 11000);
}

TEST(CoutPolicyTest, PlanCostingMatchesTheFormulaPerNode) {
  auto r = OptimizeEmbedded(Example(), {PlanShape::kLeftDeep, true, CostModelKind::kCout}, 2, 1);
  ASSERT_TRUE(r.ok());
  for (const PlanNode& node : r->plan.nodes) {
    if (node.is_leaf()) {
      EXPECT_EQ(node.cost, 0);
    } else {
      EXPECT_DOUBLE_EQ(node.cost, node.cardinality + r->plan.nodes[node.left].cost +
                                      r->plan.nodes[node.right].cost);
    }
  }
}

}  // namespace
}  // namespace sliceplan
