// The shared scheduling path with fake workers in one process: failures
// are re-dispatched, stragglers hedged, deadlines enforced, and the answer
// is still the optimum (docs/slicing.md, invariant 3).
#include "schedule/slice_scheduler.h"

#include <atomic>
#include <cmath>
#include <thread>

#include "gtest/gtest.h"
#include "schedule/local_worker.h"
#include "tests/support/reference_dp.h"
#include "tests/support/test_queries.h"

namespace sliceplan {
namespace {

using namespace std::chrono_literals;

// Finishes every call with `status` after `delay`, or CANCELLED when
// cancelled first (a hung or dying worker).
class FaultyWorker : public SliceWorker {
 public:
  FaultyWorker(std::string name, absl::Status status, std::chrono::milliseconds delay)
      : name_(std::move(name)), status_(std::move(status)), delay_(delay) {}
  std::string Name() const override { return name_; }
  std::unique_ptr<SliceCall> Start(const SliceTask&, SliceDone done) override {
    ++calls;
    return std::make_unique<Call>(status_, delay_, std::move(done));
  }
  std::atomic<int> calls{0};

 private:
  class Call : public SliceCall {
   public:
    Call(absl::Status status, std::chrono::milliseconds delay, SliceDone done)
        : thread_([this, status, delay, done = std::move(done)] {
            const auto end = std::chrono::steady_clock::now() + delay;
            while (!cancel_ && std::chrono::steady_clock::now() < end) {
              std::this_thread::sleep_for(1ms);
            }
            done(cancel_ ? absl::CancelledError("cancelled") : status);
          }) {}
    ~Call() override { thread_.join(); }
    void Cancel() override { cancel_ = true; }

   private:
    std::atomic<bool> cancel_{false};
    std::thread thread_;
  };
  std::string name_;
  absl::Status status_;
  std::chrono::milliseconds delay_;
};

// Answers every call with the true answer of an in-process worker,
// altered: its costs made up (a thousandth of the truth) or its plan
// dropped (a hostile or broken worker).
class LyingWorker : public SliceWorker {
 public:
  enum class Lie { kCosts, kNoPlan };
  LyingWorker(std::string name, Lie lie) : name_(std::move(name)), lie_(lie), inner_(name_) {}
  std::string Name() const override { return name_; }
  std::unique_ptr<SliceCall> Start(const SliceTask& task, SliceDone done) override {
    ++calls;
    return inner_.Start(task, [this, done = std::move(done)](absl::StatusOr<SliceResult> r) {
      if (r.ok() && r->plan) {
        if (lie_ == Lie::kNoPlan) {
          r->plan.reset();
        } else {
          for (PlanNode& node : r->plan->nodes) node.cost *= 1e-3;
        }
      }
      done(std::move(r));
    });
  }
  std::atomic<int> calls{0};

 private:
  std::string name_;
  Lie lie_;
  LocalWorker inner_;
};

// Its calls see their cancel only after `stall` (a search thread starved
// of CPU), then solve their slice for real from the task's query.
class StalledWorker : public SliceWorker {
 public:
  explicit StalledWorker(std::chrono::milliseconds stall) : stall_(stall) {}
  std::string Name() const override { return "stalled"; }
  std::unique_ptr<SliceCall> Start(const SliceTask& task, SliceDone done) override {
    ++calls;
    return std::make_unique<Call>(task, stall_, std::move(done), reported);
  }
  std::atomic<int> calls{0};
  std::atomic<int> reported{0};

 private:
  class Call : public SliceCall {
   public:
    Call(SliceTask task, std::chrono::milliseconds stall, SliceDone done,
         std::atomic<int>& reported)
        : thread_([task, stall, done = std::move(done), &reported] {
            std::this_thread::sleep_for(stall);
            SearchControl control;
            done(SolveSlice(*task.query, task.options, task.slice, control));
            ++reported;
          }) {}
    ~Call() override { thread_.join(); }
    void Cancel() override {}  // seen too late: the stall ends first

