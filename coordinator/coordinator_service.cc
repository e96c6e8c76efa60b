#include "coordinator/coordinator_service.h"

#include <algorithm>
#include <cmath>
#include <tuple>

#include "absl/strings/str_cat.h"
#include "absl/synchronization/mutex.h"
#include "core/capacity/capacity_table.h"
#include "core/model/status_macros.h"
#include "core/slice_planner.h"
#include "rpc/call_deadline.h"
#include "rpc/coalescing_writer.h"
#include "rpc/outcome_label.h"
#include "rpc/request_id.h"
#include "rpc/rpc_status.h"
#include "rpc/server_log.h"
#include "schedule/frontier_thinning.h"
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

// The answer, or RESOURCE_EXHAUSTED when it is larger than `limit` bytes.
absl::StatusOr<v1::OptimizeResponse> CheckResponseSize(v1::OptimizeResponse response,
                                                       int64_t limit) {
  const auto bytes = static_cast<int64_t>(response.ByteSizeLong());
  if (bytes <= limit) return response;
  return absl::ResourceExhaustedError(absl::StrCat(
      "the answer is ", bytes, " bytes (", response.frontier_size(), " plans), over the limit of ",
      limit,
      " (--max_response_bytes); ask for a precision alpha > 1, fewer objectives, sample rates "
      "or node counts, or raise the limit together with the client's receive limit"));
}

// An anytime set too large for the answer's limit is thinned to fit
// (schedule/frontier_thinning.h), never refused after its whole deadline:
// as many plans as the largest plan's size lets the rest of the answer
// hold, with a kilobyte and a hundredth of the limit to spare for the
// longer reason.
void FitAnytimeSet(TieredOutcome& outcome, CostModelKind cost, int64_t limit) {
  if (outcome.tier != SearchTier::kAnytime || outcome.frontier.size() < 2) return;
  const auto bytes = static_cast<int64_t>(TieredToProto(outcome, cost).ByteSizeLong());
  if (bytes <= limit) return;
  int64_t plans = 0, largest = 0;
  for (const WidePlan& p : outcome.frontier) {
    const auto size = static_cast<int64_t>(WidePlanToProto(p, cost).ByteSizeLong()) + 8;
    plans += size;
    largest = std::max(largest, size);
  }
  const int64_t room = limit - limit / 100 - 1024 - (bytes - plans);
  const auto keep = static_cast<size_t>(std::max<int64_t>(1, room / largest));
  ThinFrontier(outcome, keep,
               absl::StrCat("the answer's limit of ", limit, " bytes, --max_response_bytes"));
}

// The request's one log line: who asked what, which tier answered, how.
void LogRequest(const std::string& request_id, const RequestFacts& facts,
                const absl::StatusOr<TieredOutcome>& outcome, double wall) {
  LogEvent line("optimize");
  line.Add("request_id", request_id)
      .Add("outcome", OutcomeLabel(outcome.status()))
      .Add("relations", facts.relations)
      .Add("tier", TierName(outcome.ok() ? outcome->tier : facts.asked))
      .Add("workers", facts.workers)
      .Add("concurrent_slices", facts.concurrent_slices);
  if (outcome.ok()) {
    line.Add("proven_optimal", outcome->proven_optimal)
        .Add("slices", outcome->schedule.result.slices.size())
        .Add("retries", outcome->schedule.retries)
        .Add("hedges", outcome->schedule.hedges)
        .Add("cost", outcome->plan.cost());
  } else {
    line.Add("error", std::string(outcome.status().message()));
  }
  line.Add("search_seconds", facts.search_seconds).Add("wall_seconds", wall);
  line.Log(outcome.ok() || OutcomeLabel(outcome.status()) != "error" ? spdlog::level::info
                                                                     : spdlog::level::warn);
}

// The request's query, with "query." before the message of any error.
absl::StatusOr<WideQuery> QueryOfRequest(const v1::OptimizeRequest& request,
                                         const InputLimits& limits) {
  auto query = WideQueryFromProto(request.query(), limits);
  if (!query.ok()) {
    return absl::Status(query.status().code(), absl::StrCat("query.", query.status().message()));
  }
  return query;
}

// The server's limits on the options, with "options.cluster." before the
// message of an error.
absl::Status CheckOptionsWithinLimits(const SearchOptions& options, const InputLimits& limits) {
  if (auto s = CheckOptionLimits(options, limits); !s.ok()) {
    return absl::Status(s.code(), absl::StrCat("options.cluster.", s.message()));
  }
  return absl::OkStatus();
}

