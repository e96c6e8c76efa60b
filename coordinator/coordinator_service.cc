#include "coordinator/coordinator_service.h"

#include <cmath>
#include <tuple>

#include "absl/strings/str_cat.h"
#include "absl/synchronization/mutex.h"
#include "core/capacity_table.h"
#include "core/slice_planner.h"
#include "core/status_macros.h"
#include "rpc/call_deadline.h"
#include "rpc/rpc_status.h"
#include "schedule/tiered_search.h"
#include "spdlog/spdlog.h"
#include "tiers/join_forest.h"
#include "wire/capacity_proto.h"
#include "wire/query_proto.h"
#include "wire/service_proto.h"
#include "wire/tier_proto.h"

namespace sliceplan {
namespace {

using Clock = std::chrono::steady_clock;

// The earliest of the call's deadline (less the margin), the request's
// and the server's maximum: every run ends.
absl::StatusOr<Clock::time_point> RunDeadline(const grpc::ServerContext* context,
                                              const v1::OptimizeRequest& request,
                                              const CoordinatorConfig& config) {
  ASSIGN_OR_RETURN(const double seconds,
                   AllowedSeconds(request.deadline_seconds(), config.limits.max_deadline_seconds));
  Clock::time_point out = SteadyAfter(seconds);
  if (const auto call = CallDeadline(context); call && *call - config.deadline_margin < out) {
    out = *call - config.deadline_margin;
  }
  return out;
}

absl::Status ValidateRequest(const v1::OptimizeRequest& request) {
  if (!request.has_query()) return absl::InvalidArgumentError("query: missing");
  return absl::OkStatus();
}

}  // namespace

absl::StatusOr<v1::OptimizeResponse> CoordinatorService::Run(
    grpc::ServerContext* context, const v1::OptimizeRequest& request,
    const std::function<void(const ScheduleProgress&)>& on_progress) {
  RETURN_IF_ERROR(ValidateRequest(request));
  ASSIGN_OR_RETURN(const Clock::time_point deadline, RunDeadline(context, request, config_));
  auto query = WideQueryFromProto(request.query(), config_.limits);
  if (!query.ok()) {
    return absl::Status(query.status().code(), absl::StrCat("query.", query.status().message()));
  }
  ASSIGN_OR_RETURN(const SearchOptions options, SearchOptionsFromProto(request.options()));
  ASSIGN_OR_RETURN(const SearchTier tier, TierFromProto(request.tier()));
  ASSIGN_OR_RETURN(const double budget,
                   AllowedSeconds(request.budget_seconds(), config_.limits.max_deadline_seconds,
                                  "budget_seconds"));
  if (auto s = CheckOptionLimits(options, config_.limits); !s.ok()) {
    return absl::Status(s.code(), absl::StrCat("options.cluster.", s.message()));
  }
  std::optional<Admission::Ticket> ticket;
  if (auto s = admission_.Enter(
          deadline, [context] { return context->IsCancelled(); }, ticket);
      !s.ok()) {
    spdlog::warn("optimize: refused: {}", std::string(s.message()));
    return s;
  }

  std::vector<std::shared_ptr<RpcWorker>> pool = pool_.Workers();
  std::vector<SliceWorker*> workers;
  int slots = 0;
  for (const auto& w : pool) {
    if (request.max_workers() != 0 && workers.size() >= request.max_workers()) break;
    if (!w->Healthy()) continue;
    workers.push_back(w.get());
    slots += w->Slots();
  }
  // The unhealthy ones too, after the healthy: the scheduler skips them
  // (and uses them if they recover), and names them if nothing is left.
  for (const auto& w : pool) {
    if (!w->Healthy()) workers.push_back(w.get());
  }
  if (request.slice_count() != 0) {
    if (query->size() > kMaxRelations) {
      return absl::InvalidArgumentError(
          absl::StrCat("slice_count: slices divide the exact search, which takes at most ",
                       kMaxRelations, " relations (", query->size(), " given)"));
    }
    RETURN_IF_ERROR(
        ValidateSlice({0, request.slice_count()}, query->size(), options.shape, kRpcSliceFields));
  }
  TierRequest tiers;
  tiers.tier = tier;
  tiers.slice_count = request.slice_count();
  // The time auto plans for: the request's deadline, else its budget,
  // else the server's default; the call's deadline still bounds it.
  tiers.budget_seconds = request.deadline_seconds() > 0 ? request.deadline_seconds()
                         : request.budget_seconds() > 0 ? budget
                                                        : config_.default_budget_seconds;
  ScheduleOptions schedule;
  if (config_.hedge_after) schedule.hedge_after = *config_.hedge_after;
  schedule.deadline = deadline;
  schedule.partial_on_deadline = request.partial_on_deadline();
  schedule.on_progress = on_progress;
  // A caller that cancels or goes away cancels every slice it started.
  schedule.cancelled = [context] { return context->IsCancelled(); };
  const auto start = Clock::now();
  auto outcome = RunTiers(*query, options, tiers, workers, schedule);
  const double wall = std::chrono::duration<double>(Clock::now() - start).count();
  spdlog::info(
      "optimize: {} relations, tier {}, {} workers ({} slots), retries={}, hedges={}, "
      "wall {:.3f} s, {}",
      query->size(), outcome.ok() ? TierName(outcome->tier) : TierName(tier), workers.size(), slots,
      outcome.ok() ? outcome->schedule.retries : 0, outcome.ok() ? outcome->schedule.hedges : 0,
      wall,
      outcome.ok() ? (outcome->proven_optimal ? "optimal" : "not proven optimal")
                   : std::string(outcome.status().message()));
  if (!outcome.ok()) return outcome.status();
  const auto plans = static_cast<int64_t>(outcome->schedule.result.frontier.size());
  if (plans > config_.limits.max_frontier_plans) {
    return absl::ResourceExhaustedError(
        absl::StrCat("the Pareto set has ", plans, " plans, over the limit of ",
                     config_.limits.max_frontier_plans,
                     " (--max_frontier_plans); ask for a precision alpha > 1 or fewer objectives"));
  }
  return TieredToProto(*outcome, options.cost);
}

absl::Status CoordinatorService::Authenticate(const grpc::ServerContext& context) const {
  std::shared_ptr<const BearerTokens> tokens;
  {
    absl::MutexLock lock(&tokens_mu_);
    tokens = tokens_;
  }
  if (tokens == nullptr) return absl::OkStatus();
  return tokens->Check(context);
}

void CoordinatorService::SetTokens(BearerTokens tokens) {
  auto fresh = std::make_shared<const BearerTokens>(std::move(tokens));
  absl::MutexLock lock(&tokens_mu_);
  tokens_ = std::move(fresh);
}

grpc::Status CoordinatorService::Optimize(grpc::ServerContext* context,
                                          const v1::OptimizeRequest* request,
                                          v1::OptimizeResponse* response) {
  if (auto s = Authenticate(*context); !s.ok()) return ToGrpc(s);
  auto result = Run(context, *request, {});
  if (!result.ok()) return ToGrpc(result.status());
  *response = *std::move(result);
  return grpc::Status::OK;
}

grpc::Status CoordinatorService::OptimizeStream(grpc::ServerContext* context,
                                                const v1::OptimizeRequest* request,
                                                grpc::ServerWriter<v1::OptimizeEvent>* writer) {
  if (auto s = Authenticate(*context); !s.ok()) return ToGrpc(s);
  absl::Mutex write_mu;  // progress comes from the scheduler's threads
  auto result = Run(context, *request, [&](const ScheduleProgress& p) {
    v1::OptimizeEvent event;
    v1::Progress* out = event.mutable_progress();
    out->set_slices_done(p.slices_done);
    out->set_slice_count(p.slice_count);
    if (p.best_cost) out->mutable_best_cost()->set_value(*p.best_cost);
    out->set_elapsed_seconds(p.elapsed_seconds);
    absl::MutexLock lock(&write_mu);
    writer->Write(event);
  });
  if (!result.ok()) return ToGrpc(result.status());
  v1::OptimizeEvent event;
  *event.mutable_result() = *std::move(result);
  absl::MutexLock lock(&write_mu);
  writer->Write(event);
  return grpc::Status::OK;
}

absl::StatusOr<v1::CapacityResponse> CoordinatorService::Capacity(
    const v1::CapacityRequest& request) {
  if (!request.has_query()) return absl::InvalidArgumentError("query: missing");
  auto query = WideQueryFromProto(request.query(), config_.limits);
  if (!query.ok()) {
    return absl::Status(query.status().code(), absl::StrCat("query.", query.status().message()));
  }
  ASSIGN_OR_RETURN(SearchOptions options, SearchOptionsFromProto(request.options()));
  RETURN_IF_ERROR(ValidateSearchOptions(options));
  const auto pool = pool_.Workers();
  const auto healthy =
      std::count_if(pool.begin(), pool.end(), [](const auto& w) { return w->Healthy(); });
  int threads = FewestThreadsPerSlice(pool);
  if (request.threads_per_worker() > static_cast<uint32_t>(kCapacityMaxThreads)) {
    return absl::InvalidArgumentError(absl::StrCat("threads_per_worker: at most ",
                                                   kCapacityMaxThreads, ", got ",
                                                   request.threads_per_worker()));
  }
  if (request.threads_per_worker() != 0) threads = static_cast<int>(request.threads_per_worker());
  threads = std::max(threads, 1);
  MachineRates rates;
  for (const auto& [given, rate, name] :
       {std::tuple{request.seconds_per_split(), &rates.dense_split_seconds, "seconds_per_split"},
        std::tuple{request.seconds_per_connected_set(), &rates.connected_set_seconds,
                   "seconds_per_connected_set"}}) {
    if (given == 0) continue;
    if (!(std::isfinite(given) && given > 0 && given < 1)) {
      return absl::InvalidArgumentError(
          absl::StrCat(name, ": a number of seconds in (0, 1), got ", given));
    }
    *rate = given;
  }
  if (!options.cross_products && !IsConnected(*query)) {
    return absl::InvalidArgumentError(
        "the join graph is not connected, so every plan has a cross product; ask with "
        "cross products allowed");
  }
  const double own_rate =
      options.cross_products ? request.seconds_per_split() : request.seconds_per_connected_set();
  ASSIGN_OR_RETURN(
      const CapacityTable table,
      PlanCapacityFor(*query, options, request.deadline_seconds(), threads, rates, own_rate != 0));
  v1::CapacityResponse out = CapacityToProto(table);
  out.set_pool_workers(static_cast<uint32_t>(healthy));
  spdlog::info("capacity: {} relations, deadline {:.3g} s, {} threads per worker: {}",
               query->size(), request.deadline_seconds(), threads, table.summary);
  return out;
}

grpc::Status CoordinatorService::PlanCapacity(grpc::ServerContext* context,
                                              const v1::CapacityRequest* request,
                                              v1::CapacityResponse* response) {
  if (auto s = Authenticate(*context); !s.ok()) return ToGrpc(s);
  auto out = Capacity(*request);
  if (!out.ok()) return ToGrpc(out.status());
  *response = *std::move(out);
  return grpc::Status::OK;
}

grpc::Status CoordinatorService::ListWorkers(grpc::ServerContext* context,
                                             const v1::ListWorkersRequest*,
                                             v1::ListWorkersResponse* response) {
  if (auto s = Authenticate(*context); !s.ok()) return ToGrpc(s);
  for (const auto& w : pool_.Workers()) {
    v1::WorkerStatus* s = response->add_workers();
    const WorkerCounters c = w->counters();
    s->set_address(w->Name());
    s->set_healthy(w->Healthy());
    s->set_concurrent_slices(static_cast<uint32_t>(w->Slots()));
    s->set_threads_per_slice(static_cast<uint32_t>(w->ThreadsPerSlice()));
    s->set_slices_solved(c.solved);
    s->set_failures(c.failures);
    s->set_last_error(c.last_error);
  }
  return grpc::Status::OK;
}

}  // namespace sliceplan
