// card(X) by hand (docs/cost-models.md): the product of the rows of X times
// the selectivity of every predicate inside X, hyperedges applying only
// once all their relations are in.
#include "core/model/cardinality.h"

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

TEST(CardinalityTest, OfJoinCombinesTheSidesAndThePredicatesBetweenThem) {
  // berths 120, cranes 40, shifts 300; berths-cranes 0.05 twice (both
  // apply), cranes-shifts 0.1.
  const Query q = testing::MakeQueryOrDie(
      {{"berths", 120}, {"cranes", 40}, {"shifts", 300}},
      {{kBerths | kCranes, 0.05}, {kBerths | kCranes, 0.5}, {kCranes | kShifts, 0.1}});
  const Cardinality card(q);
  EXPECT_DOUBLE_EQ(card.OfJoin(kBerths, 120, kCranes, 40), 120.0 * 40 * 0.05 * 0.5);
  EXPECT_DOUBLE_EQ(card.OfJoin(kBerths | kCranes, 120.0, kShifts, 300),
                   120.0 * 300 * 0.1);  // the left side's card is taken as given
  EXPECT_DOUBLE_EQ(card.OfJoin(kBerths, 120, kShifts, 300), 120.0 * 300);
}

TEST(CardinalityTest, OfJoinEqualsOfOnEverySplitOfRandomQueries) {
  for (testing::GraphShape shape :
       {testing::GraphShape::kRandom, testing::GraphShape::kClique, testing::GraphShape::kHyper}) {
    const Query q = testing::MakeQuery(shape, 10, 7);
    const Cardinality card(q);
    for (RelSet set = 1; set < (RelSet{1} << 10); set += 37) {
      for (RelSet left = (set - 1) & set; left != 0; left = (left - 1) & set) {
        const RelSet right = set ^ left;
        const double got = card.OfJoin(left, card.Of(left), right, card.Of(right));
        EXPECT_NEAR(got, card.Of(set), 1e-12 * card.Of(set)) << set << " " << left;
      }
    }
  }
}

}  // namespace
}  // namespace sliceplan
