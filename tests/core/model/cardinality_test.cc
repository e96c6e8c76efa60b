// card(X) by hand (docs/cost-models.md): the product of the rows of X times
// the selectivity of every predicate inside X, hyperedges applying only
// once all their relations are in.
#include "core/model/cardinality.h"

#include <limits>
#include <memory>
#include <string>
#include <vector>

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

namespace listed {

// A chain quay - berths - cranes - shifts: rows 10, 120, 40, 300;
// quay-berths 0.1, berths-cranes 0.05, cranes-shifts 0.01.
constexpr RelSet kQuay = 1, kBerth = 2, kCrane = 4, kShift = 8;

Query Chain(std::vector<ListedSet> sets) {
  const Query q = testing::MakeQueryOrDie(
      {{"quay", 10}, {"berths", 120}, {"cranes", 40}, {"shifts", 300}},
      {{kQuay | kBerth, 0.1}, {kBerth | kCrane, 0.05}, {kCrane | kShift, 0.01}});
  auto rows = ListedRows::Create(4, std::move(sets));
  EXPECT_TRUE(rows.ok()) << rows.status();
  return q.WithListed(std::make_shared<const ListedRows>(*std::move(rows)));
}

TEST(CardinalityListedTest, AListedSetIsItsRows) {
  const Cardinality card(Chain({{kBerth | kCrane, 1234.5}, {kQuay, 7}}));
  EXPECT_EQ(card.Of(kBerth | kCrane), 1234.5);
  EXPECT_EQ(card.Of(kQuay), 7);
  EXPECT_EQ(card.Of(kShift), 300);  // not listed: its rows
}

TEST(CardinalityListedTest, AConnectedSetAboveAListedOneCarriesItsCorrection) {
  // {berths, cranes} is listed at 1,000 where the model says 240. Its
  // supersets peel the relation whose removal leaves it:
  //   {quay, berths, cranes} = 1,000 * 10 * 0.1 (quay's step) = 1,000
  //   {berths, cranes, shifts} = 1,000 * 300 * 0.01 = 3,000
  // and the whole chain peels the highest relation first (no listed set
  // one relation down): card({q, b, c}) * 300 * 0.01 = 3,000.
  const Cardinality card(Chain({{kBerth | kCrane, 1000}}));
  EXPECT_NEAR(card.Of(kQuay | kBerth | kCrane), 1000, 1e-9);
  EXPECT_NEAR(card.Of(kBerth | kCrane | kShift), 3000, 1e-9);
  EXPECT_NEAR(card.Of(kQuay | kBerth | kCrane | kShift), 3000, 1e-9);
  // Unlisted and not above it: the model.
  EXPECT_NEAR(card.Of(kCrane | kShift), 40.0 * 300 * 0.01, 1e-9);
}

TEST(CardinalityListedTest, ComponentsMultiplyTheirCorrections) {
  // {quay, berths} listed at 500 (model 120), {cranes, shifts} at 50
  // (model 120): their union without the berths-cranes predicate is no
  // set of the query, but {quay, berths} u {shifts} falls apart into two
  // components: 500 * 300.
  const Cardinality card(Chain({{kQuay | kBerth, 500}, {kCrane | kShift, 50}}));
  EXPECT_NEAR(card.Of(kQuay | kBerth | kShift), 500.0 * 300, 1e-6);
  EXPECT_NEAR(card.Of(kQuay | kShift), 10.0 * 300, 1e-9);
}

TEST(CardinalityListedTest, NothingListedBelowIsTheModel) {
  // Listing one set changes no set that is not above it.
  const Cardinality model(YardQuery());
  const Query q = YardQuery();
  auto rows = ListedRows::Create(3, {{kBerths | kShifts, 99}});
  ASSERT_TRUE(rows.ok());
  const Cardinality card(q.WithListed(std::make_shared<const ListedRows>(*std::move(rows))));
  for (RelSet x : {kBerths, kCranes, kBerths | kCranes, kCranes | kShifts}) {
    EXPECT_NEAR(card.Of(x), model.Of(x), 1e-9 * model.Of(x)) << x;
  }
}

TEST(CardinalityListedTest, RefusesBadEntriesByIndex) {
  const auto refusal = [](std::vector<ListedSet> sets) {
    auto r = ListedRows::Create(4, std::move(sets));
    return r.ok() ? std::string("accepted") : std::string(r.status().message());
  };
  EXPECT_EQ(refusal({{kQuay, 1}, {0, 5}}),
            "cardinalities[1].relations: empty; list one or more relations");
  EXPECT_EQ(refusal({{RelSet{1} << 4, 5}}),
            "cardinalities[0].relations: a relation outside the query");
  EXPECT_EQ(refusal({{kQuay, -1}}), "cardinalities[0].rows: must be finite and > 0, got -1");
  EXPECT_EQ(refusal({{kQuay, std::numeric_limits<double>::infinity()}}),
            "cardinalities[0].rows: must be finite and > 0, got inf");
  EXPECT_EQ(refusal({{kQuay | kBerth, 5}, {kQuay | kBerth, 6}}),
            "cardinalities[1]: the same relations are listed again with other rows (6 against 5)");
  // The same rows twice: kept once.
  auto twice = ListedRows::Create(4, {{kQuay, 5}, {kQuay, 5}});
  ASSERT_TRUE(twice.ok());
  EXPECT_EQ(twice->size(), 1u);
}

}  // namespace listed

}  // namespace
}  // namespace sliceplan