// The workers a search is given: the healthy ones of `pool` in order, at
// most `max_workers` of them (0: no limit), counted with their concurrent slices in
// `facts`, then every unhealthy one: the scheduler skips them (and uses
// them if they recover), and names them if nothing is left.
std::vector<std::shared_ptr<SliceWorker>> WorkersForSearch(
    const std::vector<std::shared_ptr<RpcWorker>>& pool, uint32_t max_workers,
    RequestFacts& facts) {
  std::vector<std::shared_ptr<SliceWorker>> workers;
  for (const auto& w : pool) {
    if (max_workers != 0 && workers.size() >= max_workers) break;
    if (!w->Healthy()) continue;
    workers.push_back(w);
    facts.concurrent_slices += w->ConcurrentSlices();
  }
  facts.workers = workers.size();
  for (const auto& w : pool) {
    if (!w->Healthy()) workers.push_back(w);
  }
  return workers;
}

// INVALID_ARGUMENT when the request names a slice count (non-zero) that the
// query cannot be sliced into: past the exact search's kMaxRelations, or
// not a valid count for its size and shape.
absl::Status CheckSliceCount(uint32_t slice_count, int relations, PlanShape shape) {
  if (slice_count == 0) return absl::OkStatus();
  if (relations > kMaxRelations) {
    return absl::InvalidArgumentError(
        absl::StrCat("slice_count: slices divide the exact search, which takes at most ",
                     kMaxRelations, " relations (", relations, " given)"));
  }
  return ValidateSlice({0, slice_count}, relations, shape, kRpcSliceFields);
}

// The tiers the request asks for. The time auto plans for: the request's
// deadline, else its budget (`budget`, already checked), else the server's
// default; the call's deadline still bounds it.
TierRequest TiersOfRequest(const v1::OptimizeRequest& request, SearchTier asked, double budget,
                           double default_budget_seconds) {
  TierRequest tiers;
  tiers.tier = asked;
  tiers.slice_count = request.slice_count();
  tiers.budget_seconds = request.deadline_seconds() > 0 ? request.deadline_seconds()
                         : request.budget_seconds() > 0 ? budget
                                                        : default_budget_seconds;
  return tiers;
}

// The hedge delay for a run ending at `deadline`: the server's, but at
// most a fifth of the time left (at least kMinHedgeDelay), so a 1 s
// request is not lost to one hanging worker while another sits idle.
constexpr std::chrono::milliseconds kMinHedgeDelay{50};
std::optional<std::chrono::milliseconds> HedgeDelay(const CoordinatorConfig& config,
                                                    Clock::time_point deadline) {
  if (!config.hedge_after) return std::nullopt;
  const auto fifth =
      std::chrono::duration_cast<std::chrono::milliseconds>((deadline - Clock::now()) / 5);
  const auto configured =
      std::chrono::duration_cast<std::chrono::milliseconds>(*config.hedge_after);
  return std::clamp(fifth, std::min(kMinHedgeDelay, configured), configured);
}

// How the request's slices are scheduled: the server's hedging, the run's
// deadline, the request's partial-on-deadline, the progress callback and
// request id; a caller that cancels or goes away cancels every slice it
// started.
ScheduleOptions ScheduleOfRequest(grpc::ServerContext* context, const v1::OptimizeRequest& request,
                                  const CoordinatorConfig& config, Clock::time_point deadline,
                                  const std::string& request_id,
                                  const std::function<void(const ScheduleProgress&)>& on_progress) {
  ScheduleOptions schedule;
  schedule.hedge_after = HedgeDelay(config, deadline);
  schedule.deadline = deadline;
  schedule.partial_on_deadline = request.partial_on_deadline();
  schedule.on_progress = on_progress;
  schedule.cancelled = [context] { return context->IsCancelled(); };
  schedule.request_id = request_id;
  return schedule;
}

// RESOURCE_EXHAUSTED when the outcome's Pareto set has more plans than the
// server returns; an anytime set is thinned to the limit instead
// (schedule/frontier_thinning.h).
absl::Status CheckFrontierSize(TieredOutcome& outcome, const InputLimits& limits) {
  const auto plans = static_cast<int64_t>(outcome.frontier.size());
  if (plans > limits.max_frontier_plans && outcome.tier == SearchTier::kAnytime) {
    ThinFrontier(
        outcome, static_cast<size_t>(std::max<int64_t>(1, limits.max_frontier_plans)),
        absl::StrCat("the limit of ", limits.max_frontier_plans, " plans, --max_frontier_plans"));
    return absl::OkStatus();
  }
  if (plans > limits.max_frontier_plans) {
    return absl::ResourceExhaustedError(absl::StrCat(
        "the Pareto set has ", plans, " plans, over the limit of ", limits.max_frontier_plans,
        " (--max_frontier_plans); ask for a precision alpha > 1 or fewer objectives"));
  }
  return absl::OkStatus();
}

