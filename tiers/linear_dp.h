// The `linear` tier's search: linearized DP (T. Neumann and B. Radke,
// "Adaptive Optimization of Very Large Join Queries", SIGMOD 2018). Given
// an order of the relations (IKKBZ's, tiers/ikkbz.h), the best plan all of
// whose subtrees are contiguous runs of that order, found by a DP over the
// O(n^2) runs with O(n) splits each: O(n^3) bushy, O(n^2) left-deep.
//
// Without cross products only splits joined by a predicate count: a split
// of run [i, j] at k is connected when some predicate lies within [i, j]
// and names positions on both sides of k. reach(i, k), the least last
// position of a predicate whose first position is in [i, k] and whose
// last is past k, answers that in O(1): connected iff reach(i, k) <= j.
// Costs are kept row-major and column-major, so the inner loop over k
// reads two contiguous arrays.
//
// Memory: 32 bytes per run, n^2 runs (32 MB at 1,000 relations). Pure.
#ifndef SLICEPLAN_TIERS_LINEAR_DP_H_
#define SLICEPLAN_TIERS_LINEAR_DP_H_

#include <cstdint>
#include <vector>

#include "absl/status/statusor.h"
#include "core/capacity/capacity_table.h"  // kMaxLinearTierRelations
#include "core/model/wide_query.h"
#include "core/search/search_control.h"
#include "core/slicing/slice_spec.h"
#include "tiers/wide_plan.h"

namespace sliceplan {

// The largest query the linear tier takes (memory: 32 n^2 bytes).
inline constexpr int kMaxLinearRelations = 1000;
static_assert(kMaxLinearRelations == kMaxLinearTierRelations, "core/capacity/capacity_table.h");

// The best plan of `shape` over contiguous runs of `order`, costed. Without
// cross products: on a disconnected join graph (where no plan avoids them)
// they are allowed; on a connected one where no plan along the order
// avoids them (runs joined only through hyperedges), FAILED_PRECONDITION.
// Errors also: the control's (deadline, cancel); RESOURCE_EXHAUSTED past
// kMaxLinearRelations.
// REQUIRES: order is a permutation of the query's relations.
absl::StatusOr<WidePlan> LinearizedDp(const WideQuery& query, const std::vector<int32_t>& order,
                                      PlanShape shape, bool cross_products, SearchControl& control);

// RESOURCE_EXHAUSTED, with the numbers, past kMaxLinearRelations.
absl::Status CheckLinearSize(const WideQuery& query);

// IKKBZ's order (up to `max_roots` roots), then LinearizedDp over it.
absl::StatusOr<WidePlan> LinearPlan(const WideQuery& query, PlanShape shape, bool cross_products,
                                    SearchControl& control, int max_roots = 16);

}  // namespace sliceplan

#endif  // SLICEPLAN_TIERS_LINEAR_DP_H_
