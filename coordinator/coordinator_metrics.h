// What the coordinator exports at /metrics (--metrics-listen):
//
//   sliceplan_requests_total{outcome, tier}   counter: Optimize calls ended
//       (outcome as rpc/outcome_label.h; tier the one that answered, or
//       the one asked for when none did)
//   sliceplan_request_seconds                 histogram: their wall time
//   sliceplan_slice_retries_total             counter: slices re-dispatched after a failed call
//   sliceplan_slice_hedges_total              counter: second copies started
//   sliceplan_deadline_misses_total           counter: requests whose deadline came
//       before their search ended (DEADLINE_EXCEEDED, or an exact search cut short)
//   the slice figures of rpc/slice_metrics.h  for every slice in an answer
//   sliceplan_rpc_refused_total{method, reason}  counter: rpc/refusals.h
//   sliceplan_pool_workers, sliceplan_pool_healthy_workers,
//   sliceplan_requests_running, sliceplan_queue_depth   gauges read at scrape time
//
// Thread-safe.
#ifndef SLICEPLAN_COORDINATOR_COORDINATOR_METRICS_H_
#define SLICEPLAN_COORDINATOR_COORDINATOR_METRICS_H_

#include <memory>
#include <string_view>
#include <vector>

#include "absl/status/statusor.h"
#include "coordinator/admission.h"
#include "coordinator/worker_pool.h"
#include "prometheus/counter.h"
#include "prometheus/histogram.h"
#include "prometheus/registry.h"
#include "rpc/metric_set.h"
#include "rpc/refusals.h"
#include "schedule/tiered_search.h"

namespace sliceplan {

class CoordinatorMetrics {
 public:
  // `pool` and `admission` are read at each scrape and must outlive this.
  CoordinatorMetrics(const WorkerPool& pool, const Admission& admission);

  // One Optimize call ended with `outcome` after `seconds`; `asked` is the
  // tier the request named (auto included).
  void Request(const absl::StatusOr<TieredOutcome>& outcome, SearchTier asked, double seconds);

  // Refused calls of every method: logged and counted.
  RpcRefusals& refusals() { return refusals_; }

  // For ServeOptions::metrics.
  std::vector<std::weak_ptr<prometheus::Collectable>> Collectables() const {
    return set_.Collectables();
  }

 private:
  MetricSet set_;
  prometheus::Family<prometheus::Counter>& requests_;
  prometheus::Histogram& request_seconds_;
  prometheus::Counter& retries_;
  prometheus::Counter& hedges_;
  prometheus::Counter& deadline_misses_;
  RpcRefusals refusals_;
};

}  // namespace sliceplan

#endif  // SLICEPLAN_COORDINATOR_COORDINATOR_METRICS_H_
