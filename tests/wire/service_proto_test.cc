// The wire conversion of search options and of worker replies: what
// round-trips comes back equal, and every malformed reply a broken or
// hostile worker could send is refused with the field named, so it never
// reaches the merge.
#include "wire/service_proto.h"

#include <cmath>

#include "core/slice_solver.h"
#include "gtest/gtest.h"
#include "tests/support/test_queries.h"

namespace sliceplan {
namespace {

using testing::GraphShape;

SliceResult Solve(const Query& q, const SearchOptions& options) {
  SearchControl control;
  auto r = SolveSlice(q, options, {0, 1}, control);
  EXPECT_TRUE(r.ok()) << r.status();
  return *r;
}

TEST(ServiceProtoTest, SliceResultRoundTrips) {
  const Query q = testing::MakeQuery(GraphShape::kStar, 6, 2);
  const SliceResult r = Solve(q, {});
  auto back = SliceResultFromProto(SliceResultToProto(r, CostModelKind::kCout), q,
                                   CostModelKind::kCout, {0, 1});
  ASSERT_TRUE(back.ok()) << back.status();
  ASSERT_TRUE(back->plan.has_value());
  EXPECT_EQ(TreeString(*back->plan, q), TreeString(*r.plan, q));
  EXPECT_EQ(back->plan->root().cost, r.plan->root().cost);
  EXPECT_EQ(back->stats.splits, r.stats.splits);
}

TEST(ServiceProtoTest, ClusterFrontierRoundTrips) {
  const Query q = testing::MakeQuery(GraphShape::kChain, 4, 1);
  SearchOptions options;
  options.cost = CostModelKind::kCluster;
  options.cluster.params.node_counts = {4, 16};
  const SliceResult r = Solve(q, options);
  auto back = SliceResultFromProto(SliceResultToProto(r, CostModelKind::kCluster), q,
                                   CostModelKind::kCluster, {0, 1});
  ASSERT_TRUE(back.ok()) << back.status();
  ASSERT_EQ(back->frontier.size(), r.frontier.size());
  for (size_t i = 0; i < r.frontier.size(); ++i) {
    EXPECT_EQ(back->frontier[i].root().metrics.node_seconds,
              r.frontier[i].root().metrics.node_seconds);
    EXPECT_EQ(back->frontier[i].root().strategy, r.frontier[i].root().strategy);
  }
}

// A valid reply for a 3-relation query, then one defect at a time.
class MalformedReplyTest : public ::testing::Test {
 protected:
  void SetUp() override {
    query_ = testing::MakeQuery(GraphShape::kChain, 3, 1);
    reply_ = SliceResultToProto(Solve(query_, {}), CostModelKind::kCout);
    ASSERT_EQ(reply_.plan().nodes_size(), 5);
  }
  void ExpectRefused(const std::string& part) {
    auto r = SliceResultFromProto(reply_, query_, CostModelKind::kCout, {0, 1});
    ASSERT_FALSE(r.ok()) << part;
    EXPECT_EQ(r.status().code(), absl::StatusCode::kInvalidArgument);
    EXPECT_NE(r.status().message().find(part), std::string::npos) << r.status();
  }
  v1::PlanNode& Node(int i) { return *reply_.mutable_plan()->mutable_nodes(i); }
  int FirstLeaf() {
    for (int i = 0; i < reply_.plan().nodes_size(); ++i) {
      if (reply_.plan().nodes(i).has_relation()) return i;
    }
    return -1;
  }
  int Root() { return reply_.plan().nodes_size() - 1; }
  Query query_ = testing::MakeQuery(GraphShape::kChain, 2, 1);
  v1::SolveSliceResponse reply_;
};

TEST_F(MalformedReplyTest, UnknownRelationId) {
  Node(FirstLeaf()).set_relation(7);
  ExpectRefused("relation: unknown relation id 7 (the query has 3)");
}

TEST_F(MalformedReplyTest, ChildAfterItsParent) {
  Node(Root()).mutable_join()->set_left(static_cast<uint32_t>(Root()));
  ExpectRefused("join: children must be distinct earlier nodes");
}

TEST_F(MalformedReplyTest, RelationTwice) {
  const int leaf = FirstLeaf();
  for (int i = leaf + 1; i < Root(); ++i) {
    if (reply_.plan().nodes(i).has_relation()) {
      Node(i).set_relation(reply_.plan().nodes(leaf).relation());
      break;
    }
  }
  ExpectRefused("appears twice");
}

TEST_F(MalformedReplyTest, TreeThatMissesARelation) {
  reply_.mutable_plan()->mutable_nodes()->RemoveLast();
  ExpectRefused("plan: not a tree joining every relation");
}

TEST_F(MalformedReplyTest, MissingCostEntry) {
  Node(Root()).mutable_costs()->clear();
  ExpectRefused("costs: no \"cout\" entry");
}

TEST_F(MalformedReplyTest, NotANumberCost) {
  (*Node(Root()).mutable_costs())["cout"] = std::nan("");
  ExpectRefused("is not a number in [0, 1e300], got nan");
}

TEST_F(MalformedReplyTest, NegativeCardinality) {
  Node(Root()).set_cardinality(-4);
  ExpectRefused("got -4");
}

TEST_F(MalformedReplyTest, LeafWithAJoinOperator) {
  Node(FirstLeaf()).set_op(v1::OPERATOR_SHUFFLE);
  ExpectRefused(".op: OPERATOR_SHUFFLE is not an operator of a leaf");
}

TEST_F(MalformedReplyTest, EmptyNode) {
  Node(FirstLeaf()).clear_relation();
  ExpectRefused(": neither relation nor join");
}

TEST(ServiceProtoTest, OptionsAreValidatedBeforeNarrowing) {
  v1::SearchOptions m;
  m.set_cost(v1::COST_MODEL_CLUSTER);
  m.mutable_cluster()->add_node_counts(4294967295u);
  auto o = SearchOptionsFromProto(m);
  ASSERT_FALSE(o.ok());
  EXPECT_NE(o.status().message().find("node_counts[0]: must be a whole number in 1..1000000, "
                                      "got 4294967295"),
            std::string::npos)
      << o.status();

  v1::SearchOptions alpha;
  alpha.set_alpha(0.5);
  o = SearchOptionsFromProto(alpha);
  ASSERT_FALSE(o.ok());
  EXPECT_EQ(o.status().message(),
            "options.alpha: only the cluster model's Pareto search takes a precision");

  v1::SearchOptions shape;
  shape.set_shape(static_cast<v1::PlanShape>(9));
  o = SearchOptionsFromProto(shape);
  ASSERT_FALSE(o.ok());
  EXPECT_EQ(o.status().message(), "options.shape: unknown plan shape 9");
}

TEST(ServiceProtoTest, TypedChoiceFieldsAreChecked) {
  v1::SearchOptions m;
  m.set_cost(v1::COST_MODEL_CLUSTER);
  v1::Bound* b = m.add_bounds();
  b->set_metric(v1::METRIC_COMPLETENESS);
  auto o = SearchOptionsFromProto(m);
  ASSERT_FALSE(o.ok());
  EXPECT_EQ(o.status().message(), "options.bounds[0].comparison: must be AT_MOST or AT_LEAST");
  b->set_comparison(v1::COMPARISON_AT_LEAST);
  b->set_value(std::nan(""));
  o = SearchOptionsFromProto(m);
  ASSERT_FALSE(o.ok());
  EXPECT_EQ(o.status().message(), "options.bounds[0].value: must be finite, got nan");
  b->set_value(0.99);
  m.mutable_preference()->set_best(v1::METRIC_UNSPECIFIED);
  o = SearchOptionsFromProto(m);
  ASSERT_FALSE(o.ok());
  EXPECT_EQ(o.status().message(), "options.preference.best: not a metric (0)");
  m.mutable_preference()->set_best(v1::METRIC_NODE_SECONDS);
  o = SearchOptionsFromProto(m);
  ASSERT_TRUE(o.ok()) << o.status();
  EXPECT_EQ(o->cluster.choice.prefer.node_seconds, 1);
  EXPECT_EQ(o->cluster.choice.prefer.latency, 0);
  EXPECT_TRUE(o->cluster.choice.bounds[0].value == 0.99 && !o->cluster.choice.bounds[0].at_most);
}

TEST(ServiceProtoTest, SearchOptionsRoundTrip) {
  SearchOptions in;
  in.shape = PlanShape::kLeftDeep;
  in.cross_products = false;
  in.cost = CostModelKind::kCluster;
  in.cluster.params.node_counts = {8, 32};
  in.cluster.params.sample_rates = {1, 0.1};
  in.cluster.alpha = 1.1;
  in.cluster.objectives.mask = Objectives::kLatency | Objectives::kCompleteness;
  in.cluster.choice.bounds.push_back({Metric::kCompleteness, false, 0.9});
  in.cluster.choice.prefer = {0, 1, 0};
  auto out = SearchOptionsFromProto(SearchOptionsToProto(in));
  ASSERT_TRUE(out.ok()) << out.status();
  EXPECT_EQ(out->shape, in.shape);
  EXPECT_EQ(out->cross_products, in.cross_products);
  EXPECT_EQ(out->cluster.params.node_counts, in.cluster.params.node_counts);
  EXPECT_EQ(out->cluster.params.sample_rates, in.cluster.params.sample_rates);
  EXPECT_EQ(out->cluster.alpha, 1.1);
  EXPECT_EQ(out->cluster.objectives.mask, in.cluster.objectives.mask);
  ASSERT_EQ(out->cluster.choice.bounds.size(), 1u);
  EXPECT_EQ(out->cluster.choice.bounds[0].metric, Metric::kCompleteness);
  EXPECT_FALSE(out->cluster.choice.bounds[0].at_most);
  EXPECT_EQ(out->cluster.choice.bounds[0].value, 0.9);
  EXPECT_EQ(out->cluster.choice.prefer.node_seconds, 1);
  EXPECT_EQ(out->cluster.choice.prefer.latency, 0);
}

}  // namespace
}  // namespace sliceplan
