// The tiers run on a thread of their own, and the caller is answered by
// the run's deadline whatever CPU that thread gets (docs/operations.md,
// "Deadlines under load"). The coordinator's in-process tiers (greedy,
// linear, the forecast, idp's glue) run on the machine's cores like any
// other work: on a saturated node a handler thread that runs them itself
// answers as late as it is scheduled. Here the caller only waits, a timed
// wait that needs a moment of CPU when it ends.
//
// At the deadline (plus `slack`, so a run that is merely finishing gets
// to finish) the run is cancelled and the caller gets the best plan the
// run posted so far (schedule/incumbent_board.h), marked unproven with a
// reason that says so; with none posted yet (a forced exact or cluster
// search, or greedy itself starved), DEADLINE_EXCEEDED. The run's thread
// keeps its own copies of everything it reads and reports nothing once the
// caller has its answer. A caller that goes away cancels the run.
//
// Thread-safe; the destructor cancels the runs still going and joins
// their threads.
#ifndef SLICEPLAN_SCHEDULE_TIMED_TIERS_H_
#define SLICEPLAN_SCHEDULE_TIMED_TIERS_H_

#include <chrono>
#include <functional>
#include <memory>
#include <thread>
#include <vector>

#include "absl/base/thread_annotations.h"
#include "absl/status/statusor.h"
#include "absl/synchronization/mutex.h"
#include "core/model/wide_query.h"
#include "schedule/slice_worker.h"
#include "schedule/tiered_search.h"

namespace sliceplan {

// What one run reads, owned by the run. `schedule.cancelled` and
// `schedule.on_progress` are the caller's: the runner calls the first
// from the waiting thread only and the second only until the caller has
// its answer.
struct TimedTierInputs {
  WideQuery query;
  SearchOptions options;
  TierRequest request;  // its board is the run's own
  std::vector<std::shared_ptr<SliceWorker>> workers;
  ScheduleOptions schedule;
  // Held until the run itself ends, not the wait (the coordinator's
  // admission place: a run cut off still counts until it stops).
  std::shared_ptr<void> hold;
};

inline constexpr std::chrono::milliseconds kTimedTierSlack{50};

class TimedTiers {
 public:
  explicit TimedTiers(std::chrono::steady_clock::duration slack = kTimedTierSlack);
  ~TimedTiers();
  TimedTiers(const TimedTiers&) = delete;
  TimedTiers& operator=(const TimedTiers&) = delete;

  // RunTiers on `in`, answered by in.schedule.deadline + slack (no
  // deadline: when the run ends). RESOURCE_EXHAUSTED when no thread can
  // be started. `work` replaces RunTiers (tests); it
  // must post to request.board and poll schedule.cancelled as RunTiers
  // does.
  using Work = std::function<absl::StatusOr<TieredOutcome>(const TimedTierInputs&,
                                                           std::span<SliceWorker* const>)>;
  absl::StatusOr<TieredOutcome> Run(TimedTierInputs in, Work work = nullptr)
      ABSL_LOCKS_EXCLUDED(mu_);

 private:
  struct Flight;
  // The run's outcome, the caller's cancel or the deadline's answer.
  absl::StatusOr<TieredOutcome> Wait(Flight& f, std::chrono::steady_clock::time_point start) const;
  // Joins the threads whose runs have ended.
  void Reap() ABSL_EXCLUSIVE_LOCKS_REQUIRED(mu_);

  const std::chrono::steady_clock::duration slack_;
  absl::Mutex mu_;
  std::vector<std::pair<std::shared_ptr<Flight>, std::thread>> flights_ ABSL_GUARDED_BY(mu_);
};

}  // namespace sliceplan

#endif  // SLICEPLAN_SCHEDULE_TIMED_TIERS_H_
