#include "core/search/search_control.h"

namespace sliceplan {

bool SearchControl::Check() {
  bool cancelled = cancel_ != nullptr && cancel_->load(std::memory_order_relaxed);
  for (const auto& check : checks_) cancelled = cancelled || check();
  if (cancelled) {
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
