// What a worker exports at /metrics (--metrics-listen):
//
//   sliceplan_slice_calls_total{outcome}   counter: SolveSlice calls ended
//       (outcome as rpc/outcome_label.h)
//   the slice figures of rpc/slice_metrics.h  for every slice it solved
//   sliceplan_rpc_refused_total{method, reason}  counter: rpc/refusals.h
//   sliceplan_slices_running, sliceplan_slices_waiting   gauges read at scrape time
//
// Thread-safe.
#ifndef SLICEPLAN_WORKER_WORKER_METRICS_H_
#define SLICEPLAN_WORKER_WORKER_METRICS_H_

#include <functional>
#include <memory>
#include <vector>

#include "absl/status/status.h"
#include "core/search/search_stats.h"
#include "prometheus/counter.h"
#include "prometheus/registry.h"
#include "rpc/metric_set.h"
#include "rpc/refusals.h"

namespace sliceplan {

class WorkerMetrics {
 public:
  // `running` and `waiting` are read at each scrape (from the endpoint's
  // threads) and must stay callable while this lives.
  WorkerMetrics(std::function<int()> running, std::function<int()> waiting);

  // One SolveSlice call ended; `stats` are the slice's when it was solved.
  void Call(const absl::Status& status, const SearchStats* stats);

  // Refused calls (a full queue): logged and counted.
  RpcRefusals& refusals() { return refusals_; }

  // For ServeOptions::metrics.
  std::vector<std::weak_ptr<prometheus::Collectable>> Collectables() const {
    return set_.Collectables();
  }

 private:
  MetricSet set_;
  prometheus::Family<prometheus::Counter>& calls_;
  RpcRefusals refusals_;
};

}  // namespace sliceplan

#endif  // SLICEPLAN_WORKER_WORKER_METRICS_H_
