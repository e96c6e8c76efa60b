// card(X) by hand (docs/cost-models.md): the product of the rows of X times
// the selectivity of every predicate inside X, hyperedges applying only
// once all their relations are in.
#include "core/cardinality.h"

#include "gtest/gtest.h"
#include "tests/support/test_queries.h"

namespace sliceplan {
namespace {

constexpr RelSet kBerths = 1, kCranes = 2, kShifts = 4;

// berths 120, cranes 40, shifts 300; berths-cranes 0.05; a hyperedge over
// all three of 0.01.
Query YardQuery() {
  return testing::MakeQueryOrDie({{"berths", 120}, {"cranes", 40}, {"shifts", 300}},
                                 {{kBerths | kCranes, 0.05}, {kBerths | kCranes | kShifts, 0.01}});
}

TEST(CardinalityTest, ProductOfRowsAndTheSelectivitiesInside) {
  const Cardinality card(YardQuery());
  EXPECT_EQ(card.Of(kBerths), 120);
  EXPECT_EQ(card.Of(kBerths | kCranes), 120.0 * 40 * 0.05);  // 240
  EXPECT_EQ(card.Of(kBerths | kShifts), 120.0 * 300);        // no predicate inside
  EXPECT_EQ(card.Of(kBerths | kCranes | kShifts), 120.0 * 40 * 300 * 0.05 * 0.01);  // 720
}

TEST(CardinalityTest, ConnectsOnlyThroughAPredicateSpanningBothSides) {
  const Cardinality card(YardQuery());
  EXPECT_TRUE(card.Connects(kBerths, kCranes));
  EXPECT_FALSE(card.Connects(kBerths, kShifts));  // the hyperedge needs cranes too
  EXPECT_TRUE(card.Connects(kBerths | kCranes, kShifts));
  EXPECT_TRUE(card.Connects(kShifts, kBerths | kCranes));
}

}  // namespace
}  // namespace sliceplan
