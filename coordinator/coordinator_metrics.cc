#include "coordinator/coordinator_metrics.h"

#include <algorithm>
#include <string>

#include "rpc/outcome_label.h"

namespace sliceplan {
CoordinatorMetrics::CoordinatorMetrics(const WorkerPool& pool, const Admission& admission)
    : requests_(prometheus::BuildCounter()
                    .Name("sliceplan_requests_total")
                    .Help("Optimize calls ended, by outcome and by the tier that answered")
                    .Register(set_.registry())),
      request_seconds_(prometheus::BuildHistogram()
                           .Name("sliceplan_request_seconds")
                           .Help("Wall time of an Optimize call, admission wait excluded")
                           .Register(set_.registry())
                           .Add({}, SecondsBuckets())),
      retries_(PlainCounter(set_.registry(), "sliceplan_slice_retries_total",
                            "Slices re-dispatched after a failed worker call")),
      hedges_(PlainCounter(set_.registry(), "sliceplan_slice_hedges_total",
                           "Second copies of a slow slice started")),
      deadline_misses_(PlainCounter(set_.registry(), "sliceplan_deadline_misses_total",
                                    "Requests whose deadline came before their search ended")),
      refusals_(set_.registry()) {
  set_.gauges().Add("sliceplan_pool_workers", "Workers in the pool, healthy or not",
                    [&pool] { return static_cast<double>(pool.Workers().size()); });
  set_.gauges().Add(
      "sliceplan_pool_healthy_workers", "Workers passing their health checks", [&pool] {
        const auto workers = pool.Workers();
        return static_cast<double>(std::count_if(workers.begin(), workers.end(),
                                                 [](const auto& w) { return w->Healthy(); }));
      });
  set_.gauges().Add("sliceplan_requests_running", "Optimize calls running now",
                    [&admission] { return static_cast<double>(admission.running()); });
  set_.gauges().Add("sliceplan_queue_depth", "Optimize calls waiting for a place",
                    [&admission] { return static_cast<double>(admission.queued()); });
}

void CoordinatorMetrics::Request(const absl::StatusOr<TieredOutcome>& outcome, SearchTier asked,
                                 double seconds) {
  const std::string tier(TierName(outcome.ok() ? outcome->tier : asked));
  requests_.Add({{"outcome", std::string(OutcomeLabel(outcome.status()))}, {"tier", tier}})
      .Increment();
  request_seconds_.Observe(seconds);
  const bool cut_short = outcome.ok() && outcome->exact_ran && outcome->coverage < 1;
  if (outcome.status().code() == absl::StatusCode::kDeadlineExceeded || cut_short) {
    deadline_misses_.Increment();
  }
  if (!outcome.ok()) return;
  retries_.Increment(outcome->schedule.retries);
  hedges_.Increment(outcome->schedule.hedges);
  for (const auto& slice : outcome->schedule.result.slices) set_.slices().Solved(slice.stats);
}

}  // namespace sliceplan
