#include "tests/support/solve_slices.h"

#include <utility>
#include <vector>

#include "core/model/status_macros.h"
#include "core/slice_solver.h"

namespace sliceplan::testing {

absl::StatusOr<OptimizeResult> SolveAllSlices(const Query& query, const SearchOptions& options,
                                              uint32_t p) {
  std::vector<SliceResult> slices;
  for (uint32_t i = 0; i < p; ++i) {
    SearchControl control;
    ASSIGN_OR_RETURN(SliceResult slice, SolveSlice(query, options, {i, p}, control));
    slices.push_back(std::move(slice));
  }
  ASSIGN_OR_RETURN(OptimizeResult result,
                   MergeSlices(std::move(slices), p, options.cluster.objectives));
  ApplyChoice(result, options.cluster.choice);
  return result;
}

}  // namespace sliceplan::testing
