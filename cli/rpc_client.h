// The CLI's RPC path: the same request as embedded mode, sent to a running
// coordinator, with progress streamed back.
#ifndef SLICEPLAN_CLI_RPC_CLIENT_H_
#define SLICEPLAN_CLI_RPC_CLIENT_H_

#include <functional>
#include <string>

#include "absl/status/statusor.h"
#include "core/capacity/capacity_table.h"
#include "core/model/query.h"
#include "rpc/tls.h"
#include "schedule/slice_scheduler.h"
#include "schedule/tiered_search.h"
#include "sliceplan.pb.h"

namespace sliceplan::cli {

struct RemoteRequest {
  std::string coordinator;  // HOST:PORT
  SearchOptions options;
  uint32_t slice_count = 0;  // 0: the coordinator chooses
  double deadline_seconds = 0;
  bool partial_on_deadline = false;
  TlsFiles tls;            // --tls-ca [--tls-cert --tls-key]; none: plaintext
  std::string token_file;  // --token-file: the bearer token sent with each call
  SearchTier tier = SearchTier::kAuto;
  double budget_seconds = 0;  // 0: the coordinator's default
};

// Calls OptimizeStream and converts the answer (the plan is checked
// against the query). Errors: the coordinator's status as it came.
absl::StatusOr<TieredOutcome> OptimizeRemote(
    const RemoteRequest& request, const WideQuery& query,
    const std::function<void(const ScheduleProgress&)>& on_progress);

// The exact tier on a query of at most 64 relations, whatever
// request.tier says: the slice machinery's answer as the scheduler gives
// it (the service tests and benchmarks read its slices).
absl::StatusOr<ScheduleOutcome> OptimizeRemote(
    const RemoteRequest& request, const Query& query,
    const std::function<void(const ScheduleProgress&)>& on_progress);

// The coordinator's capacity table for `query`: threads per worker and
// rates as given (0: the coordinator's pool and measurement).
struct RemoteCapacity {
  std::string coordinator;  // HOST:PORT
  TlsFiles tls;
  std::string token_file;
  SearchOptions options;
  double deadline_seconds = 0;
  int threads_per_worker = 0;
  double seconds_per_split = 0;
  double seconds_per_connected_set = 0;
};
// The table, checked (wire/capacity_proto.h), and the coordinator's
// healthy workers. Errors: the coordinator's status as it came.
absl::StatusOr<std::pair<CapacityTable, int>> CapacityRemote(const RemoteCapacity& request,
                                                             const WideQuery& query);

// Where a template call goes: the coordinator and how to reach it.
struct RemoteCoordinator {
  std::string address;  // HOST:PORT
  TlsFiles tls;
  std::string token_file;
};

// Calls PrepareTemplate, passing each progress event on (points done, grid
// points). Errors: the coordinator's status as it came, after its address.
absl::StatusOr<v1::PrepareTemplateResult> PrepareRemote(
    const RemoteCoordinator& to, const v1::PrepareTemplateRequest& request,
    const std::function<void(size_t done, size_t total)>& on_progress);

absl::StatusOr<v1::ChooseTemplatePlanResponse> ChooseRemote(
    const RemoteCoordinator& to, const v1::ChooseTemplatePlanRequest& request);

absl::StatusOr<v1::ListWorkersResponse> ListWorkersRemote(const std::string& coordinator,
                                                          const TlsFiles& tls = {},
                                                          const std::string& token_file = "");

}  // namespace sliceplan::cli

#endif  // SLICEPLAN_CLI_RPC_CLIENT_H_
