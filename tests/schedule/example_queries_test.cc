// The example query files (examples/tpch) read as a user's would be and
// solved through the embedded pool: the TPC-H join graphs' optima against
// the independent reference search, and a sampled cluster frontier that is
// sorted, valid and free of dominated plans.
#include <cmath>
#include <string>
#include <vector>

#include "gtest/gtest.h"
#include "schedule/embedded_pool.h"
#include "tests/support/cluster_reference.h"
#include "tests/support/reference_search.h"
#include "wire/query_proto.h"

namespace sliceplan {
namespace {

bool Near(double a, double b) {
  return std::fabs(a - b) <= 1e-9 * std::max(std::fabs(a), std::fabs(b));
}
bool Same(const testing::RefCosts& r, const ClusterCosts& c) {
  return Near(r.latency, c.latency_s) && Near(r.node_seconds, c.node_seconds) &&
         Near(r.completeness, c.completeness);
}

SearchOptions ClusterOptions(std::vector<int> nodes, std::vector<double> rates, double alpha) {
  SearchOptions o;
  o.cost = CostModelKind::kCluster;
  o.cluster.params.node_counts = std::move(nodes);
  o.cluster.params.sample_rates = std::move(rates);
  o.cluster.alpha = alpha;
  return o;
}

// TPC-H join graphs (examples/tpch, cardinalities of the TPC-H
// specification, clause 4.2.5, scale factor 1, from memory): the engine's
// plan is valid and its cost equals the reference optimum, for both plan
// shapes, with and without cross products, sliced and not.
class TpchTest : public ::testing::TestWithParam<const char*> {};

TEST_P(TpchTest, PlanIsValidAndOptimal) {
  auto query =
      ReadQueryFile(std::string(SLICEPLAN_SOURCE_DIR) + "/examples/tpch/" + GetParam() + ".json");
  ASSERT_TRUE(query.ok()) << query.status();
  for (PlanShape shape : {PlanShape::kBushy, PlanShape::kLeftDeep}) {
    for (bool cross : {true, false}) {
      const double want = shape == PlanShape::kBushy ? testing::RefBestBushy(*query, cross)
                                                     : testing::RefBestLeftDeep(*query, cross);
      ASSERT_TRUE(std::isfinite(want)) << "the reference found no plan";
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

INSTANTIATE_TEST_SUITE_P(Queries, TpchTest, ::testing::Values("q5", "q8", "q9"),
                         [](const ::testing::TestParamInfo<const char*>& param_info) {
                           return std::string(param_info.param);
                         });

TEST(ExampleQueriesTest, TpchQ8WithSamplingGivesASortedValidFrontier) {
  auto q = ReadQueryFile(std::string(SLICEPLAN_SOURCE_DIR) + "/examples/tpch/q8.json");
  ASSERT_TRUE(q.ok());
  const SearchOptions o = ClusterOptions({4, 16, 64}, {1.0, 0.1, 0.01}, 1.05);
  auto r = OptimizeEmbedded(*q, o, 2, 2);
  ASSERT_TRUE(r.ok()) << r.status();
  const std::vector<Plan>& f = r->frontier;
  ASSERT_FALSE(f.empty());
  for (size_t i = 0; i < f.size(); ++i) {
    EXPECT_TRUE(testing::RefCoversQuery(*q, f[i]));
    EXPECT_TRUE(Same(testing::RefCostsOf(*q, o.cluster.params, f[i]), f[i].root().metrics));
    if (i > 0) {
      EXPECT_LE(f[i - 1].root().metrics.latency_s, f[i].root().metrics.latency_s);
    }
    for (size_t j = 0; j < f.size(); ++j) {
      if (i == j) continue;
      const ClusterCosts& a = f[j].root().metrics;
      const ClusterCosts& b = f[i].root().metrics;
      EXPECT_FALSE(a.latency_s <= b.latency_s && a.node_seconds <= b.node_seconds &&
                   a.completeness >= b.completeness)
          << j << " dominates " << i;
    }
  }
}

}  // namespace
}  // namespace sliceplan
