// Every slice of a P-way slicing solved in this thread and merged, with
// core/ alone (no scheduler): what the core suites use where they need the
// whole answer of a sliced search.
#ifndef SLICEPLAN_TESTS_SUPPORT_SOLVE_SLICES_H_
#define SLICEPLAN_TESTS_SUPPORT_SOLVE_SLICES_H_

#include <cstdint>

#include "absl/status/statusor.h"
#include "core/merge.h"
#include "core/model/query.h"
#include "core/search_options.h"

namespace sliceplan::testing {

// SolveSlice over slices 0..p-1, MergeSlices, then the cluster model's
// choice rule. Errors: the first slice's error, or the merge's.
absl::StatusOr<OptimizeResult> SolveAllSlices(const Query& query, const SearchOptions& options,
                                              uint32_t p);

}  // namespace sliceplan::testing

#endif  // SLICEPLAN_TESTS_SUPPORT_SOLVE_SLICES_H_
