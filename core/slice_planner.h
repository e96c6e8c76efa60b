// Choosing the slice count P for a query and a pool of W workers.
//
// Slicing trades total work for wall time: a bushy slice does (21/27)^k of
// the unsliced work, but 2^k slices together do (42/27)^k of it. With W
// equal workers the wall time is about ceil(2^k / W) * work(k), which the
// planner minimises over k (ties to fewer slices), among the k whose memo
// fits the limit. A search too small to gain from slicing gets P = 1. The
// cross-product space has closed-form work; without cross products the
// planner counts connected sets up to a cap instead. Pure; thread-safe.
#ifndef SLICEPLAN_CORE_SLICE_PLANNER_H_
#define SLICEPLAN_CORE_SLICE_PLANNER_H_

#include <cstdint>

#include "core/graph/connected_sets.h"  // CountConnectedSets, for the planner's callers
#include "core/model/query.h"
#include "core/slice_solver.h"

namespace sliceplan {

// Below this many splits a search is not worth slicing (common practice:
// thread start-up and merge costs are in the tens of microseconds).
inline constexpr double kMinSplitsToSlice = 4e6;
// Without cross products, searches with fewer connected sets than this
// stay whole.
inline constexpr uint64_t kSmallSearchSets = 100000;
// The planner never proposes more slices than this.
inline constexpr int kMaxPlannedSliceBits = 8;

// REQUIRES: workers >= 1.
uint32_t ChooseSliceCount(const Query& query, const SearchOptions& options, int workers);
// The same with the query's connected-set count already known (counted, or
// estimated when past kSmallSearchSets); unused with cross products.
uint32_t ChooseSliceCount(const Query& query, const SearchOptions& options, int workers,
                          double connected_sets);

}  // namespace sliceplan

#endif  // SLICEPLAN_CORE_SLICE_PLANNER_H_
