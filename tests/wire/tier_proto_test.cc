// The tiers' answer on the wire (wire/tier_proto.h): a cluster answer past
// the exact engine's 64 relations round-trips figure for figure, its
// chosen plan included, and a reply whose frontier plan is no tree over
// the query, or whose figures are out of range, is refused with the plan
// and field named.
#include "wire/tier_proto.h"

#include <gtest/gtest.h>

#include "tests/support/physical_plans.h"
#include "tests/support/wide_queries.h"
#include "tiers/anytime_frontier.h"

namespace sliceplan {
namespace {

// A cluster answer over a 200-relation query: a few anytime moves' set.
class WideClusterAnswerTest : public ::testing::Test {
 protected:
  void SetUp() override {
    AnytimeFrontierOptions options;
    options.max_moves = 40;
    SearchControl control;
    const AnytimeFrontierResult r =
        AnytimeFrontier(query_, testing::SmallClusterConfig(), options, control);
    ASSERT_GE(r.frontier.size(), 2u);
    for (const FrontierPlan& p : r.frontier) {
      outcome_.frontier.push_back(WithPhysicalChoices(*p.tree, p.physical));
    }
    outcome_.chosen = 1;
    outcome_.plan = outcome_.frontier[1];
    outcome_.tier = SearchTier::kAnytime;
    outcome_.reason = "anytime: requested";
    reply_ = TieredToProto(outcome_, CostModelKind::kCluster);
  }
  absl::Status Read() { return TieredFromProto(reply_, query_, CostModelKind::kCluster).status(); }
  v1::PlanNode& FrontierNode(int plan, int node) {
    return *reply_.mutable_frontier(plan)->mutable_nodes(node);
  }

  const WideQuery query_ = testing::MakeWideQuery(testing::WideShape::kTreeWithCycles, 200, 4);
  TieredOutcome outcome_;
  v1::OptimizeResponse reply_;
};

TEST_F(WideClusterAnswerTest, RoundTripsFigureForFigure) {
  auto back = TieredFromProto(reply_, query_, CostModelKind::kCluster);
  ASSERT_TRUE(back.ok()) << back.status();
  EXPECT_EQ(back->tier, SearchTier::kAnytime);
  EXPECT_EQ(back->chosen, outcome_.chosen);
  ASSERT_EQ(back->frontier.size(), outcome_.frontier.size());
  for (size_t i = 0; i < outcome_.frontier.size(); ++i) {
    const WidePlan& a = outcome_.frontier[i];
    const WidePlan& b = back->frontier[i];
    ASSERT_EQ(a.nodes.size(), b.nodes.size());
    for (size_t k = 0; k < a.nodes.size(); ++k) {
      const WideNode& x = a.nodes[k];
      const WideNode& y = b.nodes[k];
      EXPECT_EQ(x.relation, y.relation);
      EXPECT_EQ(x.left, y.left);
      EXPECT_EQ(x.right, y.right);
      EXPECT_EQ(x.cardinality, y.cardinality);
      EXPECT_EQ(x.cost, y.cost);
      EXPECT_EQ(x.metrics.latency_s, y.metrics.latency_s);
      EXPECT_EQ(x.metrics.node_seconds, y.metrics.node_seconds);
      EXPECT_EQ(x.metrics.completeness, y.metrics.completeness);
      if (x.is_leaf()) {
        EXPECT_EQ(x.sample_rate, y.sample_rate);
      } else {
        EXPECT_EQ(x.strategy, y.strategy);
        EXPECT_EQ(x.nodes, y.nodes);
      }
    }
  }
  EXPECT_EQ(WideTreeString(back->plan, query_), WideTreeString(outcome_.plan, query_));
}

TEST_F(WideClusterAnswerTest, AFrontierPlanThatIsNoTreeIsRefusedByName) {
  // The first leaf of plan 1 names another plan-1 leaf's relation.
  int first = -1, second = -1;
  for (int i = 0; i < reply_.frontier(1).nodes_size(); ++i) {
    if (!reply_.frontier(1).nodes(i).has_relation()) continue;
    (first < 0 ? first : second) = i;
    if (second >= 0) break;
  }
  FrontierNode(1, first).set_relation(reply_.frontier(1).nodes(second).relation());
  const absl::Status s = Read();
  EXPECT_EQ(s.code(), absl::StatusCode::kInvalidArgument);
  EXPECT_NE(s.message().find("frontier[1]."), std::string::npos) << s;
}

TEST_F(WideClusterAnswerTest, FiguresOutOfRangeAreRefused) {
  const int root = reply_.frontier(0).nodes_size() - 1;
  (*FrontierNode(0, root).mutable_costs())["completeness"] = 0;
  absl::Status s = Read();
  EXPECT_NE(s.message().find("completeness must lie in (0, 1]"), std::string::npos) << s;
  SetUp();
  FrontierNode(0, root).mutable_costs()->erase("node_seconds");
  s = Read();
  EXPECT_NE(s.message().find("needs node_seconds and completeness"), std::string::npos) << s;
  SetUp();
  (*FrontierNode(0, root).mutable_costs())["latency_s"] = -1;
  s = Read();
  EXPECT_NE(s.message().find("frontier[0].plan.nodes["), std::string::npos) << s;
}

}  // namespace
}  // namespace sliceplan
