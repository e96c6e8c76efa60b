#include "schedule/embedded_pool.h"

#include <memory>
#include <string>
#include <vector>

#include "core/status_macros.h"
#include "schedule/local_worker.h"

namespace sliceplan {

absl::StatusOr<ScheduleOutcome> RunEmbedded(const Query& query, const SearchOptions& options,
                                            uint32_t slice_count, int workers,
                                            const ScheduleOptions& schedule) {
  std::vector<std::unique_ptr<LocalWorker>> pool;
  std::vector<SliceWorker*> handles;
  for (int w = 0; w < workers; ++w) {
    pool.push_back(std::make_unique<LocalWorker>("local-" + std::to_string(w)));
    handles.push_back(pool.back().get());
  }
  return RunSlices(query, options, slice_count, handles, schedule);
}

absl::StatusOr<OptimizeResult> OptimizeEmbedded(const Query& query, const SearchOptions& options,
                                                uint32_t slice_count, int workers) {
  ASSIGN_OR_RETURN(ScheduleOutcome outcome, RunEmbedded(query, options, slice_count, workers));
  return std::move(outcome.result);
}

}  // namespace sliceplan
