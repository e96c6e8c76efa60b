#include "core/capacity_model.h"

#include <algorithm>
#include <bit>
#include <cmath>
#include <limits>

#include "core/cout_policy.h"
#include "core/search_estimate.h"
#include "core/slice_planner.h"

namespace sliceplan {

ExactForecast ForecastExact(const Query& query, const SearchOptions& options, int slots,
                            double horizon_seconds, const MachineRates& rates, uint32_t slices) {
  ExactForecast out;
  slots = std::max(1, slots);
  out.slices = slices != 0 ? slices : ChooseSliceCount(query, options, slots);
  const int k = std::countr_zero(out.slices);
  const double rounds = std::ceil(static_cast<double>(out.slices) / slots);
  const int n = query.size();
  if (options.cross_products) {
    out.work_units = DenseSplits(n, options.shape, k, true);
    out.memo_bytes = DenseSlots(n, options.shape, k) * CoutPolicy::kBytesPerSlot;
    out.seconds =
        rounds * (out.work_units * rates.dense_split_seconds + rates.slice_overhead_seconds);
    return out;
  }
  const double affordable = horizon_seconds * slots / rates.connected_set_seconds;
  const auto cap = static_cast<uint64_t>(std::clamp(affordable, 1.0, 5e7)) + 1;
  const uint64_t sets = CountConnectedSets(query, cap);
  if (sets >= cap) {
    out.beyond_horizon = true;
    out.seconds = std::numeric_limits<double>::infinity();
    out.work_units = static_cast<double>(sets);
    return out;
  }
  const double shrink = options.shape == PlanShape::kBushy ? 21.0 / 27.0 : 0.75;
  out.work_units = static_cast<double>(sets) * std::pow(shrink, k);
  // The hash memo: about 40 bytes per connected set (common practice for an
  // open-addressing table at half load).
  out.memo_bytes = out.work_units * 40;
  out.seconds =
      rounds * (out.work_units * rates.connected_set_seconds + rates.slice_overhead_seconds);
  return out;
}

}  // namespace sliceplan
