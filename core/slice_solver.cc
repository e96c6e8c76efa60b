#include "core/slice_solver.h"

#include "core/count_policy.h"
#include "core/cout_policy.h"
#include "core/slice_search.h"
#include "core/status_macros.h"

namespace sliceplan {

std::string MetricName(CostModelKind model) {
  switch (model) {
    case CostModelKind::kCout:
      return "cout";
  }
  return "unknown";
}

absl::Status CheckDenseMemo(int n, PlanShape shape, int k,
                            size_t bytes_per_slot, uint64_t limit) {
  const double slots = DenseSlots(n, shape, k);
  const double bytes = slots * static_cast<double>(bytes_per_slot);
  if (bytes <= static_cast<double>(limit) && slots < static_cast<double>(kNoSlot)) {
    return absl::OkStatus();
  }
  std::string advice = "no slice count of this shape fits";
  for (int more = k + 1; more <= MaxSliceBits(n, shape); ++more) {
    const double s = DenseSlots(n, shape, more);
    if (s * static_cast<double>(bytes_per_slot) <= static_cast<double>(limit) &&
        s < static_cast<double>(kNoSlot)) {
      advice = absl::StrCat("at least ", uint64_t{1} << more,
                            " slices would fit");
      break;
    }
  }
  return absl::ResourceExhaustedError(absl::StrFormat(
      "slice memo needs %.4g bytes (%.4g sets x %d bytes), over the limit of "
      "%d bytes (%s); raise the memo limit or use more slices: %s",
      bytes, slots, static_cast<int>(bytes_per_slot), limit,
      slots >= static_cast<double>(kNoSlot) ? "and 2^32 slots" : "memo bytes",
      advice));
}

namespace {

template <SearchPolicy Policy>
absl::Status Prepare(const Query& query, const SearchOptions& options,
                     SliceSpec slice, std::optional<SliceConstraints>& out) {
  ASSIGN_OR_RETURN(SliceConstraints constraints,
                   SliceConstraints::ForSlice(query, options.shape, slice,
                                              options.cross_products));
  if (options.cross_products) {
    RETURN_IF_ERROR(CheckDenseMemo(query.size(), options.shape, slice.bits(),
                                   Policy::kBytesPerSlot,
                                   options.memo_limit_bytes));
  }
  out.emplace(std::move(constraints));
  return absl::OkStatus();
}

}  // namespace

absl::StatusOr<SliceResult> SolveSlice(const Query& query,
                                       const SearchOptions& options,
                                       SliceSpec slice,
                                       SearchControl& control) {
  std::optional<SliceConstraints> constraints;
  RETURN_IF_ERROR(Prepare<CoutPolicy>(query, options, slice, constraints));
  SliceSearch<CoutPolicy> search(query, options, *std::move(constraints));
  RETURN_IF_ERROR(search.Run(control));
  SliceResult result{slice, std::nullopt, search.stats()};
  if (search.RootSlot()) {
    result.plan = search.ExtractPlan();
    CostWithCout(*result.plan);
  }
  return result;
}

absl::StatusOr<SliceCount> CountSlicePlans(const Query& query,
                                           const SearchOptions& options,
                                           SliceSpec slice) {
  std::optional<SliceConstraints> constraints;
  RETURN_IF_ERROR(Prepare<CountPolicy>(query, options, slice, constraints));
  SliceSearch<CountPolicy> search(query, options, *std::move(constraints));
  SearchControl control;
  RETURN_IF_ERROR(search.Run(control));
  const auto root = search.RootSlot();
  return SliceCount{slice, root ? search.policy().Count(*root) : 0,
                    search.stats()};
}

}  // namespace sliceplan
