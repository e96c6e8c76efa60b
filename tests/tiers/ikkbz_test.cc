// IKKBZ on trees: under C_out (which has the ASI property, Ibaraki and
// Kameda 1984) the best order over all roots is the optimal left-deep
// order without cross products; checked against brute force over every
// permutation with connected prefixes, and against the subset DP.
#include "tiers/ikkbz.h"

#include <gtest/gtest.h>

#include <algorithm>
#include <numeric>

#include "tests/support/reference_dp.h"
#include "tests/support/test_queries.h"
#include "tests/support/wide_queries.h"

namespace sliceplan {
namespace {

// The least LeftDeepCout over permutations whose every prefix is connected.
double BruteForceBest(const WideQuery& q) {
  std::vector<int32_t> order(q.size());
  std::iota(order.begin(), order.end(), 0);
  double best = -1;
  do {
    bool connected = true;
    for (int i = 1; i < q.size() && connected; ++i) {
      bool linked = false;
      for (const int32_t p : q.incident(order[i])) {
        for (const int32_t r : q.predicates()[p].relations) {
          linked |= std::find(order.begin(), order.begin() + i, r) != order.begin() + i;
        }
      }
      connected = linked;
    }
    if (!connected) continue;
    const double cost = LeftDeepCout(q, order);
    if (best < 0 || cost < best) best = cost;
  } while (std::next_permutation(order.begin(), order.end()));
  return best;
}

Query Exact(const WideQuery& q) { return *ToExactQuery(q); }

TEST(IkkbzTest, OptimalLeftDeepOrderOnTrees) {
  for (const int n : {2, 3, 5, 7, 9}) {
    for (uint64_t seed = 1; seed <= 4; ++seed) {
      const WideQuery q = testing::MakeWideQuery(testing::WideShape::kTree, n, seed);
      const std::vector<int32_t> order = IkkbzOrder(q, n);
      const double brute = BruteForceBest(q);
      EXPECT_NEAR(LeftDeepCout(q, order), brute, 1e-9 * brute) << n << " seed " << seed;
      const double dp = testing::DpBestLeftDeep(Exact(q), false);
      EXPECT_NEAR(brute, dp, 1e-9 * dp);
    }
  }
}

TEST(IkkbzTest, OptimalOnStarsAndChainsWithRandomFigures) {
  for (const auto shape : {testing::GraphShape::kChain, testing::GraphShape::kStar}) {
    for (uint64_t seed = 1; seed <= 4; ++seed) {
      const WideQuery q = WideQuery::FromExact(testing::MakeQuery(shape, 8, seed));
      const double best = testing::DpBestLeftDeep(*ToExactQuery(q), false);
      EXPECT_NEAR(LeftDeepCout(q, IkkbzOrder(q, 8)), best, 1e-9 * best);
    }
  }
}

TEST(IkkbzTest, SpanningTreeKeepsTheMostSelectiveEdgesAndTiesComponents) {
  // Cycle a-b-c-a with b-c least selective (0.9): the tree drops it.
  // d is alone: tied by a cross product (selectivity 1).
  auto q = WideQuery::Create({{"a", 1, 1}, {"b", 1, 1}, {"c", 1, 1}, {"d", 1, 1}},
                             {{{0, 1}, 0.1}, {{1, 2}, 0.9}, {{0, 2}, 0.2}});
  ASSERT_TRUE(q.ok());
  const std::vector<TreeEdge> tree = SpanningTree(*q);
  ASSERT_EQ(tree.size(), 3u);
  EXPECT_DOUBLE_EQ(tree[0].selectivity, 0.1);
  EXPECT_DOUBLE_EQ(tree[1].selectivity, 0.2);
  EXPECT_DOUBLE_EQ(tree[2].selectivity, 1.0);
}

TEST(IkkbzTest, OrdersArePermutationsForLargeQueries) {
  const WideQuery q = testing::MakeWideQuery(testing::WideShape::kTreeWithCycles, 2000, 5);
  std::vector<int32_t> order = IkkbzOrder(q, 4);
  std::sort(order.begin(), order.end());
  for (int i = 0; i < q.size(); ++i) ASSERT_EQ(order[i], i);
}

}  // namespace
}  // namespace sliceplan
