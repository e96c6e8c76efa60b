// The embedded mode: the coordinator's scheduler (slice_scheduler.h) over a
// pool of in-process workers (local_worker.h), with no servers. The same
// scheduling and merging path as the RPC coordinator. Thread-safe.
#ifndef SLICEPLAN_SCHEDULE_EMBEDDED_POOL_H_
#define SLICEPLAN_SCHEDULE_EMBEDDED_POOL_H_

#include "absl/status/statusor.h"
#include "core/merge.h"
#include "core/model/query.h"
#include "core/slice_solver.h"
#include "schedule/slice_scheduler.h"
#include "schedule/tiered_search.h"
#include "schedule/timed_tiers.h"

namespace sliceplan {

// Solves slices 0..slice_count-1 on `workers` in-process workers and
// merges them. Errors as RunSlices. REQUIRES: workers >= 1.
absl::StatusOr<ScheduleOutcome> RunEmbedded(const Query& query, const SearchOptions& options,
                                            uint32_t slice_count, int workers,
                                            const ScheduleOptions& schedule = {});

// The tiers (tiered_search.h) over `workers` in-process workers. With
// `timer` and a deadline, they run on its thread and the answer comes by
// the deadline whatever CPU they get (timed_tiers.h); a run the deadline
// cut off is joined when `timer` is destroyed.
absl::StatusOr<TieredOutcome> RunEmbeddedTiers(const WideQuery& query, const SearchOptions& options,
                                               const TierRequest& request, int workers,
                                               const ScheduleOptions& schedule = {},
                                               TimedTiers* timer = nullptr);

// RunEmbedded's merged result alone.
absl::StatusOr<OptimizeResult> OptimizeEmbedded(const Query& query, const SearchOptions& options,
                                                uint32_t slice_count, int workers);

}  // namespace sliceplan

#endif  // SLICEPLAN_SCHEDULE_EMBEDDED_POOL_H_
