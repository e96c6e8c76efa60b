// The capacity planner's table (docs/tiers.md): for pools of 1, 2, 4, ...
// 1,024 workers, the slice count the coordinator would choose, the
// predicted slowest-slice wall time and the memo each worker holds, and
// the smallest pool that finishes the exact search by a deadline. The
// same model (capacity_model.h) drives `auto` and the slice count, so the
// table says what a request would do. Pure; thread-safe.
#ifndef SLICEPLAN_CORE_CAPACITY_CAPACITY_TABLE_H_
#define SLICEPLAN_CORE_CAPACITY_CAPACITY_TABLE_H_

#include <optional>
#include <string>
#include <vector>

#include "absl/status/statusor.h"
#include "core/capacity/capacity_model.h"
#include "core/model/query.h"
#include "core/model/wide_query.h"
#include "core/search_options.h"

namespace sliceplan {

inline constexpr int kCapacityMaxWorkers = 1024;
inline constexpr int kCapacityMaxThreads = kMaxSearchThreads;
// The largest query the linear tier (tiers/linear_dp.h) takes; core does
// not see the tiers, so the summary's number is kept here and checked
// equal there.
inline constexpr int kMaxLinearTierRelations = 1000;
// The sizes up to which auto tries the cluster model's exact Pareto search
// before the anytime one (with and without cross products): past them it
// cannot finish in seconds, and a slice stopped at its deadline still
// takes a while to give up its memo (a rule of thumb of ours, from
// docs/benchmarks.md, "Many objectives"). schedule/ reads them.
inline constexpr int kClusterExactReach = 14;
inline constexpr int kClusterExactReachConnected = 18;
// The cluster model's forecast (cluster_forecast.h) spends at most this.
inline constexpr double kClusterForecastMaxSeconds = 1.0;

struct CapacityRow {
  int workers = 1;
  uint32_t slices = 1;
  double seconds = 0;     // predicted wall time: rounds x the slowest slice
  double memo_bytes = 0;  // per worker: the memo of the one slice it solves at a time
  bool fits_memo = true;  // each slice's memo within the memo limit
};

struct CapacityTable {
  std::vector<CapacityRow> rows;  // workers 1, 2, 4, ... 1,024
  // The cluster model: the rows come from this forecast (no memo figure).
  std::optional<std::string> cluster_forecast;
  std::optional<int> enough_workers;  // smallest pool meeting the deadline
  // Smallest pool on which `auto` runs the exact search (predicted within
  // kExactShare of the deadline); none: auto runs the heuristic tiers.
  std::optional<int> auto_exact_workers;
  double deadline_seconds = 0;
  int threads_per_worker = 1;
  bool estimated = false;  // connected sets sampled, not counted
  MachineRates rates;      // the rates the table was computed with
  std::string summary;     // one or two sentences: the answer in words
};

// Each worker solves one slice at a time on `threads_per_worker` threads
// sharing its memo (ThreadSpeedup, capacity_model.h). Errors:
// INVALID_ARGUMENT for a deadline not finite and > 0 or threads outside
// 1..kCapacityMaxThreads.
absl::StatusOr<CapacityTable> PlanCapacity(const Query& query, const SearchOptions& options,
                                           double deadline_seconds, int threads_per_worker,
                                           const MachineRates& rates);

// The answer for a query past the exact search's reach (more than
// kMaxRelations relations): no rows, and a summary naming what auto does.
CapacityTable CapacityPastExact(int relations, double deadline_seconds, int threads_per_worker);

// The table for the cluster model's exact Pareto search, from
// ForecastClusterSearch (a second at most): each pool's seconds are the
// forecast over its slices (the slice count the coordinator would choose,
// at most one per worker; the work taken as split evenly); memory is not
// forecast. Errors: as PlanCapacity; the forecast's.
absl::StatusOr<CapacityTable> PlanClusterCapacity(const Query& query, const SearchOptions& options,
                                                  double deadline_seconds, int threads_per_worker);

// The table for a query of any size, as the CLI and the coordinator answer
// it: past kMaxRelations the rowless CapacityPastExact; the cluster model
// PlanClusterCapacity; else PlanCapacity
// with the search's own rate (dense splits with cross products, connected
// sets without) measured here by CalibrateRates unless `own_rate_given`.
// Errors as PlanCapacity and CalibrateRates.
absl::StatusOr<CapacityTable> PlanCapacityFor(const WideQuery& query, const SearchOptions& options,
                                              double deadline_seconds, int threads_per_worker,
                                              MachineRates rates, bool own_rate_given);

}  // namespace sliceplan

#endif  // SLICEPLAN_CORE_CAPACITY_CAPACITY_TABLE_H_
