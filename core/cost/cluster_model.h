// The `cluster` cost model of docs/cost-models.md: one stage per join on a
// rented cluster, a node count and a strategy (shuffle hash join or a
// broadcast hash join of either input) per join, a sample rate per leaf,
// and three metrics: latency_s and node_seconds (minimised), completeness
// (maximised). Every formula here is part of the contract; tests pin it.
// Pure functions and plain values; thread-safe.
#ifndef SLICEPLAN_CORE_COST_CLUSTER_MODEL_H_
#define SLICEPLAN_CORE_COST_CLUSTER_MODEL_H_

#include <cstdint>
#include <string>
#include <vector>

#include "absl/status/status.h"
#include "core/model/cluster_costs.h"

namespace sliceplan {

// The most nodes one stage may rent.
inline constexpr int kMaxNodeCount = 1000000;

struct ClusterParams {
  std::vector<int> node_counts = {4, 16, 64};
  std::vector<double> sample_rates = {1.0};  // {1, 0.1, 0.01} turns sampling on
  double net_bytes_per_s = 1.25e9;           // per node
  double cpu_rows_per_s = 5e7;               // per node
  double scan_bytes_per_s = 5e8;             // per node
  double stage_startup_s = 0.5;
};

// INVALID_ARGUMENT naming the field: an empty list, a node count < 1, a
// sample rate outside (0, 1], a rate or count listed twice, a throughput
// or start-up time not finite and > 0 (start-up may be 0).
absl::Status ValidateClusterParams(const ClusterParams& params);

// One join input as the stage sees it.
struct StageInput {
  double rows;   // card x completeness
  double width;  // bytes per row
  bool leaf;     // a base relation: its scan is paid by this stage
};

// The stage time t of docs/cost-models.md for output rows `out_rows`, on `m`
// nodes:
//   scan_s    = (bytes of the leaf inputs) / (m * scan_bytes_per_s)
//   shuffle   : startup + scan_s + (b_L + b_R) / (m net) + (r_L + r_R + r_O) / (m cpu)
//   broadcast R: startup + scan_s + b_R / net + (r_L / m + r_R + r_O / m) / cpu
//   broadcast L: the mirror image.
// Saturates at kValueCeiling (value_range.h), and is saturated whenever a
// row count it reads is.
double StageSeconds(const ClusterParams& params, JoinStrategy strategy, int m,
                    const StageInput& left, const StageInput& right, double out_rows);

// latency = max(L, R) + t; node_seconds = L + R + m t; completeness = L * R.
// latency and node_seconds saturate at kValueCeiling.
ClusterCosts JoinCosts(const ClusterCosts& left, const ClusterCosts& right, int m,
                       double stage_seconds);

}  // namespace sliceplan

#endif  // SLICEPLAN_CORE_COST_CLUSTER_MODEL_H_
