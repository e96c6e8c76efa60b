// Checking a slice's answer before it is merged: a coordinator must not
// trust what a worker sends (a faulty or hostile worker could return a
// valid-looking tree with made-up costs, or no plan where one exists).
// Pure function; thread-safe.
#ifndef SLICEPLAN_CORE_SLICE_CHECK_H_
#define SLICEPLAN_CORE_SLICE_CHECK_H_

#include <vector>

#include "absl/status/status.h"
#include "core/model/query.h"
#include "core/search_options.h"
#include "core/slice_solver.h"
#include "core/slicing/slice_constraints.h"

namespace sliceplan {

// Relative tolerance of a recomputed figure against the one sent.
inline constexpr double kCheckTolerance = 1e-9;

// OK when `result` could be slice `result.slice`'s true answer for `query`
// under `options`: every plan (the best one and, for the cluster model, the
// frontier's) is a binary tree over the query's relations, each once,
// children before parents; of the requested shape; without cross products
// when they are excluded; every node set admitted by the slice's
// constraints (so the plan lies in the slice); every join of the type and
// orientation the original tree allows (core/graph/join_conflicts.h); and, for the cout model,
// every node's cardinality and cost equal to those recomputed from the
// query (kCheckTolerance). With cross products every slice has a plan, so
// "no plan" there is a fault too. DATA_LOSS naming the first fault
// otherwise. O(plan nodes x (relations + predicates)).
absl::Status CheckSliceResult(const Query& query, const SearchOptions& options,
                              const SliceResult& result);
// The same with the constraint relations of the run's slice count chosen
// once (ChooseConstraintRelations costs about a millisecond at 20
// relations without cross products; the check itself microseconds).
absl::Status CheckSliceResult(const Query& query, const SearchOptions& options,
                              const SliceResult& result,
                              const std::vector<ConstraintRelations>& chosen);

}  // namespace sliceplan

#endif  // SLICEPLAN_CORE_SLICE_CHECK_H_
