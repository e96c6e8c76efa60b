// The dense memo layout: slot counts, bijection with the admissible sets,
// and the subset order dynamic programming needs (docs/slicing.md, "Indexing
// the memo densely").
#include "core/slicing/dense_layout.h"

#include <cmath>

#include "core/slicing/slice_constraints.h"
#include "gtest/gtest.h"
#include "tests/support/test_queries.h"

namespace sliceplan {
namespace {

uint64_t Pow(uint64_t b, int e) {
  uint64_t r = 1;
  while (e-- > 0) r *= b;
  return r;
}

SliceConstraints Constraints(const Query& q, PlanShape shape, uint32_t index, int k) {
  auto c = SliceConstraints::ForSlice(q, shape, {index, uint32_t{1} << k});
  EXPECT_TRUE(c.ok()) << c.status();
  return *c;
}

TEST(DenseLayoutTest, SlotCountIsTheClosedFormAndMatchesAdmissibleSets) {
  for (PlanShape shape : {PlanShape::kBushy, PlanShape::kLeftDeep}) {
    for (int n = 3; n <= 10; ++n) {
      const Query q = testing::MakeQuery(testing::GraphShape::kRandom, n, 5);
      for (int k = 0; k <= MaxSliceBits(n, shape); ++k) {
        const uint32_t index = (uint32_t{1} << k) - 1;  // every bit set
        const SliceConstraints c = Constraints(q, shape, index, k);
        const DenseLayout layout(n, c);
        // docs/slicing.md: 3^k 2^(n-2k) sets per pair slice, 7^k 2^(n-3k) per
        // triple slice (the empty set included).
        const uint64_t want =
            shape == PlanShape::kBushy ? Pow(7, k) << (n - 3 * k) : Pow(3, k) << (n - 2 * k);
        EXPECT_EQ(layout.slot_count(), want) << "n=" << n << " k=" << k;
        uint64_t admissible = 0;
        for (RelSet s = 0; s < (RelSet{1} << n); ++s) {
          const bool a = c.Admissible(s);
          admissible += a;
          EXPECT_EQ(a, layout.Admissible(PermuteSet(s, layout.perm())));
        }
        EXPECT_EQ(admissible, want);
      }
    }
  }
}

TEST(DenseLayoutTest, SlotsAreABijectionOrderedBySubset) {
  for (PlanShape shape : {PlanShape::kBushy, PlanShape::kLeftDeep}) {
    const int n = 8;
    const Query q = testing::MakeQuery(testing::GraphShape::kCycle, n, 2);
    for (int k = 0; k <= MaxSliceBits(n, shape); ++k) {
      const DenseLayout layout(n, Constraints(q, shape, (1u << k) >> 1, k));
      for (Slot slot = 0; slot < layout.slot_count(); ++slot) {
        const RelSet s = layout.SetOf(slot);
        ASSERT_TRUE(layout.Admissible(s));
        ASSERT_EQ(layout.SlotOf(s), slot);
        for (RelSet sub = (s - 1) & s; sub != s; sub = (sub - 1) & s) {
          if (layout.Admissible(sub)) {
            ASSERT_LT(layout.SlotOf(sub), slot);
          }
          if (sub == 0) break;
        }
      }
    }
  }
}

TEST(DenseLayoutTest, FreeRelationsTakeTheLowBits) {
  const Query q = testing::MakeQuery(testing::GraphShape::kChain, 7, 1);
  const SliceConstraints c = Constraints(q, PlanShape::kBushy, 0, 2);
  const DenseLayout layout(7, c);
  EXPECT_EQ(layout.free_bits(), 1);
  for (int i = 0; i < 7; ++i) {
    const RelationId r{static_cast<uint8_t>(i)};
    EXPECT_EQ(Contains(c.constrained(), r), layout.perm()[i].value >= 1);
    EXPECT_EQ(layout.inverse_perm()[layout.perm()[i].value], r);
  }
}

}  // namespace
}  // namespace sliceplan
