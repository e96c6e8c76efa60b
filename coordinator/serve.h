// Running a gRPC server the way both sliceplan servers do: health checking
// (grpc.health.v1) and reflection on, the bound address printed as
// "listening on HOST:PORT" on stdout (port 0 picks a free one, which tests
// and the local-cluster script read back), and a clean shutdown on SIGINT
// or SIGTERM.
#ifndef SLICEPLAN_COORDINATOR_SERVE_H_
#define SLICEPLAN_COORDINATOR_SERVE_H_

#include <functional>
#include <string>
#include <vector>

#include "absl/status/status.h"
#include "grpcpp/grpcpp.h"

namespace sliceplan {

// Blocks SIGINT and SIGTERM in the calling thread (and the threads it
// starts later). Call first in main, before any thread exists.
void BlockStopSignals();

// Serves `services` on `listen` until a stop signal; `on_stop` runs first
// (e.g. to end background threads). Errors: UNAVAILABLE when the address
// cannot be bound.
absl::Status Serve(const std::string& listen, const std::vector<grpc::Service*>& services,
                   const std::function<void()>& on_stop = {});

}  // namespace sliceplan

#endif  // SLICEPLAN_COORDINATOR_SERVE_H_
