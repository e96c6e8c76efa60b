#include "core/slicing/slice_spec.h"

#include "absl/strings/str_cat.h"

namespace sliceplan {

absl::Status ValidateSlice(SliceSpec spec, int n, PlanShape shape, SliceFieldNames names) {
  if (spec.count == 0 || !std::has_single_bit(spec.count)) {
    return absl::InvalidArgumentError(
        absl::StrCat(names.count, ": ", spec.count, " is not a power of two (1, 2, 4, 8, ...)"));
  }
  if (spec.index >= spec.count) {
    return absl::InvalidArgumentError(
        absl::StrCat(names.index, ": ", spec.index, " is not below the slice count ", spec.count));
  }
  const int k = spec.bits();
  const int max_k = MaxSliceBits(n, shape);
  if (k > max_k) {
    const bool bushy = shape == PlanShape::kBushy;
    return absl::InvalidArgumentError(absl::StrCat(
        names.count, ": ", spec.count, " slices need ", k, " disjoint ",
        bushy ? "triples" : "pairs", " of relations (", k * RelationsPerConstraint(shape),
        " relations) but the query has ", n, "; at most ", uint64_t{1} << max_k, " slices for ",
        bushy ? "bushy" : "left-deep", " plans of this query"));
  }
  return absl::OkStatus();
}

}  // namespace sliceplan
