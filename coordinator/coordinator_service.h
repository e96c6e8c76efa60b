// The coordinator's gRPC service: turns an OptimizeRequest into slices,
// runs them on the pool with the shared scheduler (schedule/slice_scheduler.h)
// and returns the merged plan; one log line and one metrics record per
// request. Thread-safe.
#ifndef SLICEPLAN_COORDINATOR_COORDINATOR_SERVICE_H_
#define SLICEPLAN_COORDINATOR_COORDINATOR_SERVICE_H_

#include <chrono>
#include <functional>
#include <memory>
#include <optional>

#include "absl/base/thread_annotations.h"
#include "absl/status/statusor.h"
#include "absl/synchronization/mutex.h"
#include "coordinator/admission.h"
#include "coordinator/coordinator_metrics.h"
#include "coordinator/template_desk.h"
#include "coordinator/worker_pool.h"
#include "core/model/input_limits.h"
#include "rpc/bearer_tokens.h"
#include "schedule/slice_scheduler.h"
#include "schedule/timed_tiers.h"
#include "sliceplan.grpc.pb.h"

namespace sliceplan {

inline constexpr std::chrono::milliseconds kPrepareProgressEvery{250};
// How long an answer waits for a stalled stream client past the run's
// deadline, at least.
inline constexpr std::chrono::milliseconds kAnswerGrace{1000};

struct CoordinatorConfig {
  // Hedge a slice running this long while a worker has a slice free; none: never.
  std::optional<std::chrono::milliseconds> hedge_after = std::chrono::milliseconds(2000);
  // Answer this long before the call's deadline, to get the answer back in time.
  std::chrono::milliseconds deadline_margin{50};
  InputLimits limits;
  // Bearer tokens every client call must carry; none: calls are not
  // authenticated (loopback development, tests).
  std::optional<BearerTokens> tokens;
  int max_concurrent_requests = 16;  // run at once
  int max_queued_requests = 64;      // wait for a place; more are refused
  // The time auto and idp plan for when a request names none.
  double default_budget_seconds = 10;
  // Largest answer sent: gRPC clients refuse a message past their receive
  // limit (4 MiB unless raised) with an error of their own library, so a
  // larger answer is refused here, by name, instead.
  int64_t max_response_bytes = int64_t{4} << 20;
};

// What one request's log line says beside its outcome.
struct RequestFacts {
  size_t relations = 0;
  SearchTier asked = SearchTier::kAuto;
  CostModelKind cost = CostModelKind::kCout;
  size_t workers = 0;         // healthy workers used
  int concurrent_slices = 0;  // their slices at once
  double search_seconds = 0;  // from admission to the answer
};

class CoordinatorService final : public v1::Coordinator::Service {
 public:
  // `templates`: the prepared queries (with their plan store); null: an
  // empty desk in memory, with the default limits.
  CoordinatorService(WorkerPool& pool, const CoordinatorConfig& config,
                     std::unique_ptr<TemplateDesk> templates = nullptr);

  // Replaces the bearer tokens (a re-read token file); calls already
  // admitted are not affected.
  void SetTokens(BearerTokens tokens) ABSL_LOCKS_EXCLUDED(tokens_mu_);

  // What the metrics endpoint serves (coordinator_metrics.h).
  std::vector<std::weak_ptr<prometheus::Collectable>> MetricsCollectables() const {
    return metrics_.Collectables();
  }

  grpc::Status Optimize(grpc::ServerContext* context, const v1::OptimizeRequest* request,
                        v1::OptimizeResponse* response) override;
  grpc::Status OptimizeStream(grpc::ServerContext* context, const v1::OptimizeRequest* request,
                              grpc::ServerWriter<v1::OptimizeEvent>* writer) override;
  // The capacity planner's table for the request's query, with the pool's
  // threads per worker and rates measured here unless the request gives
  // them.
  grpc::Status PlanCapacity(grpc::ServerContext* context, const v1::CapacityRequest* request,
                            v1::CapacityResponse* response) override;
  grpc::Status ListWorkers(grpc::ServerContext* context, const v1::ListWorkersRequest* request,
                           v1::ListWorkersResponse* response) override;
  // A template's grid optimized on the pool, one slice per point;
  // progress at most every kPrepareProgressEvery, then the stored id.
  grpc::Status PrepareTemplate(grpc::ServerContext* context,
                               const v1::PrepareTemplateRequest* request,
                               grpc::ServerWriter<v1::PrepareTemplateEvent>* writer) override;
  grpc::Status ChooseTemplatePlan(grpc::ServerContext* context,
                                  const v1::ChooseTemplatePlanRequest* request,
                                  v1::ChooseTemplatePlanResponse* response) override;

 private:
  // UNAUTHENTICATED when tokens are configured and the call has none of them.
  absl::StatusOr<v1::CapacityResponse> Capacity(const v1::CapacityRequest& request);
  absl::Status Authenticate(const grpc::ServerContext& context) const
      ABSL_LOCKS_EXCLUDED(tokens_mu_);
  // Authenticates, searches, counts and logs one Optimize call (its id
  // from the caller's x-request-id or new, sent back in the metadata).
  // `method`: the RPC's name for the refusal count.
  absl::StatusOr<v1::OptimizeResponse> Run(
      grpc::ServerContext* context, const v1::OptimizeRequest& request, const char* method,
      const std::function<void(const ScheduleProgress&)>& on_progress);

  // Validates, waits for admission and runs the tiers; fills `facts` as it
  // learns them, for the log line.
  absl::StatusOr<TieredOutcome> Search(
      grpc::ServerContext* context, const v1::OptimizeRequest& request,
      const std::string& request_id,
      const std::function<void(const ScheduleProgress&)>& on_progress, RequestFacts& facts);

  // Authenticates, admits and prepares one template.
  absl::StatusOr<v1::PrepareTemplateResult> Prepare(
      grpc::ServerContext* context, const v1::PrepareTemplateRequest& request,
      const std::function<void(size_t, size_t)>& on_progress);

  WorkerPool& pool_;
  const CoordinatorConfig config_;
  Admission admission_;
  CoordinatorMetrics metrics_;
  const std::unique_ptr<TemplateDesk> templates_;
  mutable absl::Mutex tokens_mu_;
  std::shared_ptr<const BearerTokens> tokens_ ABSL_GUARDED_BY(tokens_mu_);
  // Last: its destructor cancels and joins the runs still going first.
  TimedTiers timed_tiers_;
};

}  // namespace sliceplan

#endif  // SLICEPLAN_COORDINATOR_COORDINATOR_SERVICE_H_
