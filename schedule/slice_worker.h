// What the coordinator's scheduler talks to: something that solves one
// slice at a time per concurrent slice, in this process (local_worker.h) or over RPC
// (coordinator/rpc_worker.h). Slices are deterministic and idempotent, so a
// slice may be run twice (a retry, a hedge) and either answer used.
#ifndef SLICEPLAN_SCHEDULE_SLICE_WORKER_H_
#define SLICEPLAN_SCHEDULE_SLICE_WORKER_H_

#include <algorithm>
#include <chrono>
#include <functional>
#include <memory>
#include <optional>
#include <string>
#include <string_view>

#include "absl/status/statusor.h"
#include "absl/strings/cord.h"
#include "core/model/query.h"
#include "core/model/wide_query.h"
#include "core/slice_solver.h"
#include "tiers/anytime_part.h"

namespace sliceplan {

struct SliceTask {
  const Query* query = nullptr;  // outlives the call
  SearchOptions options;
  SliceSpec slice;
  std::optional<std::chrono::steady_clock::time_point> deadline;
  std::string request_id;  // the request's, for log lines; may be empty
};

// One part of the anytime frontier search (tiers/anytime_part.h): the
// cluster model over a query of any size, until the deadline (the worker
// keeps a reserve before it to send its answer).
struct AnytimeTask {
  const WideQuery* query = nullptr;  // outlives the call
  SearchOptions options;
  AnytimePartSpec part;
  std::chrono::steady_clock::time_point deadline;
  std::string request_id;
  // In-process parts only: the part's set size and trees so far, at least
  // once a second (a remote part reports at its end only). May be empty.
  std::function<void(size_t plans, uint64_t trees)> on_progress;
};
using AnytimeDone = std::function<void(absl::StatusOr<AnytimeAnswer>)>;

// How long before its deadline a part stops searching, to build and send
// its answer: a tenth of the time it was given, at least 50 ms, plus
// 10 us per relation (a tree of 10,000 relations takes tens of ms to
// evaluate), at most half the time. (A twentieth and 20 ms lost a part
// to its deadline on two loaded cores under the sanitizers.)
std::chrono::steady_clock::duration AnytimeReserve(double seconds_given, int relations);

// One running slice (or anytime part). Destroying it waits for the work
// to end.
class SliceCall {
 public:
  virtual ~SliceCall() = default;
  // Asks the work to stop soon; `done` still runs (with CANCELLED, or with
  // the answer if it was already there).
  virtual void Cancel() = 0;
};

using SliceDone = std::function<void(absl::StatusOr<SliceResult>)>;

// Thread-safe.
class SliceWorker {
 public:
  virtual ~SliceWorker() = default;
  virtual std::string Name() const = 0;
  // Slices it solves at once.
  virtual int ConcurrentSlices() const { return 1; }
  // Threads the worker puts on one slice (sharing its memo).
  virtual int ThreadsPerSlice() const { return 1; }
  // False while health checks fail; the scheduler skips it.
  virtual bool Healthy() const { return true; }
  // Starts solving `task`; `done` runs exactly once, on any thread. The
  // returned call must not be destroyed from inside `done`.
  virtual std::unique_ptr<SliceCall> Start(const SliceTask& task, SliceDone done) = 0;
  // The same for an anytime part. The default answers UNIMPLEMENTED at
  // once (a worker that runs slices only).
  virtual std::unique_ptr<SliceCall> StartAnytime(const AnytimeTask& task, AnytimeDone done);
  // The scheduler's word that a slice this worker had started first was
  // answered by a hedge on another worker (this call was cancelled): a
  // worker that keeps losing so does not answer (rpc_worker.h demotes it).
  virtual void NoteLostToHedge() {}
};

// A server's refusal for lack of room (a worker's queue of waiting calls,
// the coordinator's requests waiting for a place): RESOURCE_EXHAUSTED
// marked busy. The scheduler runs a busy worker's slice on another worker;
// the refusal is not the worker's fault (a busy worker is a healthy one).
// Over RPC the mark travels as the trailing metadata kBusyKey, so clients
// can tell "retry later" from a request past a limit.
inline constexpr char kBusyKey[] = "sliceplan-busy";
inline absl::Status BusyError(const std::string& message) {
  absl::Status s = absl::ResourceExhaustedError(message);
  s.SetPayload(kBusyKey, absl::Cord("1"));
  return s;
}
inline bool IsBusy(const absl::Status& s) {
  return s.code() == absl::StatusCode::kResourceExhausted && s.GetPayload(kBusyKey);
}

// The threads per slice of the pool's slowest healthy worker (the fewest);
// 0 when no worker is healthy. Works on any range of worker pointers.
template <class Workers>
int FewestThreadsPerSlice(const Workers& workers) {
  int fewest = 0;
  for (const auto& w : workers) {
    if (!w->Healthy()) continue;
    fewest = fewest == 0 ? w->ThreadsPerSlice() : std::min(fewest, w->ThreadsPerSlice());
  }
  return fewest;
}

}  // namespace sliceplan

#endif  // SLICEPLAN_SCHEDULE_SLICE_WORKER_H_
