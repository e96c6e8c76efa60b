// Solving one slice: the single entry point workers and the embedded mode
// call. P = 1 is the unsliced search; there is no second engine.
//
// Thread-safe: concurrent calls share nothing (each owns its memo).
#ifndef SLICEPLAN_CORE_SLICE_SOLVER_H_
#define SLICEPLAN_CORE_SLICE_SOLVER_H_

#include <cstdint>
#include <optional>
#include <string>

#include "absl/status/statusor.h"
#include "core/cluster_policy.h"
#include "core/input_limits.h"
#include "core/plan.h"
#include "core/query.h"
#include "core/search_control.h"
#include "core/search_stats.h"
#include "core/slice_spec.h"

namespace sliceplan {

enum class CostModelKind { kCout, kCluster };

// The primary metric's name, as the JSON result spells it ("cout";
// "latency_s" for the cluster model).
std::string MetricName(CostModelKind model);

inline constexpr uint64_t kDefaultMemoLimitBytes = uint64_t{8} << 30;

struct SearchOptions {
  PlanShape shape = PlanShape::kBushy;
  bool cross_products = true;
  CostModelKind cost = CostModelKind::kCout;
  uint64_t memo_limit_bytes = kDefaultMemoLimitBytes;  // per slice
  ClusterSearchConfig cluster;  // for CostModelKind::kCluster
};

// OUT_OF_RANGE, naming the largest relations, when the join of all
// relations saturates (value_range.h): every cout plan's cost would.
absl::Status CheckCoutInRange(const Query& query);

// INVALID_ARGUMENT naming the field for bad cluster parameters, alpha < 1,
// or an alpha other than 1 with a model that has no Pareto search.
absl::Status ValidateSearchOptions(const SearchOptions& options);

// RESOURCE_EXHAUSTED naming the limit: more node counts or sample rates
// than `limits` allow (each multiplies the cluster search's work). The
// edges check it with their configured limits; the solver does not.
absl::Status CheckOptionLimits(const SearchOptions& options, const InputLimits& limits);

struct SliceResult {
  SliceSpec slice;
  std::optional<Plan> plan;  // none when no plan of the space lies here
  SearchStats stats;
  // Cluster model: the slice's Pareto set by increasing latency_s (`plan`
  // is its first plan), and the largest Pareto set of any memo entry.
  std::vector<Plan> frontier;
  size_t largest_set = 0;
};

// The best plan of one slice. Errors: INVALID_ARGUMENT for a bad slice
// (ValidateSlice); RESOURCE_EXHAUSTED, with the numbers, when the memo would
// pass options.memo_limit_bytes (checked before allocating in the
// cross-product space, while growing without cross products); CANCELLED or
// DEADLINE_EXCEEDED from `control`. On error nothing is returned.
absl::StatusOr<SliceResult> SolveSlice(const Query& query,
                                       const SearchOptions& options,
                                       SliceSpec slice,
                                       SearchControl& control);

struct SliceCount {
  SliceSpec slice;
  uint64_t plans = 0;  // ordered trees (or join orders) in the slice
  SearchStats stats;
};

// Counts the slice's plans with the same enumerators (counting semiring).
// Errors as SolveSlice.
absl::StatusOr<SliceCount> CountSlicePlans(const Query& query,
                                           const SearchOptions& options,
                                           SliceSpec slice);

}  // namespace sliceplan

#endif  // SLICEPLAN_CORE_SLICE_SOLVER_H_
