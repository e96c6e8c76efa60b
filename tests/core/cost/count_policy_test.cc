// Plan counts with the counting policy (the same enumerators over the
// counting semiring) against textbook tree counts and explicit coverage.
//
// Sources: n! join orders and (2n-2)!/(n-1)! ordered bushy trees with cross
// products (n! leaf orders times Catalan(n-1) tree shapes); without cross
// products a chain has 2^(n-1) left-deep orders and a star 2(n-1)!
// (Ono and Lohman, VLDB 1990; also Moerkotte's "Building Query Compilers",
// ch. 3, from memory); a chain's bushy trees are its Catalan(n-1)
// bracketings with 2^(n-1) child orders.
#include <cstdint>
#include <set>

#include "core/slice_solver.h"
#include "core/slicing/slice_constraints.h"
#include "gtest/gtest.h"
#include "tests/support/reference_search.h"
#include "tests/support/test_queries.h"

namespace sliceplan {
namespace {

using testing::GraphShape;

uint64_t Factorial(int n) { return n <= 1 ? 1 : n * Factorial(n - 1); }
uint64_t Catalan(int n) {  // C(2n, n) / (n + 1), exact in uint64 for n <= 30
  uint64_t c = 1;
  for (int i = 0; i < n; ++i) c = c * 2 * (2 * i + 1) / (i + 2);
  return c;
}

uint64_t Count(const Query& q, PlanShape shape, bool cross, SliceSpec slice) {
  auto r = CountSlicePlans(q, {shape, cross, CostModelKind::kCout}, slice);
  EXPECT_TRUE(r.ok()) << r.status();
  return r.ok() ? r->plans : 0;
}

TEST(PlanCountTest, UnslicedCountsWithCrossProducts) {
  for (int n = 1; n <= 12; ++n) {
    const Query q = testing::MakeUniformQuery(GraphShape::kChain, n);
    EXPECT_EQ(Count(q, PlanShape::kLeftDeep, true, {0, 1}), Factorial(n));
    // (2n-2)!/(n-1)! = n! * Catalan(n-1).
    EXPECT_EQ(Count(q, PlanShape::kBushy, true, {0, 1}), Factorial(n) * Catalan(n - 1));
  }
}

TEST(PlanCountTest, LeftDeepSlicesPartitionTheJoinOrders) {
  // docs/slicing.md, invariant 2: the sum over slices is n! exactly.
  for (int n = 2; n <= 10; ++n) {
    const Query q = testing::MakeUniformQuery(GraphShape::kRandom, n);
    for (int k = 0; k <= MaxSliceBits(n, PlanShape::kLeftDeep); ++k) {
      uint64_t total = 0;
      for (uint32_t i = 0; i < (1u << k); ++i) {
        total += Count(q, PlanShape::kLeftDeep, true, {i, 1u << k});
      }
      EXPECT_EQ(total, Factorial(n)) << "n=" << n << " k=" << k;
    }
  }
}

TEST(PlanCountTest, BushySlicesCoverEveryTreeAndCountTheirOwn) {
  for (int n = 3; n <= 7; ++n) {
    const Query q = testing::MakeUniformQuery(GraphShape::kCycle, n);
    for (int k = 1; k <= MaxSliceBits(n, PlanShape::kBushy); ++k) {
      const uint32_t p = 1u << k;
      std::vector<SliceConstraints> slices;
      for (uint32_t i = 0; i < p; ++i) {
        slices.push_back(*SliceConstraints::ForSlice(q, PlanShape::kBushy, {i, p}));
      }
      std::vector<uint64_t> inside(p, 0);
      uint64_t trees = 0;
      testing::ForEachBushyTree(q, [&](const std::vector<RelSet>& nodes) {
        ++trees;
        bool covered = false;
        for (uint32_t i = 0; i < p; ++i) {
          bool all = true;
          for (RelSet s : nodes) all = all && slices[i].Admissible(s);
          inside[i] += all;
          covered |= all;
        }
        EXPECT_TRUE(covered) << "a tree lies in no slice, n=" << n;
      });
      // (2n-3)!! unordered trees.
      EXPECT_EQ(trees * (uint64_t{1} << (n - 1)), Factorial(n) * Catalan(n - 1));
      for (uint32_t i = 0; i < p; ++i) {
        // Each unordered tree has 2^(n-1) child orders, all in its slice.
        EXPECT_EQ(Count(q, PlanShape::kBushy, true, {i, p}), inside[i] << (n - 1))
            << "n=" << n << " slice " << i << "/" << p;
      }
    }
  }
}

TEST(PlanCountTest, CountsWithoutCrossProducts) {
  for (int n = 2; n <= 10; ++n) {
    const Query chain = testing::MakeUniformQuery(GraphShape::kChain, n);
    const Query star = testing::MakeUniformQuery(GraphShape::kStar, n);
    const Query clique = testing::MakeUniformQuery(GraphShape::kClique, n);
    EXPECT_EQ(Count(chain, PlanShape::kLeftDeep, false, {0, 1}), uint64_t{1} << (n - 1));
    EXPECT_EQ(Count(star, PlanShape::kLeftDeep, false, {0, 1}), 2 * Factorial(n - 1));
    EXPECT_EQ(Count(chain, PlanShape::kBushy, false, {0, 1}), Catalan(n - 1) << (n - 1));
    EXPECT_EQ(Count(clique, PlanShape::kLeftDeep, false, {0, 1}), Factorial(n));
    EXPECT_EQ(Count(clique, PlanShape::kBushy, false, {0, 1}), Factorial(n) * Catalan(n - 1));
  }
}

TEST(PlanCountTest, ConnectedLeftDeepSlicesPartitionTheOrders) {
  for (GraphShape g : {GraphShape::kChain, GraphShape::kStar, GraphShape::kCycle}) {
    const int n = 9;
    const Query q = testing::MakeUniformQuery(g, n);
    const uint64_t whole = Count(q, PlanShape::kLeftDeep, false, {0, 1});
    for (int k = 1; k <= 4; ++k) {
      uint64_t total = 0;
      for (uint32_t i = 0; i < (1u << k); ++i) {
        total += Count(q, PlanShape::kLeftDeep, false, {i, 1u << k});
      }
      EXPECT_EQ(total, whole) << testing::ShapeName(g) << " k=" << k;
    }
  }
}

}  // namespace
}  // namespace sliceplan
