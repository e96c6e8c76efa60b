// The connected-only left-deep search (core/search/connected_left_deep.h):
// every (S \ {r}, r) with S \ {r} connected and r joined to it costed once,
// the optimum over join orders without cross products split over slices,
// every such order counted once, in push order on a hashed or a direct
// memo and in pull order.
#include "core/search/connected_left_deep.h"

#include <optional>
#include <string>

#include "core/cost/cout_policy.h"
#include "core/graph/join_graph.h"
#include "core/memo/direct_memo.h"
#include "core/model/cardinality.h"
#include "gtest/gtest.h"
#include "tests/support/closed_forms.h"
#include "tests/support/enumerator_runs.h"
#include "tests/support/reference_dp.h"
#include "tests/support/test_queries.h"

namespace sliceplan {
namespace {

using testing::GraphShape;

// Push order on either memo, and pull order (a direct memo, binary
// predicates: the hyperedge shape is searched in push order).
constexpr ConnectedMethod kMethods[] = {ConnectedMethod::kPushHashed, ConnectedMethod::kPushDirect,
                                        ConnectedMethod::kPullEverySplit};

TEST(ConnectedLeftDeepTest, UnslicedSplitsMatchTheClosedForms) {
  for (ConnectedMethod method : kMethods) {
    for (GraphShape shape :
         {GraphShape::kChain, GraphShape::kCycle, GraphShape::kStar, GraphShape::kClique}) {
      for (int n = 3; n <= 12; ++n) {
        const Query q = testing::MakeQuery(shape, n, 8);
        const testing::EnumeratorRun run =
            testing::RunEnumerator(q, PlanShape::kLeftDeep, false, {0, 1}, method);
        ASSERT_EQ(run.method, method);
        EXPECT_EQ(run.stats.splits, testing::ConnectedLeftDeepSplits(shape, n))
            << testing::ShapeName(shape) << " n=" << n;
      }
    }
  }
}

TEST(ConnectedLeftDeepTest, SlicesHoldTheOptimumAndEveryOrderOnce) {
  for (ConnectedMethod method : kMethods) {
    for (GraphShape shape : {GraphShape::kChain, GraphShape::kCycle, GraphShape::kStar,
                             GraphShape::kClique, GraphShape::kRandom, GraphShape::kHyper}) {
      for (int n : {5, 8, 11}) {
        const Query q = testing::MakeQuery(shape, n, 9);
        const double best = testing::DpBestLeftDeep(q, false);
        const uint64_t orders =
            testing::RunAllSlices(q, PlanShape::kLeftDeep, false, 1, method).plans;
        if (testing::LeftDeepOrders(shape, n, false) != 0) {
          EXPECT_EQ(orders, testing::LeftDeepOrders(shape, n, false)) << testing::ShapeName(shape);
        }
        for (uint32_t p : {1u, 2u, 4u}) {
          SCOPED_TRACE(testing::ShapeName(shape) + " n=" + std::to_string(n) +
                       " P=" + std::to_string(p));
          const testing::SlicedRun all =
              testing::RunAllSlices(q, PlanShape::kLeftDeep, false, p, method);
          ASSERT_TRUE(all.cost.has_value());
          EXPECT_NEAR(*all.cost, best, best * 1e-12);
          EXPECT_EQ(all.plans, orders);
        }
      }
    }
  }
}

// A direct memo that charges each call its cost in memory words touched:
// one for a set's bit, every word for a count of the sets.
class ChargedMemo {
 public:
  static constexpr bool kGrows = false;
  explicit ChargedMemo(int n) : memo_(n) {}
  std::optional<Slot> Find(RelSet s) const {
    ++words_;
    return memo_.Find(s);
  }
  Slot Insert(RelSet s, bool& added) {
    ++words_;
    return memo_.Insert(s, added);
  }
  size_t size() const {
    words_ += memo_.words().size();
    return memo_.size();
  }
  uint64_t slot_count() const { return memo_.slot_count(); }
  uint64_t words() const { return words_; }

 private:
  DirectMemo memo_;
  mutable uint64_t words_ = 0;
};

// The search's memo work is a few words per split, whatever n: a search
// that counted the memo's sets per step (2^n / 64 words each) took minutes
// on a 22-relation star. Counts, not a clock.
TEST(ConnectedLeftDeepTest, MemoWorkPerSplitDoesNotGrowWithN) {
  for (GraphShape shape : {GraphShape::kStar, GraphShape::kClique, GraphShape::kRandom}) {
    for (int n : {8, 12, 16}) {
      const Query q = testing::MakeQuery(shape, n, 3);
      const JoinGraph graph(q);
      const Cardinality card(q);
      auto constraints = SliceConstraints::ForSlice(q, PlanShape::kLeftDeep, {0, 1}, false);
      ASSERT_TRUE(constraints.ok());
      CoutPolicy policy(card);
      policy.UseScatteredLayout();
      ChargedMemo memo(n);
      policy.Resize(memo.slot_count());
      SearchControl control;
      SearchStats stats;
      ASSERT_TRUE(
          RunConnectedLeftDeep(n, graph, card, *constraints, policy, memo, control, stats).ok());
      ASSERT_GT(stats.splits, 0u);
      EXPECT_LE(memo.words(), 3 * stats.splits + (uint64_t{1} << n))
          << testing::ShapeName(shape) << " n=" << n << " splits " << stats.splits;
    }
  }
}

}  // namespace
}  // namespace sliceplan
