// The cout model on a hand-computed example (docs/cost-models.md: C_out(leaf) =
// 0, C_out(L join R) = card(L u R) + C_out(L) + C_out(R)).
#include "core/cost/cout_policy.h"

#include <map>
#include <vector>

#include "gtest/gtest.h"
#include "tests/support/solve_slices.h"
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
  auto r = testing::SolveAllSlices(Example(), {}, 1);
  ASSERT_TRUE(r.ok());
  EXPECT_DOUBLE_EQ(r->plan.root().cost, 11000);
  EXPECT_DOUBLE_EQ(r->plan.root().cardinality, 10000);
  EXPECT_EQ(TreeString(r->plan, Example()), "((berths cranes) moves)");
}

TEST(CoutPolicyTest, JoinCostAddsOutputCardinalityToInputs) {
  EXPECT_DOUBLE_EQ(CoutJoin(1000, 0, 0), 1000);
  EXPECT_DOUBLE_EQ(CoutJoin(10000, 1000, 0), 11000);
}

// Every reported node, cardinality and cost, against the hand-computed
// table above (not against the engine's own cardinalities): the costs of
// the subtrees are rebuilt from the table alone.
TEST(CoutPolicyTest, ReportedCardinalitiesAndCostsMatchTheHandComputation) {
  const std::map<RelSet, double> card = {{0b001, 100},  {0b010, 1000},  {0b100, 10000},
                                         {0b011, 1000}, {0b110, 10000}, {0b101, 1e6},
                                         {0b111, 10000}};
  for (PlanShape shape : {PlanShape::kBushy, PlanShape::kLeftDeep}) {
    for (uint32_t p : {1u, 2u}) {
      auto r = testing::SolveAllSlices(Example(), {shape, true, CostModelKind::kCout}, p);
      ASSERT_TRUE(r.ok());
      std::vector<double> want(r->plan.nodes.size());
      for (size_t i = 0; i < r->plan.nodes.size(); ++i) {
        const PlanNode& node = r->plan.nodes[i];
        want[i] = node.is_leaf() ? 0 : card.at(node.relations) + want[node.left] + want[node.right];
        EXPECT_EQ(node.cardinality, card.at(node.relations)) << node.relations;
        EXPECT_EQ(node.cost, want[i]) << node.relations;
      }
      EXPECT_EQ(r->plan.root().cost, 11000);
    }
  }
}

}  // namespace
}  // namespace sliceplan
