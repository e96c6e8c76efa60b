// The `greedy` tier: a plan for a query of any size in O(m log n).
//
// Bushy: greedy operator ordering, GOO (L. Fegaras, "A New Heuristic for
// Optimizing Large Queries", DEXA 1998): among the joined components,
// repeatedly join the connected pair whose result has the least
// cardinality. Pairs wait in a heap keyed by that cardinality (stale
// entries skipped by a version stamp); each component keeps the combined
// selectivity toward each neighbour, and merging moves the smaller map into
// the larger, so every predicate moves O(log n) times. A hyperedge joins
// the neighbour maps once all its relations but those of two components
// are joined. When no connected pair is left (a disconnected join graph),
// the two smallest components are joined by a cross product until one is
// left.
//
// Left-deep: the same rule with one side fixed: start from the connected
// pair of least result, then repeatedly add the connected relation that
// gives the least result (a cross product with the smallest relation only
// when none is connected).
//
// Pure; thread-compatible.
#ifndef SLICEPLAN_TIERS_GREEDY_H_
#define SLICEPLAN_TIERS_GREEDY_H_

#include <chrono>
#include <optional>

#include "core/model/wide_query.h"
#include "core/slicing/slice_spec.h"
#include "tiers/wide_plan.h"

namespace sliceplan {

// What a greedy run did: the joins it chose greedily (all of them unless
// the deadline cut it short).
struct GreedyReport {
  bool cut = false;
  int greedy_joins = 0;
};

// The greedy plan of `shape`, costed (CostWidePlan). Bushy: the clock is
// read every few merges; at `deadline` the components left are joined
// along the predicates in input order (then by cross products), so a plan
// comes back by the deadline plus O(relations + predicates) work, and the
// pair heap is compacted so memory stays linear in relations plus
// predicates. Left-deep runs in O(m log n) with no deadline.
WidePlan GreedyPlan(const WideQuery& query, PlanShape shape,
                    std::optional<std::chrono::steady_clock::time_point> deadline = std::nullopt,
                    GreedyReport* report = nullptr);

}  // namespace sliceplan

#endif  // SLICEPLAN_TIERS_GREEDY_H_
