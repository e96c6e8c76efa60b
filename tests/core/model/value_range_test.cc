// Cardinalities and costs past double's range (value_range.h): sub-plans
// that saturate are never chosen over exact ones, the optimum of a query
// whose small plans are in range is exact, and a query whose every plan
// saturates is refused with OUT_OF_RANGE, never answered with inf or NaN.
// Expected values are worked out by hand in each test's comment.
#include "core/model/value_range.h"

#include <cmath>

#include "core/model/cardinality.h"
#include "core/model/plan.h"
#include "gtest/gtest.h"
#include "tests/support/solve_slices.h"
#include "tests/support/test_queries.h"

namespace sliceplan {
namespace {

using testing::MakeQueryOrDie;

constexpr RelSet kA = 1, kB = 2, kC = 4;

// a, b of 1e200 rows and c of 1 row; c joins each of them with selectivity
// 1e-200. card(a c) = card(b c) = 1e200 * 1 * 1e-200 = 1; card(a b) =
// 1e400 saturates; card(a b c) = 1e400 * 1e-400 = 1.
Query WideQuery() {
  return MakeQueryOrDie({{"a", 1e200}, {"b", 1e200}, {"c", 1}},
                        {{kA | kC, 1e-200}, {kB | kC, 1e-200}});
}

TEST(ValueRangeTest, SaturateCapsLargeValuesAndNaN) {
  EXPECT_EQ(Saturate(5.0), 5.0);
  EXPECT_EQ(Saturate(1e301), kValueCeiling);
  EXPECT_EQ(Saturate(INFINITY), kValueCeiling);
  EXPECT_EQ(Saturate(NAN), kValueCeiling);
  EXPECT_TRUE(IsSaturated(kValueCeiling));
  EXPECT_TRUE(IsSaturated(NAN));
  EXPECT_FALSE(IsSaturated(1e299));
}

TEST(ValueRangeTest, NarrowRangeCardinalityIsThePlainProduct) {
  const Query q = MakeQueryOrDie({{"a", 10}, {"b", 20}, {"c", 30}}, {{kA | kB, 0.1}});
  const Cardinality card(q);
  EXPECT_FALSE(card.wide_range());
  EXPECT_EQ(card.Of(kA | kB | kC), 10.0 * 20.0 * 30.0 * 0.1);
  EXPECT_EQ(card.Of(kB | kC), 600.0);
}

TEST(ValueRangeTest, WideRangeCardinalityGoesThroughLogarithms) {
  const Cardinality card(WideQuery());
  EXPECT_TRUE(card.wide_range());
  EXPECT_NEAR(card.Of(kA | kC), 1.0, 1e-9);
  EXPECT_NEAR(card.Of(kB | kC), 1.0, 1e-9);
  EXPECT_NEAR(card.Of(kA | kB | kC), 1.0, 1e-9);
  EXPECT_EQ(card.Of(kA | kB), kValueCeiling);
  EXPECT_NEAR(card.Of(kA), 1e200, 1e188);
}

// The optimum joins c first: cost = card(a c) + card(a b c) = 2 (or the
// mirror through b c); every plan that joins a with b first saturates.
TEST(ValueRangeTest, SaturatedSubPlansLoseToExactOnes) {
  const Query q = WideQuery();
  for (PlanShape shape : {PlanShape::kBushy, PlanShape::kLeftDeep}) {
    for (uint32_t p : {1u, 2u}) {
      SearchOptions options{shape, true, CostModelKind::kCout};
      auto r = testing::SolveAllSlices(q, options, p);
      ASSERT_TRUE(r.ok()) << r.status();
      EXPECT_NEAR(r->plan.root().cost, 2.0, 1e-9);
      const std::string tree = TreeString(r->plan, q);
      EXPECT_TRUE(tree.find("a b") == std::string::npos && tree.find("b a") == std::string::npos)
          << tree;
    }
  }
}

void ExpectOutOfRange(const Query& q, SearchOptions options, const std::string& names) {
  for (uint32_t p : {1u, 2u}) {
    auto r = testing::SolveAllSlices(q, options, p);
    ASSERT_FALSE(r.ok());
    EXPECT_EQ(r.status().code(), absl::StatusCode::kOutOfRange) << r.status();
    EXPECT_NE(r.status().message().find(names), std::string::npos) << r.status();
  }
}

// Three relations of 1e160 rows: the join of all has 1e480 rows, so every
// cout plan passes the ceiling; refused before any search.
TEST(ValueRangeTest, QueryWhoseResultSaturatesIsRefusedUpFront) {
  const Query q = MakeQueryOrDie({{"a", 1e160}, {"b", 1e160}, {"c", 1e160}}, {});
  for (PlanShape shape : {PlanShape::kBushy, PlanShape::kLeftDeep}) {
    ExpectOutOfRange(q, {shape, true, CostModelKind::kCout}, "a 1e+160");
  }
  // 1e308 x 1e308 x 1e-300 = 1e316 rows for a b, times 10 for c.
  const Query q2 = MakeQueryOrDie({{"a", 1e308}, {"b", 1e308}, {"c", 10}}, {{kA | kB, 1e-300}});
  ExpectOutOfRange(q2, {PlanShape::kBushy, true, CostModelKind::kCout}, "a 1e+308");
  ExpectOutOfRange(q2, {PlanShape::kLeftDeep, false, CostModelKind::kCout}, "a 1e+308");
}

// a, b, c of 1e200 rows and one predicate over all three of selectivity
// 1e-320: card(a b c) = 1e600 * 1e-320 = 1e280 is in range, but every plan
// first joins two of them (1e400 rows): every plan saturates, found only
// after the search, and refused by the merge.
TEST(ValueRangeTest, QueryWhoseEveryPlanSaturatesIsRefusedAfterTheSearch) {
  const Query q =
      MakeQueryOrDie({{"a", 1e200}, {"b", 1e200}, {"c", 1e200}}, {{kA | kB | kC, 1e-320}});
  ExpectOutOfRange(q, {PlanShape::kBushy, true, CostModelKind::kCout}, "1e+300");
  ExpectOutOfRange(q, {PlanShape::kLeftDeep, true, CostModelKind::kCout}, "1e+300");
}

TEST(ValueRangeTest, ClusterFrontierOfSaturatedPlansIsRefused) {
  const Query q = MakeQueryOrDie({{"a", 1e160}, {"b", 1e160}, {"c", 1e160}}, {});
  SearchOptions options;
  options.cost = CostModelKind::kCluster;
  ExpectOutOfRange(q, options, "1e+300");
}

}  // namespace
}  // namespace sliceplan
