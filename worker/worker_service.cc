#include "worker/worker_service.h"

#include <algorithm>
#include <chrono>
#include <cstdlib>
#include <thread>

#include "absl/cleanup/cleanup.h"
#include "absl/strings/str_cat.h"
#include "core/model/status_macros.h"
#include "core/slice_solver.h"
#include "google/protobuf/arena.h"
#include "rpc/call_deadline.h"
#include "rpc/call_watchdog.h"
#include "rpc/outcome_label.h"
#include "rpc/request_id.h"
#include "rpc/rpc_status.h"
#include "rpc/server_log.h"
#include "schedule/frontier_thinning.h"
#include "schedule/slice_worker.h"
#include "tiers/join_forest.h"
#include "wire/query_proto.h"
#include "wire/service_proto.h"
#include "wire/tier_proto.h"
#include "wire/version.h"

namespace sliceplan {
namespace {

using Clock = std::chrono::steady_clock;

// At most this many bytes a plan node takes on the wire (ids, figures and
// the cost map's three named entries: about 95 measured).
constexpr uint64_t kWireBytesPerNode = 128;

// An anytime part's set thinned to fit its share of kAnytimeReplyBytes
// (at least 1 MiB; schedule/frontier_thinning.h: spread evenly along
// latency), by the bound above rather than by encoding every plan.
void ThinToFit(AnytimeAnswer& answer, uint32_t parts) {
  if (answer.frontier.empty()) return;
  // All parts' answers reach the coordinator together: each gets its share.
  const uint64_t budget = std::max<uint64_t>(uint64_t{1} << 20, kAnytimeReplyBytes / parts);
  const uint64_t per_plan = answer.frontier.front().nodes.size() * kWireBytesPerNode;
  const uint64_t keep = std::max<uint64_t>(1, budget / per_plan);
  if (answer.frontier.size() <= keep) return;
  std::vector<WidePlan> kept;
  for (size_t i : SpreadIndices(answer.frontier.size(), keep, std::nullopt)) {
    kept.push_back(std::move(answer.frontier[i]));
  }
  answer.frontier = std::move(kept);
}

// The request's options within the worker's limits, its memo limit and
// threads applied.
absl::StatusOr<SearchOptions> OptionsOf(const v1::SolveSliceRequest& request,
                                        const WorkerConfig& config) {
  ASSIGN_OR_RETURN(SearchOptions options, SearchOptionsFromProto(request.options()));
  if (auto s = CheckOptionLimits(options, config.limits); !s.ok()) {
    return absl::Status(s.code(), absl::StrCat("options.cluster.", s.message()));
  }
  options.memo_limit_bytes = std::min(options.memo_limit_bytes, config.memo_limit_bytes);
  options.threads = config.threads_per_slice;  // the worker's own setting
  return options;
}

}  // namespace

absl::StatusOr<WorkerService::Parsed> WorkerService::Parse(const v1::SolveSliceRequest& request,
                                                           const WorkerConfig& config) {
  if (!request.has_query()) return absl::InvalidArgumentError("query: missing");
  if (request.has_anytime()) return ParseAnytime(request, config);
  auto query = QueryFromProto(request.query(), config.limits);
  if (!query.ok()) {
    return absl::Status(query.status().code(), absl::StrCat("query.", query.status().message()));
  }
  Parsed out;
  ASSIGN_OR_RETURN(out.options, OptionsOf(request, config));
  out.slice = {request.slice_index(), request.slice_count()};
  RETURN_IF_ERROR(ValidateSlice(out.slice, query->size(), out.options.shape, kRpcSliceFields));
  out.query = *std::move(query);
  return out;
}

absl::StatusOr<WorkerService::Parsed> WorkerService::ParseAnytime(
    const v1::SolveSliceRequest& request, const WorkerConfig& config) {
  Parsed out;
  ASSIGN_OR_RETURN(out.part, AnytimePartFromProto(request));
  ASSIGN_OR_RETURN(out.options, OptionsOf(request, config));
  if (out.options.cost != CostModelKind::kCluster) {
    return absl::InvalidArgumentError(
        "anytime: the anytime search is the cluster model's (options.cost)");
  }
  auto query = WideQueryFromProto(request.query(), config.limits);
  if (!query.ok()) {
    return absl::Status(query.status().code(), absl::StrCat("query.", query.status().message()));
  }
  if (query->size() < 2) {
    return absl::InvalidArgumentError("anytime: the query needs at least 2 relations");
  }
  if (!query->joins().empty()) {
    return absl::InvalidArgumentError(
        "anytime: reorders inner joins only; a query with outer, semi or anti joins (`joins`) is "
        "searched by slices");
  }
  if (!out.options.cross_products && !IsConnected(*query)) {
    return absl::InvalidArgumentError(
        "anytime: the join graph is not connected, so every plan has a cross product; allow them "
        "(options.cross_products)");
  }
  out.wide = *std::move(query);
  return out;
}

WorkerService::WorkerService(const WorkerConfig& config)
    : config_(config),
      metrics_(
          [this] {
            absl::MutexLock lock(&mu_);
            return running_;
          },
          [this] {
            absl::MutexLock lock(&mu_);
            return waiting_;
          }) {}

absl::Status WorkerService::Enqueue() {
  absl::MutexLock lock(&mu_);
  if (running_ + waiting_ >= config_.concurrent_slices + config_.max_queued_slices) {
    return BusyError(absl::StrCat("worker busy: ", running_, " slices running and ", waiting_,
                                  " waiting, its limit (--max_queued_slices); retry"));
  }
  ++waiting_;
  return absl::OkStatus();
}

void WorkerService::Leave() {
  absl::MutexLock lock(&mu_);
  --waiting_;
}

bool WorkerService::Acquire(grpc::ServerContext* context) {
  absl::MutexLock lock(&mu_);
  const auto free = [this]() ABSL_EXCLUSIVE_LOCKS_REQUIRED(mu_) {
    return running_ < config_.concurrent_slices;
  };
  // Polls the call's cancel while it waits (gRPC has no wake-up for it).
  while (!mu_.AwaitWithTimeout(absl::Condition(&free), absl::Milliseconds(10))) {
    if (context->IsCancelled()) {
      --waiting_;
      return false;
    }
  }
  --waiting_;
  ++running_;
  return true;
}

void WorkerService::Release() {
  absl::MutexLock lock(&mu_);
  --running_;
}

absl::StatusOr<WorkerService::Parsed> WorkerService::ReadRequest(
    grpc::ServerContext* context,
    grpc::ServerUnaryStreamer<v1::SolveSliceRequest, v1::SolveSliceResponse>& stream,
    CallFacts& facts) {
  // The message lives on an arena only until it is parsed: its many small
  // parts come from a few blocks and go back in one release, and a
  // waiting call holds the compact parsed query, not the message.
  google::protobuf::Arena arena;
  auto* request = google::protobuf::Arena::Create<v1::SolveSliceRequest>(&arena);
  bool read = false;
  {
    CallWatchdog watchdog(context, kRequestReadLimit);
    read = stream.Read(request);
    if (watchdog.Disarm()) {
      return absl::DeadlineExceededError(absl::StrCat(
          "the request was not received within ",
          absl::FormatDuration(absl::FromChrono(kRequestReadLimit)), "; the call was ended"));
    }
  }
  if (!read) {
    if (context->IsCancelled()) return absl::CancelledError("the call ended before its request");
    return absl::InvalidArgumentError(
        "the request could not be read: a string field holds invalid UTF-8, or the bytes are "
        "not a SolveSliceRequest");
  }
  const bool anytime = request->has_anytime();
  facts = {true, anytime, anytime ? request->anytime().part() : request->slice_index(),
           anytime ? request->anytime().parts() : request->slice_count(),
           request->query().relations_size()};
  return Parse(*request, config_);
}

absl::StatusOr<WorkerService::Reply> WorkerService::Solve(
    grpc::ServerContext* context,
    grpc::ServerUnaryStreamer<v1::SolveSliceRequest, v1::SolveSliceResponse>& stream,
    CallFacts& facts) {
  // Admission before the request is read: a refused call costs no more
  // than its headers. The read is bounded (kRequestReadLimit), so a client
  // that sends slowly holds a place in the queue for that long at most,
  // never a running slot.
  RETURN_IF_ERROR(Enqueue());
  absl::StatusOr<Parsed> parsed_or = ReadRequest(context, stream, facts);
  if (!parsed_or.ok()) {
    Leave();
    return parsed_or.status();
  }
  const Parsed& parsed = *parsed_or;
  if (parsed.part && !CallDeadline(context)) {  // it would hold a slot for the server's maximum
    Leave();
    return absl::InvalidArgumentError(
        "anytime: a part searches until its call's deadline, and the call has none");
  }
  if (!parsed.part && parsed.slice.index == config_.test_crash_slice) std::abort();
  if (!Acquire(context)) return absl::CancelledError("call ended");
  const absl::Cleanup release = [this] { Release(); };
  const auto hang_until =
      Clock::now() + std::chrono::duration_cast<Clock::duration>(
                         std::chrono::duration<double>(config_.test_hang_seconds));
  while (Clock::now() < hang_until && !context->IsCancelled()) {
    std::this_thread::sleep_for(std::chrono::milliseconds(5));
  }
  // The call's deadline, or the server's maximum if that is sooner (or the
  // call has none): no slice runs unbounded.
  auto deadline = SteadyAfter(config_.limits.max_deadline_seconds);
  if (const auto call = CallDeadline(context); call && *call < deadline) deadline = *call;
  return Run(parsed, context, deadline);
}

absl::StatusOr<WorkerService::Reply> WorkerService::Run(const Parsed& parsed,
                                                        grpc::ServerContext* context,
                                                        Clock::time_point deadline) {
  Reply reply;
  if (parsed.part) {
    // The part stops its reserve before the deadline, to send its set.
    const double given = SecondsBetween(Clock::now(), deadline);
    SearchControl control(nullptr, deadline - AnytimeReserve(given, parsed.wide->size()));
    control.set_cancel_check([context] { return context->IsCancelled(); });
    AnytimeAnswer answer = RunAnytimePart(*parsed.wide, parsed.options, *parsed.part, control);
    if (context->IsCancelled()) return absl::CancelledError("call ended");
    ThinToFit(answer, parsed.part->parts);
    reply.stats.seconds = answer.seconds;
    reply.trees = answer.trees;
    reply.message = AnytimeAnswerToProto(answer);
    return reply;
  }
  SearchControl control(nullptr, deadline);
  control.set_cancel_check([context] { return context->IsCancelled(); });
  ASSIGN_OR_RETURN(SliceResult result,
                   sliceplan::SolveSlice(*parsed.query, parsed.options, parsed.slice, control));
  reply.stats = result.stats;
  reply.message = SliceResultToProto(result, parsed.options.cost);
  return reply;
}

bool WorkerService::IdleAfterCalls() {
  absl::MutexLock lock(&mu_);
  if (running_ != 0 || waiting_ != 0 || calls_ended_ == ended_at_last_idle_) return false;
  ended_at_last_idle_ = calls_ended_;
  return true;
}

grpc::Status WorkerService::StreamedSolveSlice(
    grpc::ServerContext* context,
    grpc::ServerUnaryStreamer<v1::SolveSliceRequest, v1::SolveSliceResponse>* stream) {
  const auto start = Clock::now();
  CallFacts facts;
  absl::StatusOr<Reply> result = Solve(context, *stream, facts);
  {
    absl::MutexLock lock(&mu_);
    ++calls_ended_;
  }
  const double wall = std::chrono::duration<double>(Clock::now() - start).count();
  metrics_.Call(result.status(), result.ok() ? &result->stats : nullptr);
  LogEvent line("slice");
  line.Add("request_id", RequestIdOf(*context)).Add("outcome", OutcomeLabel(result.status()));
  if (facts.read) {  // a refused or cancelled call never is
    line.Add(facts.anytime ? "part" : "index", facts.index)
        .Add(facts.anytime ? "parts" : "count", facts.count)
        .Add("relations", facts.relations);
  }
  if (result.ok() && result->trees) {
    line.Add("trees", *result->trees)
        .Add("plans", result->message.frontier_size())
        .Add("search_seconds", result->stats.seconds);
  } else if (result.ok()) {
    line.Add("splits", result->stats.splits)
        .Add("memo_bytes", result->stats.memo_bytes)
        .Add("search_seconds", result->stats.seconds);
  } else {
    line.Add("error", std::string(result.status().message()));
  }
  line.Add("wall_seconds", wall).Log();
  if (!result.ok()) {
    if (IsBusy(result.status())) {
      context->AddTrailingMetadata(kBusyKey, "1");
      metrics_.refusals().Note("SolveSlice", *context, result.status());
    }
    return ToGrpc(result.status());
  }
  if (!stream->Write(result->message)) {
    return grpc::Status(grpc::StatusCode::CANCELLED, "the caller went away before the answer");
  }
  return grpc::Status::OK;
}

grpc::Status WorkerService::DescribeWorker(grpc::ServerContext*, const v1::DescribeWorkerRequest*,
                                           v1::DescribeWorkerResponse* response) {
  response->set_concurrent_slices(static_cast<uint32_t>(config_.concurrent_slices));
  response->set_threads_per_slice(static_cast<uint32_t>(config_.threads_per_slice));
  response->set_memo_limit_bytes(config_.memo_limit_bytes);
  response->set_version(VersionLine("sliceplan-worker"));  // the project version, not a copy
  return grpc::Status::OK;
}

}  // namespace sliceplan
