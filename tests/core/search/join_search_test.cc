// Every search with non-inner joins against the transformation closure
// (tests/support/join_oracle.h): on random original trees of up to 6
// relations, each slice count, both shapes, cross products on and off and
// either model finds exactly the closure's optimum, and the plan it returns
// is in the closure and returns the original's rows on generated tables.
#include <random>

#include "core/model/plan.h"
#include "gtest/gtest.h"
#include "tests/support/join_oracle.h"
#include "tests/support/solve_slices.h"

namespace sliceplan {
namespace {

using testing::JoinCase;
using testing::OpTreePtr;

bool LeftDeep(const testing::OpTree& t) {
  if (t.relation >= 0) return true;
  return t.right->relation >= 0 && LeftDeep(*t.left);
}

// The least C_out over the closure's trees of `shape`; nullopt when none.
std::optional<double> ClosureOptimum(const JoinCase& c, bool cross, PlanShape shape) {
  std::optional<double> best;
  for (const OpTreePtr& t : testing::ClosureTrees(c.query, c.original, cross)) {
    if (shape == PlanShape::kLeftDeep && !LeftDeep(*t)) continue;
    const double cost = testing::TreeCout(c.query, *t);
    if (!best || cost < *best) best = cost;
  }
  return best;
}

TEST(JoinSearchTest, EverySearchFindsTheClosureOptimumWithAValidPlan) {
  std::mt19937_64 rng(3);
  int solved = 0;
  for (int round = 0; round < 120; ++round) {
    const JoinCase c = testing::RandomJoinQuery(3 + round % 4, rng);
    const std::set<std::string> reachable = testing::Closure(c.query, c.original, true);
    for (bool cross : {true, false}) {
      for (PlanShape shape : {PlanShape::kBushy, PlanShape::kLeftDeep}) {
        const std::optional<double> best = ClosureOptimum(c, cross, shape);
        for (uint32_t p : {1u, 2u, 4u}) {
          SearchOptions options;
          options.cross_products = cross;
          options.shape = shape;
          auto result = testing::SolveAllSlices(c.query, options, p);
          const std::string where =
              absl::StrCat(testing::Text(*c.original), " cross ", cross, " left-deep ",
                           shape == PlanShape::kLeftDeep, " P ", p);
          if (absl::IsInvalidArgument(result.status())) continue;  // too few relations for p
          if (!best) {
            EXPECT_FALSE(result.ok()) << where;
            continue;
          }
          ASSERT_TRUE(result.ok()) << where << ": " << result.status();
          EXPECT_NEAR(result->plan.root().cost, *best, 1e-9 * *best) << where;
          const OpTreePtr plan = testing::FromPlan(c.query, result->plan);
          ASSERT_TRUE(reachable.count(testing::Text(*plan)))
              << where << ": " << testing::Text(*plan) << " is not reachable";
          for (uint64_t seed = 0; seed < 3; ++seed) {
            EXPECT_EQ(testing::Evaluate(c.query, *plan, seed),
                      testing::Evaluate(c.query, *c.original, seed))
                << where << " seed " << seed;
          }
          ++solved;
        }
      }
    }
  }
  EXPECT_GT(solved, 700);
}

// The cluster model's Pareto search: every frontier plan is reachable and
// valid by execution.
TEST(JoinSearchTest, ClusterFrontierPlansAreValid) {
  std::mt19937_64 rng(5);
  size_t plans = 0;
  for (int round = 0; round < 40; ++round) {
    const JoinCase c = testing::RandomJoinQuery(3 + round % 4, rng);
    const std::set<std::string> reachable = testing::Closure(c.query, c.original, true);
    for (uint32_t p : {1u, 2u}) {
      SearchOptions options;
      options.cost = CostModelKind::kCluster;
      auto result = testing::SolveAllSlices(c.query, options, p);
      if (absl::IsInvalidArgument(result.status())) continue;
      ASSERT_TRUE(result.ok()) << result.status();
      for (const Plan& plan : result->frontier) {
        const OpTreePtr tree = testing::FromPlan(c.query, plan);
        ASSERT_TRUE(reachable.count(testing::Text(*tree))) << testing::Text(*tree);
        EXPECT_EQ(testing::Evaluate(c.query, *tree, 1), testing::Evaluate(c.query, *c.original, 1));
        ++plans;
      }
    }
  }
  EXPECT_GT(plans, 60u);
}

}  // namespace
}  // namespace sliceplan
