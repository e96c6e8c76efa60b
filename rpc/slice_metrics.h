// The slice figures both servers export: a worker for the slices it
// solved, the coordinator for the slices in its answers (whichever worker
// solved them). Metric names:
//
//   sliceplan_slices_solved_total      counter
//   sliceplan_splits_total             counter: (left, right) pairs costed
//   sliceplan_slice_solve_seconds      histogram: one slice's search
//   sliceplan_splits_per_second        gauge: the last slice's splits over its seconds
//   sliceplan_memo_bytes               gauge: the last slice's peak memo
//
// Thread-safe.
#ifndef SLICEPLAN_RPC_SLICE_METRICS_H_
#define SLICEPLAN_RPC_SLICE_METRICS_H_

#include "core/search/search_stats.h"
#include "prometheus/counter.h"
#include "prometheus/gauge.h"
#include "prometheus/histogram.h"
#include "prometheus/registry.h"

namespace sliceplan {

class SliceMetrics {
 public:
  // The families are added to `registry`, which must outlive this.
  explicit SliceMetrics(prometheus::Registry& registry);

  // One slice solved with these figures.
  void Solved(const SearchStats& stats);

 private:
  prometheus::Counter& solved_;
  prometheus::Counter& splits_;
  prometheus::Histogram& seconds_;
  prometheus::Gauge& splits_per_second_;
  prometheus::Gauge& memo_bytes_;
};

// A counter and a gauge without labels, made in `registry`.
prometheus::Counter& PlainCounter(prometheus::Registry& registry, const char* name,
                                  const char* help);
prometheus::Gauge& PlainGauge(prometheus::Registry& registry, const char* name, const char* help);

// Buckets for seconds from 1 ms to about 17 minutes, a factor 4 apart.
prometheus::Histogram::BucketBoundaries SecondsBuckets();

}  // namespace sliceplan

#endif  // SLICEPLAN_RPC_SLICE_METRICS_H_
