// One slice searched the way the engine searches it (SliceSearch), with the
// enumerator a test names: the dense ones by the options, the connected-only
// ones by forcing the method. For the suites named after each enumerator.
#ifndef SLICEPLAN_TESTS_SUPPORT_ENUMERATOR_RUNS_H_
#define SLICEPLAN_TESTS_SUPPORT_ENUMERATOR_RUNS_H_

#include <cstdint>
#include <optional>

#include "core/model/plan_shape.h"
#include "core/model/query.h"
#include "core/search/connected_strategy.h"
#include "core/search/search_stats.h"
#include "core/slicing/slice_spec.h"

namespace sliceplan::testing {

struct EnumeratorRun {
  std::optional<double> cost;             // the slice's least cout; none when it holds no plan
  uint64_t plans = 0;                     // the slice's plans, counted by the same enumerator
  SearchStats stats;                      // of the costed run
  std::optional<ConnectedMethod> method;  // the connected-only method that ran
};

// Searches slice `slice` of `query` for `shape` plans, with or without
// cross products; `method` forces the connected-only enumerator (the
// limits permitting). Aborts the test binary on a search error.
EnumeratorRun RunEnumerator(const Query& query, PlanShape shape, bool cross_products,
                            SliceSpec slice, std::optional<ConnectedMethod> method = {});

// The least cost over the slices of a P-way slicing (none when no slice
// holds a plan), and the plans summed over them, each slice run as above.
struct SlicedRun {
  std::optional<double> cost;
  uint64_t plans = 0;
};
SlicedRun RunAllSlices(const Query& query, PlanShape shape, bool cross_products, uint32_t p,
                       std::optional<ConnectedMethod> method = {});

}  // namespace sliceplan::testing

#endif  // SLICEPLAN_TESTS_SUPPORT_ENUMERATOR_RUNS_H_
