#include "core/capacity/capacity_model.h"

#include <algorithm>
#include <bit>
#include <cmath>

#include "core/cost/cout_policy.h"
#include "core/graph/connected_set_estimate.h"
#include "core/graph/join_graph.h"
#include "core/search/connected_strategy.h"
#include "core/slice_planner.h"
#include "core/slicing/search_estimate.h"

namespace sliceplan {

ExactWork MeasureExactWork(const Query& query, const SearchOptions& options) {
  ExactWork work;
  if (options.cross_products) return work;
  const ConnectedSetCount count = EstimateConnectedSets(query);
  work.connected_sets = count.sets;
  work.estimated = !count.exact;
  return work;
}

double ThreadSpeedup(const SearchOptions& options, bool pulled) {
  const bool threads = options.cross_products || (pulled && options.shape == PlanShape::kBushy);
  if (!threads || options.threads <= 1) return 1;
  return 1 + kThreadEfficiency * (options.threads - 1);
}

ExactForecast ForecastExact(const Query& query, const SearchOptions& options, int concurrent_slices,
                            const MachineRates& rates, uint32_t slices) {
  return ForecastExact(query, options, MeasureExactWork(query, options), concurrent_slices, rates,
                       slices);
}

ExactForecast ForecastExact(const Query& query, const SearchOptions& options, const ExactWork& work,
                            int concurrent_slices, const MachineRates& rates, uint32_t slices) {
  ExactForecast out;
  concurrent_slices = std::max(1, concurrent_slices);
  out.slices = slices != 0
                   ? slices
                   : ChooseSliceCount(query, options, concurrent_slices, work.connected_sets);
  const int k = std::countr_zero(out.slices);
  const double rounds = std::ceil(static_cast<double>(out.slices) / concurrent_slices);
  const int n = query.size();
  double unit_seconds = 0;
  bool pulled = false;  // a connected-only search in pull order (threads)
  if (options.cross_products) {
    out.work_units = DenseSplits(n, options.shape, k, true);
    out.memo_bytes = DenseSlots(n, options.shape, k) * CoutPolicy::kBytesPerSlot;
    unit_seconds = rates.dense_split_seconds;
  } else {
    const double shrink = options.shape == PlanShape::kBushy ? 21.0 / 27.0 : 0.75;
    out.work_units = work.connected_sets * std::pow(shrink, k);
    // The policy's entry and cached cardinality per set, in the memo the
    // search would choose (direct or hashed, connected_strategy.h).
    const bool hyperedges = JoinGraph(query).has_hyperedges();
    constexpr uint64_t kBytesPerSet = CoutPolicy::kBytesPerSlot + sizeof(double);
    const uint64_t sparsity = DirectSparsity(options.shape, hyperedges);
    out.memo_bytes =
        ConnectedMemoBytes(n, out.work_units, kBytesPerSet, options.memo_limit_bytes, sparsity);
    // (ThreadSpeedup counts it for bushy plans only.)
    pulled = !hyperedges &&
             TakesDirectMemo(n, out.work_units, kBytesPerSet, options.memo_limit_bytes, sparsity);
    out.estimated = work.estimated;
    unit_seconds = rates.connected_set_seconds;
  }
  out.seconds = rounds * (out.work_units * unit_seconds / ThreadSpeedup(options, pulled) +
                          rates.slice_overhead_seconds);
  return out;
}

ExactForecast FastestForecast(const Query& query, const SearchOptions& options,
                              const ExactWork& work, int concurrent_slices,
                              const MachineRates& rates) {
  ExactForecast best = ForecastExact(query, options, work, concurrent_slices, rates);
  // The largest slice count the planner picks for any pool up to this one.
  uint32_t most = best.slices;
  for (int w = 1; w < concurrent_slices; ++w) {
    most = std::max(most, ChooseSliceCount(query, options, w, work.connected_sets));
  }
  for (uint32_t p = 1; p <= most && p != 0; p *= 2) {
    const ExactForecast f = ForecastExact(query, options, work, concurrent_slices, rates, p);
    const bool fits = f.memo_bytes <= static_cast<double>(options.memo_limit_bytes);
    if (fits && f.seconds < best.seconds) best = f;
  }
  return best;
}

}  // namespace sliceplan
