#include "rpc/slice_metrics.h"

namespace sliceplan {

prometheus::Histogram::BucketBoundaries SecondsBuckets() {
  prometheus::Histogram::BucketBoundaries out;
  for (double b = 0.001; b < 2000; b *= 4) out.push_back(b);
  return out;
}

SliceMetrics::SliceMetrics(prometheus::Registry& registry)
    : solved_(prometheus::BuildCounter()
                  .Name("sliceplan_slices_solved_total")
                  .Help("Slices solved")
                  .Register(registry)
                  .Add({})),
      splits_(prometheus::BuildCounter()
                  .Name("sliceplan_splits_total")
                  .Help("Joins costed: (left, right) pairs evaluated in solved slices")
                  .Register(registry)
                  .Add({})),
      seconds_(prometheus::BuildHistogram()
                   .Name("sliceplan_slice_solve_seconds")
                   .Help("Wall time of one slice's search")
                   .Register(registry)
                   .Add({}, SecondsBuckets())),
      splits_per_second_(prometheus::BuildGauge()
                             .Name("sliceplan_splits_per_second")
                             .Help("Splits per second of the last slice solved")
                             .Register(registry)
                             .Add({})),
      memo_bytes_(prometheus::BuildGauge()
                      .Name("sliceplan_memo_bytes")
                      .Help("Peak memo bytes of the last slice solved")
                      .Register(registry)
                      .Add({})) {}

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
