#include "rpc/refusals.h"

#include "rpc/request_id.h"
#include "rpc/server_log.h"

namespace sliceplan {

std::string_view RefusalReason(const absl::Status& status) {
  switch (status.code()) {
    case absl::StatusCode::kUnauthenticated:
      return "unauthenticated";
    case absl::StatusCode::kResourceExhausted:
      return "limits";
    case absl::StatusCode::kUnavailable:
      return "overload";
    default:
      return "";
  }
}

RpcRefusals::RpcRefusals(prometheus::Registry& registry)
    : refused_(prometheus::BuildCounter()
                   .Name("sliceplan_rpc_refused_total")
                   .Help("RPCs refused for authentication, limits or overload")
                   .Register(registry)) {}

const absl::Status& RpcRefusals::Note(std::string_view method, const grpc::ServerContext& context,
                                      const absl::Status& status) {
  const std::string_view reason = RefusalReason(status);
  if (reason.empty()) return status;
  refused_.Add({{"method", std::string(method)}, {"reason", std::string(reason)}}).Increment();
  LogEvent("refused")
      .Add("method", method)
      .Add("peer", context.peer())
      .Add("reason", reason)
      .Add("request_id", RequestIdOf(context))
      .Add("error", std::string(status.message()))
      .Log(spdlog::level::warn);
  return status;
}

}  // namespace sliceplan
