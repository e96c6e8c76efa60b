// Merging the answers of a query's slices (single metric: the minimum).
//
// The slices cover the plan space (docs/slicing.md, invariant 2), so the best
// of their optima is the global optimum. Ties go to the lowest slice index
// so that every merge of the same answers picks the same plan.
#ifndef SLICEPLAN_CORE_MERGE_H_
#define SLICEPLAN_CORE_MERGE_H_

#include <optional>
#include <vector>

#include "absl/status/statusor.h"
#include "core/cost/pareto.h"
#include "core/cost/plan_choice.h"
#include "core/slice_solver.h"

namespace sliceplan {

struct OptimizeResult {
  Plan plan;                   // the single best plan, or the frontier's first
  std::vector<Plan> frontier;  // cluster model: the merged Pareto set
  // Cluster model: the frontier plan the choice rule names (`plan` is that
  // plan); none when no plan meets the bounds (`plan` is the first).
  std::optional<size_t> chosen;
  uint32_t slice_count = 1;
  uint32_t best_slice = 0;          // the slice the plan came from
  std::vector<SliceResult> slices;  // by slice index; plans dropped
  double wall_seconds = 0;
};

// Merges the answers of all `slice_count` slices (any order). Errors:
// INVALID_ARGUMENT when a slice is missing or repeated; NOT_FOUND when no
// slice holds a plan (only possible without cross products: the join graph
// cannot be joined without one).
//
// Slices with a Pareto set (the cluster model) merge into one: the union,
// less every plan another plan beats or equals on each of `objectives`
// (exact dominance, docs/cost-models.md), by increasing latency_s.
absl::StatusOr<OptimizeResult> MergeSlices(std::vector<SliceResult> slices, uint32_t slice_count,
                                           Objectives objectives = {});

// Names the frontier plan `rule` picks (OptimizeResult::chosen).
void ApplyChoice(OptimizeResult& result, const ChoiceRule& rule);

// As MergeSlices over the slices that were solved (a deadline passed before
// the rest): any subset of distinct slices, at least one of them with a
// plan. The result is the best plan found so far, not proven optimal.
absl::StatusOr<OptimizeResult> MergeSolvedSlices(std::vector<SliceResult> slices,
                                                 uint32_t slice_count, Objectives objectives = {});

}  // namespace sliceplan

#endif  // SLICEPLAN_CORE_MERGE_H_
