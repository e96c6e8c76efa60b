// Checking a slice's answer (core/slice_check.h): every true answer of
// every slice passes, for both shapes, with and without cross products;
// each kind of made-up answer is caught, named, and DATA_LOSS.
#include "core/slice_check.h"

#include <string>

#include "core/cost/cout_model.h"
#include "core/model/cardinality.h"
#include "gtest/gtest.h"
#include "tests/support/test_queries.h"

namespace sliceplan {
namespace {

using testing::GraphShape;

SliceResult Solve(const Query& q, const SearchOptions& options, SliceSpec slice) {
  SearchControl control;
  auto r = SolveSlice(q, options, slice, control);
  EXPECT_TRUE(r.ok()) << r.status();
  return *std::move(r);
}

std::string Refusal(const Query& q, const SearchOptions& options, const SliceResult& r) {
  const absl::Status s = CheckSliceResult(q, options, r);
  if (s.ok()) return "accepted";
  EXPECT_EQ(s.code(), absl::StatusCode::kDataLoss) << s;
  return std::string(s.message());
}

TEST(SliceCheckTest, EveryTrueAnswerPasses) {
  const Query q = testing::MakeQuery(GraphShape::kRandom, 9, 3);
  for (PlanShape shape : {PlanShape::kBushy, PlanShape::kLeftDeep}) {
    for (bool cross : {true, false}) {
      SearchOptions options;
      options.shape = shape;
      options.cross_products = cross;
      for (uint32_t p : {1u, 4u, 8u}) {
        for (uint32_t i = 0; i < p; ++i) {
          const SliceResult r = Solve(q, options, {i, p});
          EXPECT_TRUE(CheckSliceResult(q, options, r).ok())
              << CheckSliceResult(q, options, r) << " P=" << p << " i=" << i;
        }
      }
    }
  }
}

// The cluster model's answers: every true frontier passes; made-up
// metrics, or a node count or sample rate the request did not offer, are
// caught and named.
TEST(SliceCheckTest, ClusterMetricsAreRecomputedFromThePhysicalChoices) {
  const Query q = testing::MakeQuery(GraphShape::kRandom, 7, 4);
  SearchOptions options;
  options.cost = CostModelKind::kCluster;
  options.cluster.params.sample_rates = {1.0, 0.1};
  for (uint32_t p : {1u, 4u}) {
    for (uint32_t i = 0; i < p; ++i) {
      const SliceResult r = Solve(q, options, {i, p});
      ASSERT_FALSE(r.frontier.empty());
      EXPECT_EQ(Refusal(q, options, r), "accepted") << "P=" << p << " i=" << i;
    }
  }
  const SliceResult truth = Solve(q, options, {0, 1});
  SliceResult lie = truth;
  lie.frontier.back().nodes.back().metrics.latency_s *= 0.5;
  EXPECT_NE(Refusal(q, options, lie).find("its physical choices give"), std::string::npos)
      << Refusal(q, options, lie);
  lie = truth;
  lie.plan->nodes.back().metrics.node_seconds *= 1.001;
  EXPECT_NE(Refusal(q, options, lie).find("node_seconds"), std::string::npos);
  lie = truth;
  lie.plan->nodes.back().nodes = 5;  // not among 4, 16, 64
  EXPECT_NE(Refusal(q, options, lie).find("5 nodes is not a count offered"), std::string::npos)
      << Refusal(q, options, lie);
  lie = truth;
  lie.plan->nodes.front().sample_rate = 0.5;
  EXPECT_NE(Refusal(q, options, lie).find("sample rate 0.5 is not offered"), std::string::npos)
      << Refusal(q, options, lie);
}

TEST(SliceCheckTest, MadeUpAnswersAreCaughtAndNamed) {
  const Query q = testing::MakeQuery(GraphShape::kChain, 8, 1);
  SearchOptions options;  // bushy, cross products, cout
  const SliceResult truth = Solve(q, options, {1, 4});
  ASSERT_TRUE(truth.plan);

  SliceResult cheap = truth;  // a cost the query does not give
  cheap.plan->nodes.back().cost *= 0.5;
  EXPECT_NE(Refusal(q, options, cheap).find("says cardinality"), std::string::npos);

  SliceResult rows = truth;  // a cardinality the query does not give
  rows.plan->nodes.back().cardinality += 1;
  EXPECT_NE(Refusal(q, options, rows).find("the query gives"), std::string::npos);

  SliceResult none = truth;  // no plan, where every slice has one
  none.plan.reset();
  EXPECT_NE(Refusal(q, options, none).find("no plan"), std::string::npos);

  SliceResult short_tree = truth;  // a relation missing
  short_tree.plan->nodes.back().relations ^= 1;
  EXPECT_NE(Refusal(q, options, short_tree).find("not the disjoint union"), std::string::npos);

  // The true plan of one slice sent as another's answer: some slice of the
  // four does not admit it.
  int outside = 0;
  for (uint32_t i = 0; i < 4; ++i) {
    SliceResult moved = truth;
    moved.slice = {i, 4};
    outside += Refusal(q, options, moved).find("outside the slice") != std::string::npos;
  }
  EXPECT_GE(outside, 1);

  // A bushy plan where left-deep plans were asked for.
  SearchOptions left_deep = options;
  left_deep.shape = PlanShape::kLeftDeep;
  const SliceResult bushy = Solve(q, options, {0, 1});
  ASSERT_FALSE(IsLeftDeep(*bushy.plan));
  EXPECT_NE(Refusal(q, left_deep, bushy).find("left-deep"), std::string::npos);
}

TEST(SliceCheckTest, ACrossProductIsCaughtWhereTheyAreExcluded) {
  const Query q = testing::MakeQuery(GraphShape::kChain, 6, 1);
  SearchOptions with;  // the optimum of a chain with cross products allowed
  SearchOptions without = with;
  without.cross_products = false;
  // A left-deep order joining the two ends first: (r0 r5) is a cross product.
  Plan plan;
  plan.nodes.push_back({RelSet{1}, -1, -1});
  plan.nodes.push_back({RelSet{32}, -1, -1});
  plan.nodes.push_back({RelSet{33}, 0, 1});
  int last = 2;
  for (int r = 1; r <= 4; ++r) {
    plan.nodes.push_back({RelSet{1} << r, -1, -1});
    const RelSet joined = plan.nodes[last].relations | (RelSet{1} << r);
    plan.nodes.push_back({joined, last, static_cast<int>(plan.nodes.size()) - 1});
    last = static_cast<int>(plan.nodes.size()) - 1;
  }
  const Cardinality card(q);
  for (PlanNode& node : plan.nodes) node.cardinality = card.Of(node.relations);
  CostWithCout(plan);
  SliceResult r;
  r.slice = {0, 1};
  r.plan = plan;
  EXPECT_EQ(Refusal(q, with, r), "accepted");
  EXPECT_NE(Refusal(q, without, r).find("a cross product"), std::string::npos);
}

}  // namespace
}  // namespace sliceplan

