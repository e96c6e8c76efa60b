// The engine's optimum against the independent reference (explicit
// enumeration of every join order and tree), for every join-graph shape,
// both plan shapes, with and without cross products, for P = 1, 2, 4, 8
// where the query has room for the constraints (docs/slicing.md, invariant 3).
#include "core/slice_solver.h"

#include <cmath>
#include <tuple>

#include "gtest/gtest.h"
#include "tests/support/reference_dp.h"
#include "tests/support/reference_search.h"
#include "tests/support/solve_slices.h"
#include "tests/support/test_queries.h"

namespace sliceplan {
namespace {

using testing::GraphShape;

constexpr double kRelTol = 1e-9;

void ExpectNear(double want, double got) {
  EXPECT_LE(std::fabs(got - want), kRelTol * std::fabs(want)) << "want " << want << " got " << got;
}

struct Case {
  GraphShape graph;
  int n;
  PlanShape shape;
  bool cross;
};

class SliceSolverTest : public ::testing::TestWithParam<Case> {};

TEST_P(SliceSolverTest, MergedOptimumEqualsReferenceForEverySliceCount) {
  const Case c = GetParam();
  for (uint64_t seed = 1; seed <= 3; ++seed) {
    const Query query = testing::MakeQuery(c.graph, c.n, seed);
    const double want = c.shape == PlanShape::kBushy ? testing::RefBestBushy(query, c.cross)
                                                     : testing::RefBestLeftDeep(query, c.cross);
    ASSERT_TRUE(std::isfinite(want));
    SearchOptions options{c.shape, c.cross, CostModelKind::kCout};
    for (uint32_t p : {1u, 2u, 4u, 8u}) {
      if (std::countr_zero(p) > MaxSliceBits(c.n, c.shape)) continue;
      SCOPED_TRACE(testing::ShapeName(c.graph) + " n=" + std::to_string(c.n) +
                   " seed=" + std::to_string(seed) + " P=" + std::to_string(p));
      auto result = testing::SolveAllSlices(query, options, p);
      ASSERT_TRUE(result.ok()) << result.status();
      const Plan& plan = result->plan;
      ExpectNear(want, plan.root().cost);
      // The plan is real: its shape recomputes to the reported cost, and
      // every node's reported cardinality and cost match an independent
      // recomputation (so a cost scaled by a constant would show).
      ExpectNear(testing::RefCoutOf(query, plan), plan.root().cost);
      std::vector<double> cost(plan.nodes.size());
      for (size_t i = 0; i < plan.nodes.size(); ++i) {
        const PlanNode& node = plan.nodes[i];
        const double card = testing::RefCard(query, node.relations);
        cost[i] = node.is_leaf() ? 0 : card + cost[node.left] + cost[node.right];
        ExpectNear(card, node.cardinality);
        ExpectNear(cost[i], node.cost);
      }
      EXPECT_TRUE(testing::RefCoversQuery(query, plan));
      if (c.shape == PlanShape::kLeftDeep) {
        EXPECT_TRUE(IsLeftDeep(plan));
      }
      if (!c.cross) {
        EXPECT_TRUE(testing::RefFreeOfCrossProducts(query, plan));
      }
      EXPECT_EQ(result->slices.size(), p);
    }
  }
}

std::vector<Case> AllCases() {
  std::vector<Case> out;
  for (GraphShape g : {GraphShape::kChain, GraphShape::kCycle, GraphShape::kStar,
                       GraphShape::kClique, GraphShape::kRandom, GraphShape::kHyper}) {
    for (PlanShape s : {PlanShape::kBushy, PlanShape::kLeftDeep}) {
      for (bool cross : {true, false}) {
        // n = 9 gives bushy plans room for P = 8 (three triples).
        for (int n : {5, 7, s == PlanShape::kBushy ? 9 : 8}) {
          out.push_back({g, n, s, cross});
        }
      }
    }
  }
  return out;
}

INSTANTIATE_TEST_SUITE_P(Shapes, SliceSolverTest, ::testing::ValuesIn(AllCases()),
                         [](const ::testing::TestParamInfo<Case>& param_info) {
                           const Case& c = param_info.param;
                           return testing::ShapeName(c.graph) + "_n" + std::to_string(c.n) + "_" +
                                  (c.shape == PlanShape::kBushy ? "bushy" : "leftdeep") +
                                  (c.cross ? "_cross" : "_connected");
                         });

// Larger cases against the second oracle (tests/support/reference_dp.h):
// 14 relations, every graph shape, with and without cross products, every
// slice count the query has room for: P <= 16 bushy, P <= 128 left-deep.
class SliceSolverLargeTest : public ::testing::TestWithParam<GraphShape> {};

TEST_P(SliceSolverLargeTest, MergedOptimumEqualsTheSubsetDpForEverySliceCount) {
  const Query query = testing::MakeQuery(GetParam(), 14, 4);
  for (bool cross : {true, false}) {
    for (PlanShape shape : {PlanShape::kBushy, PlanShape::kLeftDeep}) {
      const double want = shape == PlanShape::kBushy ? testing::DpBestBushy(query, cross)
                                                     : testing::DpBestLeftDeep(query, cross);
      ASSERT_TRUE(std::isfinite(want)) << "the join graphs are connected";
      for (int k = 0; k <= MaxSliceBits(14, shape); ++k) {
        SCOPED_TRACE(std::string(cross ? "cross" : "connected") +
                     (shape == PlanShape::kBushy ? " bushy" : " left-deep") +
                     " P=" + std::to_string(1 << k));
        auto r = testing::SolveAllSlices(query, {shape, cross, CostModelKind::kCout}, 1u << k);
        ASSERT_TRUE(r.ok()) << r.status();
        ExpectNear(want, r->plan.root().cost);
        ExpectNear(testing::RefCoutOf(query, r->plan), r->plan.root().cost);
      }
    }
  }
}

// The two oracles agree where both reach: a wrong DP oracle would pass
// wrong engines above.
TEST(SliceSolverOraclesTest, SubsetDpEqualsExplicitEnumeration) {
  for (GraphShape g : {GraphShape::kChain, GraphShape::kCycle, GraphShape::kStar,
                       GraphShape::kClique, GraphShape::kRandom, GraphShape::kHyper}) {
    const Query q = testing::MakeQuery(g, 7, 9);
    for (bool cross : {true, false}) {
      ExpectNear(testing::RefBestBushy(q, cross), testing::DpBestBushy(q, cross));
      ExpectNear(testing::RefBestLeftDeep(q, cross), testing::DpBestLeftDeep(q, cross));
    }
  }
}

INSTANTIATE_TEST_SUITE_P(Shapes, SliceSolverLargeTest,
                         ::testing::Values(GraphShape::kChain, GraphShape::kCycle,
                                           GraphShape::kStar, GraphShape::kClique,
                                           GraphShape::kRandom, GraphShape::kHyper),
                         [](const ::testing::TestParamInfo<GraphShape>& param_info) {
                           return testing::ShapeName(param_info.param);
                         });

TEST(SliceSolverErrorsTest, RefusesSliceCountTooLargeForTheQuery) {
  const Query query = testing::MakeQuery(GraphShape::kChain, 5, 1);
  SearchControl control;
  auto r = SolveSlice(query, {}, {0, 4}, control);  // bushy needs 6 relations
  ASSERT_FALSE(r.ok());
  EXPECT_EQ(r.status().code(), absl::StatusCode::kInvalidArgument);
  EXPECT_NE(r.status().message().find("slices"), std::string::npos);
}

TEST(SliceSolverErrorsTest, RefusesSliceCountNotAPowerOfTwo) {
  const Query query = testing::MakeQuery(GraphShape::kChain, 9, 1);
  SearchControl control;
  auto r = SolveSlice(query, {}, {0, 3}, control);
  ASSERT_FALSE(r.ok());
  EXPECT_NE(r.status().message().find("power of two"), std::string::npos);
}

TEST(SliceSolverErrorsTest, RefusesMemoOverTheLimitWithTheNumbers) {
  const Query query = testing::MakeQuery(GraphShape::kChain, 30, 1);
  SearchControl control;
  // 2^30 sets x 12 bytes = 12 GiB > 8 GiB. Each triple keeps 7/8 of the
  // sets: 7^3 2^21 x 12 = 8.63e9 bytes still passes 8 GiB = 8.59e9, and
  // 7^4 2^18 x 12 = 7.55e9 fits, so 16 slices is the least that fits.
  auto r = SolveSlice(query, {}, {0, 1}, control);
  ASSERT_FALSE(r.ok());
  EXPECT_EQ(r.status().code(), absl::StatusCode::kResourceExhausted);
  EXPECT_NE(r.status().message().find("1.074e+09 sets x 12 bytes"), std::string::npos)
      << r.status();
  EXPECT_NE(r.status().message().find("at least 16 slices"), std::string::npos) << r.status();
}

// A limit no slice count meets says so, with the smallest slice's size,
// rather than advising more slices.
TEST(SliceSolverErrorsTest, AMemoLimitNoSliceCountMeetsSaysToRaiseIt) {
  const Query query = testing::MakeQuery(GraphShape::kChain, 6, 1);
  SearchOptions options;
  options.memo_limit_bytes = 1;
  SearchControl control;
  auto r = SolveSlice(query, options, {0, 1}, control);
  ASSERT_FALSE(r.ok());
  EXPECT_EQ(r.status().code(), absl::StatusCode::kResourceExhausted);
  const std::string m(r.status().message());
  EXPECT_NE(m.find("over the memo limit of 1 bytes"), std::string::npos) << m;
  EXPECT_NE(m.find("more slices do not bring it under"), std::string::npos) << m;
  EXPECT_NE(m.find("raise the memo limit"), std::string::npos) << m;
  EXPECT_EQ(m.find("use at least"), std::string::npos) << m;
}

TEST(SliceSolverErrorsTest, ConnectedMemoLimitIsResourceExhausted) {
  const Query query = testing::MakeQuery(GraphShape::kClique, 12, 1);
  SearchOptions options;
  options.cross_products = false;
  options.memo_limit_bytes = 4096;
  SearchControl control;
  auto r = SolveSlice(query, options, {0, 1}, control);
  ASSERT_FALSE(r.ok());
  EXPECT_EQ(r.status().code(), absl::StatusCode::kResourceExhausted);
}

TEST(SliceSolverErrorsTest, CancelledSearchReturnsCancelled) {
  const Query query = testing::MakeQuery(GraphShape::kClique, 16, 1);
  std::atomic<bool> cancel{true};
  SearchControl control(&cancel, std::nullopt);
  auto r = SolveSlice(query, {}, {0, 1}, control);
  ASSERT_FALSE(r.ok());
  EXPECT_EQ(r.status().code(), absl::StatusCode::kCancelled);
}

TEST(SliceSolverErrorsTest, DisconnectedGraphWithoutCrossProductsIsNotFound) {
  const Query query = testing::MakeQueryOrDie({{"a", 10, 100}, {"b", 10, 100}, {"c", 10, 100}},
                                              {{0b011, 0.1}});  // c joins nothing
  SearchOptions options;
  options.cross_products = false;
  auto r = testing::SolveAllSlices(query, options, 1);
  ASSERT_FALSE(r.ok());
  EXPECT_EQ(r.status().code(), absl::StatusCode::kNotFound);
}

}  // namespace
}  // namespace sliceplan
