// The constraint choice: deterministic, disjoint, of the right size, and
// on symmetric graphs it splits the work evenly.
#include "core/constraint_choice.h"

#include "core/slice_solver.h"
#include "gtest/gtest.h"
#include "tests/support/test_queries.h"

namespace sliceplan {
namespace {

using testing::GraphShape;

TEST(ConstraintChoiceTest, DisjointDeterministicAndSized) {
  for (GraphShape g :
       {GraphShape::kChain, GraphShape::kStar, GraphShape::kRandom, GraphShape::kHyper}) {
    const Query q = testing::MakeQuery(g, 13, 2);
    for (PlanShape shape : {PlanShape::kBushy, PlanShape::kLeftDeep}) {
      for (int k = 1; k <= MaxSliceBits(13, shape); ++k) {
        const auto a = ChooseConstraintRelations(q, shape, k, /*cross_products=*/false);
        const auto b = ChooseConstraintRelations(q, shape, k, /*cross_products=*/false);
        ASSERT_EQ(a.size(), static_cast<size_t>(k));
        RelSet used = 0;
        for (size_t j = 0; j < a.size(); ++j) {
          EXPECT_EQ(a[j].size, RelationsPerConstraint(shape));
          for (int d = 0; d < a[j].size; ++d) {
            EXPECT_EQ(a[j].ids[d], b[j].ids[d]);
            EXPECT_FALSE(Contains(used, a[j].ids[d]));
            used |= Singleton(a[j].ids[d]);
          }
        }
      }
    }
  }
}

TEST(ConstraintChoiceTest, ColourRefinementFindsTheChainsMirrorClasses) {
  // A chain r0-...-r6 has mirror classes {0,6} {1,5} {2,4} {3}.
  const std::vector<int> c = RefinedColours(testing::MakeQuery(GraphShape::kChain, 7, 1));
  EXPECT_EQ(c[0], c[6]);
  EXPECT_EQ(c[1], c[5]);
  EXPECT_EQ(c[2], c[4]);
  EXPECT_NE(c[0], c[1]);
  EXPECT_NE(c[1], c[2]);
  EXPECT_NE(c[2], c[3]);
}

uint64_t SliceSplits(const Query& q, PlanShape shape, SliceSpec slice) {
  SearchOptions options{shape, false, CostModelKind::kCout};
  SearchControl control;
  auto r = SolveSlice(q, options, slice, control);
  EXPECT_TRUE(r.ok()) << r.status();
  return r.ok() ? r->stats.splits : 0;
}

TEST(ConstraintChoiceTest, StarSlicesWithoutCrossProductsAreEven) {
  // Leaves of a star are interchangeable, so both sides of a constraint on
  // two leaves hold the same number of csg-cmp pairs.
  const Query q = testing::MakeQuery(GraphShape::kStar, 10, 1);
  for (PlanShape shape : {PlanShape::kBushy, PlanShape::kLeftDeep}) {
    const uint64_t whole = SliceSplits(q, shape, {0, 1});
    const uint64_t a = SliceSplits(q, shape, {0, 2});
    const uint64_t b = SliceSplits(q, shape, {1, 2});
    EXPECT_EQ(a, b);
    EXPECT_LT(a, whole);
  }
}

}  // namespace
}  // namespace sliceplan
