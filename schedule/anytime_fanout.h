// The anytime frontier search across the pool (tiers/anytime_part.h): one
// part per concurrent slice of each healthy worker, every part with its
// own seeds and no cross-talk, all until the same deadline; each answer
// is checked (CheckAnytimeAnswer: a faulty worker's set is dropped, never
// merged) and the plans of the answers are pooled for the caller's
// dominance filter. Thread-safe: one call per request, any number at once.
#ifndef SLICEPLAN_SCHEDULE_ANYTIME_FANOUT_H_
#define SLICEPLAN_SCHEDULE_ANYTIME_FANOUT_H_

#include <chrono>
#include <functional>
#include <span>
#include <string>
#include <vector>

#include "absl/status/statusor.h"
#include "core/model/wide_query.h"
#include "core/search_options.h"
#include "schedule/slice_worker.h"
#include "tiers/wide_plan.h"

namespace sliceplan {

struct AnytimeFanoutRequest {
  const WideQuery* query = nullptr;
  SearchOptions options;
  std::chrono::steady_clock::time_point deadline;  // the parts' (their reserve inside it)
  std::function<bool()> cancelled;                 // polled; may be empty
  // Once a second while the parts run: the plans in the parts' sets so
  // far (before the merge; a remote part's count arrives with its answer)
  // and the trees they evaluated. May be empty.
  std::function<void(uint64_t plans, uint64_t trees)> on_progress;
  std::string request_id;
};

struct AnytimeFanout {
  std::vector<WidePlan> plans;  // every answered part's set, pooled (not filtered)
  uint64_t trees = 0;
  uint32_t parts = 0;     // started
  uint32_t answered = 0;  // whose set was checked and pooled
  std::string failure;    // the first part's error, if any part failed
};

// FAILED_PRECONDITION when no worker is healthy; CANCELLED when the
// caller cancelled. Parts that fail (a worker fault, a bad answer, a
// worker that runs no anytime parts) leave the others' sets standing.
absl::StatusOr<AnytimeFanout> RunAnytimeFanout(const AnytimeFanoutRequest& request,
                                               std::span<SliceWorker* const> workers);

}  // namespace sliceplan

#endif  // SLICEPLAN_SCHEDULE_ANYTIME_FANOUT_H_
