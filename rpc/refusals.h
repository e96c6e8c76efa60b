// Every RPC a server refuses for authentication, limits or overload leaves
// a trace (docs/operations.md, "Metrics" and "Logs"): one warning line
// (event "refused": method, peer, reason, the status message; never a
// token) and one count in
//
//   sliceplan_rpc_refused_total{method, reason}
//
// reason: "unauthenticated" (UNAUTHENTICATED), "limits" (RESOURCE_EXHAUSTED:
// a request past a limit, a full queue) or "overload" (UNAVAILABLE from
// the server itself). Other errors are the request's own and are not
// counted here. Thread-safe.
#ifndef SLICEPLAN_RPC_REFUSALS_H_
#define SLICEPLAN_RPC_REFUSALS_H_

#include <string>
#include <string_view>

#include "absl/status/status.h"
#include "grpcpp/server_context.h"
#include "prometheus/counter.h"
#include "prometheus/registry.h"

namespace sliceplan {

// The reason label of a refusal, or empty for a status that is none.
std::string_view RefusalReason(const absl::Status& status);

class RpcRefusals {
 public:
  explicit RpcRefusals(prometheus::Registry& registry);

  // Records `status` for `method` when it is a refusal (RefusalReason);
  // returns it unchanged.
  const absl::Status& Note(std::string_view method, const grpc::ServerContext& context,
                           const absl::Status& status);

 private:
  prometheus::Family<prometheus::Counter>& refused_;
};

}  // namespace sliceplan

#endif  // SLICEPLAN_RPC_REFUSALS_H_
