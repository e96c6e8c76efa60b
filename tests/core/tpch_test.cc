// TPC-H join graphs (examples/tpch, cardinalities of the TPC-H
// specification, clause 4.2.5, scale factor 1): the engine's plan is valid
// and its cost equals the reference optimum, for both plan shapes, with and
// without cross products, sliced and not.
#include <cmath>

#include "core/embedded_pool.h"
#include "core/query_proto.h"
#include "gtest/gtest.h"
#include "tests/support/reference_search.h"

namespace sliceplan {
namespace {

class TpchTest : public ::testing::TestWithParam<const char*> {};

TEST_P(TpchTest, PlanIsValidAndOptimal) {
  auto query = ReadQueryFile(std::string(SLICEPLAN_SOURCE_DIR) +
                             "/examples/tpch/" + GetParam() + ".json");
  ASSERT_TRUE(query.ok()) << query.status();
  for (PlanShape shape : {PlanShape::kBushy, PlanShape::kLeftDeep}) {
    for (bool cross : {true, false}) {
      const double want = shape == PlanShape::kBushy
                              ? testing::RefBestBushy(*query, cross)
                              : testing::RefBestLeftDeep(*query, cross);
      for (uint32_t p : {1u, 2u, 4u}) {
        SCOPED_TRACE(std::string(GetParam()) + " P=" + std::to_string(p) +
                     (cross ? " cross" : " connected"));
        auto r = OptimizeEmbedded(*query, {shape, cross, CostModelKind::kCout}, p, 2);
        ASSERT_TRUE(r.ok()) << r.status();
        EXPECT_LE(std::fabs(r->plan.root().cost - want), 1e-9 * want);
        EXPECT_TRUE(testing::RefCoversQuery(*query, r->plan));
        EXPECT_LE(std::fabs(testing::RefCoutOf(*query, r->plan) - want), 1e-9 * want);
        if (!cross) {
          EXPECT_TRUE(testing::RefFreeOfCrossProducts(*query, r->plan));
        }
        if (shape == PlanShape::kLeftDeep) {
          EXPECT_TRUE(IsLeftDeep(r->plan));
        }
      }
    }
  }
}

INSTANTIATE_TEST_SUITE_P(Queries, TpchTest, ::testing::Values("q5", "q8", "q9"));

}  // namespace
}  // namespace sliceplan
