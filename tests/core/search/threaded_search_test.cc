// One slice solved by several threads sharing its memo (level_threads.h):
// the same optimum, the same plan count and the same number of splits as
// one thread, for every graph shape, slice count and 1 to 4 threads (more
// threads than this machine's cores on purpose).
#include <cmath>
#include <string>

#include "core/slice_solver.h"
#include "gtest/gtest.h"
#include "tests/support/test_queries.h"

namespace sliceplan {
namespace {

using testing::GraphShape;

SearchOptions Options(bool cross, int threads) {
  SearchOptions o{PlanShape::kBushy, cross, CostModelKind::kCout};
  o.threads = threads;
  return o;
}

TEST(ThreadedSearchTest, SameAnswerOnAnyNumberOfThreads) {
  for (GraphShape graph : {GraphShape::kChain, GraphShape::kStar, GraphShape::kClique,
                           GraphShape::kRandom, GraphShape::kHyper}) {
    for (bool cross : {true, false}) {
      const Query q = testing::MakeQuery(graph, 15, 2);
      for (uint32_t p : {1u, 2u, 8u}) {
        for (uint32_t i = 0; i < p; i += 3) {
          SearchControl control;
          auto one = SolveSlice(q, Options(cross, 1), {i, p}, control);
          auto one_count = CountSlicePlans(q, Options(cross, 1), {i, p});
          ASSERT_TRUE(one.ok() && one_count.ok());
          for (int threads : {2, 3, 4}) {
            SCOPED_TRACE(testing::ShapeName(graph) + (cross ? " cross" : " connected") +
                         " P=" + std::to_string(p) + " i=" + std::to_string(i) +
                         " threads=" + std::to_string(threads));
            auto many = SolveSlice(q, Options(cross, threads), {i, p}, control);
            ASSERT_TRUE(many.ok()) << many.status();
            ASSERT_EQ(one->plan.has_value(), many->plan.has_value());
            if (one->plan) {
              EXPECT_EQ(one->plan->root().cost, many->plan->root().cost);
            }
            EXPECT_EQ(one->stats.splits, many->stats.splits);
            EXPECT_EQ(one->stats.memo_entries, many->stats.memo_entries);
            auto count = CountSlicePlans(q, Options(cross, threads), {i, p});
            ASSERT_TRUE(count.ok());
            EXPECT_EQ(one_count->plans, count->plans);
          }
        }
      }
    }
  }
}

TEST(ThreadedSearchTest, ThreadCountIsValidated) {
  SearchControl control;
  const Query q = testing::MakeQuery(GraphShape::kChain, 5, 1);
  for (int bad : {0, -1, kMaxSearchThreads + 1}) {
    auto r = SolveSlice(q, Options(true, bad), {0, 1}, control);
    ASSERT_FALSE(r.ok());
    EXPECT_EQ(r.status().code(), absl::StatusCode::kInvalidArgument);
    EXPECT_NE(r.status().message().find("threads"), std::string::npos) << r.status();
  }
}

// Seconds SolveSlice takes on `q` with three threads and a deadline
// `after` from the call; the call must fail with DEADLINE_EXCEEDED.
double SecondsToStop(const Query& q, std::chrono::milliseconds after) {
  const auto start = SearchControl::Clock::now();
  SearchControl control(nullptr, start + after);
  auto r = SolveSlice(q, Options(true, 3), {0, 1}, control);
  EXPECT_FALSE(r.ok());
  EXPECT_EQ(r.status().code(), absl::StatusCode::kDeadlineExceeded) << r.status();
  return std::chrono::duration<double>(SearchControl::Clock::now() - start).count();
}

TEST(ThreadedSearchTest, ADeadlineStopsEveryThread) {
  // 20 relations with cross products: about 1.6 s on one thread here. The
  // call returns only once every thread has stopped (they are joined), so
  // a deadline 50 ms in must end it well within 100 ms of the time an
  // already-passed deadline takes (memo set-up and the first level), which
  // is measured first: sanitizer builds are many times slower at both.
  const Query q = testing::MakeQuery(GraphShape::kRandom, 20, 1);
  const double setup = SecondsToStop(q, std::chrono::milliseconds(0));
  const double stopped = SecondsToStop(q, std::chrono::milliseconds(50));
  EXPECT_LT(stopped, setup + 0.05 + 0.1) << "set-up alone " << setup;
}

}  // namespace
}  // namespace sliceplan