// The error sent back: a busy refusal carries the busy mark
// (schedule/slice_worker.h) so the client knows to retry.
grpc::Status Reply(grpc::ServerContext& context, const absl::Status& status) {
  if (IsBusy(status)) context.AddTrailingMetadata(kBusyKey, "1");
  return ToGrpc(status);
}

// One grid point's optimum on the pool: a single slice, scheduled like
// any other (retries, hedges, the answer checked).
PointSolver PoolPointSolver(std::span<SliceWorker* const> workers,
                            const ScheduleOptions& schedule) {
  return [workers, schedule](const Query& q, const SearchOptions& options) -> absl::StatusOr<Plan> {
    ASSIGN_OR_RETURN(ScheduleOutcome outcome, RunSlices(q, options, 1, workers, schedule));
    if (outcome.result.plan.nodes.empty()) {
      return absl::NotFoundError("no plan joins all relations without a cross product");
    }
    return std::move(outcome.result.plan);
  };
}

}  // namespace

CoordinatorService::CoordinatorService(WorkerPool& pool, const CoordinatorConfig& config,
                                       std::unique_ptr<TemplateDesk> templates)
    : pool_(pool),
      config_(config),
      admission_(config.max_concurrent_requests, config.max_queued_requests),
      metrics_(pool, admission_),
      templates_(templates != nullptr ? std::move(templates)
                                      : std::move(TemplateDesk::Open(nullptr, {})).value()),
      // The answer leaves before the caller's own deadline: the run's ends
      // deadline_margin before it, and the wait at most half that after.
      timed_tiers_(std::min<Clock::duration>(kTimedTierSlack, config.deadline_margin / 2)) {
  if (config.tokens) tokens_ = std::make_shared<const BearerTokens>(*config.tokens);
}

absl::StatusOr<TieredOutcome> CoordinatorService::Search(
    grpc::ServerContext* context, const v1::OptimizeRequest& request, const std::string& request_id,
    const std::function<void(const ScheduleProgress&)>& on_progress, RequestFacts& facts) {
  RETURN_IF_ERROR(ValidateRequest(request));
  ASSIGN_OR_RETURN(const Clock::time_point deadline, RunDeadline(context, request, config_));
  ASSIGN_OR_RETURN(WideQuery query, QueryOfRequest(request, config_.limits));
  facts.relations = query.size();
  ASSIGN_OR_RETURN(const SearchOptions options, SearchOptionsFromProto(request.options()));
  facts.cost = options.cost;
  ASSIGN_OR_RETURN(facts.asked, TierFromProto(request.tier()));
  ASSIGN_OR_RETURN(const double budget,
                   AllowedSeconds(request.budget_seconds(), config_.limits.max_deadline_seconds,
                                  "budget_seconds"));
  RETURN_IF_ERROR(CheckOptionsWithinLimits(options, config_.limits));
  std::optional<Admission::Ticket> ticket;
  RETURN_IF_ERROR(admission_.Enter(
      deadline, [context] { return context->IsCancelled(); }, ticket));
  const auto start = Clock::now();  // admitted: the search's own time from here

  RETURN_IF_ERROR(CheckSliceCount(request.slice_count(), query.size(), options.shape));
  // The tiers run on a thread of their own; this one answers by the
  // deadline whatever CPU that thread gets (schedule/timed_tiers.h).
  TimedTierInputs run{
      std::move(query), options,
      TiersOfRequest(request, facts.asked, budget, config_.default_budget_seconds),
      WorkersForSearch(pool_.Workers(), request.max_workers(), facts),
      ScheduleOfRequest(context, request, config_, deadline, request_id, on_progress)};
  // The place is the run's: a run cut off at the deadline holds it until
  // it stops, so cut-off runs never pile up past the limit.
  run.hold = std::make_shared<Admission::Ticket>(*std::move(ticket));
  auto outcome = timed_tiers_.Run(std::move(run));
  facts.search_seconds = std::chrono::duration<double>(Clock::now() - start).count();
  if (!outcome.ok()) return outcome;
  RETURN_IF_ERROR(CheckFrontierSize(*outcome, config_.limits));
  return outcome;
}

