#include "core/merge.h"

#include <algorithm>

#include "absl/strings/str_cat.h"
#include "absl/strings/str_format.h"
#include "core/model/value_range.h"

namespace sliceplan {

namespace {

bool Saturated(const ClusterCosts& c) {
  return IsSaturated(c.latency_s) || IsSaturated(c.node_seconds);
}

// The union of the slices' Pareto sets, exactly filtered. Plans with a
// saturated metric are not numbers the answer can report: left out.
std::vector<Plan> MergeFrontiers(const std::vector<SliceResult>& slices, Objectives objectives) {
  std::vector<const Plan*> plans;
  std::vector<ClusterCosts> costs;
  for (const SliceResult& r : slices) {
    for (const Plan& p : r.frontier) {
      if (Saturated(p.root().metrics)) continue;
      plans.push_back(&p);
      costs.push_back(p.root().metrics);
    }
  }
  std::vector<Plan> out;
  for (size_t i : FrontierIndices(costs, objectives)) out.push_back(*plans[i]);
  return out;
}

absl::Status OutOfRange(const Plan& best) {
  return absl::OutOfRangeError(
      absl::StrFormat("every plan's cost reaches %g, the largest value the engine represents "
                      "(the best plan's result has %.4g rows): the row estimates multiply past "
                      "double range; scale them down",
                      kValueCeiling, best.root().cardinality));
}

absl::StatusOr<OptimizeResult> Merge(std::vector<SliceResult> slices, uint32_t slice_count,
                                     bool all, Objectives objectives) {
  std::sort(slices.begin(), slices.end(), [](const SliceResult& a, const SliceResult& b) {
    return a.slice.index < b.slice.index;
  });
  if (all && slices.size() != slice_count) {
    return absl::InvalidArgumentError(
        absl::StrCat("merge: ", slices.size(), " slice answers for ", slice_count, " slices"));
  }
  OptimizeResult out;
  out.slice_count = slice_count;
  const Plan* best = nullptr;
  for (size_t i = 0; i < slices.size(); ++i) {
    const SliceResult& r = slices[i];
    const bool repeated = i > 0 && slices[i - 1].slice.index == r.slice.index;
    if ((all && r.slice.index != i) || repeated || r.slice.index >= slice_count) {
      return absl::InvalidArgumentError(
          absl::StrCat("merge: slice ", all ? i : r.slice.index, " is missing or repeated"));
    }
    if (r.plan && (best == nullptr || r.plan->root().cost < best->root().cost)) {
      best = &*r.plan;
      out.best_slice = r.slice.index;
    }
  }
  if (best == nullptr) {
    return absl::NotFoundError(
        "no plan joins all relations without a cross product; allow cross "
        "products or add the missing join predicates (with outer, semi or anti joins: no "
        "tree of this shape is equivalent to the original one; ask for bushy plans)");
  }
  out.plan = *best;
  out.frontier = MergeFrontiers(slices, objectives);
  const bool has_frontier = std::any_of(slices.begin(), slices.end(),
                                        [](const SliceResult& r) { return !r.frontier.empty(); });
  if (IsSaturated(best->root().cost) || (has_frontier && out.frontier.empty())) {
    return OutOfRange(*best);
  }
  if (!out.frontier.empty()) out.plan = out.frontier.front();
  for (SliceResult& r : slices) {
    r.plan.reset();
    r.frontier.clear();
  }
  out.slices = std::move(slices);
  return out;
}

}  // namespace

void ApplyChoice(OptimizeResult& result, const ChoiceRule& rule) {
  if (result.frontier.empty()) return;
  std::vector<ClusterCosts> costs;
  for (const Plan& p : result.frontier) costs.push_back(p.root().metrics);
  result.chosen = ChoosePlan(costs, rule);
  result.plan = result.frontier[result.chosen.value_or(0)];
}

absl::StatusOr<OptimizeResult> MergeSlices(std::vector<SliceResult> slices, uint32_t slice_count,
                                           Objectives objectives) {
  return Merge(std::move(slices), slice_count, true, objectives);
}

absl::StatusOr<OptimizeResult> MergeSolvedSlices(std::vector<SliceResult> slices,
                                                 uint32_t slice_count, Objectives objectives) {
  return Merge(std::move(slices), slice_count, false, objectives);
}

}  // namespace sliceplan
