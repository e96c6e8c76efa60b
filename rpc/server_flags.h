// The flags both servers take, defined once here (the worker's and the
// coordinator's own flags stay in their main.cc): where to listen, TLS,
// health and metrics listeners, the log format, the input limits and the
// shutdown grace. ReadServerFlags checks them and does the start-up steps
// they imply (logging first, so later refusals and warnings are in the
// chosen format).
#ifndef SLICEPLAN_RPC_SERVER_FLAGS_H_
#define SLICEPLAN_RPC_SERVER_FLAGS_H_

#include <string>

#include "absl/status/statusor.h"
#include "core/model/input_limits.h"
#include "rpc/serve.h"
#include "rpc/tls.h"

namespace sliceplan {

inline constexpr char kServerFlagsFile[] = "rpc/server_flags.cc";

struct ServerFlags {
  std::string listen;
  TlsFiles tls;
  // max_frontier_plans is the coordinator's own flag; the rest are here.
  InputLimits limits;
  // Filled by ReadServerFlags: credentials, plaintext consent, health and
  // metrics addresses, request size, shutdown grace.
  ServeOptions serve;
};

// Sets up the log (rpc/server_log.h) for `server` ("worker",
// "coordinator"), then reads and checks the shared flags and prepares the
// listener (PrepareListener). Errors: INVALID_ARGUMENT or
// FAILED_PRECONDITION naming the flag.
absl::StatusOr<ServerFlags> ReadServerFlags(const char* server);

}  // namespace sliceplan

#endif  // SLICEPLAN_RPC_SERVER_FLAGS_H_
