// A one-line progress bar on stderr for long runs: slices done / total,
// best cost so far, ETA; for the anytime search, the plans in its set and
// the trees evaluated. Silent for the first second and whenever stderr
// is not a terminal (or the user asked for quiet). Thread-safe.
#ifndef SLICEPLAN_CLI_PROGRESS_BAR_H_
#define SLICEPLAN_CLI_PROGRESS_BAR_H_

#include "absl/base/thread_annotations.h"
#include "absl/synchronization/mutex.h"
#include "schedule/slice_scheduler.h"

namespace sliceplan::cli {

class ProgressBar {
 public:
  explicit ProgressBar(bool enabled);
  ~ProgressBar();  // clears the line if one was drawn
  void Update(const ScheduleProgress& p) ABSL_LOCKS_EXCLUDED(mu_);

 private:
  const bool enabled_;
  absl::Mutex mu_;
  bool drawn_ ABSL_GUARDED_BY(mu_) = false;
};

}  // namespace sliceplan::cli

#endif  // SLICEPLAN_CLI_PROGRESS_BAR_H_
