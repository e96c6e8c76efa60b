// A part of the anytime search spread over the pool (tiers/anytime_part.h):
// the part fields are validated by name; parts differ by their seeds
// alone (part 0 is the single search); a part's own answer passes the
// coordinator's check, and every figure a faulty worker could make up is
// caught by it, naming the plan, the node and the figure.
#include "tiers/anytime_part.h"

#include <gtest/gtest.h>

#include "tests/support/physical_plans.h"
#include "tests/support/test_queries.h"
#include "tests/support/wide_queries.h"
#include "tiers/anytime_frontier.h"

namespace sliceplan {
namespace {

SearchOptions Cluster(PlanShape shape = PlanShape::kBushy, bool cross = true) {
  SearchOptions o;
  o.cost = CostModelKind::kCluster;
  o.cluster = testing::SmallClusterConfig();
  o.shape = shape;
  o.cross_products = cross;
  return o;
}

AnytimeAnswer Part(const WideQuery& q, const SearchOptions& o, uint32_t part, uint32_t parts = 4,
                   uint64_t moves = 60) {
  SearchControl control;
  return RunAnytimePart(q, o, {part, parts}, control, {}, moves);
}

TEST(AnytimePartTest, ThePartFieldsAreValidatedByName) {
  EXPECT_TRUE(ValidateAnytimePart({0, 1}).ok());
  EXPECT_TRUE(ValidateAnytimePart({4095, 4096}).ok());
  const auto refused = [](AnytimePartSpec spec, const std::string& part) {
    const absl::Status s = ValidateAnytimePart(spec);
    EXPECT_EQ(s.code(), absl::StatusCode::kInvalidArgument);
    EXPECT_NE(s.message().find(part), std::string::npos) << s;
  };
  refused({0, 0}, "anytime.parts: must lie in 1..4096, got 0");
  refused({0, 4097}, "anytime.parts: must lie in 1..4096, got 4097");
  refused({3, 3}, "anytime.part: must be less than parts (3), got 3");
}

// Part 0 is the single search (seed 1); other parts draw other moves.
TEST(AnytimePartTest, PartsDifferByTheirSeedsAlone) {
  const WideQuery q = testing::MakeWideQuery(testing::WideShape::kTreeWithCycles, 30, 2);
  const SearchOptions o = Cluster();
  SearchControl control;
  AnytimeFrontierOptions single;
  single.max_moves = 60;
  const AnytimeFrontierResult alone = AnytimeFrontier(q, o.cluster, single, control);
  const AnytimeAnswer zero = Part(q, o, 0);
  ASSERT_EQ(zero.frontier.size(), alone.frontier.size());
  for (size_t i = 0; i < alone.frontier.size(); ++i) {
    EXPECT_EQ(zero.frontier[i].root().metrics.latency_s,
              alone.frontier[i].physical.costs().latency_s);
  }
  const AnytimeAnswer one = Part(q, o, 1);
  EXPECT_EQ(one.trees, zero.trees);  // both made their 60 moves
  std::vector<double> a, b;
  for (const WidePlan& p : zero.frontier) a.push_back(p.root().metrics.latency_s);
  for (const WidePlan& p : one.frontier) b.push_back(p.root().metrics.latency_s);
  EXPECT_NE(a, b);
}

TEST(AnytimePartTest, APartsOwnAnswerPassesTheCheck) {
  for (PlanShape shape : {PlanShape::kBushy, PlanShape::kLeftDeep}) {
    for (bool cross : {true, false}) {
      const WideQuery q = testing::MakeWideQuery(testing::WideShape::kTreeWithCycles, 90, 3);
      const SearchOptions o = Cluster(shape, cross);
      const AnytimeAnswer answer = Part(q, o, 2);
      ASSERT_FALSE(answer.frontier.empty());
      EXPECT_TRUE(CheckAnytimeAnswer(q, o, answer).ok()) << CheckAnytimeAnswer(q, o, answer);
    }
  }
}

// One made-up figure at a time, each caught and named.
class TamperedAnswerTest : public ::testing::Test {
 protected:
  void SetUp() override {
    answer_ = Part(query_, options_, 1);
    ASSERT_GE(answer_.frontier.size(), 2u);
  }
  void ExpectCaught(const std::string& part) {
    const absl::Status s = CheckAnytimeAnswer(query_, options_, answer_);
    EXPECT_EQ(s.code(), absl::StatusCode::kDataLoss);
    EXPECT_NE(s.message().find(part), std::string::npos) << s;
  }
  WideNode& Root(size_t plan) { return answer_.frontier[plan].nodes.back(); }
  WideNode& FirstLeaf(size_t plan) {
    for (WideNode& n : answer_.frontier[plan].nodes) {
      if (n.is_leaf()) return n;
    }
    return answer_.frontier[plan].nodes.front();
  }

