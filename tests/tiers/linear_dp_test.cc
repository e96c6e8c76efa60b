// Linearized DP: on a chain in its own order every connected set is a run
// of the order, so the DP is the exact connected-only optimum; checked
// against the subset DP (n <= 14) and against an interval DP written here
// (to 200 relations). Every shape: valid, never below the optimum.
#include "tiers/linear_dp.h"

#include <gtest/gtest.h>

#include <algorithm>
#include <numeric>
#include <random>
#include <string>

#include "core/cost/cout_policy.h"
#include "tests/support/reference_dp.h"
#include "tests/support/test_queries.h"
#include "tests/support/wide_queries.h"

namespace sliceplan {
namespace {

using testing::GraphShape;

std::vector<int32_t> Identity(int n) {
  std::vector<int32_t> order(n);
  std::iota(order.begin(), order.end(), 0);
  return order;
}

// A chain r0 - r1 - ... with rows and selectivities from a fixed rule.
WideQuery Chain(int n) {
  std::vector<Relation> relations;
  std::vector<WidePredicate> predicates;
  for (int i = 0; i < n; ++i) {
    relations.push_back({"r" + std::to_string(i), double(10 + (i * 37) % 1000), 1});
    if (i > 0) predicates.push_back({{i - 1, i}, 1.0 / double(20 + (i * 53) % 900)});
  }
  return *WideQuery::Create(std::move(relations), std::move(predicates));
}

// The interval DP over a chain, from the definitions: card of [i, j] is
// the product of rows and of the selectivities inside; every split of an
// interval into two intervals is connected.
double ChainOptimum(const WideQuery& q) {
  const int n = q.size();
  std::vector<std::vector<double>> card(n, std::vector<double>(n)), cost = card;
  for (int i = 0; i < n; ++i) {
    card[i][i] = q.relation(i).rows;
    for (int j = i + 1; j < n; ++j) {
      card[i][j] = card[i][j - 1] * q.relation(j).rows * q.predicates()[j - 1].selectivity;
    }
  }
  for (int len = 2; len <= n; ++len) {
    for (int i = 0; i + len <= n; ++i) {
      const int j = i + len - 1;
      double best = 1e308;
      for (int k = i; k < j; ++k) best = std::min(best, cost[i][k] + cost[k + 1][j]);
      cost[i][j] = card[i][j] + best;
    }
  }
  return cost[0][n - 1];
}

TEST(LinearDpTest, ChainInItsOwnOrderIsTheConnectedOptimum) {
  SearchControl control;
  for (const int n : {2, 3, 8, 14}) {
    for (uint64_t seed = 1; seed <= 3; ++seed) {
      const Query q = testing::MakeQuery(GraphShape::kChain, n, seed);
      const WideQuery w = WideQuery::FromExact(q);
      auto bushy = LinearizedDp(w, Identity(n), PlanShape::kBushy, false, control);
      auto deep = LinearizedDp(w, Identity(n), PlanShape::kLeftDeep, false, control);
      ASSERT_TRUE(bushy.ok() && deep.ok());
      const double best = testing::DpBestBushy(q, false);
      const double best_deep = testing::DpBestLeftDeep(q, false);
      EXPECT_NEAR(bushy->cost(), best, 1e-12 * best) << n;
      EXPECT_NEAR(deep->cost(), best_deep, 1e-12 * best_deep) << n;
      EXPECT_TRUE(CheckWidePlan(*deep, n, true).ok());
    }
  }
}

TEST(LinearDpTest, LongChainsMatchTheIntervalDp) {
  SearchControl control;
  for (const int n : {30, 100, 200}) {
    const WideQuery q = Chain(n);
    auto plan = LinearizedDp(q, Identity(n), PlanShape::kBushy, false, control);
    ASSERT_TRUE(plan.ok());
    ASSERT_TRUE(CheckWidePlan(*plan, n).ok());
    EXPECT_FALSE(HasCrossProduct(*plan, q));
    const double best = ChainOptimum(q);
    EXPECT_NEAR(plan->cost(), best, 1e-9 * best) << n;
  }
}

// The interval DP over `order` without cross products, from the
// definitions: a run's cardinality is its rows times the selectivities of
// the (binary) predicates inside it; a split is taken when both parts
// have plans and some predicate joins them.
double RunOptimum(const WideQuery& q, const std::vector<int32_t>& order) {
  const int n = q.size();
  std::vector<int> position(n);
  for (int i = 0; i < n; ++i) position[order[i]] = i;
  const double inf = 1e308;
  std::vector<std::vector<double>> card(n, std::vector<double>(n, 1.0)), cost(n, card[0]);
  for (int i = 0; i < n; ++i) {
    for (int j = i; j < n; ++j) {
      card[i][j] = (j > i ? card[i][j - 1] : 1.0) * q.relation(order[j]).rows;
      for (const WidePredicate& p : q.predicates()) {
        const int a = position[p.relations[0]], b = position[p.relations[1]];
        if (std::max(a, b) == j && std::min(a, b) >= i) card[i][j] *= p.selectivity;
      }
      cost[i][j] = i == j ? 0.0 : inf;
    }
  }
  const auto joined = [&](int i, int k, int j) {
    for (const WidePredicate& p : q.predicates()) {
      const int a = std::min(position[p.relations[0]], position[p.relations[1]]);
      const int b = std::max(position[p.relations[0]], position[p.relations[1]]);
      if (a >= i && a <= k && b > k && b <= j) return true;
    }
    return false;
  };
  for (int len = 2; len <= n; ++len) {
    for (int i = 0; i + len <= n; ++i) {
      const int j = i + len - 1;
      for (int k = i; k < j; ++k) {
        if (cost[i][k] < inf && cost[k + 1][j] < inf && joined(i, k, j)) {
          cost[i][j] = std::min(cost[i][j], card[i][j] + cost[i][k] + cost[k + 1][j]);
        }
      }
    }
  }
  return cost[0][n - 1];
}

TEST(LinearDpTest, AnyOrderWithoutCrossProductsMatchesTheIntervalDp) {
  // Stars and random graphs in shuffled orders: most runs are not
  // connected, so the DP takes its sparse split loop (the runs from one
  // start that have plans) beside the full scan.
  SearchControl control;
  for (const GraphShape shape : {GraphShape::kStar, GraphShape::kRandom, GraphShape::kChain}) {
    for (const int n : {12, 40, 64}) {
      const WideQuery q = WideQuery::FromExact(testing::MakeQuery(shape, n, 5));
      std::vector<int32_t> order = Identity(n);
      std::mt19937_64 rng(static_cast<uint64_t>(n));
      std::shuffle(order.begin(), order.end(), rng);
      for (const std::vector<int32_t>& o : {Identity(n), order}) {
        const double best = RunOptimum(q, o);
        auto plan = LinearizedDp(q, o, PlanShape::kBushy, false, control);
        SCOPED_TRACE(testing::ShapeName(shape) + " n=" + std::to_string(n));
        if (!(best < 1e308)) {
          EXPECT_FALSE(plan.ok());  // no connected plan along this order
          continue;
        }
        ASSERT_TRUE(plan.ok()) << plan.status();
        EXPECT_FALSE(HasCrossProduct(*plan, q));
        EXPECT_NEAR(plan->cost(), best, 1e-9 * best);
      }
    }
  }
}

TEST(LinearDpTest, EveryShapeValidAndNeverBelowTheOptimum) {
  SearchControl control;
  for (const GraphShape shape : {GraphShape::kChain, GraphShape::kCycle, GraphShape::kStar,
                                 GraphShape::kClique, GraphShape::kRandom, GraphShape::kHyper}) {
    for (const int n : {4, 9, 12}) {
      const Query q = testing::MakeQuery(shape, n, 11);
      const WideQuery w = WideQuery::FromExact(q);
      for (const bool cross : {false, true}) {
        auto bushy = LinearPlan(w, PlanShape::kBushy, cross, control);
        auto deep = LinearPlan(w, PlanShape::kLeftDeep, cross, control);
        ASSERT_TRUE(bushy.ok() && deep.ok());
        ASSERT_TRUE(CheckWidePlan(*bushy, n).ok());
        ASSERT_TRUE(CheckWidePlan(*deep, n, true).ok());
        if (!cross) {
          EXPECT_FALSE(HasCrossProduct(*bushy, w)) << testing::ShapeName(shape);
          EXPECT_FALSE(HasCrossProduct(*deep, w)) << testing::ShapeName(shape);
        }
        const double best = testing::DpBestBushy(q, cross);
        const double best_deep = testing::DpBestLeftDeep(q, cross);
        EXPECT_GE(bushy->cost(), best * (1 - 1e-12)) << testing::ShapeName(shape);
        EXPECT_GE(deep->cost(), best_deep * (1 - 1e-12)) << testing::ShapeName(shape);
      }
    }
  }
}

TEST(LinearDpTest, DisconnectedGraphsFallBackToCrossProducts) {
  auto q = WideQuery::Create({{"a", 10, 1}, {"b", 5, 1}, {"c", 7, 1}}, {{{0, 1}, 0.1}});
  ASSERT_TRUE(q.ok());
  SearchControl control;
  auto plan = LinearPlan(*q, PlanShape::kBushy, false, control);
  ASSERT_TRUE(plan.ok());
  EXPECT_TRUE(CheckWidePlan(*plan, 3).ok());
}

TEST(LinearDpTest, RefusesPastItsLimitAndStopsAtTheDeadline) {
  const WideQuery big = testing::MakeWideQuery(testing::WideShape::kTree, 1200, 1);
  SearchControl control;
  EXPECT_EQ(LinearPlan(big, PlanShape::kBushy, false, control).status().code(),
            absl::StatusCode::kResourceExhausted);
  const WideQuery q = testing::MakeWideQuery(testing::WideShape::kTree, 600, 1);
  SearchControl expired(nullptr, std::chrono::steady_clock::now());
  EXPECT_EQ(LinearPlan(q, PlanShape::kBushy, false, expired).status().code(),
            absl::StatusCode::kDeadlineExceeded);
}

}  // namespace
}  // namespace sliceplan
