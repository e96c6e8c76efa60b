#include "rpc/slice_metrics.h"

namespace sliceplan {

prometheus::Histogram::BucketBoundaries SecondsBuckets() {
  prometheus::Histogram::BucketBoundaries out;
  for (double b = 0.001; b < 2000; b *= 4) out.push_back(b);
  return out;
}

prometheus::Counter& PlainCounter(prometheus::Registry& registry, const char* name,
                                  const char* help) {
  return prometheus::BuildCounter().Name(name).Help(help).Register(registry).Add({});
}

prometheus::Gauge& PlainGauge(prometheus::Registry& registry, const char* name, const char* help) {
  return prometheus::BuildGauge().Name(name).Help(help).Register(registry).Add({});
}

SliceMetrics::SliceMetrics(prometheus::Registry& registry)
    : solved_(PlainCounter(registry, "sliceplan_slices_solved_total", "Slices solved")),
      splits_(PlainCounter(registry, "sliceplan_splits_total",
                           "Joins costed: (left, right) pairs evaluated in solved slices")),
      seconds_(prometheus::BuildHistogram()
                   .Name("sliceplan_slice_solve_seconds")
                   .Help("Wall time of one slice's search")
                   .Register(registry)
                   .Add({}, SecondsBuckets())),
      splits_per_second_(PlainGauge(registry, "sliceplan_splits_per_second",
                                    "Splits per second of the last slice solved")),
      memo_bytes_(PlainGauge(registry, "sliceplan_memo_bytes",
                             "Peak memo bytes of the last slice solved")) {}

void SliceMetrics::Solved(const SearchStats& stats) {
  solved_.Increment();
  splits_.Increment(static_cast<double>(stats.splits));
  seconds_.Observe(stats.seconds);
  if (stats.seconds > 0) {
    splits_per_second_.Set(static_cast<double>(stats.splits) / stats.seconds);
  }
  memo_bytes_.Set(static_cast<double>(stats.memo_bytes));
}

}  // namespace sliceplan