absl::StatusOr<v1::OptimizeResponse> CoordinatorService::Run(
    grpc::ServerContext* context, const v1::OptimizeRequest& request, const char* method,
    const std::function<void(const ScheduleProgress&)>& on_progress) {
  const auto start = Clock::now();
  const std::string request_id = RequestIdOf(*context);
  context->AddInitialMetadata(kRequestIdKey, request_id);
  RequestFacts facts;
  const absl::Status allowed = Authenticate(*context);
  absl::StatusOr<TieredOutcome> outcome =
      allowed.ok() ? Search(context, request, request_id, on_progress, facts)
                   : absl::StatusOr<TieredOutcome>(allowed);
  // An answer too large to send is the request's outcome too (counted and
  // logged as refused), not a success the caller never receives.
  absl::StatusOr<v1::OptimizeResponse> answer = absl::UnknownError("no answer");
  if (outcome.ok()) {
    FitAnytimeSet(*outcome, facts.cost, config_.max_response_bytes);
    answer = CheckResponseSize(TieredToProto(*outcome, facts.cost), config_.max_response_bytes);
    if (!answer.ok()) outcome = answer.status();
  }
  const double wall = std::chrono::duration<double>(Clock::now() - start).count();
  metrics_.Request(outcome, facts.asked, wall);
  metrics_.refusals().Note(method, *context, outcome.status());
  LogRequest(request_id, facts, outcome, wall);
  if (!outcome.ok()) return outcome.status();
  return answer;
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
  auto result = Run(context, *request, "Optimize", {});
  if (!result.ok()) return Reply(*context, result.status());
  *response = *std::move(result);
  return grpc::Status::OK;
}

grpc::Status CoordinatorService::OptimizeStream(grpc::ServerContext* context,
                                                const v1::OptimizeRequest* request,
                                                grpc::ServerWriter<v1::OptimizeEvent>* writer) {
  // Progress comes from the scheduler's threads and never waits for the
  // client to read it; the answer waits for a stalled client at most
  // until the run's deadline.
  CoalescingWriter<v1::OptimizeEvent> progress(writer, context);
  // The run's deadline, fixed before it starts.
  const auto deadline = RunDeadline(context, *request, config_);
  auto result = Run(context, *request, "OptimizeStream", [&](const ScheduleProgress& p) {
    v1::OptimizeEvent event;
    v1::Progress* out = event.mutable_progress();
    out->set_slices_done(p.slices_done);
    out->set_slice_count(p.slice_count);
    if (p.best_cost) out->set_best_cost(*p.best_cost);
    out->set_elapsed_seconds(p.elapsed_seconds);
    if (p.frontier_plans) out->set_frontier_plans(*p.frontier_plans);
    out->set_trees(p.trees);
    progress.Offer(std::move(event));
  });
  // A client that reads takes the answer at once; one that stalls gets
  // until the run's deadline, and at least kAnswerGrace (an answer made
  // at the deadline, partial_on_deadline, must still be sent).
  const Clock::time_point give_up =
      std::max(Clock::now() + kAnswerGrace, deadline.ok() ? *deadline : Clock::now());
  if (!result.ok()) {
    progress.Finish(std::nullopt, give_up);
    return Reply(*context, result.status());
  }
  v1::OptimizeEvent event;
  *event.mutable_result() = *std::move(result);
  if (!progress.Finish(std::move(event), give_up)) {
    return grpc::Status(grpc::StatusCode::CANCELLED, "the client did not read the answer in time");
  }
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
  if (auto s = Authenticate(*context); !s.ok()) {
    return ToGrpc(metrics_.refusals().Note("PlanCapacity", *context, s));
  }
  auto out = Capacity(*request);
  if (!out.ok()) return ToGrpc(metrics_.refusals().Note("PlanCapacity", *context, out.status()));
  *response = *std::move(out);
  return grpc::Status::OK;
}

grpc::Status CoordinatorService::ListWorkers(grpc::ServerContext* context,
                                             const v1::ListWorkersRequest*,
                                             v1::ListWorkersResponse* response) {
  if (auto s = Authenticate(*context); !s.ok()) {
    return ToGrpc(metrics_.refusals().Note("ListWorkers", *context, s));
  }
  for (const auto& w : pool_.Workers()) {
    v1::WorkerStatus* s = response->add_workers();
    const WorkerCounters c = w->counters();
    s->set_address(w->Name());
    s->set_healthy(w->Healthy());
    s->set_concurrent_slices(static_cast<uint32_t>(w->ConcurrentSlices()));
    s->set_threads_per_slice(static_cast<uint32_t>(w->ThreadsPerSlice()));
    s->set_slices_solved(c.solved);
    s->set_failures(c.failures);
    s->set_last_error(c.last_error);
  }
  return grpc::Status::OK;
}

}  // namespace sliceplan

