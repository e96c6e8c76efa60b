#include "cli/rpc_client.h"

#include <chrono>
#include <optional>

#include "absl/strings/match.h"
#include "absl/strings/str_cat.h"
#include "core/model/status_macros.h"
#include "grpcpp/grpcpp.h"
#include "rpc/bearer_tokens.h"
#include "rpc/rpc_status.h"
#include "schedule/slice_worker.h"
#include "sliceplan.grpc.pb.h"
#include "wire/capacity_proto.h"
#include "wire/query_proto.h"
#include "wire/service_proto.h"
#include "wire/tier_proto.h"

namespace sliceplan::cli {
namespace {

absl::StatusOr<std::unique_ptr<v1::Coordinator::Stub>> Connect(const std::string& address,
                                                               const TlsFiles& tls) {
  ASSIGN_OR_RETURN(std::shared_ptr<grpc::ChannelCredentials> credentials,
                   ChannelCredentialsFor(tls));
  grpc::ChannelArguments args;
  args.SetMaxReceiveMessageSize(64 << 20);
  return v1::Coordinator::NewStub(grpc::CreateCustomChannel(address, credentials, args));
}

// Adds the bearer token of `token_file`, if one is named.
absl::Status Authorize(grpc::ClientContext& context, const std::string& token_file) {
  if (token_file.empty()) return absl::OkStatus();
  ASSIGN_OR_RETURN(const std::string token, ReadClientToken(token_file));
  context.AddMetadata("authorization", "Bearer " + token);
  return absl::OkStatus();
}

// A call's error as the CLI reports it, after the coordinator's address:
// a busy refusal becomes UNAVAILABLE "busy, retry later" (exit status 1,
// not bad input), and UNAVAILABLE and UNAUTHENTICATED are named, as the
// docs and other clients name them.
absl::Status CallError(const std::string& address, const grpc::Status& status,
                       const grpc::ClientContext& context) {
  const std::string& message = status.error_message();
  switch (status.error_code()) {
    case grpc::StatusCode::RESOURCE_EXHAUSTED:
      if (context.GetServerTrailingMetadata().count(kBusyKey) != 0) {
        return absl::UnavailableError(absl::StrCat(
            "coordinator ", address, ": busy, retry later (RESOURCE_EXHAUSTED: ", message, ")"));
      }
      break;
    case grpc::StatusCode::UNAVAILABLE:
      // What most likely happened, where the library's words say it.
      return absl::UnavailableError(absl::StrCat(
          "coordinator ", address, ": ",
          absl::StrContains(message, "Connection refused") ? "nothing listens at that address"
          : absl::StrContains(message, "Socket closed") || absl::StrContains(message, "handshake")
              ? "the connection closed while being set up (TLS expected, or this client's "
                "certificate refused?)"
              : "unavailable, retry later",
          " (UNAVAILABLE: ", message, ")"));
    case grpc::StatusCode::UNAUTHENTICATED:
      return absl::UnauthenticatedError(
          absl::StrCat("coordinator ", address, ": UNAUTHENTICATED: ", message));
    default:
      break;
  }
  return absl::Status(static_cast<absl::StatusCode>(status.error_code()),
                      absl::StrCat("coordinator ", address, ": ", message));
}

}  // namespace

absl::StatusOr<TieredOutcome> OptimizeRemote(
    const RemoteRequest& request, const WideQuery& query,
    const std::function<void(const ScheduleProgress&)>& on_progress) {
  ASSIGN_OR_RETURN(auto stub, Connect(request.coordinator, request.tls));
  v1::OptimizeRequest m;
  *m.mutable_query() = WideQueryToProto(query);
  m.set_tier(TierToProto(request.tier));
  m.set_budget_seconds(request.budget_seconds);
  *m.mutable_options() = SearchOptionsToProto(request.options);
  m.set_slice_count(request.slice_count);
  m.set_deadline_seconds(request.deadline_seconds);
  m.set_partial_on_deadline(request.partial_on_deadline);
  grpc::ClientContext context;
  RETURN_IF_ERROR(Authorize(context, request.token_file));
  // Room for the answer to travel back; past a year the server's own
  // maximum is the bound, and the call gets none.
  if (request.deadline_seconds > 0 && request.deadline_seconds < 3.2e7) {
    context.set_deadline(
        std::chrono::system_clock::now() +
        std::chrono::milliseconds(static_cast<int64_t>(request.deadline_seconds * 1000) + 2000));
  }
  auto reader = stub->OptimizeStream(&context, m);
  v1::OptimizeEvent event;
  std::optional<v1::OptimizeResponse> result;
  while (reader->Read(&event)) {
    if (event.has_progress() && on_progress) {
      const v1::Progress& p = event.progress();
      ScheduleProgress progress{p.slices_done(), p.slice_count(), std::nullopt,
                                p.elapsed_seconds()};
      if (p.has_best_cost()) progress.best_cost = p.best_cost();
      if (p.has_frontier_plans()) progress.frontier_plans = p.frontier_plans();
      progress.trees = p.trees();
      on_progress(progress);
    }
    if (event.has_result()) result = event.result();
  }
  const grpc::Status status = reader->Finish();
  if (!status.ok()) return CallError(request.coordinator, status, context);
  if (!result) return absl::InternalError("coordinator sent no result");
  return TieredFromProto(*result, query, request.options.cost);
}

absl::StatusOr<ScheduleOutcome> OptimizeRemote(
    const RemoteRequest& request, const Query& query,
    const std::function<void(const ScheduleProgress&)>& on_progress) {
  RemoteRequest exact = request;
  exact.tier = SearchTier::kExact;
  ASSIGN_OR_RETURN(TieredOutcome out,
                   OptimizeRemote(exact, WideQuery::FromExact(query), on_progress));
  return std::move(out.schedule);
}

absl::StatusOr<std::pair<CapacityTable, int>> CapacityRemote(const RemoteCapacity& request,
                                                             const WideQuery& query) {
  ASSIGN_OR_RETURN(auto stub, Connect(request.coordinator, request.tls));
  grpc::ClientContext context;
  RETURN_IF_ERROR(Authorize(context, request.token_file));
  context.set_deadline(std::chrono::system_clock::now() + std::chrono::seconds(60));
  v1::CapacityRequest m;
  *m.mutable_query() = WideQueryToProto(query);
  *m.mutable_options() = SearchOptionsToProto(request.options);
  m.set_deadline_seconds(request.deadline_seconds);
  m.set_threads_per_worker(static_cast<uint32_t>(request.threads_per_worker));
  m.set_seconds_per_split(request.seconds_per_split);
  m.set_seconds_per_connected_set(request.seconds_per_connected_set);
  v1::CapacityResponse response;
  const grpc::Status status = stub->PlanCapacity(&context, m, &response);
  if (!status.ok()) return CallError(request.coordinator, status, context);
  ASSIGN_OR_RETURN(CapacityTable table, CapacityFromProto(response));
  return std::pair{std::move(table), static_cast<int>(response.pool_workers())};
}

absl::StatusOr<v1::PrepareTemplateResult> PrepareRemote(
    const RemoteCoordinator& to, const v1::PrepareTemplateRequest& request,
    const std::function<void(size_t, size_t)>& on_progress) {
  ASSIGN_OR_RETURN(auto stub, Connect(to.address, to.tls));
  grpc::ClientContext context;
  RETURN_IF_ERROR(Authorize(context, to.token_file));
  auto reader = stub->PrepareTemplate(&context, request);
  std::optional<v1::PrepareTemplateResult> result;
  for (v1::PrepareTemplateEvent event; reader->Read(&event);) {
    if (event.has_progress() && on_progress) {
      on_progress(event.progress().points_done(), event.progress().grid_points());
    } else if (event.has_result()) {
      result = std::move(*event.mutable_result());
    }
  }
  const grpc::Status status = reader->Finish();
  if (!status.ok()) return CallError(to.address, status, context);
  if (!result) {
    return absl::DataLossError(
        absl::StrCat("coordinator ", to.address, ": the prepare ended without its result"));
  }
  return *std::move(result);
}

absl::StatusOr<v1::ChooseTemplatePlanResponse> ChooseRemote(
    const RemoteCoordinator& to, const v1::ChooseTemplatePlanRequest& request) {
  ASSIGN_OR_RETURN(auto stub, Connect(to.address, to.tls));
  grpc::ClientContext context;
  RETURN_IF_ERROR(Authorize(context, to.token_file));
  v1::ChooseTemplatePlanResponse response;
  const grpc::Status status = stub->ChooseTemplatePlan(&context, request, &response);
  if (!status.ok()) return CallError(to.address, status, context);
  return response;
}

absl::StatusOr<v1::ListWorkersResponse> ListWorkersRemote(const std::string& coordinator,
                                                          const TlsFiles& tls,
                                                          const std::string& token_file) {
  ASSIGN_OR_RETURN(auto stub, Connect(coordinator, tls));
  grpc::ClientContext context;
  RETURN_IF_ERROR(Authorize(context, token_file));
  context.set_deadline(std::chrono::system_clock::now() + std::chrono::seconds(5));
  v1::ListWorkersResponse response;
  const grpc::Status status = stub->ListWorkers(&context, v1::ListWorkersRequest(), &response);
  if (!status.ok()) return CallError(coordinator, status, context);
  return response;
}

}  // namespace sliceplan::cli
