// The connected-only left-deep search (core/search/connected_left_deep.h):
// every (S \ {r}, r) with S \ {r} connected and r joined to it costed once,
// the optimum over join orders without cross products split over slices,
// every such order counted once, on a hashed or a direct memo.
#include "core/search/connected_left_deep.h"

#include <string>

#include "gtest/gtest.h"
#include "tests/support/closed_forms.h"
#include "tests/support/enumerator_runs.h"
#include "tests/support/reference_dp.h"
#include "tests/support/test_queries.h"

namespace sliceplan {
namespace {

using testing::GraphShape;

constexpr ConnectedMethod kMemos[] = {ConnectedMethod::kPushHashed, ConnectedMethod::kPushDirect};

TEST(ConnectedLeftDeepTest, UnslicedSplitsMatchTheClosedForms) {
  for (ConnectedMethod method : kMemos) {
    for (GraphShape shape :
         {GraphShape::kChain, GraphShape::kCycle, GraphShape::kStar, GraphShape::kClique}) {
      for (int n = 3; n <= 12; ++n) {
        const Query q = testing::MakeQuery(shape, n, 8);
        const testing::EnumeratorRun run =
            testing::RunEnumerator(q, PlanShape::kLeftDeep, false, {0, 1}, method);
        ASSERT_EQ(run.method, method);
        EXPECT_EQ(run.stats.splits, testing::ConnectedLeftDeepSplits(shape, n))
            << testing::ShapeName(shape) << " n=" << n;
      }
    }
  }
}

TEST(ConnectedLeftDeepTest, SlicesHoldTheOptimumAndEveryOrderOnce) {
  for (ConnectedMethod method : kMemos) {
    for (GraphShape shape : {GraphShape::kChain, GraphShape::kCycle, GraphShape::kStar,
                             GraphShape::kClique, GraphShape::kRandom, GraphShape::kHyper}) {
      for (int n : {5, 8, 11}) {
        const Query q = testing::MakeQuery(shape, n, 9);
        const double best = testing::DpBestLeftDeep(q, false);
        const uint64_t orders =
            testing::RunAllSlices(q, PlanShape::kLeftDeep, false, 1, method).plans;
        if (testing::LeftDeepOrders(shape, n, false) != 0) {
          EXPECT_EQ(orders, testing::LeftDeepOrders(shape, n, false)) << testing::ShapeName(shape);
        }
        for (uint32_t p : {1u, 2u, 4u}) {
          SCOPED_TRACE(testing::ShapeName(shape) + " n=" + std::to_string(n) +
                       " P=" + std::to_string(p));
          const testing::SlicedRun all =
              testing::RunAllSlices(q, PlanShape::kLeftDeep, false, p, method);
          ASSERT_TRUE(all.cost.has_value());
          EXPECT_NEAR(*all.cost, best, best * 1e-12);
          EXPECT_EQ(all.plans, orders);
        }
      }
    }
  }
}

}  // namespace
}  // namespace sliceplan
