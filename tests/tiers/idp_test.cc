// Iterative DP over blocks: never below the optimum, never above its start
// plan, exact when one block covers the query, hyperedges kept, and large
// queries improved within a time limit.
#include "tiers/idp.h"

#include <gtest/gtest.h>

#include <algorithm>
#include <chrono>
#include <set>
#include <string>
#include <vector>

#include "absl/strings/str_cat.h"
#include "absl/strings/str_format.h"
#include "schedule/embedded_pool.h"
#include "tests/support/reference_dp.h"
#include "tests/support/test_queries.h"
#include "tests/support/wide_queries.h"
#include "tiers/greedy.h"

namespace sliceplan {
namespace {

using testing::GraphShape;

BlockSearch InProcess(bool cross_products) {
  return [cross_products](const Query& block) -> absl::StatusOr<Plan> {
    SearchOptions options;
    options.cross_products = cross_products;
    auto result = OptimizeEmbedded(block, options, 1, 1);
    if (!result.ok()) return result.status();
    return result->plan;
  };
}

TEST(IdpTest, OneBlockOverTheWholeQueryIsExact) {
  for (const GraphShape shape : {GraphShape::kChain, GraphShape::kStar, GraphShape::kClique,
                                 GraphShape::kRandom, GraphShape::kHyper}) {
    const Query q = testing::MakeQuery(shape, 10, 5);
    const WideQuery w = WideQuery::FromExact(q);
    for (const bool cross : {false, true}) {
      IdpConfig config;
      config.block = 10;
      config.cross_products = cross;
      const IdpResult r =
          ImproveByBlocks(w, GreedyPlan(w, PlanShape::kBushy), config, InProcess(cross));
      ASSERT_TRUE(CheckWidePlan(r.plan, 10).ok());
      const double best = testing::DpBestBushy(q, cross);
      EXPECT_NEAR(r.plan.cost(), best, 1e-9 * best) << testing::ShapeName(shape) << cross;
      EXPECT_GE(r.stats.blocks, 1);
    }
  }
}

TEST(IdpTest, SmallBlocksNeverBelowTheOptimumNorAboveTheStart) {
  for (const GraphShape shape : {GraphShape::kChain, GraphShape::kCycle, GraphShape::kStar,
                                 GraphShape::kClique, GraphShape::kRandom, GraphShape::kHyper}) {
    for (uint64_t seed = 1; seed <= 3; ++seed) {
      const Query q = testing::MakeQuery(shape, 13, seed);
      const WideQuery w = WideQuery::FromExact(q);
      for (const bool cross : {false, true}) {
        IdpConfig config;
        config.block = 5;
        config.cross_products = cross;
        const WidePlan start = GreedyPlan(w, PlanShape::kBushy);
        const IdpResult r = ImproveByBlocks(w, start, config, InProcess(cross));
        ASSERT_TRUE(CheckWidePlan(r.plan, 13).ok());
        if (!cross) {
          EXPECT_FALSE(HasCrossProduct(r.plan, w));
        }
        EXPECT_LE(r.plan.cost(), start.cost());
        EXPECT_DOUBLE_EQ(r.stats.start_cost, start.cost());
        const double best = testing::DpBestBushy(q, cross);
        EXPECT_GE(r.plan.cost(), best * (1 - 1e-12)) << testing::ShapeName(shape);
      }
    }
  }
}

// A 14-relation chain with its left-deep greedy plan (its optimum is
// bushy) and blocks of 6 without cross products.
struct PoorChainStart {
  Query q = testing::MakeQuery(GraphShape::kChain, 14, 2);
  WideQuery w = WideQuery::FromExact(q);
  WidePlan start = GreedyPlan(w, PlanShape::kLeftDeep);
  IdpConfig config{.block = 6, .cross_products = false};
};

TEST(IdpTest, ImprovesAPoorStartOnAChain) {
  // Blocks of 6 find cheaper sub-plans.
  const PoorChainStart c;
  const Query& q = c.q;
  const WidePlan& start = c.start;
  const IdpResult r = ImproveByBlocks(c.w, start, c.config, InProcess(false));
  const double best = testing::DpBestBushy(q, false);
  ASSERT_GT(start.cost(), best * 1.01);  // the start is poor
  EXPECT_LT(r.plan.cost(), start.cost());
  EXPECT_GT(r.stats.improved, 0);
}

// Block searches that fail (no worker, a memo limit) are counted as
// failed with their error, never as searched: the plan stays the start.
TEST(IdpTest, FailedBlockSearchesAreCountedNotClaimed) {
  const PoorChainStart c;
  const IdpResult r =
      ImproveByBlocks(c.w, c.start, c.config, [](const Query&) -> absl::StatusOr<Plan> {
        return absl::UnavailableError("no worker is healthy");
      });
  EXPECT_GT(r.stats.blocks, 0);
  EXPECT_EQ(r.stats.failed, r.stats.blocks);
  EXPECT_EQ(r.stats.last_failure, "no worker is healthy");
  EXPECT_EQ(r.stats.improved, 0);
  EXPECT_DOUBLE_EQ(r.plan.cost(), c.start.cost());
}

// A block met again is answered from its first search: the same plan as
// searching it again, with fewer searches, and no block query searched
// twice.
TEST(IdpTest, BlocksMetAgainReuseTheirAnswerWithTheSameOutcome) {
  int total_reused = 0;
  for (const auto shape : {testing::WideShape::kTree, testing::WideShape::kSnowflake,
                           testing::WideShape::kTreeWithHyperedges}) {
    for (const bool cross : {false, true}) {
      const WideQuery w = testing::MakeWideQuery(shape, 60, 7);
      const WidePlan start = GreedyPlan(w, PlanShape::kBushy);
      IdpResult runs[2];
      int searches[2] = {0, 0};
      std::set<std::string> seen;
      bool repeated = false;
      for (const bool reuse : {false, true}) {
        IdpConfig config;
        config.block = 7;
        config.cross_products = cross;
        config.reuse_answers = reuse;
        const BlockSearch exact = InProcess(cross);
        runs[reuse] = ImproveByBlocks(w, start, config, [&](const Query& block) {
          ++searches[reuse];
          if (reuse) {
            std::string key;
            for (const Relation& r : block.relations()) absl::StrAppendFormat(&key, "%a,", r.rows);
            for (const Predicate& p : block.predicates()) {
              absl::StrAppendFormat(&key, "%x:%a;", p.relations, p.selectivity);
            }
            repeated |= !seen.insert(key).second;
          }
          return exact(block);
        });
      }
      const std::string what = absl::StrCat(static_cast<int>(shape), cross ? " cross" : "");
      EXPECT_EQ(WideTreeString(runs[1].plan, w), WideTreeString(runs[0].plan, w)) << what;
      EXPECT_EQ(runs[1].plan.cost(), runs[0].plan.cost()) << what;
      EXPECT_EQ(runs[1].stats.passes, runs[0].stats.passes) << what;
      EXPECT_EQ(runs[1].stats.improved, runs[0].stats.improved) << what;
      EXPECT_EQ(searches[0], runs[0].stats.blocks) << what;
      EXPECT_EQ(searches[1], runs[1].stats.blocks) << what;
      EXPECT_EQ(runs[0].stats.reused, 0) << what;
      EXPECT_EQ(runs[1].stats.blocks + runs[1].stats.reused, runs[0].stats.blocks) << what;
      EXPECT_FALSE(repeated) << what;
      total_reused += runs[1].stats.reused;
    }
  }
  EXPECT_GT(total_reused, 0);  // passes over unchanged parts do meet blocks again
}

// The capacity model hears of every searched block, with the count so far
// (1, 2, 3, ...: what it subtracts from the blocks still to come), and the
// block size it answers is the next block's.
TEST(IdpTest, TheCapacityModelHearsEachSearchedBlockInTurn) {
  const WideQuery w = testing::MakeWideQuery(testing::WideShape::kTree, 60, 5);
  IdpConfig config;
  config.block = 5;
  config.cross_products = false;
  std::vector<int> heard, sizes;
  config.next_block = [&](int block, double seconds, int searched) {
    EXPECT_GE(seconds, 0);
    heard.push_back(searched);
    sizes.push_back(block);
    return 6;
  };
  const IdpResult r =
      ImproveByBlocks(w, GreedyPlan(w, PlanShape::kBushy), config, InProcess(false));
  ASSERT_EQ(static_cast<int>(heard.size()), r.stats.blocks);
  for (size_t i = 0; i < heard.size(); ++i) EXPECT_EQ(heard[i], static_cast<int>(i) + 1);
  ASSERT_GE(sizes.size(), 2u);
  EXPECT_LE(sizes[0], 5);
  EXPECT_EQ(r.stats.largest_block, *std::max_element(sizes.begin(), sizes.end()));
  EXPECT_GT(r.stats.largest_block, 5);  // the answered 6 was used
}

TEST(IdpTest, LargeQueriesStopWhenTimeIsOut) {
  const WideQuery w = testing::MakeWideQuery(testing::WideShape::kTreeWithHyperedges, 1000, 3);
  const WidePlan start = GreedyPlan(w, PlanShape::kBushy);
  IdpConfig config;
  config.block = 8;
  config.cross_products = false;
  const auto until = std::chrono::steady_clock::now() + std::chrono::milliseconds(300);
  config.out_of_time = [until] { return std::chrono::steady_clock::now() > until; };
  const auto began = std::chrono::steady_clock::now();
  const IdpResult r = ImproveByBlocks(w, start, config, InProcess(false));
  const double seconds =
      std::chrono::duration<double>(std::chrono::steady_clock::now() - began).count();
  ASSERT_TRUE(CheckWidePlan(r.plan, 1000).ok());
  EXPECT_FALSE(HasCrossProduct(r.plan, w));
  EXPECT_LE(r.plan.cost(), start.cost());
  EXPECT_GT(r.stats.blocks, 0);
  EXPECT_LT(seconds, 2.0);  // one block past the limit at most; blocks of 8 take milliseconds
}

}  // namespace
}  // namespace sliceplan
