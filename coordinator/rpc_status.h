// Status conversion at the service edge: absl and gRPC codes map one to
// one, so each side converts once, where a call enters or leaves.
#ifndef SLICEPLAN_COORDINATOR_RPC_STATUS_H_
#define SLICEPLAN_COORDINATOR_RPC_STATUS_H_

#include <chrono>
#include <optional>
#include <string>

#include "absl/status/status.h"
#include "grpcpp/server_context.h"
#include "grpcpp/support/status.h"

namespace sliceplan {

inline grpc::Status ToGrpc(const absl::Status& s) {
  if (s.ok()) return grpc::Status::OK;
  return grpc::Status(static_cast<grpc::StatusCode>(s.code()), std::string(s.message()));
}

inline absl::Status FromGrpc(const grpc::Status& s) {
  if (s.ok()) return absl::OkStatus();
  return absl::Status(static_cast<absl::StatusCode>(s.error_code()), s.error_message());
}

// A server call's deadline on the steady clock the search uses; none when
// the caller set no deadline.
inline std::optional<std::chrono::steady_clock::time_point> CallDeadline(
    const grpc::ServerContext* context) {
  const auto deadline = context->deadline();
  if (deadline == std::chrono::system_clock::time_point::max()) return std::nullopt;
  return std::chrono::steady_clock::now() + (deadline - std::chrono::system_clock::now());
}

}  // namespace sliceplan

#endif  // SLICEPLAN_COORDINATOR_RPC_STATUS_H_