   private:
    std::thread thread_;
  };
  std::chrono::milliseconds stall_;
};

Query TestQuery() { return testing::MakeQuery(testing::GraphShape::kRandom, 10, 7); }

// From the independent subset DP, not from the engine under test.
double Optimum(const Query& q) { return testing::DpBestBushy(q, true); }

// The answer at the deadline does not wait for calls that are slow to see
// their cancel; they report later into the run they keep alive (its own
// copy of the query: the caller's is gone by then), and no progress is
// reported after the answer.
TEST(SliceSchedulerTest, TheDeadlineAnswerDoesNotWaitForStarvedCalls) {
  StalledWorker stalled(1500ms);
  SliceWorker* workers[] = {&stalled};
  std::atomic<bool> answered{false};
  std::atomic<int> late_progress{0};
  ScheduleOptions schedule;
  schedule.deadline = std::chrono::steady_clock::now() + 200ms;
  schedule.on_progress = [&](const ScheduleProgress&) { late_progress += answered ? 1 : 0; };
  const auto start = std::chrono::steady_clock::now();
  absl::StatusOr<ScheduleOutcome> out;
  {
    const Query q = TestQuery();
    out = RunSlices(q, {}, 2, workers, schedule);
  }
  answered = true;
  EXPECT_TRUE(absl::IsDeadlineExceeded(out.status())) << out.status();
  EXPECT_LT(std::chrono::steady_clock::now() - start, 500ms);
  for (int i = 0; i < 500 && stalled.reported < stalled.calls; ++i) {
    std::this_thread::sleep_for(10ms);
  }
  EXPECT_EQ(stalled.reported, stalled.calls);
  EXPECT_GE(stalled.calls, 1);
  EXPECT_EQ(late_progress, 0);
  std::this_thread::sleep_for(50ms);  // the reaper lets the calls go
}

TEST(SliceSchedulerTest, FailedWorkerSlicesAreRedispatched) {
  const Query q = TestQuery();
  FaultyWorker broken("broken", absl::UnavailableError("connection reset"), 0ms);
  LocalWorker good("good");
  SliceWorker* workers[] = {&broken, &good};
  auto out = RunSlices(q, {}, 8, workers, {});
  ASSERT_TRUE(out.ok()) << out.status();
  EXPECT_NEAR(out->result.plan.root().cost, Optimum(q), 1e-12 * Optimum(q));
  EXPECT_GE(out->retries, 1u);
  EXPECT_EQ(broken.calls, 1);  // not used again after its failure
  EXPECT_TRUE(out->proven_optimal);
  EXPECT_EQ(out->result.slices.size(), 8u);
}

TEST(SliceSchedulerTest, AWorkersMadeUpAnswerIsCheckedAndRedispatched) {
  const Query q = TestQuery();
  for (LyingWorker::Lie lie : {LyingWorker::Lie::kCosts, LyingWorker::Lie::kNoPlan}) {
    LyingWorker liar("liar", lie);
    LocalWorker good("good");
    SliceWorker* workers[] = {&liar, &good};
    auto out = RunSlices(q, {}, 8, workers, {});
    ASSERT_TRUE(out.ok()) << out.status();
    // The optimum, not the liar's cheaper figure, and proven.
    EXPECT_NEAR(out->result.plan.root().cost, Optimum(q), 1e-12 * Optimum(q));
    EXPECT_TRUE(out->proven_optimal);
    EXPECT_GE(out->retries, 1u);
    EXPECT_EQ(liar.calls, 1);  // a fault: not used again
  }
}

TEST(SliceSchedulerTest, AllWorkersDownIsUnavailableNamingThem) {
  const Query q = TestQuery();
  FaultyWorker a("worker-a", absl::UnavailableError("connection refused"), 0ms);
  FaultyWorker b("worker-b", absl::UnavailableError("socket closed"), 5ms);
  SliceWorker* workers[] = {&a, &b};
  auto out = RunSlices(q, {}, 4, workers, {});
  ASSERT_FALSE(out.ok());
  EXPECT_EQ(out.status().code(), absl::StatusCode::kUnavailable);
  EXPECT_NE(out.status().message().find("worker-a: connection refused"), std::string::npos)
      << out.status();
  EXPECT_NE(out.status().message().find("worker-b: socket closed"), std::string::npos);
}

TEST(SliceSchedulerTest, NoWorkersIsUnavailable) {
  const Query q = TestQuery();
  auto out = RunSlices(q, {}, 2, {}, {});
  EXPECT_EQ(out.status().code(), absl::StatusCode::kUnavailable);
}

TEST(SliceSchedulerTest, StragglerIsHedgedAndTheAnswerArrives) {
  const Query q = TestQuery();
  FaultyWorker hung("hung", absl::InternalError("never"), 60000ms);
  LocalWorker good("good");
  SliceWorker* workers[] = {&hung, &good};
  ScheduleOptions schedule;
  schedule.hedge_after = 20ms;
  const auto start = std::chrono::steady_clock::now();
  auto out = RunSlices(q, {}, 4, workers, schedule);
  ASSERT_TRUE(out.ok()) << out.status();
  EXPECT_LT(std::chrono::steady_clock::now() - start, 10s);
  EXPECT_GE(out->hedges, 1u);
  EXPECT_NEAR(out->result.plan.root().cost, Optimum(q), 1e-12 * Optimum(q));
  for (const std::string& w : out->slice_workers) EXPECT_EQ(w, "good");
}

TEST(SliceSchedulerTest, DeadlineGivesPartialAnswerWhenAsked) {
  const Query q = TestQuery();
  FaultyWorker hung("hung", absl::InternalError("never"), 60000ms);
  LocalWorker good("good");
  SliceWorker* workers[] = {&hung, &good};
  ScheduleOptions schedule;
  schedule.deadline =
      std::chrono::steady_clock::now() + 1000ms;  // three small slices need milliseconds
  schedule.partial_on_deadline = true;
  auto out = RunSlices(q, {}, 4, workers, schedule);
  ASSERT_TRUE(out.ok()) << out.status();
  EXPECT_FALSE(out->proven_optimal);
  EXPECT_DOUBLE_EQ(out->coverage, 0.75);  // the hung worker held one slice
  // Exactly the best of the slices solved, each solved here on its own.
  ASSERT_EQ(out->result.slices.size(), 3u);
  double best = INFINITY;
  for (const SliceResult& solved : out->result.slices) {
    SearchControl control;
    auto alone = SolveSlice(q, {}, solved.slice, control);
    ASSERT_TRUE(alone.ok() && alone->plan);
    best = std::min(best, alone->plan->root().cost);
  }
  EXPECT_EQ(out->result.plan.root().cost, best);
  EXPECT_GE(best, Optimum(q) * (1 - 1e-12));
}

TEST(SliceSchedulerTest, DeadlineExceededWhenNoPartialAnswerIsWanted) {
  const Query q = TestQuery();
  FaultyWorker hung("hung", absl::InternalError("never"), 60000ms);
  SliceWorker* workers[] = {&hung};
  ScheduleOptions schedule;
  schedule.deadline = std::chrono::steady_clock::now() + 100ms;
  const auto start = std::chrono::steady_clock::now();
  auto out = RunSlices(q, {}, 2, workers, schedule);
  EXPECT_LT(std::chrono::steady_clock::now() - start, 5s);
  ASSERT_FALSE(out.ok());
  EXPECT_EQ(out.status().code(), absl::StatusCode::kDeadlineExceeded);
  EXPECT_NE(out.status().message().find("0 of 2 slices solved"), std::string::npos);
}

TEST(SliceSchedulerTest, ErrorThatRerunsReproduceEndsTheRun) {
  const Query q = testing::MakeQuery(testing::GraphShape::kChain, 22, 1);
  LocalWorker a("a"), b("b");
  SliceWorker* workers[] = {&a, &b};
  SearchOptions options;
  options.memo_limit_bytes = 1 << 20;
  auto out = RunSlices(q, options, 2, workers, {});
  EXPECT_EQ(out.status().code(), absl::StatusCode::kResourceExhausted);
}

// A slice whose attempts bring workers down is sent to two, never a third.
TEST(SliceSchedulerTest, PoisonSliceEndsTheRunAfterTwoWorkers) {
  const Query q = TestQuery();
  FaultyWorker a("a", absl::UnavailableError("socket closed"), 5ms);
  FaultyWorker b("b", absl::UnavailableError("socket closed"), 5ms);
  FaultyWorker c("c", absl::UnavailableError("socket closed"), 5ms);
  SliceWorker* workers[] = {&a, &b, &c};
  auto out = RunSlices(q, {}, 1, workers, {});
  ASSERT_FALSE(out.ok());
  EXPECT_EQ(out.status().code(), absl::StatusCode::kInternal);
  EXPECT_NE(out.status().message().find("slice 0 of 1 failed on 2 workers (a: socket closed; "
                                        "b: socket closed)"),
            std::string::npos)
      << out.status();
  EXPECT_EQ(a.calls + b.calls + c.calls, 2);
}

// Busy workers (their queue full) are no fault and no poison: the slice
// runs elsewhere; with every worker busy the run is UNAVAILABLE, saying
// busy, never INTERNAL.
TEST(SliceSchedulerTest, ABusyWorkersRefusalRunsTheSliceElsewhere) {
  const Query q = TestQuery();
  const absl::Status busy = BusyError("worker busy: 1 slices running and 2 waiting");
  EXPECT_TRUE(IsRetryable(busy));
  EXPECT_FALSE(IsWorkerFault(busy));
  FaultyWorker a("a", busy, 1ms), b("b", busy, 1ms);
  LocalWorker good("good");
  SliceWorker* some[] = {&a, &b, &good};
  auto out = RunSlices(q, {}, 1, some, {});
  ASSERT_TRUE(out.ok()) << out.status();
  EXPECT_NEAR(out->result.plan.root().cost, Optimum(q), 1e-12 * Optimum(q));
  FaultyWorker c("c", busy, 1ms), d("d", busy, 1ms);
  SliceWorker* all_busy[] = {&c, &d};
  auto none = RunSlices(q, {}, 1, all_busy, {});
  ASSERT_FALSE(none.ok());
  EXPECT_EQ(none.status().code(), absl::StatusCode::kUnavailable) << none.status();
  EXPECT_NE(none.status().message().find("busy"), std::string::npos) << none.status();
}

TEST(SliceSchedulerTest, CallerCancelStopsEveryCall) {
  const Query q = TestQuery();
  FaultyWorker a("a", absl::InternalError("never"), 60000ms);
  FaultyWorker b("b", absl::InternalError("never"), 60000ms);
  SliceWorker* workers[] = {&a, &b};
  ScheduleOptions schedule;
  const auto start = std::chrono::steady_clock::now();
  schedule.cancelled = [&] { return std::chrono::steady_clock::now() - start > 100ms; };
  auto out = RunSlices(q, {}, 4, workers, schedule);
  EXPECT_LT(std::chrono::steady_clock::now() - start, 1s);
  ASSERT_FALSE(out.ok());
  EXPECT_EQ(out.status().code(), absl::StatusCode::kCancelled);
  EXPECT_NE(out.status().message().find("0 of 4 slices solved"), std::string::npos);
}

// 22 relations at P = 2: (3^19 21 - 2 2^19 7 + 1) / 2 = 1.22e10 splits a
// slice, 3 s even at 0.25 ns each: a 50 ms deadline is hopeless.
TEST(SliceSchedulerTest, HopelessDeadlineIsRefusedUpFront) {
  const Query q = testing::MakeQuery(testing::GraphShape::kChain, 22, 1);
  LocalWorker a("a");
  SliceWorker* workers[] = {&a};
  ScheduleOptions schedule;
  schedule.deadline = std::chrono::steady_clock::now() + 50ms;
  auto out = RunSlices(q, {}, 2, workers, schedule);
  ASSERT_FALSE(out.ok());
  EXPECT_EQ(out.status().code(), absl::StatusCode::kDeadlineExceeded);
  EXPECT_NE(out.status().message().find("refused up front: 2 slices of 1.22e+10 splits"),
            std::string::npos)
      << out.status();
}

TEST(SliceSchedulerTest, OnlyAWorkersOwnFaultsCountAgainstIt) {
  for (auto code : {absl::StatusCode::kUnavailable, absl::StatusCode::kInternal,
                    absl::StatusCode::kUnknown, absl::StatusCode::kDataLoss}) {
    EXPECT_TRUE(IsWorkerFault(absl::Status(code, "x"))) << code;
  }
  for (auto code : {absl::StatusCode::kInvalidArgument, absl::StatusCode::kResourceExhausted,
                    absl::StatusCode::kOutOfRange, absl::StatusCode::kDeadlineExceeded,
                    absl::StatusCode::kCancelled, absl::StatusCode::kNotFound}) {
    EXPECT_FALSE(IsWorkerFault(absl::Status(code, "x"))) << code;
  }
}

TEST(SliceSchedulerTest, ProgressIsReportedOncePerSlice) {
  const Query q = TestQuery();
  LocalWorker a("a"), b("b");
  SliceWorker* workers[] = {&a, &b};
  std::atomic<int> reports{0};
  std::atomic<uint32_t> last{0};
  ScheduleOptions schedule;
  schedule.on_progress = [&](const ScheduleProgress& p) {
    ++reports;
    last = std::max<uint32_t>(last, p.slices_done);
    EXPECT_EQ(p.slice_count, 8u);
    EXPECT_TRUE(p.best_cost.has_value());
  };
  auto out = RunSlices(q, {}, 8, workers, schedule);
  ASSERT_TRUE(out.ok());
  EXPECT_EQ(reports, 8);
  EXPECT_EQ(last, 8u);
  EXPECT_EQ(out->workers_used, 2u);
}

}  // namespace
}  // namespace sliceplan
