#include "coordinator/admission.h"

#include "absl/strings/str_cat.h"
#include "absl/time/time.h"
#include "schedule/slice_worker.h"

namespace sliceplan {

absl::Status Admission::Enter(std::chrono::steady_clock::time_point deadline,
                              const std::function<bool()>& cancelled,
                              std::optional<Ticket>& ticket) {
  absl::MutexLock lock(&mu_);
  const auto free = [this]() ABSL_EXCLUSIVE_LOCKS_REQUIRED(mu_) { return running_ < max_running_; };
  if (!free()) {
    if (queued_ >= max_queued_) {
      return BusyError(
          absl::StrCat("the coordinator runs ", running_, " requests and has ", queued_,
                       " waiting, its limits (--max_concurrent_requests=", max_running_,
                       ", --max_queued_requests=", max_queued_, "); try again later"));
    }
    ++queued_;
    // Polls the caller's cancel while it waits (gRPC has no wake-up for it).
    constexpr auto kPoll = std::chrono::milliseconds(20);
    absl::Status status;
    while (!mu_.AwaitWithTimeout(absl::Condition(&free), absl::FromChrono(kPoll))) {
      if (cancelled && cancelled()) {
        status = absl::CancelledError("cancelled while waiting for a place to run");
        break;
      }
      if (std::chrono::steady_clock::now() >= deadline) {
        status = absl::DeadlineExceededError("deadline passed while waiting for a place to run");
        break;
      }
    }
    --queued_;
    if (!status.ok()) return status;
  }
  ++running_;
  ticket.emplace(this);
  return absl::OkStatus();
}

void Admission::Leave() {
  absl::MutexLock lock(&mu_);
  --running_;
}

}  // namespace sliceplan
