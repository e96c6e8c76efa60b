// The shipped examples with outer, semi and anti joins (the port-logistics
// query and TPC-H Q4, Q13, Q21, Q22): every slice count and shape finds
// the least C_out over the trees reachable from the original one
// (tests/support/join_oracle.h), with a reachable plan that returns the
// original's rows on generated tables.
#include <string>

#include "gtest/gtest.h"
#include "tests/support/join_oracle.h"
#include "tests/support/solve_slices.h"
#include "wire/query_proto.h"

namespace sliceplan {
namespace {

class JoinExamplesTest : public ::testing::TestWithParam<const char*> {};

TEST_P(JoinExamplesTest, FindsTheClosureOptimum) {
  auto query = ReadQueryFile(std::string(SLICEPLAN_SOURCE_DIR) + "/examples/" + GetParam());
  ASSERT_TRUE(query.ok()) << query.status();
  ASSERT_TRUE(query->has_joins());
  const testing::OpTreePtr original = testing::OriginalTree(*query);
  for (bool cross : {false, true}) {
    const auto trees = testing::ClosureTrees(*query, original, cross);
    std::set<std::string> reachable;
    double best = 1e300;
    for (const auto& t : trees) {
      reachable.insert(testing::Text(*t));
      best = std::min(best, testing::TreeCout(*query, *t));
    }
    for (uint32_t p : {1u, 2u, 4u}) {
      SearchOptions options;
      options.cross_products = cross;
      auto result = testing::SolveAllSlices(*query, options, p);
      if (absl::IsInvalidArgument(result.status())) continue;  // too few relations for p
      ASSERT_TRUE(result.ok()) << result.status();
      EXPECT_NEAR(result->plan.root().cost, best, 1e-9 * best) << "P " << p << " cross " << cross;
      const testing::OpTreePtr plan = testing::FromPlan(*query, result->plan);
      EXPECT_TRUE(reachable.count(testing::Text(*plan))) << testing::Text(*plan);
      EXPECT_EQ(testing::Evaluate(*query, *plan, 1), testing::Evaluate(*query, *original, 1));
    }
  }
}

INSTANTIATE_TEST_SUITE_P(Files, JoinExamplesTest,
                         ::testing::Values("port_inspections_joins.json", "tpch/q4.json",
                                           "tpch/q13.json", "tpch/q21.json", "tpch/q22.json"));

}  // namespace
}  // namespace sliceplan
