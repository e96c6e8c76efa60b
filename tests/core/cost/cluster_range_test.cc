// The cluster model's range rule (core/cost/cluster_range.h): the
// cheapest stage by hand from docs/cost-models.md's stage formula, the
// bound under every plan the exact search finds, and refusals that name
// the parameter or the rows that saturate every plan.
#include "core/cost/cluster_range.h"

#include <random>
#include <string>

#include "core/slice_solver.h"
#include "gtest/gtest.h"
#include "tests/support/test_queries.h"

namespace sliceplan {
namespace {

Relation Rel(const std::string& name, double rows, double row_bytes) {
  Relation r;
  r.name = name;
  r.rows = rows;
  r.row_bytes = row_bytes;
  return r;
}

std::string Message(const absl::Status& s) { return std::string(s.message()); }

TEST(ClusterRangeTest, TheCheapestStageByHand) {
  const std::vector<Relation> rels = {Rel("berths", 100, 10), Rel("cranes", 1000, 50)};
  const ClusterParams p;  // 4, 16 or 64 nodes, no sampling
  // Shuffle on 64 nodes, both inputs the smallest relation's 100 rows of
  // the narrowest 10 bytes, no output: start-up, scan, network, CPU.
  const double bytes = 2 * 100 * 10.0;
  const double shuffle = 0.5 + bytes / (64 * 5e8) + bytes / (64 * 1.25e9) + 200 / (64 * 5e7);
  EXPECT_DOUBLE_EQ(CheapestStageSeconds(rels, p), shuffle);
  ClusterParams sampled = p;
  sampled.sample_rates = {1, 0.1};
  const double b10 = bytes / 10;
  EXPECT_DOUBLE_EQ(CheapestStageSeconds(rels, sampled),
                   0.5 + b10 / (64 * 5e8) + b10 / (64 * 1.25e9) + 20 / (64 * 5e7));
}

// No plan the exact search finds is cheaper than the bound, on random
// queries and parameters.
TEST(ClusterRangeTest, NoPlanRunsFasterThanTheCheapestStage) {
  std::mt19937_64 rng(11);
  std::uniform_real_distribution<double> log10(-2, 2);
  for (int trial = 0; trial < 40; ++trial) {
    const Query q = testing::MakeQuery(testing::GraphShape::kRandom, 3 + trial % 4, trial);
    SearchOptions options;
    options.cost = CostModelKind::kCluster;
    ClusterParams& p = options.cluster.params;
    p.node_counts = {2, 8};
    p.sample_rates = {1, 0.25};
    p.stage_startup_s = 0.5 * std::pow(10, log10(rng));
    p.cpu_rows_per_s = 5e7 * std::pow(10, log10(rng));
    p.net_bytes_per_s = 1.25e9 * std::pow(10, log10(rng));
    p.scan_bytes_per_s = 5e8 * std::pow(10, log10(rng));
    SearchControl control;
    auto r = SolveSlice(q, options, {0, 1}, control);
    ASSERT_TRUE(r.ok()) << r.status();
    ASSERT_FALSE(r->frontier.empty());
    const double bound = CheapestStageSeconds(q.relations(), p);
    for (const Plan& plan : r->frontier) {
      EXPECT_GE(plan.root().metrics.latency_s, bound * (1 - 1e-12)) << "trial " << trial;
    }
  }
}

TEST(ClusterRangeTest, ARefusalNamesTheParameterThatSaturates) {
  const std::vector<Relation> rels = {Rel("berths", 100, 10), Rel("cranes", 1000, 50)};
  EXPECT_TRUE(CheckClusterInRange(rels, ClusterParams{}).ok());
  ClusterParams p;
  p.stage_startup_s = 1e308;
  absl::Status s = CheckClusterInRange(rels, p);
  EXPECT_TRUE(absl::IsOutOfRange(s));
  EXPECT_NE(Message(s).find("stage_startup_s (--stage-startup-s) = 1e+308"), std::string::npos)
      << Message(s);
  p = {};
  p.cpu_rows_per_s = 1e-308;
  s = CheckClusterInRange(rels, p);
  EXPECT_NE(Message(s).find("cpu_rows_per_s (--cpu-rows-per-s)"), std::string::npos) << Message(s);
  EXPECT_EQ(Message(s).find("stage_startup_s"), std::string::npos) << Message(s);
  // The rows alone: the smallest relation is named.
  const std::vector<Relation> huge = {Rel("berths", 1e300, 10), Rel("cranes", 1e300, 50)};
  s = CheckClusterInRange(huge, ClusterParams{});
  EXPECT_NE(Message(s).find("smallest relation has 1e+300 rows"), std::string::npos) << Message(s);
  // Below the ceiling: no refusal.
  p = {};
  p.cpu_rows_per_s = 1e-200;
  EXPECT_TRUE(CheckClusterInRange(rels, p).ok());
}

TEST(ClusterRangeTest, SaturatedPlansNameTheSlowerParametersOrTheRows) {
  const std::vector<Relation> rels = {Rel("berths", 100, 10), Rel("cranes", 2e9, 50)};
  ClusterParams p;
  p.cpu_rows_per_s = 1e-296;
  p.net_bytes_per_s = 1e-296;
  p.scan_bytes_per_s = 1e10;  // faster than its default: not blamed
  const std::string m = Message(ClusterPlansSaturated(rels, p));
  EXPECT_NE(m.find("cpu_rows_per_s (--cpu-rows-per-s) = 1e-296, net_bytes_per_s"),
            std::string::npos)
      << m;
  EXPECT_EQ(m.find("scan_bytes_per_s"), std::string::npos) << m;
  const std::string rows = Message(ClusterPlansSaturated(rels, ClusterParams{}));
  EXPECT_NE(rows.find("the largest relation has 2e+09"), std::string::npos) << rows;
}

}  // namespace
}  // namespace sliceplan