namespace sliceplan {
namespace {

// A query with non-inner joins: true answers of every slice pass; a join
// given the wrong type or its preserved side put on the right is caught,
// and so is a left join claimed in an inner-only query.
TEST(SliceCheckTest, JoinTypesAreCheckedAgainstTheOriginalTree) {
  auto base = Query::Create({{"a", 100}, {"b", 50}, {"c", 20}, {"d", 30}},
                            {{0b0011, 0.01}, {0b1001, 0.02}});
  ASSERT_TRUE(base.ok());
  // (a b d) LEFT c on b = c
  auto q = base->WithJoins({{JoinType::kLeft, 0b1011, 0b0100, 0b0110, 0.1}});
  ASSERT_TRUE(q.ok()) << q.status();
  SearchOptions options;
  options.cross_products = false;
  for (uint32_t p : {1u, 2u}) {
    for (uint32_t i = 0; i < p; ++i) {
      const SliceResult r = Solve(*q, options, SliceSpec{i, p});
      EXPECT_EQ(Refusal(*q, options, r), "accepted") << i << " of " << p;
    }
  }
  SliceResult r = Solve(*q, options, SliceSpec{0, 1});
  ASSERT_TRUE(r.plan);
  Plan& plan = *r.plan;
  int left = -1;
  for (size_t i = 0; i < plan.nodes.size(); ++i) {
    if (plan.nodes[i].type == JoinType::kLeft) left = static_cast<int>(i);
  }
  ASSERT_GE(left, 0);
  SliceResult wrong_type = r;
  wrong_type.plan->nodes[left].type = JoinType::kSemi;
  EXPECT_NE(Refusal(*q, options, wrong_type).find("is no semi join the original tree allows"),
            std::string::npos);
  SliceResult swapped = r;
  std::swap(swapped.plan->nodes[left].left, swapped.plan->nodes[left].right);
  EXPECT_NE(Refusal(*q, options, swapped).find("is no left join the original tree allows"),
            std::string::npos);
  // The inner-only query (c joins nothing there: cross products on): a
  // node claimed as a left join.
  options.cross_products = true;
  SliceResult inner = Solve(*base, options, SliceSpec{0, 1});
  ASSERT_TRUE(inner.plan);
  inner.plan->nodes.back().type = JoinType::kLeft;
  EXPECT_NE(Refusal(*base, options, inner).find("the query has inner joins only"),
            std::string::npos);
}

}  // namespace
}  // namespace sliceplan
