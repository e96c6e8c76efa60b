// Splits per slice: the closed forms of search_estimate.h against explicit
// counting, and the engine's own split counters against the closed forms.
//
// Derivation (bushy, cross-product space, docs/slicing.md): give every relation
// one of three places, left, right or neither. A free relation allows all 3;
// a triple (r, t, u) allows 21 of its 27 placements: those making L u R,
// L or R hold r and t without u are out (4 + 1 + 1). That counts 3^f 21^k
// ordered pairs (L, R) with L, R, L u R admissible, empty sides included;
// L empty leaves R = any admissible set (2^f 7^k of them), likewise R
// empty, and both empty once, so with both sides non-empty:
//     3^f 21^k - 2 * 2^f 7^k + 1,  and 3^n - 2^(n+1) + 1 unsliced.
// Left-deep: pairs (S, x) with x in S and S \ {x} admissible, non-empty.
// Per free x: S holds x, any admissible rest: f 2^(f-1) 3^k. Per pair
// (a, c) (c needs a): remove a from {a} or c from {a, c}: 2k 3^(k-1) 2^f.
// Minus the f + k admissible singletons, whose rest is empty.
#include "core/slicing/search_estimate.h"

#include <cmath>

#include "core/slice_solver.h"
#include "core/slicing/slice_constraints.h"
#include "gtest/gtest.h"
#include "tests/support/test_queries.h"

namespace sliceplan {
namespace {

// Counts ordered non-empty admissible splits by walking all 3^n placements.
uint64_t CountPlacements(const SliceConstraints& c, int n) {
  uint64_t count = 0;
  std::vector<int> place(n, 0);  // 0 neither, 1 left, 2 right
  for (;;) {
    RelSet l = 0, r = 0;
    for (int i = 0; i < n; ++i) {
      if (place[i] == 1) l |= RelSet{1} << i;
      if (place[i] == 2) r |= RelSet{1} << i;
    }
    if (l && r && c.Admissible(l) && c.Admissible(r) && c.Admissible(l | r)) {
      ++count;
    }
    int i = 0;
    while (i < n && place[i] == 2) place[i++] = 0;
    if (i == n) return count;
    ++place[i];
  }
}

// Counts (S, x) pairs of left-deep steps by walking all sets.
uint64_t CountSteps(const SliceConstraints& c, int n) {
  uint64_t count = 0;
  for (RelSet s = 1; s < (RelSet{1} << n); ++s) {
    if (!c.Admissible(s) || Size(s) < 2) continue;
    for (int x = 0; x < n; ++x) {
      const RelSet rest = s & ~(RelSet{1} << x);
      if (rest != s && c.Admissible(rest)) ++count;
    }
  }
  return count;
}

TEST(SplitCountTest, BushyClosedFormMatchesThePlacementCount) {
  for (int n = 2; n <= 10; ++n) {
    const Query q = testing::MakeQuery(testing::GraphShape::kStar, n, 1);
    for (int k = 0; k <= MaxSliceBits(n, PlanShape::kBushy); ++k) {
      auto c = SliceConstraints::ForSlice(q, PlanShape::kBushy, {0, 1u << k});
      ASSERT_TRUE(c.ok());
      EXPECT_EQ(CountPlacements(*c, n),
                static_cast<uint64_t>(DenseSplits(n, PlanShape::kBushy, k, false)))
          << "n=" << n << " k=" << k;
    }
  }
}

TEST(SplitCountTest, LeftDeepClosedFormMatchesTheStepCount) {
  for (int n = 2; n <= 12; ++n) {
    const Query q = testing::MakeQuery(testing::GraphShape::kChain, n, 1);
    for (int k = 0; k <= MaxSliceBits(n, PlanShape::kLeftDeep); ++k) {
      auto c = SliceConstraints::ForSlice(q, PlanShape::kLeftDeep, {(1u << k) >> 1, 1u << k});
      ASSERT_TRUE(c.ok());
      EXPECT_EQ(CountSteps(*c, n),
                static_cast<uint64_t>(DenseSplits(n, PlanShape::kLeftDeep, k, false)))
          << "n=" << n << " k=" << k;
    }
  }
}

TEST(SplitCountTest, EngineCountsMatchTheClosedFormsUpToSixteenRelations) {
  for (int n : {4, 9, 12, 13, 16}) {  // 9 and 12 reach f = 0 (no free relations)
    const Query q = testing::MakeQuery(testing::GraphShape::kRandom, n, 3);
    for (PlanShape shape : {PlanShape::kBushy, PlanShape::kLeftDeep}) {
      const int max_k = std::min(MaxSliceBits(n, shape), 5);
      for (int k = 0; k <= max_k; ++k) {
        const uint32_t p = 1u << k;
        const SliceSpec slice{p - 1, p};
        SCOPED_TRACE("n=" + std::to_string(n) + " k=" + std::to_string(k));
        SearchOptions options{shape, true, CostModelKind::kCout};
        SearchControl control;
        auto costed = SolveSlice(q, options, slice, control);
        ASSERT_TRUE(costed.ok()) << costed.status();
        const double ordered = DenseSplits(n, shape, k, false);
        // cout is symmetric: bushy slices cost each unordered split once.
        const double want = shape == PlanShape::kBushy ? ordered / 2 : ordered;
        EXPECT_EQ(costed->stats.splits, static_cast<uint64_t>(want));
        EXPECT_EQ(costed->stats.memo_entries, static_cast<uint64_t>(DenseSlots(n, shape, k)));
        if (n <= 13) {  // the counting policy offers both orders
          auto counted = CountSlicePlans(q, options, slice);
          ASSERT_TRUE(counted.ok());
          EXPECT_EQ(counted->stats.splits, static_cast<uint64_t>(ordered));
        }
      }
    }
  }
}

TEST(SplitCountTest, WorkShrinksTowardsTheSlicingRatios) {
  // docs/slicing.md: per slice, bushy work tends to (21/27)^k, left-deep sets
  // to (3/4)^k of the unsliced search.
  const int n = 18;
  for (int k = 1; k <= 4; ++k) {
    const double bushy =
        DenseSplits(n, PlanShape::kBushy, k, false) / DenseSplits(n, PlanShape::kBushy, 0, false);
    EXPECT_NEAR(bushy, std::pow(21.0 / 27.0, k), 0.01 * std::pow(21.0 / 27.0, k));
    EXPECT_DOUBLE_EQ(
        DenseSlots(n, PlanShape::kLeftDeep, k) / DenseSlots(n, PlanShape::kLeftDeep, 0),
        std::pow(0.75, k));
  }
}

}  // namespace
}  // namespace sliceplan
