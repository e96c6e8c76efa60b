#include "rpc/idle_trim.h"

#include <malloc.h>

#include <cstdlib>

#include "absl/time/time.h"

namespace sliceplan {

void CapHeapArenas(int arenas) {
  if (std::getenv("MALLOC_ARENA_MAX") == nullptr) mallopt(M_ARENA_MAX, arenas);
}

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
