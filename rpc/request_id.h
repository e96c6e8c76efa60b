// The id that ties one request's log lines together across servers. The
// coordinator takes the caller's `x-request-id` metadata when it is a
// plain token, or makes one; it logs the id on its request line, sends it
// back in the initial metadata, and passes it to every worker call in the
// same metadata key, where the worker logs it on each slice line.
#ifndef SLICEPLAN_RPC_REQUEST_ID_H_
#define SLICEPLAN_RPC_REQUEST_ID_H_

#include <string>
#include <string_view>

#include "grpcpp/server_context.h"

namespace sliceplan {

inline constexpr char kRequestIdKey[] = "x-request-id";
inline constexpr size_t kMaxRequestIdBytes = 64;

// True for 1..kMaxRequestIdBytes bytes of [A-Za-z0-9._:-]: what a log line
// can carry unquoted and a collector can index.
bool IsValidRequestId(std::string_view id);

// 16 lower-case hex digits from a random 64-bit number.
std::string NewRequestId();

// The call's x-request-id when valid, else a new one.
std::string RequestIdOf(const grpc::ServerContext& context);

}  // namespace sliceplan

#endif  // SLICEPLAN_RPC_REQUEST_ID_H_
