// The dense bushy enumerator (core/search/dense_bushy.h): with cross
// products, every split of every subset exactly once, the optimum of the
// whole space split over slices, every tree counted, once unsliced.
#include "core/search/dense_bushy.h"

#include <string>

#include "gtest/gtest.h"
#include "tests/support/closed_forms.h"
#include "tests/support/enumerator_checks.h"
#include "tests/support/enumerator_runs.h"
#include "tests/support/reference_dp.h"
#include "tests/support/test_queries.h"

namespace sliceplan {
namespace {

using testing::GraphShape;

TEST(DenseBushyTest, UnslicedSplitsAreEverySplitOfEverySubset) {
  for (int n = 2; n <= 13; ++n) {
    const Query q = testing::MakeQuery(GraphShape::kRandom, n, 7);
    const testing::EnumeratorRun run = testing::RunEnumerator(q, PlanShape::kBushy, true, {0, 1});
    EXPECT_EQ(run.stats.splits, testing::UnorderedSplitsAllSubsets(n)) << "n=" << n;
    EXPECT_FALSE(run.method.has_value());  // the dense kernel, not a connected-only one
  }
}

TEST(DenseBushyTest, SlicesHoldTheOptimumAndCoverEveryTree) {
  for (GraphShape shape : {GraphShape::kChain, GraphShape::kStar, GraphShape::kCycle,
                           GraphShape::kRandom, GraphShape::kHyper}) {
    for (int n : {6, 9, 11}) {
      const Query q = testing::MakeQuery(shape, n, 3);
      const double best = testing::DpBestBushy(q, true);
      for (uint32_t p : {1u, 2u, 4u, 8u}) {
        if (p > 1 && n < 3 * std::countr_zero(p)) continue;
        SCOPED_TRACE(testing::ShapeName(shape) + " n=" + std::to_string(n) +
                     " P=" + std::to_string(p));
        const testing::SlicedRun all = testing::RunAllSlices(q, PlanShape::kBushy, true, p);
        ASSERT_TRUE(all.cost.has_value());
        EXPECT_NEAR(*all.cost, best, best * 1e-12);
        if (n <= 9) testing::ExpectBushyCover(all.plans, testing::BushyTrees(shape, n, true), p);
      }
    }
  }
}

}  // namespace
}  // namespace sliceplan
