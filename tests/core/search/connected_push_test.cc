// The push search (core/search/connected_push.h): bushy plans without cross
// products from the whole graph's ccp walk, on a hashed or a direct memo;
// each csg-cmp pair costed once, the connected-only optimum split over
// slices, every tree without a cross product counted once.
#include "core/search/connected_push.h"

#include <string>

#include "gtest/gtest.h"
#include "tests/support/closed_forms.h"
#include "tests/support/enumerator_runs.h"
#include "tests/support/reference_dp.h"
#include "tests/support/test_queries.h"

namespace sliceplan {
namespace {

using testing::GraphShape;

// Bushy slices cover every tree; a tree whose constrained relations arrive
// together on the path lies in both slices of that constraint
// (docs/slicing.md), so over P slices a tree is counted 1 to P times.
void ExpectCovered(uint64_t counted, uint64_t trees, uint32_t p) {
  if (p == 1) {
    EXPECT_EQ(counted, trees);
  } else {
    EXPECT_GE(counted, trees);
    EXPECT_LE(counted, p * trees);
  }
}

constexpr ConnectedMethod kPush[] = {ConnectedMethod::kPushHashed, ConnectedMethod::kPushDirect};

TEST(ConnectedPushTest, UnslicedSplitsAreTheCsgCmpPairs) {
  for (ConnectedMethod method : kPush) {
    for (GraphShape shape :
         {GraphShape::kChain, GraphShape::kCycle, GraphShape::kStar, GraphShape::kClique}) {
      for (int n = 3; n <= 12; ++n) {
        const Query q = testing::MakeQuery(shape, n, 2);
        const testing::EnumeratorRun run =
            testing::RunEnumerator(q, PlanShape::kBushy, false, {0, 1}, method);
        ASSERT_EQ(run.method, method);
        EXPECT_EQ(run.stats.splits, testing::CcpCount(shape, n))
            << testing::ShapeName(shape) << " n=" << n;
      }
    }
  }
}

TEST(ConnectedPushTest, SlicesHoldTheOptimumAndCoverEveryTree) {
  for (ConnectedMethod method : kPush) {
    for (GraphShape shape : {GraphShape::kChain, GraphShape::kStar, GraphShape::kClique,
                             GraphShape::kRandom, GraphShape::kHyper}) {
      for (int n : {6, 9, 12}) {
        const Query q = testing::MakeQuery(shape, n, 6);
        const double best = testing::DpBestBushy(q, false);
        const uint64_t trees = testing::RunAllSlices(q, PlanShape::kBushy, false, 1, method).plans;
        if (n <= 9 && testing::BushyTrees(shape, n, false) != 0) {
          EXPECT_EQ(trees, testing::BushyTrees(shape, n, false)) << testing::ShapeName(shape);
        }
        for (uint32_t p : {1u, 2u, 4u}) {
          SCOPED_TRACE(testing::ShapeName(shape) + " n=" + std::to_string(n) +
                       " P=" + std::to_string(p));
          const testing::SlicedRun all =
              testing::RunAllSlices(q, PlanShape::kBushy, false, p, method);
          ASSERT_TRUE(all.cost.has_value());
          EXPECT_NEAR(*all.cost, best, best * 1e-12);
          ExpectCovered(all.plans, trees, p);
        }
      }
    }
  }
}

}  // namespace
}  // namespace sliceplan
