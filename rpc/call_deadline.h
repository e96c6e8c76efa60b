// A server call's deadline, for the two servers (the client never needs
// it). Pure function; thread-safe.
#ifndef SLICEPLAN_RPC_CALL_DEADLINE_H_
#define SLICEPLAN_RPC_CALL_DEADLINE_H_

#include <chrono>
#include <optional>

#include "grpcpp/server_context.h"

namespace sliceplan {

// A server call's deadline on the steady clock the search uses; none when
// the caller set no deadline.
inline std::optional<std::chrono::steady_clock::time_point> CallDeadline(
    const grpc::ServerContext* context) {
  const auto deadline = context->deadline();
  if (deadline == std::chrono::system_clock::time_point::max()) return std::nullopt;
  return std::chrono::steady_clock::now() + (deadline - std::chrono::system_clock::now());
}

}  // namespace sliceplan

#endif  // SLICEPLAN_RPC_CALL_DEADLINE_H_
