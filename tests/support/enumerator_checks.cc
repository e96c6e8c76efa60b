#include "tests/support/enumerator_checks.h"

#include <string>

#include "gtest/gtest.h"
#include "tests/support/closed_forms.h"
#include "tests/support/enumerator_runs.h"
#include "tests/support/reference_dp.h"

namespace sliceplan::testing {

void ExpectBushyCover(uint64_t counted, uint64_t trees, uint32_t p) {
  if (p == 1) {
    EXPECT_EQ(counted, trees);
  } else {
    EXPECT_GE(counted, trees);
    EXPECT_LE(counted, p * trees);
  }
}

void ExpectSplitsAreCsgCmpPairs(ConnectedMethod method) {
  for (GraphShape shape :
       {GraphShape::kChain, GraphShape::kCycle, GraphShape::kStar, GraphShape::kClique}) {
    for (int n = 3; n <= 12; ++n) {
      const EnumeratorRun run =
          RunEnumerator(MakeQuery(shape, n, 2), PlanShape::kBushy, false, {0, 1}, method);
      ASSERT_EQ(run.method, method);
      EXPECT_EQ(run.stats.splits, CcpCount(shape, n)) << ShapeName(shape) << " n=" << n;
    }
  }
}

void ExpectSlicesHoldTheConnectedOptimum(ConnectedMethod method,
                                         const std::vector<GraphShape>& shapes) {
  for (GraphShape shape : shapes) {
    for (int n : {6, 9, 12}) {
      const Query q = MakeQuery(shape, n, 6);
      const double best = DpBestBushy(q, false);
      const uint64_t trees = RunAllSlices(q, PlanShape::kBushy, false, 1, method).plans;
      if (n <= 9 && BushyTrees(shape, n, false) != 0) {
        EXPECT_EQ(trees, BushyTrees(shape, n, false)) << ShapeName(shape);
      }
      for (uint32_t p : {1u, 2u, 4u}) {
        SCOPED_TRACE(ShapeName(shape) + " n=" + std::to_string(n) + " P=" + std::to_string(p));
        const SlicedRun all = RunAllSlices(q, PlanShape::kBushy, false, p, method);
        ASSERT_TRUE(all.cost.has_value());
        EXPECT_NEAR(*all.cost, best, best * 1e-12);
        ExpectBushyCover(all.plans, trees, p);
      }
    }
  }
}

}  // namespace sliceplan::testing
