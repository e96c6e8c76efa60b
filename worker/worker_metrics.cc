#include "worker/worker_metrics.h"

#include <string>
#include <utility>

#include "rpc/outcome_label.h"

namespace sliceplan {

WorkerMetrics::WorkerMetrics(std::function<int()> running, std::function<int()> waiting)
    : registry_(std::make_shared<prometheus::Registry>()),
      gauges_(std::make_shared<CallbackGauges>()),
      calls_(prometheus::BuildCounter()
                 .Name("sliceplan_slice_calls_total")
                 .Help("SolveSlice calls ended, by outcome")
                 .Register(*registry_)),
      slices_(*registry_) {
  gauges_->Add("sliceplan_slices_running", "Slices being solved now",
               [f = std::move(running)] { return static_cast<double>(f()); });
  gauges_->Add("sliceplan_slices_waiting", "Slice calls waiting for a free slot",
               [f = std::move(waiting)] { return static_cast<double>(f()); });
}

void WorkerMetrics::Call(const absl::Status& status, const SearchStats* stats) {
  calls_.Add({{"outcome", std::string(OutcomeLabel(status))}}).Increment();
  if (stats != nullptr) slices_.Solved(*stats);
}

std::vector<std::weak_ptr<prometheus::Collectable>> WorkerMetrics::Collectables() const {
  return {registry_, gauges_};
}

}  // namespace sliceplan
