#include "core/search_control.h"

namespace sliceplan {

bool SearchControl::Check() {
  if ((cancel_ != nullptr && cancel_->load(std::memory_order_relaxed)) ||
      (cancelled_ && cancelled_())) {
    status_ = absl::CancelledError("search cancelled");
    return true;
  }
  if (deadline_ && Clock::now() >= *deadline_) {
    status_ = absl::DeadlineExceededError("search passed its deadline");
    return true;
  }
  return false;
}

}  // namespace sliceplan