  const WideQuery query_ = testing::MakeWideQuery(testing::WideShape::kSnowflake, 70, 6);
  SearchOptions options_ = Cluster();
  AnytimeAnswer answer_;
};

TEST_F(TamperedAnswerTest, ALatencyMadeUp) {
  Root(1).metrics.latency_s *= 0.5;
  ExpectCaught("anytime plan 1: node ");
}

TEST_F(TamperedAnswerTest, ACostThatIsNotTheLatency) {
  Root(0).cost *= 0.5;
  ExpectCaught(", where the latency is ");
}

TEST_F(TamperedAnswerTest, NodeSecondsMadeUp) {
  Root(1).metrics.node_seconds *= 0.99;
  ExpectCaught("metrics");
}

TEST_F(TamperedAnswerTest, ACardinalityMadeUp) {
  Root(0).cardinality *= 2;
  ExpectCaught("cardinality");
}

TEST_F(TamperedAnswerTest, ANodeCountNotOffered) {
  Root(0).nodes = 5;
  ExpectCaught("5 nodes is not a count offered");
}

TEST_F(TamperedAnswerTest, ASampleRateNotOffered) {
  FirstLeaf(0).sample_rate = 0.5;
  ExpectCaught("sample rate 0.5 is not offered");
}

TEST_F(TamperedAnswerTest, ATreeThatMissesARelation) {
  WidePlan& p = answer_.frontier[0];
  for (WideNode& n : p.nodes) {
    if (n.is_leaf() && n.relation == 0) n.relation = 1;  // relation 1 twice, 0 never
  }
  ExpectCaught("anytime plan 0: plan node ");
  ExpectCaught(": bad or repeated leaf");
}

// A cross product labelled an outer join would pass a cross-product test
// that trusts the labels.
TEST_F(TamperedAnswerTest, AJoinThatIsNotInner) {
  Root(1).type = JoinType::kLeft;
  ExpectCaught("anytime plan 1: node ");
  ExpectCaught(": a left join, where every join is inner");
}

// A join of two leaves made a cross product: one leaf swapped with the
// leaf of a relation that shares no predicate with the other.
TEST_F(TamperedAnswerTest, ACrossProductWhereTheyAreExcluded) {
  options_.cross_products = false;
  answer_ = Part(query_, options_, 1);  // searched without cross products
  WidePlan& p = answer_.frontier[0];
  ASSERT_FALSE(HasCrossProduct(p, query_));
  const auto adjacent = [&](int32_t a, int32_t b) {
    for (int32_t k : query_.incident(a)) {
      for (int32_t r : query_.predicates()[static_cast<size_t>(k)].relations) {
        if (r == b) return true;
      }
    }
    return false;
  };
  for (const WideNode& join : p.nodes) {
    if (join.is_leaf() || !p.nodes[join.left].is_leaf() || !p.nodes[join.right].is_leaf()) continue;
    const int32_t a = p.nodes[join.left].relation, b = p.nodes[join.right].relation;
    int32_t c = 0;
    while (c == a || c == b || adjacent(a, c)) ++c;
    for (WideNode& n : p.nodes) {
      if (n.is_leaf() && n.relation == c) n.relation = b;
    }
    p.nodes[join.right].relation = c;
    break;
  }
  ASSERT_TRUE(HasCrossProduct(p, query_));
  ExpectCaught("anytime plan 0: a cross product, which the request excludes");
}

TEST_F(TamperedAnswerTest, ABushyPlanForALeftDeepRequest) {
  ASSERT_FALSE(CheckWidePlan(answer_.frontier[0], query_.size(), true).ok());  // bushy
  options_.shape = PlanShape::kLeftDeep;
  ExpectCaught("anytime plan 0: plan node ");
  ExpectCaught(": not left-deep");
}

}  // namespace
}  // namespace sliceplan
