// The pull search (core/search/connected_pull.h): bushy plans without cross
// products, each connected set solved from its own splits, every split
// tested or the set's csg-cmp pairs walked; each pair costed once, the
// connected-only optimum split over slices, every tree without a cross
// product covered. Binary predicates only (no hyperedge shape).
#include "core/search/connected_pull.h"

#include "gtest/gtest.h"
#include "tests/support/enumerator_checks.h"

namespace sliceplan {
namespace {

using testing::GraphShape;

constexpr ConnectedMethod kPull[] = {ConnectedMethod::kPullEverySplit,
                                     ConnectedMethod::kPullSetCcps};

TEST(ConnectedPullTest, UnslicedSplitsAreTheCsgCmpPairs) {
  for (ConnectedMethod method : kPull) testing::ExpectSplitsAreCsgCmpPairs(method);
}

TEST(ConnectedPullTest, SlicesHoldTheOptimumAndCoverEveryTree) {
  for (ConnectedMethod method : kPull) {
    testing::ExpectSlicesHoldTheConnectedOptimum(
        method, {GraphShape::kChain, GraphShape::kStar, GraphShape::kClique, GraphShape::kRandom});
  }
}

}  // namespace
}  // namespace sliceplan
