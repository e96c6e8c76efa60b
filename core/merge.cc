#include "core/merge.h"

#include <algorithm>

#include "absl/strings/str_cat.h"

namespace sliceplan {

absl::StatusOr<OptimizeResult> MergeSlices(std::vector<SliceResult> slices,
                                           uint32_t slice_count) {
  std::sort(slices.begin(), slices.end(),
            [](const SliceResult& a, const SliceResult& b) {
              return a.slice.index < b.slice.index;
            });
  if (slices.size() != slice_count) {
    return absl::InvalidArgumentError(absl::StrCat(
        "merge: ", slices.size(), " slice answers for ", slice_count,
        " slices"));
  }
  OptimizeResult out;
  out.slice_count = slice_count;
  const Plan* best = nullptr;
  for (uint32_t i = 0; i < slice_count; ++i) {
    const SliceResult& r = slices[i];
    if (r.slice.index != i) {
      return absl::InvalidArgumentError(
          absl::StrCat("merge: slice ", i, " is missing"));
    }
    if (r.plan && (best == nullptr || r.plan->root().cost < best->root().cost)) {
      best = &*r.plan;
      out.best_slice = i;
    }
  }
  if (best == nullptr) {
    return absl::NotFoundError(
        "no plan joins all relations without a cross product; allow cross "
        "products or add the missing join predicates");
  }
  out.plan = *best;
  for (SliceResult& r : slices) r.plan.reset();
  out.slices = std::move(slices);
  return out;
}

}  // namespace sliceplan
