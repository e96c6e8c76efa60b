// The coordinator's scheduling and merging path, shared by the embedded
// mode and the RPC coordinator: queue the P slices, hand the next one to
// whichever worker has a slice free, re-dispatch a slice whose worker fails,
// hedge a straggler with a second copy, enforce the deadline, merge.
//
// Invariants:
//   1. a slice is merged at most once: the first answer wins, the other
//      copies are cancelled;
//   2. a worker whose call failed is not used again in the same run;
//   3. an error that re-running cannot change (bad input, memo limit) ends
//      the run at once with that error;
//   4. every call started is finished (its `done` ran) and destroyed
//      before Run returns;
//   5. a slice whose attempts failed with a worker fault on
//      kPoisonWorkers workers is not sent anywhere else: the run ends with
//      INTERNAL naming the slice (a slice that crashes its worker would
//      otherwise take the whole pool down, one worker after the other);
//   6. a caller's cancel (ScheduleOptions::cancelled) is seen within
//      kCancelPoll and cancels every running call.
// Thread-safe: one Run per call, any number at once.
#ifndef SLICEPLAN_SCHEDULE_SLICE_SCHEDULER_H_
#define SLICEPLAN_SCHEDULE_SLICE_SCHEDULER_H_

#include <chrono>
#include <functional>
#include <optional>
#include <span>
#include <string>
#include <vector>

#include "absl/status/statusor.h"
#include "core/merge.h"
#include "schedule/slice_worker.h"

namespace sliceplan {

struct ScheduleProgress {
  uint32_t slices_done = 0;
  uint32_t slice_count = 0;
  std::optional<double> best_cost;  // of the slices done so far
  double elapsed_seconds = 0;
  // The cluster model's anytime search (no slices): the plans in its set
  // so far, and the trees it has evaluated.
  std::optional<uint64_t> frontier_plans;
  uint64_t trees = 0;
};

struct ScheduleOptions {
  // Start a second copy of a slice that has run this long while a worker has a slice
  // free and no slice waits; none: never hedge.
  std::optional<std::chrono::steady_clock::duration> hedge_after;
  std::optional<std::chrono::steady_clock::time_point> deadline;
  // At the deadline: the best plan so far (true) or DEADLINE_EXCEEDED.
  bool partial_on_deadline = false;
  int max_attempts_per_slice = 3;
  // Called (without locks held) after every slice that completes.
  std::function<void(const ScheduleProgress&)> on_progress;
  // Polled every kCancelPoll; true ends the run with CANCELLED (the
  // caller went away or cancelled). Empty: never cancelled.
  std::function<bool()> cancelled;
  // Carried to every slice call (SliceTask::request_id) for the workers'
  // log lines; empty: none.
  std::string request_id;
};

inline constexpr int kPoisonWorkers = 2;
// Faster than any machine costs a split (1.0 ns is this engine's best
// measured; a rule of thumb of our own, a factor 4 below it): a run whose
// splits at this rate cannot finish by the deadline is refused up front.
inline constexpr double kFastestSplitSeconds = 0.25e-9;
inline constexpr std::chrono::milliseconds kCancelPoll{20};

struct ScheduleOutcome {
  OptimizeResult result;
  bool proven_optimal = true;              // every slice solved
  double coverage = 1;                     // fraction of slices solved
  uint32_t retries = 0;                    // re-dispatches after a failed call
  uint32_t hedges = 0;                     // second copies started
  uint32_t workers_used = 0;               // workers that solved at least one slice
  std::vector<std::string> slice_workers;  // by result.slices position
};

// Solves slices 0..slice_count-1 of `query` on `workers` and merges them.
// Errors: ValidateSlice's; DEADLINE_EXCEEDED up front, with the numbers,
// when the cross-product search could not finish by the deadline even at
// kFastestSplitSeconds per split (unless partial_on_deadline); UNAVAILABLE naming each worker's
// last error when no usable worker is left; DEADLINE_EXCEEDED with the coverage when the deadline
// passes (unless partial_on_deadline and some slice has a plan); a slice's own error when
// re-running cannot change it.
absl::StatusOr<ScheduleOutcome> RunSlices(const Query& query, const SearchOptions& options,
                                          uint32_t slice_count,
                                          std::span<SliceWorker* const> workers,
                                          const ScheduleOptions& schedule);

// True for errors a re-run on another worker can fix (lost or failing
// workers); false for those every run reproduces.
bool IsRetryable(const absl::Status& status);

// True for errors that are the worker's own fault (it died, broke or sent
// garbage), which count against the worker and toward a poison slice;
// false for the request's own errors (bad input, memo limit, deadline,
// cancel), which say nothing about the worker.
bool IsWorkerFault(const absl::Status& status);

}  // namespace sliceplan

#endif  // SLICEPLAN_SCHEDULE_SLICE_SCHEDULER_H_
