// The worker's gRPC service: solves one slice per call with the core
// engine, or runs one part of the cluster model's anytime search (its
// `anytime` field; tiers/anytime_part.h) until the call's deadline less
// a reserve, and keeps no state between calls. Honours the call's deadline and
// cancellation inside the DP loop; refuses a slice over its memo limit with
// RESOURCE_EXHAUSTED. At most `concurrent_slices` slices run at once, each
// on `threads_per_slice` threads; at most `max_queued_slices` further
// calls wait for a slot (while their deadline allows), and calls past
// those are refused before their request is read off the connection
// (RESOURCE_EXHAUSTED with the busy mark of schedule/slice_worker.h). An
// admitted call reads its request (onto an arena, within
// kRequestReadLimit) and checks it before it waits, so the memory queued
// calls hold is bounded by the queue times the request size limit
// (docs/operations.md, "Overload, hangs and slow clients"). One log line
// and one metrics record per call, with the coordinator's request id
// (x-request-id). Thread-safe.
#ifndef SLICEPLAN_WORKER_WORKER_SERVICE_H_
#define SLICEPLAN_WORKER_WORKER_SERVICE_H_

#include <chrono>
#include <cstdint>
#include <memory>
#include <optional>
#include <vector>

#include "absl/base/thread_annotations.h"
#include "absl/synchronization/mutex.h"
#include "core/model/input_limits.h"
#include "core/model/wide_query.h"
#include "core/slice_solver.h"
#include "sliceplan.grpc.pb.h"
#include "tiers/anytime_part.h"
#include "worker/worker_metrics.h"

namespace sliceplan {

// How long an admitted call may take to send its request: past it the
// call is ended (DEADLINE_EXCEEDED) and its place in the queue freed.
inline constexpr std::chrono::seconds kRequestReadLimit{10};
// An anytime part's answer is thinned to at most about this many bytes
// over its number of parts, at least 1 MiB (the coordinator receives up
// to 64 MiB from a worker, all parts at about the same moment).
inline constexpr uint64_t kAnytimeReplyBytes = uint64_t{32} << 20;

struct WorkerConfig {
  int concurrent_slices = 1;   // slices solved at once
  int threads_per_slice = 1;   // threads sharing one slice's memo
  int max_queued_slices = 16;  // calls waiting for a slot; more are refused
  uint64_t memo_limit_bytes = uint64_t{8} << 30;
  InputLimits limits;
  // Test-only fault: every call first sleeps this long (cancellable), so
  // tests can make a worker hang.
  double test_hang_seconds = 0;
  // Test-only fault: the process aborts when asked for this slice index
  // (a slice that crashes its worker); negative: never.
  int64_t test_crash_slice = -1;
};

// SolveSlice is a streamed unary method: the handler runs before the
// request is read, so admission comes first.
class WorkerService final
    : public v1::SliceWorker::WithStreamedUnaryMethod_SolveSlice<v1::SliceWorker::Service> {
 public:
  explicit WorkerService(const WorkerConfig& config);

  // What the metrics endpoint serves (worker_metrics.h).
  std::vector<std::weak_ptr<prometheus::Collectable>> MetricsCollectables() const {
    return metrics_.Collectables();
  }

  grpc::Status StreamedSolveSlice(
      grpc::ServerContext* context,
      grpc::ServerUnaryStreamer<v1::SolveSliceRequest, v1::SolveSliceResponse>* stream) override;
  grpc::Status DescribeWorker(grpc::ServerContext* context,
                              const v1::DescribeWorkerRequest* request,
                              v1::DescribeWorkerResponse* response) override;

  // True once per burst: no call runs or waits, and some call ended since
  // the last true (rpc/idle_trim.h then gives the heap back).
  bool IdleAfterCalls() ABSL_LOCKS_EXCLUDED(mu_);

 private:
  // A request checked and parsed: all a waiting call keeps of it. A slice
  // has `query` and `slice`; an anytime part `wide` and `part`.
  struct Parsed {
    std::optional<Query> query;
    std::optional<WideQuery> wide;
    SearchOptions options;
    SliceSpec slice;
    std::optional<AnytimePartSpec> part;
  };
  // A call's answer and what its log line and metrics say of it.
  struct Reply {
    v1::SolveSliceResponse message;
    SearchStats stats;
    std::optional<uint64_t> trees;  // an anytime part's
  };
  // INVALID_ARGUMENT (or the limits' errors) naming the field.
  static absl::StatusOr<Parsed> Parse(const v1::SolveSliceRequest& request,
                                      const WorkerConfig& config);
  // A request that asks for an anytime part (its `anytime` field).
  static absl::StatusOr<Parsed> ParseAnytime(const v1::SolveSliceRequest& request,
                                             const WorkerConfig& config);
  // What the call's log line says of its request, once read.
  struct CallFacts {
    bool read = false;
    bool anytime = false;  // index and count are then the part's
    uint32_t index = 0, count = 0;
    int relations = 0;
  };
  // Admits the call, reads and parses its request, waits for a slot and
  // solves (or runs the anytime part); the call's outcome.
  absl::StatusOr<Reply> Solve(
      grpc::ServerContext* context,
      grpc::ServerUnaryStreamer<v1::SolveSliceRequest, v1::SolveSliceResponse>& stream,
      CallFacts& facts);
  // Runs the parsed request until `deadline` (or the call's cancel).
  static absl::StatusOr<Reply> Run(const Parsed& parsed, grpc::ServerContext* context,
                                   std::chrono::steady_clock::time_point deadline);
  // Reads the request (within kRequestReadLimit, onto an arena freed on
  // return) and parses it; fills `facts` once read.
  absl::StatusOr<Parsed> ReadRequest(
      grpc::ServerContext* context,
      grpc::ServerUnaryStreamer<v1::SolveSliceRequest, v1::SolveSliceResponse>& stream,
      CallFacts& facts);
  // Takes a place among the waiting calls; the busy refusal when they
  // are full.
  absl::Status Enqueue() ABSL_LOCKS_EXCLUDED(mu_);
  // Waits (from the queue) for a free slot; false when the call ended
  // first, its place in the queue given back.
  bool Acquire(grpc::ServerContext* context) ABSL_LOCKS_EXCLUDED(mu_);
  // Gives back a place in the queue without running.
  void Leave() ABSL_LOCKS_EXCLUDED(mu_);
  void Release() ABSL_LOCKS_EXCLUDED(mu_);

  const WorkerConfig config_;
  absl::Mutex mu_;
  int running_ ABSL_GUARDED_BY(mu_) = 0;
  int waiting_ ABSL_GUARDED_BY(mu_) = 0;
  uint64_t calls_ended_ ABSL_GUARDED_BY(mu_) = 0;
  uint64_t ended_at_last_idle_ ABSL_GUARDED_BY(mu_) = 0;
  WorkerMetrics metrics_;
};

}  // namespace sliceplan

#endif  // SLICEPLAN_WORKER_WORKER_SERVICE_H_
