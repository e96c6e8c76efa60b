// Where a tiered run posts each better plan as it finds it, so that a
// caller who cannot wait for the run (its deadline passed while the run's
// thread was starved of CPU) can answer with the best plan so far
// (schedule/timed_tiers.h). Thread-safe: one run posts, any thread reads.
#ifndef SLICEPLAN_SCHEDULE_INCUMBENT_BOARD_H_
#define SLICEPLAN_SCHEDULE_INCUMBENT_BOARD_H_

#include <optional>

#include "absl/base/thread_annotations.h"
#include "absl/synchronization/mutex.h"
#include "core/model/search_tier.h"
#include "tiers/wide_plan.h"

namespace sliceplan {

// One posted plan: the plan, the tier that found it and the greedy
// plan's cost the run started from.
struct Incumbent {
  WidePlan plan;
  SearchTier tier = SearchTier::kGreedy;
  double start_cost = 0;
};

class IncumbentBoard {
 public:
  // Keeps `incumbent` unless the board holds a plan at most as costly.
  void Post(const Incumbent& incumbent) ABSL_LOCKS_EXCLUDED(mu_) {
    absl::MutexLock lock(&mu_);
    if (best_ && !(incumbent.plan.cost() < best_->plan.cost())) return;
    best_ = incumbent;
  }

  // The cheapest plan posted; none before the first.
  std::optional<Incumbent> Best() const ABSL_LOCKS_EXCLUDED(mu_) {
    absl::MutexLock lock(&mu_);
    return best_;
  }

 private:
  mutable absl::Mutex mu_;
  std::optional<Incumbent> best_ ABSL_GUARDED_BY(mu_);
};

}  // namespace sliceplan

#endif  // SLICEPLAN_SCHEDULE_INCUMBENT_BOARD_H_
