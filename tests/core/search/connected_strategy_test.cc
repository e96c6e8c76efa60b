// The connected-only search's four methods (connected_strategy.h): the
// choice rules, the sampled hit rate against closed forms, and identical
// answers from every method (cost, plan count, splits, memo sets) for every
// graph shape, both plan shapes and several slice counts, against the
// subset-DP reference.
#include "core/search/connected_strategy.h"

#include <cmath>
#include <string>

#include "core/graph/connected_sets.h"
#include "core/slice_search.h"
#include "gtest/gtest.h"
#include "tests/support/reference_dp.h"
#include "tests/support/test_queries.h"

namespace sliceplan {
namespace {

using testing::GraphShape;

constexpr uint64_t kLimit = uint64_t{1} << 30;
constexpr uint64_t kBytes = 20;

ConnectedStrategy Choose(const Query& q, PlanShape shape, uint64_t limit = kLimit) {
  return ChooseConnectedStrategy(q, JoinGraph(q), shape, kBytes, limit);
}

DirectMemo Connected(const Query& q) {
  DirectMemo memo(q.size());
  MarkConnectedSets(q, memo);
  return memo;
}

TEST(SubsetHitRateTest, CliqueSplitsAreAllPairs) {
  EXPECT_EQ(EverySplitHitRate(Connected(testing::MakeQuery(GraphShape::kClique, 12, 1)), 4096),
            1.0);
}

TEST(SubsetHitRateTest, StarMatchesClosedForm) {
  // A star of n: (n-1) 2^(n-2) csg-cmp pairs; the hub with m of the n-1
  // leaves has 2^m - 1 tested splits, in all 3^(n-1) - 2^(n-1). Past 18
  // relations on, only some words are read.
  for (int n : {8, 10, 14, 20, 22}) {
    const double pairs = (n - 1) * std::ldexp(1.0, n - 2);
    const double tested = std::pow(3.0, n - 1) - std::ldexp(1.0, n - 1);
    const double rate =
        EverySplitHitRate(Connected(testing::MakeQuery(GraphShape::kStar, n, 1)), 4096);
    EXPECT_NEAR(rate, pairs / tested, 0.02) << "n=" << n;
  }
}

TEST(SubsetHitRateTest, ChainMatchesClosedForm) {
  // A chain of n: the interval of length L has L - 1 pairs among 2^(L-1) - 1
  // tested splits, n - L + 1 such intervals.
  const int n = 14;
  double pairs = 0, tested = 0;
  for (int len = 2; len <= n; ++len) {
    pairs += (n - len + 1) * (len - 1);
    tested += (n - len + 1) * (std::ldexp(1.0, len - 1) - 1);
  }
  const double rate =
      EverySplitHitRate(Connected(testing::MakeQuery(GraphShape::kChain, n, 1)), 4096);
  EXPECT_NEAR(rate, pairs / tested, 0.01);
}

TEST(SubsetHitRateTest, NoJoinSetIsZero) {
  EXPECT_EQ(EverySplitHitRate(Connected(testing::MakeQuery(GraphShape::kChain, 1, 1)), 4096), 0.0);
}

TEST(ChooseConnectedStrategyTest, FollowsDensityHitRateAndLimits) {
  // A 20-chain has 210 connected sets of 2^20: hashed.
  EXPECT_EQ(Choose(testing::MakeQuery(GraphShape::kChain, 20, 1), PlanShape::kBushy).method,
            ConnectedMethod::kPushHashed);
  // A clique: every split is a pair.
  const ConnectedStrategy clique =
      Choose(testing::MakeQuery(GraphShape::kClique, 12, 1), PlanShape::kBushy);
  EXPECT_EQ(clique.method, ConnectedMethod::kPullEverySplit);
  EXPECT_EQ(clique.hit_rate, 1.0);
  ASSERT_TRUE(clique.connected.has_value());
  EXPECT_EQ(clique.connected->size(), (1u << 12) - 1);
  // A star: half its sets connected, one split in about 40 a pair (n = 12).
  const ConnectedStrategy star =
      Choose(testing::MakeQuery(GraphShape::kStar, 12, 1), PlanShape::kBushy);
  EXPECT_EQ(star.method, ConnectedMethod::kPullSetCcps);
  EXPECT_LT(star.hit_rate, kEverySplitMinHitRate);
  ASSERT_TRUE(star.connected.has_value());
  EXPECT_EQ(star.connected->size(), (1u << 11) + 11);  // the hub with any leaves, or one leaf
  // Left-deep plans over a direct memo pull (each split one memo bit).
  const ConnectedStrategy left_deep =
      Choose(testing::MakeQuery(GraphShape::kClique, 12, 1), PlanShape::kLeftDeep);
  EXPECT_EQ(left_deep.method, ConnectedMethod::kPullEverySplit);
  ASSERT_TRUE(left_deep.connected.has_value());
  EXPECT_EQ(left_deep.connected->size(), (1u << 12) - 1);
  // 2^12 sets of 20 bytes and the bits: over 80 KiB is hashed.
  EXPECT_EQ(
      Choose(testing::MakeQuery(GraphShape::kClique, 12, 1), PlanShape::kBushy, 80 << 10).method,
      ConnectedMethod::kPushHashed);
  EXPECT_EQ(DirectMemoBytes(12, kBytes), 4096.0 * 20 + 512);
}

TEST(ChooseConnectedStrategyTest, HyperedgesNeverTakeAPullSearch) {
  const Query q = testing::MakeQuery(GraphShape::kHyper, 10, 1);
  for (PlanShape shape : {PlanShape::kBushy, PlanShape::kLeftDeep}) {
    for (ConnectedMethod wanted :
         {ConnectedMethod::kPullEverySplit, ConnectedMethod::kPullSetCcps}) {
      const ConnectedStrategy s =
          ChooseConnectedStrategy(q, JoinGraph(q), shape, kBytes, kLimit, wanted);
      EXPECT_EQ(s.method, ConnectedMethod::kPushDirect);
    }
  }
}

struct Answer {
  double cost = 0;
  uint64_t plans = 0, splits = 0, sets = 0;
  ConnectedMethod method{};
};

template <class Policy>
SliceSearch<Policy> Search(const Query& q, PlanShape shape, SliceSpec slice, ConnectedMethod method,
                           int threads) {
  auto constraints = SliceConstraints::ForSlice(q, shape, slice, false);
  EXPECT_TRUE(constraints.ok()) << constraints.status();
  SearchOptions options{shape, false, CostModelKind::kCout};
  options.threads = threads;
  SliceSearch<Policy> search(q, options, *std::move(constraints));
  search.want_connected_method(method);
  return search;
}

Answer Solve(const Query& q, PlanShape shape, SliceSpec slice, ConnectedMethod method,
             int threads = 1) {
  Answer a;
  SearchControl control;
  auto cout = Search<CoutPolicy>(q, shape, slice, method, threads);
  EXPECT_TRUE(cout.Run(control).ok());
  if (const auto root = cout.RootSlot()) a.cost = cout.policy().Cost(*root);
  a.splits = cout.stats().splits;
  a.sets = cout.stats().memo_entries;
  a.method = *cout.connected_method();
  auto count = Search<CountPolicy>(q, shape, slice, method, threads);
  EXPECT_TRUE(count.Run(control).ok());
  if (const auto root = count.RootSlot()) a.plans = count.policy().Count(*root);
  // Bushy counting offers both orders of each pair; a left-deep step has one.
  EXPECT_EQ(count.stats().splits, (shape == PlanShape::kBushy ? 2 : 1) * a.splits);
  return a;
}

void ExpectSame(const Answer& want, const Answer& got) {
  EXPECT_LE(std::fabs(got.cost - want.cost), 1e-9 * want.cost);
  EXPECT_EQ(got.plans, want.plans);
  EXPECT_EQ(got.splits, want.splits);
  EXPECT_EQ(got.sets, want.sets);
}

TEST(ConnectedMethodsTest, EveryMethodGivesTheSameAnswerInEverySlice) {
  for (GraphShape graph : {GraphShape::kChain, GraphShape::kCycle, GraphShape::kStar,
                           GraphShape::kClique, GraphShape::kRandom, GraphShape::kHyper}) {
    for (int n : {5, 9, 12}) {
      const Query q = testing::MakeQuery(graph, n, 3);
      for (PlanShape shape : {PlanShape::kBushy, PlanShape::kLeftDeep}) {
        // Pull order over binary predicates only; set ccps are bushy only.
        const bool pulls = graph != GraphShape::kHyper;
        const bool walks = pulls && shape == PlanShape::kBushy;
        const double want = shape == PlanShape::kBushy ? testing::DpBestBushy(q, false)
                                                       : testing::DpBestLeftDeep(q, false);
        const uint64_t all_plans = Solve(q, shape, {0, 1}, ConnectedMethod::kPushHashed).plans;
        for (uint32_t p : {1u, 2u, 4u}) {
          if (std::countr_zero(p) > MaxSliceBits(n, shape)) continue;
          SCOPED_TRACE(testing::ShapeName(graph) + " n=" + std::to_string(n) +
                       (shape == PlanShape::kBushy ? " bushy" : " left-deep") +
                       " P=" + std::to_string(p));
          double best = INFINITY;
          uint64_t plans = 0;
          for (uint32_t i = 0; i < p; ++i) {
            const Answer hashed = Solve(q, shape, {i, p}, ConnectedMethod::kPushHashed);
            const Answer direct = Solve(q, shape, {i, p}, ConnectedMethod::kPushDirect);
            const Answer subsets = Solve(q, shape, {i, p}, ConnectedMethod::kPullEverySplit);
            const Answer walked = Solve(q, shape, {i, p}, ConnectedMethod::kPullSetCcps);
            EXPECT_EQ(hashed.method, ConnectedMethod::kPushHashed);
            EXPECT_EQ(direct.method, ConnectedMethod::kPushDirect);
            EXPECT_EQ(subsets.method,
                      pulls ? ConnectedMethod::kPullEverySplit : ConnectedMethod::kPushDirect);
            EXPECT_EQ(walked.method, walks   ? ConnectedMethod::kPullSetCcps
                                     : pulls ? ConnectedMethod::kPullEverySplit
                                             : ConnectedMethod::kPushDirect);
            ExpectSame(hashed, direct);
            ExpectSame(hashed, subsets);
            ExpectSame(hashed, walked);
            if (hashed.plans > 0) best = std::min(best, hashed.cost);
            plans += hashed.plans;
          }
          // The slices cover every plan (left-deep slices are disjoint; bushy
          // ones share the trees where a triple's two relations arrive
          // together, docs/slicing.md), and the best of them is the optimum.
          if (shape == PlanShape::kLeftDeep) {
            EXPECT_EQ(plans, all_plans);
          } else {
            EXPECT_GE(plans, all_plans);
          }
          EXPECT_LE(std::fabs(best - want), 1e-9 * want);
        }
      }
    }
  }
}

TEST(ConnectedMethodsTest, MemoBytesCountTheWalksCopyOfTheSets) {
  // 2^12 entries of cost, best left operand and cached cardinality, and
  // the 512 bytes of one bit per set; the walk keeps a second copy of the
  // bits (the memo loses the sets a slice has no plan for).
  const uint64_t entries = 4096 * (CoutPolicy::kBytesPerSlot + sizeof(double));
  const Query star = testing::MakeQuery(GraphShape::kStar, 12, 1);
  auto walked =
      Search<CoutPolicy>(star, PlanShape::kBushy, {0, 1}, ConnectedMethod::kPullSetCcps, 1);
  SearchControl control;
  ASSERT_TRUE(walked.Run(control).ok());
  EXPECT_EQ(walked.stats().memo_bytes, entries + 2 * 512);
  auto tested =
      Search<CoutPolicy>(star, PlanShape::kBushy, {0, 1}, ConnectedMethod::kPullEverySplit, 1);
  ASSERT_TRUE(tested.Run(control).ok());
  EXPECT_EQ(tested.stats().memo_bytes, entries + 512);
}

TEST(ConnectedMethodsTest, SlicedDirectMemoCountsTheAdmittedBlocksOnly) {
  // P = 4, bushy: two triples, 7^2 of their 8^2 high patterns admitted,
  // each a block of 2^6 of the 2^12 sets; the bits stay whole (docs/slicing.md,
  // "Connected-only slices"). Left-deep: two pairs, 3^2 of 4^2.
  const uint64_t per_set = CoutPolicy::kBytesPerSlot + sizeof(double);
  const Query star = testing::MakeQuery(GraphShape::kStar, 12, 1);
  SearchControl control;
  for (ConnectedMethod method : {ConnectedMethod::kPullSetCcps, ConnectedMethod::kPullEverySplit,
                                 ConnectedMethod::kPushDirect}) {
    auto bushy = Search<CoutPolicy>(star, PlanShape::kBushy, {1, 4}, method, 1);
    ASSERT_TRUE(bushy.Run(control).ok());
    const uint64_t bits = method == ConnectedMethod::kPullSetCcps ? 2 * 512 : 512;
    EXPECT_EQ(bushy.stats().memo_bytes, 49 * 64 * per_set + bits);
  }
  auto left_deep =
      Search<CoutPolicy>(star, PlanShape::kLeftDeep, {1, 4}, ConnectedMethod::kPullEverySplit, 1);
  ASSERT_TRUE(left_deep.Run(control).ok());
  EXPECT_EQ(left_deep.stats().memo_bytes, 9 * 256 * per_set + 512);
}

TEST(ConnectedMethodsTest, PulledMethodsGiveTheSameAnswerOnThreads) {
  // 15 relations: past the threaded searches' smallest memo (2^14 slots).
  for (GraphShape graph : {GraphShape::kStar, GraphShape::kRandom, GraphShape::kClique}) {
    const Query q = testing::MakeQuery(graph, 15, 2);
    for (uint32_t p : {1u, 4u}) {
      for (uint32_t i = 0; i < p; i += 3) {
        const Answer want = Solve(q, PlanShape::kBushy, {i, p}, ConnectedMethod::kPushDirect);
        for (ConnectedMethod method :
             {ConnectedMethod::kPullSetCcps, ConnectedMethod::kPullEverySplit}) {
          for (int threads : {2, 3}) {
            SCOPED_TRACE(testing::ShapeName(graph) + " P=" + std::to_string(p) +
                         " i=" + std::to_string(i) + " threads=" + std::to_string(threads));
            const Answer got = Solve(q, PlanShape::kBushy, {i, p}, method, threads);
            EXPECT_EQ(got.method, method);
            ExpectSame(want, got);
          }
        }
      }
    }
  }
}

}  // namespace
}  // namespace sliceplan