namespace sliceplan {

absl::StatusOr<v1::PrepareTemplateResult> CoordinatorService::Prepare(
    grpc::ServerContext* context, const v1::PrepareTemplateRequest& request,
    const std::function<void(size_t, size_t)>& on_progress) {
  RETURN_IF_ERROR(Authenticate(*context));
  ASSIGN_OR_RETURN(const double seconds,
                   AllowedSeconds(request.deadline_seconds(), config_.limits.max_deadline_seconds));
  Clock::time_point deadline = SteadyAfter(seconds);
  if (const auto call = CallDeadline(context); call && *call - config_.deadline_margin < deadline) {
    deadline = *call - config_.deadline_margin;
  }
  std::optional<Admission::Ticket> ticket;
  RETURN_IF_ERROR(admission_.Enter(
      deadline, [context] { return context->IsCancelled(); }, ticket));
  RequestFacts facts;
  const std::vector<std::shared_ptr<SliceWorker>> held =
      WorkersForSearch(pool_.Workers(), 0, facts);
  std::vector<SliceWorker*> workers;
  for (const auto& w : held) workers.push_back(w.get());
  ScheduleOptions schedule;
  schedule.hedge_after = HedgeDelay(config_, deadline);
  schedule.deadline = deadline;
  schedule.cancelled = [context] { return context->IsCancelled(); };
  schedule.request_id = RequestIdOf(*context);
  return templates_->Prepare(request, config_.limits, PoolPointSolver(workers, schedule),
                             std::max(1, facts.concurrent_slices), on_progress);
}

grpc::Status CoordinatorService::PrepareTemplate(
    grpc::ServerContext* context, const v1::PrepareTemplateRequest* request,
    grpc::ServerWriter<v1::PrepareTemplateEvent>* writer) {
  const auto start = Clock::now();
  const std::string request_id = RequestIdOf(*context);
  context->AddInitialMetadata(kRequestIdKey, request_id);
  // Called under the prepare's own lock; never waits for the client.
  CoalescingWriter<v1::PrepareTemplateEvent> progress(writer, context);
  Clock::time_point last_sent = start;
  auto result = Prepare(context, *request, [&](size_t done, size_t total) {
    const auto now = Clock::now();
    if (done != total && now - last_sent < kPrepareProgressEvery) return;
    last_sent = now;
    v1::PrepareTemplateEvent event;
    v1::PrepareProgress* p = event.mutable_progress();
    p->set_points_done(done);
    p->set_grid_points(total);
    p->set_elapsed_seconds(std::chrono::duration<double>(now - start).count());
    progress.Offer(std::move(event));
  });
  // A client that stalls gets a few seconds to take the answer (a
  // prepare's deadline is for its search).
  const Clock::time_point give_up = Clock::now() + std::chrono::seconds(5);
  static_assert(kAnswerGrace <= std::chrono::seconds(5));
  LogEvent line("prepare_template");
  line.Add("request_id", request_id).Add("outcome", OutcomeLabel(result.status()));
  if (result.ok()) {
    line.Add("template_id", result->template_id())
        .Add("grid_points", result->report().grid_points())
        .Add("stored_plans", result->report().stored_plans());
  } else {
    line.Add("error", std::string(result.status().message()));
  }
  line.Add("wall_seconds", std::chrono::duration<double>(Clock::now() - start).count());
  line.Log(result.ok() ? spdlog::level::info : spdlog::level::warn);
  if (!result.ok()) {
    progress.Finish(std::nullopt, give_up);
    return Reply(*context, metrics_.refusals().Note("PrepareTemplate", *context, result.status()));
  }
  v1::PrepareTemplateEvent event;
  *event.mutable_result() = *std::move(result);
  if (!progress.Finish(std::move(event), give_up)) {
    return grpc::Status(grpc::StatusCode::CANCELLED, "the client did not read the answer in time");
  }
  return grpc::Status::OK;
}

grpc::Status CoordinatorService::ChooseTemplatePlan(grpc::ServerContext* context,
                                                    const v1::ChooseTemplatePlanRequest* request,
                                                    v1::ChooseTemplatePlanResponse* response) {
  if (auto s = Authenticate(*context); !s.ok()) {
    return ToGrpc(metrics_.refusals().Note("ChooseTemplatePlan", *context, s));
  }
  auto out = templates_->Choose(*request);
  if (!out.ok()) return ToGrpc(out.status());
  *response = *std::move(out);
  return grpc::Status::OK;
}

}  // namespace sliceplan
