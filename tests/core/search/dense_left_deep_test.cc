// The dense left-deep enumerator (core/search/dense_left_deep.h): with
// cross products, every (S \ {r}, r) of every subset once, the optimum over
// all join orders split over slices, every order counted once.
#include "core/search/dense_left_deep.h"

#include <bit>
#include <string>

#include "gtest/gtest.h"
#include "tests/support/closed_forms.h"
#include "tests/support/enumerator_runs.h"
#include "tests/support/reference_dp.h"
#include "tests/support/test_queries.h"

namespace sliceplan {
namespace {

using testing::GraphShape;

TEST(DenseLeftDeepTest, UnslicedSplitsAreEveryRelationOfEverySubset) {
  for (int n = 2; n <= 14; ++n) {
    const Query q = testing::MakeQuery(GraphShape::kRandom, n, 5);
    const testing::EnumeratorRun run =
        testing::RunEnumerator(q, PlanShape::kLeftDeep, true, {0, 1});
    EXPECT_EQ(run.stats.splits, testing::LeftDeepSplitsAllSubsets(n)) << "n=" << n;
  }
}

TEST(DenseLeftDeepTest, SlicesHoldTheOptimumAndEveryOrderOnce) {
  for (GraphShape shape : {GraphShape::kChain, GraphShape::kStar, GraphShape::kClique,
                           GraphShape::kRandom, GraphShape::kHyper}) {
    for (int n : {5, 8, 11}) {
      const Query q = testing::MakeQuery(shape, n, 4);
      const double best = testing::DpBestLeftDeep(q, true);
      for (uint32_t p : {1u, 2u, 4u, 16u}) {
        if (p > 1 && n < 2 * std::countr_zero(p)) continue;
        SCOPED_TRACE(testing::ShapeName(shape) + " n=" + std::to_string(n) +
                     " P=" + std::to_string(p));
        const testing::SlicedRun all = testing::RunAllSlices(q, PlanShape::kLeftDeep, true, p);
        ASSERT_TRUE(all.cost.has_value());
        EXPECT_NEAR(*all.cost, best, best * 1e-12);
        if (n <= 8) {
          EXPECT_EQ(all.plans, testing::LeftDeepOrders(shape, n, true));
        }
      }
    }
  }
}

}  // namespace
}  // namespace sliceplan
