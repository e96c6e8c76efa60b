// What each server's metrics are made of: one registry for its counters
// and histograms, the gauges read at scrape time, the slice figures both
// servers export (slice_metrics.h), and the pair of collectables the
// metrics endpoint serves (ServeOptions::metrics). Thread-safe once built.
#ifndef SLICEPLAN_RPC_METRIC_SET_H_
#define SLICEPLAN_RPC_METRIC_SET_H_

#include <memory>
#include <vector>

#include "prometheus/collectable.h"
#include "prometheus/registry.h"
#include "rpc/callback_gauges.h"
#include "rpc/slice_metrics.h"

namespace sliceplan {

class MetricSet {
 public:
  MetricSet()
      : registry_(std::make_shared<prometheus::Registry>()),
        gauges_(std::make_shared<CallbackGauges>()),
        slices_(*registry_) {}

  prometheus::Registry& registry() { return *registry_; }
  // Add gauges before the first scrape.
  CallbackGauges& gauges() { return *gauges_; }
  SliceMetrics& slices() { return slices_; }

  std::vector<std::weak_ptr<prometheus::Collectable>> Collectables() const {
    return {registry_, gauges_};
  }

 private:
  std::shared_ptr<prometheus::Registry> registry_;
  std::shared_ptr<CallbackGauges> gauges_;
  SliceMetrics slices_;
};

}  // namespace sliceplan

#endif  // SLICEPLAN_RPC_METRIC_SET_H_
