#include "rpc/idle_trim.h"

#include <malloc.h>

#include "absl/time/time.h"

namespace sliceplan {

IdleTrim::IdleTrim(std::function<bool()> should_trim)
    : should_trim_(std::move(should_trim)), thread_([this] { Loop(); }) {}

IdleTrim::~IdleTrim() {
  {
    absl::MutexLock lock(&mu_);
    stop_ = true;
  }
  thread_.join();
}

void IdleTrim::Loop() {
  absl::MutexLock lock(&mu_);
  while (!mu_.AwaitWithTimeout(absl::Condition(&stop_), absl::Seconds(1))) {
    mu_.Unlock();
    if (should_trim_()) malloc_trim(0);
    mu_.Lock();
  }
}

}  // namespace sliceplan
