#include "schedule/embedded_pool.h"

#include <memory>
#include <string>
#include <vector>

#include "core/model/status_macros.h"
#include "schedule/local_worker.h"

namespace sliceplan {

namespace {

struct LocalPool {
  explicit LocalPool(int workers) {
    for (int w = 0; w < workers; ++w) {
      pool.push_back(std::make_unique<LocalWorker>("local-" + std::to_string(w)));
      handles.push_back(pool.back().get());
    }
  }
  std::vector<std::unique_ptr<LocalWorker>> pool;
  std::vector<SliceWorker*> handles;
};

}  // namespace

absl::StatusOr<ScheduleOutcome> RunEmbedded(const Query& query, const SearchOptions& options,
                                            uint32_t slice_count, int workers,
                                            const ScheduleOptions& schedule) {
  LocalPool pool(workers);
  return RunSlices(query, options, slice_count, pool.handles, schedule);
}

absl::StatusOr<TieredOutcome> RunEmbeddedTiers(const WideQuery& query, const SearchOptions& options,
                                               const TierRequest& request, int workers,
                                               const ScheduleOptions& schedule, TimedTiers* timer) {
  if (timer != nullptr && schedule.deadline) {
    std::vector<std::shared_ptr<SliceWorker>> pool;
    for (int w = 0; w < workers; ++w) {
      pool.push_back(std::make_shared<LocalWorker>("local-" + std::to_string(w)));
    }
    return timer->Run({query, options, request, std::move(pool), schedule});
  }
  LocalPool pool(workers);
  return RunTiers(query, options, request, pool.handles, schedule);
}

absl::StatusOr<OptimizeResult> OptimizeEmbedded(const Query& query, const SearchOptions& options,
                                                uint32_t slice_count, int workers) {
  ASSIGN_OR_RETURN(ScheduleOutcome outcome, RunEmbedded(query, options, slice_count, workers));
  return std::move(outcome.result);
}

}  // namespace sliceplan
