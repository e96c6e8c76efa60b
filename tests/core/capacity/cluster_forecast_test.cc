// The cluster model's search forecast (core/capacity/cluster_forecast.h):
// the split counts it scales by, derived in closed form and checked
// against the search's own count; a query that finishes inside the budget
// is its own forecast; one that does not gets a forecast from its parts;
// and the capacity table built from it.
#include "core/capacity/cluster_forecast.h"

#include <cmath>

#include "core/capacity/capacity_table.h"
#include "core/slice_solver.h"
#include "gtest/gtest.h"
#include "tests/support/test_queries.h"

namespace sliceplan {
namespace {

using testing::GraphShape;

SearchOptions Cluster(PlanShape shape, bool cross) {
  SearchOptions o{shape, cross, CostModelKind::kCluster};
  o.cluster.params.node_counts = {4, 16};
  o.cluster.params.sample_rates = {1.0, 0.1};
  return o;
}

// With cross products every set of k relations has 2^(k-1) - 1 unordered
// splits (bushy) or k (left-deep, one relation on the right); summed over
// the sets: (3^n - 2^(n+1) + 1) / 2 and n 2^(n-1) - n. The cluster search
// counts each of them once (each offered in both orders).
TEST(ClusterForecastTest, SplitCountsAreTheSearchsOwn) {
  for (int n = 2; n <= 7; ++n) {
    const Query q = testing::MakeQuery(GraphShape::kRandom, n, 3);
    for (PlanShape shape : {PlanShape::kBushy, PlanShape::kLeftDeep}) {
      const SearchOptions options = Cluster(shape, true);
      SearchControl control;
      const auto result = SolveSlice(q, options, {0, 1}, control);
      ASSERT_TRUE(result.ok()) << result.status();
      const double want = shape == PlanShape::kBushy ? (std::pow(3, n) - std::pow(2, n + 1) + 1) / 2
                                                     : n * std::pow(2, n - 1) - n;
      SearchControl count;
      EXPECT_EQ(ClusterSplitCount(q, q.all(), options, count), want) << n;
      EXPECT_EQ(static_cast<double>(result->stats.splits), want) << n;
    }
  }
  // Without cross products: the cout search's count of the part (a chain
  // of n relations has (n^3 - n) / 6 unordered connected splits).
  const Query chain = testing::MakeQuery(GraphShape::kChain, 6, 3);
  SearchControl count;
  EXPECT_EQ(ClusterSplitCount(chain, chain.all(), Cluster(PlanShape::kBushy, false), count),
            (216 - 6) / 6);
}

TEST(ClusterForecastTest, AQueryThatFinishesIsItsOwnForecast) {
  const Query q = testing::MakeQuery(GraphShape::kStar, 5, 1);
  const auto f = ForecastClusterSearch(q, Cluster(PlanShape::kBushy, true), 5);
  ASSERT_TRUE(f.ok()) << f.status();
  EXPECT_TRUE(f->measured);
  EXPECT_EQ(f->probed, 5);
  EXPECT_GT(f->seconds, 0);
  EXPECT_EQ(f->seconds, f->probed_seconds);
  EXPECT_NE(f->Describe().find("the whole query, measured"), std::string::npos);
}

TEST(ClusterForecastTest, AQueryPastTheBudgetIsForecastFromItsParts) {
  // 10 relations, 16 node counts, 5 sample rates: minutes of search.
  const Query q = testing::MakeQuery(GraphShape::kRandom, 10, 1);
  SearchOptions options = Cluster(PlanShape::kBushy, true);
  options.cluster.params.node_counts.clear();
  for (int m = 1; m <= 16; ++m) options.cluster.params.node_counts.push_back(m);
  options.cluster.params.sample_rates = {1.0, 0.5, 0.25, 0.1, 0.05};
  const auto start = std::chrono::steady_clock::now();
  const auto f = ForecastClusterSearch(q, options, 0.1);
  const double took =
      std::chrono::duration<double>(std::chrono::steady_clock::now() - start).count();
  ASSERT_TRUE(f.ok()) << f.status();
  EXPECT_FALSE(f->measured);
  EXPECT_GE(f->probed, 2);
  EXPECT_LT(f->probed, 10);
  // The split ratio is the closed form's.
  const auto splits = [](double k) { return (std::pow(3, k) - std::pow(2, k + 1) + 1) / 2; };
  EXPECT_DOUBLE_EQ(f->split_ratio, splits(10) / splits(f->probed));
  EXPECT_GE(f->growth, 1);
  EXPECT_GT(f->seconds, 10 * f->probed_seconds);
  // The budget holds (the parts stop at it; setting up takes a little).
  EXPECT_LT(took, 0.5);
}

TEST(ClusterForecastTest, TheCapacityTableReadsTheForecast) {
  const Query q = testing::MakeQuery(GraphShape::kStar, 5, 1);
  const auto t = PlanClusterCapacity(q, Cluster(PlanShape::kBushy, true), 10, 1);
  ASSERT_TRUE(t.ok()) << t.status();
  ASSERT_EQ(t->rows.size(), 11u);
  // Measured whole in well under a second: one worker finishes, and auto
  // runs the exact search from one worker.
  EXPECT_EQ(t->enough_workers, 1);
  EXPECT_EQ(t->auto_exact_workers, 1);
  EXPECT_LT(t->rows[0].seconds, 1);
  EXPECT_NE(t->summary.find("ran whole"), std::string::npos);
  EXPECT_FALSE(PlanClusterCapacity(q, Cluster(PlanShape::kBushy, true), -1, 1).ok());
}

}  // namespace
}  // namespace sliceplan
