// The push search (core/search/connected_push.h): bushy plans without cross
// products from the whole graph's ccp walk, on a hashed or a direct memo;
// each csg-cmp pair costed once, the connected-only optimum split over
// slices, every tree without a cross product covered.
#include "core/search/connected_push.h"

#include "gtest/gtest.h"
#include "tests/support/enumerator_checks.h"

namespace sliceplan {
namespace {

using testing::GraphShape;

constexpr ConnectedMethod kPush[] = {ConnectedMethod::kPushHashed, ConnectedMethod::kPushDirect};

TEST(ConnectedPushTest, UnslicedSplitsAreTheCsgCmpPairs) {
  for (ConnectedMethod method : kPush) testing::ExpectSplitsAreCsgCmpPairs(method);
}

TEST(ConnectedPushTest, SlicesHoldTheOptimumAndCoverEveryTree) {
  for (ConnectedMethod method : kPush) {
    testing::ExpectSlicesHoldTheConnectedOptimum(
        method, {GraphShape::kChain, GraphShape::kStar, GraphShape::kClique, GraphShape::kRandom,
                 GraphShape::kHyper});
  }
}

}  // namespace
}  // namespace sliceplan
