// How many requests the coordinator runs at once, and how many may wait:
// past both, a request is refused at once with RESOURCE_EXHAUSTED naming
// the numbers, so a burst cannot pile up unbounded work or memory. A
// waiting request gives up at its deadline or when its caller cancels.
// Thread-safe.
#ifndef SLICEPLAN_COORDINATOR_ADMISSION_H_
#define SLICEPLAN_COORDINATOR_ADMISSION_H_

#include <chrono>
#include <functional>
#include <optional>

#include "absl/base/thread_annotations.h"
#include "absl/status/status.h"
#include "absl/synchronization/mutex.h"

namespace sliceplan {

class Admission {
 public:
  // REQUIRES: max_running >= 1, max_queued >= 0.
  Admission(int max_running, int max_queued) : max_running_(max_running), max_queued_(max_queued) {}

  // A place among the running requests; released by the destructor.
  class Ticket {
   public:
    explicit Ticket(Admission* owner) : owner_(owner) {}
    Ticket(Ticket&& other) noexcept : owner_(other.owner_) { other.owner_ = nullptr; }
    Ticket(const Ticket&) = delete;
    Ticket& operator=(const Ticket&) = delete;
    Ticket& operator=(Ticket&&) = delete;
    ~Ticket() {
      if (owner_ != nullptr) owner_->Leave();
    }

   private:
    Admission* owner_;
  };

  // Waits for a place until `deadline`, polling `cancelled` (may be empty).
  // Errors: RESOURCE_EXHAUSTED when max_queued requests already wait,
  // DEADLINE_EXCEEDED or CANCELLED while waiting. OK fills `ticket`.
  absl::Status Enter(std::chrono::steady_clock::time_point deadline,
                     const std::function<bool()>& cancelled, std::optional<Ticket>& ticket)
      ABSL_LOCKS_EXCLUDED(mu_);

  // Requests running now (metrics).
  int running() const ABSL_LOCKS_EXCLUDED(mu_) {
    absl::MutexLock lock(&mu_);
    return running_;
  }

  // Requests waiting now (tests, logs, metrics).
  int queued() const ABSL_LOCKS_EXCLUDED(mu_) {
    absl::MutexLock lock(&mu_);
    return queued_;
  }

 private:
  void Leave() ABSL_LOCKS_EXCLUDED(mu_);

  const int max_running_;
  const int max_queued_;
  mutable absl::Mutex mu_;
  int running_ ABSL_GUARDED_BY(mu_) = 0;
  int queued_ ABSL_GUARDED_BY(mu_) = 0;
};

}  // namespace sliceplan

#endif  // SLICEPLAN_COORDINATOR_ADMISSION_H_
