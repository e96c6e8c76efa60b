#include "worker/worker_metrics.h"

#include <string>
#include <utility>

#include "rpc/outcome_label.h"

namespace sliceplan {

WorkerMetrics::WorkerMetrics(std::function<int()> running, std::function<int()> waiting)
    : calls_(prometheus::BuildCounter()
                 .Name("sliceplan_slice_calls_total")
                 .Help("SolveSlice calls ended, by outcome")
                 .Register(set_.registry())),
      refusals_(set_.registry()) {
  set_.gauges().Add("sliceplan_slices_running", "Slices being solved now",
                    [f = std::move(running)] { return static_cast<double>(f()); });
  set_.gauges().Add("sliceplan_slices_waiting", "Slice calls waiting for a free slot",
                    [f = std::move(waiting)] { return static_cast<double>(f()); });
}

void WorkerMetrics::Call(const absl::Status& status, const SearchStats* stats) {
  calls_.Add({{"outcome", std::string(OutcomeLabel(status))}}).Increment();
  if (stats != nullptr) set_.slices().Solved(*stats);
}

}  // namespace sliceplan
