// The tiers answered by the deadline (schedule/timed_tiers.h): a run that
// ends in time is its own answer; one that does not (its thread starved,
// played here by a run that ignores its cancel for a while) is answered
// at the deadline with the best plan it posted, or DEADLINE_EXCEEDED; it
// is cancelled, and nothing it reports later reaches the caller.
#include "schedule/timed_tiers.h"

#include <atomic>
#include <chrono>
#include <memory>
#include <thread>

#include "gtest/gtest.h"
#include "schedule/local_worker.h"
#include "tests/support/reference_dp.h"
#include "tests/support/test_queries.h"
#include "tiers/greedy.h"

namespace sliceplan {
namespace {

using Clock = std::chrono::steady_clock;
using namespace std::chrono_literals;

const Query& Exact() {
  static const Query q = testing::MakeQuery(testing::GraphShape::kRandom, 10, 7);
  return q;
}

TimedTierInputs Inputs(Clock::duration deadline_in) {
  TimedTierInputs in{WideQuery::FromExact(Exact()),
                     SearchOptions{},
                     TierRequest{},
                     {std::make_shared<LocalWorker>("local")},
                     ScheduleOptions{}};
  in.schedule.deadline = Clock::now() + deadline_in;
  return in;
}

double SecondsSince(Clock::time_point t) {
  return std::chrono::duration<double>(Clock::now() - t).count();
}

// Sleeps `d`, as a starved thread stands still: unaware of its cancel
// until it runs again.
void Starve(Clock::duration d) { std::this_thread::sleep_for(d); }

TEST(TimedTiersTest, ARunThatEndsInTimeIsItsOwnAnswer) {
  TimedTiers tiers;
  TimedTierInputs in = Inputs(10s);
  in.request.tier = SearchTier::kExact;
  auto out = tiers.Run(std::move(in));
  ASSERT_TRUE(out.ok()) << out.status();
  EXPECT_TRUE(out->proven_optimal);
  EXPECT_EQ(out->tier, SearchTier::kExact);
  EXPECT_NEAR(out->plan.cost(), testing::DpBestBushy(Exact(), true), 1e-9 * out->plan.cost());
}

TEST(TimedTiersTest, AutoPostsItsPlansAndTheBoardEndsOnItsAnswer) {
  TimedTiers tiers;
  std::atomic<double> board_best{0};
  auto out = tiers.Run(Inputs(10s), [&](const TimedTierInputs& in, auto workers) {
    auto r = RunTiers(in.query, in.options, in.request, workers, in.schedule);
    board_best = in.request.board->Best()->plan.cost();
    return r;
  });
  ASSERT_TRUE(out.ok()) << out.status();
  EXPECT_TRUE(out->proven_optimal);
  // The board holds the cheapest plan posted: the run's answer.
  EXPECT_DOUBLE_EQ(board_best.load(), out->plan.cost());
}

TEST(TimedTiersTest, AStarvedRunIsAnsweredAtTheDeadlineWithItsIncumbent) {
  TimedTiers tiers(50ms);
  auto saw_cancel = std::make_shared<std::atomic<bool>>(false);
  const double greedy = GreedyPlan(WideQuery::FromExact(Exact()), PlanShape::kBushy).cost();
  const auto start = Clock::now();
  auto out = tiers.Run(Inputs(200ms), [&, saw_cancel](const TimedTierInputs& in, auto) {
    in.request.board->Post({GreedyPlan(in.query, PlanShape::kBushy), SearchTier::kGreedy, 0});
    Starve(1500ms);
    *saw_cancel = in.schedule.cancelled();
    return absl::StatusOr<TieredOutcome>(absl::InternalError("too late to be read"));
  });
  const double waited = SecondsSince(start);
  ASSERT_TRUE(out.ok()) << out.status();
  EXPECT_GE(waited, 0.25);
  EXPECT_LT(waited, 0.9);  // not the 1.5 s the run takes
  EXPECT_EQ(out->tier, SearchTier::kGreedy);
  EXPECT_FALSE(out->proven_optimal);
  EXPECT_DOUBLE_EQ(out->plan.cost(), greedy);
  EXPECT_NE(out->reason.find("deadline passed"), std::string::npos) << out->reason;
  std::this_thread::sleep_for(1500ms);
  EXPECT_TRUE(*saw_cancel);  // the run was told to stop
}

TEST(TimedTiersTest, AStarvedRunWithNoPlanYetIsDeadlineExceeded) {
  TimedTiers tiers(50ms);
  const auto start = Clock::now();
  auto out = tiers.Run(Inputs(200ms), [](const TimedTierInputs&, auto) {
    Starve(1s);
    return absl::StatusOr<TieredOutcome>(absl::InternalError("too late to be read"));
  });
  EXPECT_TRUE(absl::IsDeadlineExceeded(out.status())) << out.status();
  EXPECT_LT(SecondsSince(start), 0.7);
}

TEST(TimedTiersTest, NoProgressReachesTheCallerAfterItsAnswer) {
  auto calls = std::make_shared<std::atomic<int>>(0);
  {
    TimedTiers tiers(20ms);
    TimedTierInputs in = Inputs(100ms);
    in.schedule.on_progress = [calls](const ScheduleProgress&) { ++*calls; };
    auto out = tiers.Run(std::move(in), [](const TimedTierInputs& own, auto) {
      own.schedule.on_progress(ScheduleProgress{});  // before the deadline: delivered
      Starve(400ms);
      own.schedule.on_progress(ScheduleProgress{});  // after the answer: dropped
      return absl::StatusOr<TieredOutcome>(absl::InternalError("too late to be read"));
    });
    EXPECT_TRUE(absl::IsDeadlineExceeded(out.status())) << out.status();
  }  // the destructor joins the run
  EXPECT_EQ(calls->load(), 1);
}

TEST(TimedTiersTest, ACallerWhoGoesAwayCancelsTheRun) {
  TimedTiers tiers;
  TimedTierInputs in = Inputs(10s);
  const auto start = Clock::now();
  in.schedule.cancelled = [start] { return Clock::now() - start > 100ms; };
  auto saw_cancel = std::make_shared<std::atomic<bool>>(false);
  auto out = tiers.Run(std::move(in), [saw_cancel](const TimedTierInputs& own, auto) {
    while (!own.schedule.cancelled()) std::this_thread::sleep_for(5ms);
    *saw_cancel = true;
    return absl::StatusOr<TieredOutcome>(absl::CancelledError("cancelled"));
  });
  EXPECT_TRUE(absl::IsCancelled(out.status())) << out.status();
  EXPECT_LT(SecondsSince(start), 1.0);
  std::this_thread::sleep_for(100ms);
  EXPECT_TRUE(*saw_cancel);
}

}  // namespace
}  // namespace sliceplan
