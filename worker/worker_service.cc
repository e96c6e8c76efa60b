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
#include "schedule/slice_worker.h"
#include "wire/query_proto.h"
#include "wire/service_proto.h"
#include "wire/version.h"

namespace sliceplan {
namespace {

using Clock = std::chrono::steady_clock;

}  // namespace

absl::StatusOr<WorkerService::Parsed> WorkerService::Parse(const v1::SolveSliceRequest& request,
                                                           const WorkerConfig& config) {
  if (!request.has_query()) return absl::InvalidArgumentError("query: missing");
  auto query = QueryFromProto(request.query(), config.limits);
  if (!query.ok()) {
    return absl::Status(query.status().code(), absl::StrCat("query.", query.status().message()));
  }
  ASSIGN_OR_RETURN(SearchOptions options, SearchOptionsFromProto(request.options()));
  if (auto s = CheckOptionLimits(options, config.limits); !s.ok()) {
    return absl::Status(s.code(), absl::StrCat("options.cluster.", s.message()));
  }
  options.memo_limit_bytes = std::min(options.memo_limit_bytes, config.memo_limit_bytes);
  options.threads = config.threads_per_slice;  // the worker's own setting
  const SliceSpec slice{request.slice_index(), request.slice_count()};
  RETURN_IF_ERROR(ValidateSlice(slice, query->size(), options.shape, kRpcSliceFields));
  return Parsed{*std::move(query), options, slice};
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
  facts = {true, request->slice_index(), request->slice_count(), request->query().relations_size()};
  return Parse(*request, config_);
}

absl::StatusOr<SliceResult> WorkerService::Solve(
    grpc::ServerContext* context,
    grpc::ServerUnaryStreamer<v1::SolveSliceRequest, v1::SolveSliceResponse>& stream,
    SearchOptions& options, CallFacts& facts) {
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
  Parsed& parsed = *parsed_or;
  options = parsed.options;
  if (parsed.slice.index == config_.test_crash_slice) std::abort();
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
  SearchControl control(nullptr, deadline);
  control.set_cancel_check([context] { return context->IsCancelled(); });
  return sliceplan::SolveSlice(parsed.query, parsed.options, parsed.slice, control);
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
  SearchOptions options;
  CallFacts facts;
  const absl::StatusOr<SliceResult> result = Solve(context, *stream, options, facts);
  {
    absl::MutexLock lock(&mu_);
    ++calls_ended_;
  }
  const double wall = std::chrono::duration<double>(Clock::now() - start).count();
  metrics_.Call(result.status(), result.ok() ? &result->stats : nullptr);
  LogEvent line("slice");
  line.Add("request_id", RequestIdOf(*context)).Add("outcome", OutcomeLabel(result.status()));
  if (facts.read) {  // a refused or cancelled call never is
    line.Add("index", facts.index).Add("count", facts.count).Add("relations", facts.relations);
  }
  if (result.ok()) {
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
  if (!stream->Write(SliceResultToProto(*result, options.cost))) {
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
