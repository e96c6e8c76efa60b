// Rate calibration: the connected part it measures on, and that it measures
// the one rate the search uses (the value itself depends on the machine;
// only its range is checked: a split is nanoseconds, a connected set
// microseconds, on any machine this runs on).
#include "core/capacity/rate_calibration.h"

#include "core/graph/connected_sets.h"
#include "gtest/gtest.h"
#include "tests/support/test_queries.h"

namespace sliceplan {
namespace {

using testing::GraphShape;
using testing::MakeQuery;

TEST(RateCalibrationTest, ConnectedPartGrowsUntilEnoughSets) {
  // A chain prefix of m relations has m(m+1)/2 connected sets: 91 at 13,
  // 105 at 14. A star's first m relations (hub 0) have 2^(m-1) + m - 1:
  // 70 at 7, 135 at 8.
  const Query chain = MakeQuery(GraphShape::kChain, 30, 1);
  const Query part = ConnectedPart(chain, 100);
  EXPECT_EQ(part.size(), 14);
  EXPECT_EQ(part.predicates().size(), 13u);
  EXPECT_EQ(part.relation(RelationId{13}).name, chain.relation(RelationId{13}).name);
  EXPECT_EQ(ConnectedPart(MakeQuery(GraphShape::kStar, 20, 1), 100).size(), 8);
  // Fewer sets than asked: the whole query.
  EXPECT_EQ(ConnectedPart(chain, 1'000'000).size(), 30);
}

TEST(RateCalibrationTest, MeasuresTheRateTheSearchUses) {
  const MachineRates defaults;
  const Query q = MakeQuery(GraphShape::kRandom, 24, 2);
  SearchOptions dense;
  auto with = CalibrateRates(q, dense);
  ASSERT_TRUE(with.ok()) << with.status();
  EXPECT_GT(with->dense_split_seconds, 1e-11);
  EXPECT_LT(with->dense_split_seconds, 1e-7);
  EXPECT_EQ(with->connected_set_seconds, defaults.connected_set_seconds);

  SearchOptions connected;
  connected.cross_products = false;
  auto without = CalibrateRates(q, connected);
  ASSERT_TRUE(without.ok()) << without.status();
  EXPECT_EQ(without->dense_split_seconds, defaults.dense_split_seconds);
  EXPECT_GT(without->connected_set_seconds, 1e-9);
  EXPECT_LT(without->connected_set_seconds, 1e-3);
}

}  // namespace
}  // namespace sliceplan
