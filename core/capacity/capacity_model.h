// Predicting an exact search's wall time on a pool before running it: the
// model `auto` uses to choose a tier, idp to size its blocks, and the
// capacity planner prints (docs/tiers.md).
//
// With cross products the work of each slice is known exactly (the closed
// forms of search_estimate.h). Without, the connected sets of the join
// graph are counted, or estimated past a cap (connected_set_estimate.h),
// and a slice is taken to do (21/27)^k (bushy) or (3/4)^k (left-deep) of
// the unsliced work, as in the cross-product space. Seconds come from
// per-unit rates: the defaults were measured on the project's reference
// machine (docs/benchmarks.md); rate_calibration.h measures them here.
// Pure.
#ifndef SLICEPLAN_CORE_CAPACITY_CAPACITY_MODEL_H_
#define SLICEPLAN_CORE_CAPACITY_CAPACITY_MODEL_H_

#include <cstdint>

#include "core/model/query.h"
#include "core/search_options.h"

namespace sliceplan {

// auto runs the exact search when predicted to take at most this share of
// the time left (the rest is the margin for the model's error).
inline constexpr double kExactShare = 0.6;

struct MachineRates {
  // One split of the dense kernel (a default between its unsliced and its
  // sliced rate on the reference machine, docs/benchmarks.md).
  double dense_split_seconds = 1.1e-9;
  // One connected set of the connected-only search, its pairs included
  // (a default only: measured per query, rate_calibration.h).
  double connected_set_seconds = 8e-6;
  // A round trip of one slice call (scheduling, the call, the merge).
  double slice_overhead_seconds = 0.2e-3;
};

// The size of the whole (unsliced) exact search, which does not depend on
// the pool: computed once, then forecast for any number of concurrent slices.
struct ExactWork {
  double connected_sets = 0;  // without cross products
  bool estimated = false;     // connected sets sampled, not counted
};
ExactWork MeasureExactWork(const Query& query, const SearchOptions& options);

struct ExactForecast {
  double seconds = 0;      // wall time on the pool
  uint32_t slices = 1;     // P, as the coordinator would choose it
  double work_units = 0;   // splits (cross products) or connected sets of one slice
  double memo_bytes = 0;   // per slice
  bool estimated = false;  // the work comes from sampled connected sets
};

// What each thread past the first adds to one slice's speed when
// options.threads share its memo (0.75: 2 threads measured 1.5-1.9x on
// 20-relation slices, docs/benchmarks.md), for the searches that thread:
// the dense kernel (cross products) and, without cross products, the
// pulled bushy searches (`pulled`: a direct memo over binary predicates,
// connected_strategy.h). DPhyp and left-deep connected searches run on
// one thread.
inline constexpr double kThreadEfficiency = 0.75;
double ThreadSpeedup(const SearchOptions& options, bool pulled = false);

// The exact search of `query` on `concurrent_slices` slices at once (each slice
// on options.threads threads), P chosen by ChooseSliceCount unless
// `slices` (a power of two) is given.
ExactForecast ForecastExact(const Query& query, const SearchOptions& options, int concurrent_slices,
                            const MachineRates& rates = {}, uint32_t slices = 0);
// The fastest forecast on `concurrent_slices` of the planner's slice count
// (ChooseSliceCount) and every P = 1, 2, 4, ... up to the largest the
// planner picks for any smaller pool, whose slice memo fits
// options.memo_limit_bytes: the slice count auto runs the exact search
// with. A pool that grows never gets a slower forecast (it could always run
// a smaller pool's P). O(concurrent_slices) planner calls.
ExactForecast FastestForecast(const Query& query, const SearchOptions& options,
                              const ExactWork& work, int concurrent_slices,
                              const MachineRates& rates = {});

// The same from work measured once (MeasureExactWork of the same query
// and options): no connected set is counted again, for the slice count
// either.
ExactForecast ForecastExact(const Query& query, const SearchOptions& options, const ExactWork& work,
                            int concurrent_slices, const MachineRates& rates = {},
                            uint32_t slices = 0);

}  // namespace sliceplan

#endif  // SLICEPLAN_CORE_CAPACITY_CAPACITY_MODEL_H_
