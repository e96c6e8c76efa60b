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
#include "core/model/plan.h"
#include "core/model/query.h"
#include "core/model/wide_query.h"
#include "core/search/search_control.h"
#include "core/search/search_stats.h"
#include "core/search_options.h"
#include "core/slicing/slice_spec.h"

namespace sliceplan {

// OUT_OF_RANGE, naming the largest relations, when the join of all
// relations saturates (value_range.h): every cout plan's cost would.
absl::Status CheckCoutInRange(const Query& query);
// The same for a query of any size (every tier, docs/numeric-range.md).
absl::Status CheckCoutInRange(const WideQuery& query);

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
absl::StatusOr<SliceResult> SolveSlice(const Query& query, const SearchOptions& options,
                                       SliceSpec slice, SearchControl& control);

struct SliceCount {
  SliceSpec slice;
  uint64_t plans = 0;  // ordered trees (or join orders) in the slice
  SearchStats stats;
};

// Counts the slice's plans with the same enumerators (counting semiring).
// Errors as SolveSlice.
absl::StatusOr<SliceCount> CountSlicePlans(const Query& query, const SearchOptions& options,
                                           SliceSpec slice);

}  // namespace sliceplan

#endif  // SLICEPLAN_CORE_SLICE_SOLVER_H_
