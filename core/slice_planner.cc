#include "core/slice_planner.h"

#include <algorithm>
#include <cmath>

#include "core/cost/cout_policy.h"
#include "core/graph/connected_sets.h"
#include "core/slicing/search_estimate.h"

namespace sliceplan {
namespace {

uint32_t ChooseDense(const Query& query, const SearchOptions& options, int workers) {
  const int n = query.size();
  const PlanShape shape = options.shape;
  if (DenseSplits(n, shape, 0, true) < kMinSplitsToSlice) return 1;
  const int max_k = std::min(MaxSliceBits(n, shape), kMaxPlannedSliceBits);
  int best_k = -1;
  double best_time = 0;
  for (int k = 0; k <= max_k; ++k) {
    const double bytes = DenseSlots(n, shape, k) * CoutPolicy::kBytesPerSlot;
    if (bytes > static_cast<double>(options.memo_limit_bytes)) continue;
    const double rounds = std::ceil(std::ldexp(1.0, k) / workers);
    const double time = rounds * DenseSplits(n, shape, k, true);
    if (best_k < 0 || time < best_time * (1 - 1e-9)) best_k = k, best_time = time;
  }
  // Nothing fits: the smallest memo, which SolveSlice then refuses with the
  // numbers.
  return uint32_t{1} << (best_k < 0 ? max_k : best_k);
}

}  // namespace

uint32_t ChooseSliceCount(const Query& query, const SearchOptions& options, int workers) {
  if (options.cross_products) return ChooseDense(query, options, workers);
  return ChooseSliceCount(query, options, workers,
                          static_cast<double>(CountConnectedSets(query, kSmallSearchSets)));
}

uint32_t ChooseSliceCount(const Query& query, const SearchOptions& options, int workers,
                          double connected_sets) {
  if (options.cross_products) return ChooseDense(query, options, workers);
  // Connected sets only: small searches stay whole; large ones get one
  // slice per worker (the shrink per slice depends on the graph).
  if (connected_sets < static_cast<double>(kSmallSearchSets)) return 1;
  int k = 0;
  const int max_k = std::min(MaxSliceBits(query.size(), options.shape), kMaxPlannedSliceBits);
  while (k < max_k && (1 << k) < workers) ++k;
  return uint32_t{1} << k;
}

}  // namespace sliceplan
