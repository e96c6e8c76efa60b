// Connected subgraphs (csg) and csg-cmp pairs (ccp) of the classic join
// graphs: the connected-sets memo holds exactly the csgs and a symmetric
// cost model costs each ccp once. Closed forms from Moerkotte and Neumann,
// "Analysis of two existing and one new dynamic programming algorithm for
// the generation of optimal bushy join trees without cross products",
// VLDB 2006, table 1:
//   chain  csg n(n+1)/2        ccp (n^3 - n)/6
//   cycle  csg n^2 - n + 1     ccp (n^3 - 2n^2 + n)/2
//   star   csg 2^(n-1) + n - 1 ccp (n-1) 2^(n-2)
//   clique csg 2^n - 1         ccp (3^n - 2^(n+1) + 1)/2
#include "core/graph/connected_sets.h"

#include <algorithm>
#include <cmath>
#include <random>

#include "core/slice_planner.h"
#include "core/slice_solver.h"
#include "gtest/gtest.h"
#include "tests/support/test_queries.h"

namespace sliceplan {
namespace {

using testing::GraphShape;

uint64_t Pow(uint64_t b, int e) {
  uint64_t r = 1;
  while (e-- > 0) r *= b;
  return r;
}

struct Expected {
  uint64_t csg;
  uint64_t ccp;
};

Expected Formula(GraphShape g, int n) {
  const uint64_t u = static_cast<uint64_t>(n);
  switch (g) {
    case GraphShape::kChain:
      return {u * (u + 1) / 2, (u * u * u - u) / 6};
    case GraphShape::kCycle:
      return {u * u - u + 1, (u * u * u - 2 * u * u + u) / 2};
    case GraphShape::kStar:
      return {Pow(2, n - 1) + u - 1, (u - 1) * (n >= 2 ? Pow(2, n - 2) : 0)};
    default:
      return {Pow(2, n) - 1, (Pow(3, n) - Pow(2, n + 1) + 1) / 2};
  }
}

SearchStats Solve(const Query& q) {
  SearchOptions options;
  options.cross_products = false;
  SearchControl control;
  auto r = SolveSlice(q, options, {0, 1}, control);
  EXPECT_TRUE(r.ok()) << r.status();
  EXPECT_TRUE(r.ok() && r->plan.has_value());
  return r.ok() ? r->stats : SearchStats{};
}

TEST(ConnectedCountTest, CsgAndCcpCountsMatchTheClosedForms) {
  for (GraphShape g :
       {GraphShape::kChain, GraphShape::kCycle, GraphShape::kStar, GraphShape::kClique}) {
    const int max_n = g == GraphShape::kClique ? 12 : g == GraphShape::kStar ? 16 : 30;
    for (int n = 3; n <= max_n; ++n) {
      const SearchStats stats = Solve(testing::MakeQuery(g, n, 1));
      const Expected want = Formula(g, n);
      EXPECT_EQ(stats.memo_entries, want.csg) << testing::ShapeName(g) << " n=" << n;
      EXPECT_EQ(stats.splits, want.ccp) << testing::ShapeName(g) << " n=" << n;
    }
  }
}

TEST(ConnectedCountTest, SixtyRelationChainAndCycleAreExact) {
  for (GraphShape g : {GraphShape::kChain, GraphShape::kCycle}) {
    const SearchStats stats = Solve(testing::MakeQuery(g, 60, 4));
    const Expected want = Formula(g, 60);
    EXPECT_EQ(stats.memo_entries, want.csg);
    EXPECT_EQ(stats.splits, want.ccp);
  }
}

TEST(ConnectedCountTest, PlannerCountsConnectedSetsUpToItsCap) {
  EXPECT_EQ(CountConnectedSets(testing::MakeQuery(GraphShape::kChain, 20, 1), 1000), 210u);
  EXPECT_EQ(CountConnectedSets(testing::MakeQuery(GraphShape::kStar, 10, 1), 1000), 521u);
  EXPECT_EQ(CountConnectedSets(testing::MakeQuery(GraphShape::kClique, 20, 1), 500), 500u);
}

// Connected as the enumerator defines it: every predicate links all its
// relations. Grown from the lowest member one predicate at a time.
bool ConnectedByPredicates(const Query& q, RelSet s) {
  RelSet reached = LowestBit(s);
  for (bool grew = true; grew;) {
    grew = false;
    for (const Predicate& p : q.predicates()) {
      const RelSet inside = p.relations & s;
      if ((inside & reached) != 0 && (inside & ~reached) != 0) {
        reached |= inside;
        grew = true;
      }
    }
  }
  return reached == s;
}

// Every subset tested against ConnectedSets on random graphs (a random
// tree with extra edges) and on chains with a three-relation predicate,
// every other one with a chord from the first relation to the last added:
// each connected set once, nothing else (a pruned recursion that dropped
// a set fails it).
TEST(ConnectedSetsTest, RandomGraphsMatchEverySubsetTested) {
  std::mt19937_64 rng(23);
  for (int round = 0; round < 60; ++round) {
    const int n = 4 + static_cast<int>(rng() % 9);
    const Query base = testing::MakeQuery(
        round % 3 == 2 ? testing::GraphShape::kHyper : testing::GraphShape::kRandom, n, rng());
    std::vector<Predicate> predicates(base.predicates().begin(), base.predicates().end());
    if (round % 2 == 1)
      predicates.push_back({Singleton(RelationId{0}) | RelSet{1} << (n - 1), 0.5});
    const Query q = testing::MakeQueryOrDie(
        std::vector<Relation>(base.relations().begin(), base.relations().end()), predicates);
    std::vector<RelSet> got = ConnectedSets(q, uint64_t{1} << 20);
    std::sort(got.begin(), got.end());
    std::vector<RelSet> want;
    for (RelSet s = 1; s < (RelSet{1} << n); ++s) {
      if (ConnectedByPredicates(q, s)) want.push_back(s);
    }
    EXPECT_EQ(got, want) << "round " << round << ", n = " << n;
    EXPECT_EQ(CountConnectedSets(q, uint64_t{1} << 20), want.size());
  }
}

}  // namespace
}  // namespace sliceplan
