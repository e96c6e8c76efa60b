// Gives back to the system the memory the allocator keeps after a burst
// of calls: a thread asks `should_trim` once a second and, when it says
// yes (no call runs or waits, and some call ended since it last said
// yes), calls glibc's malloc_trim(0). Without it a flood of large
// requests leaves the heap at its peak after every call has ended
// (bench/worker_queue_bench: 1.18 GB held after 200 calls of 2 MB).
// CapHeapArenas bounds what the allocator keeps while calls run.
#ifndef SLICEPLAN_RPC_IDLE_TRIM_H_
#define SLICEPLAN_RPC_IDLE_TRIM_H_

#include <functional>
#include <thread>

#include "absl/base/thread_annotations.h"
#include "absl/synchronization/mutex.h"

namespace sliceplan {

// Caps glibc's heap arenas at `arenas` (mallopt M_ARENA_MAX) unless the
// MALLOC_ARENA_MAX environment variable sets its own: by default every
// thread that allocates may get an arena of its own (up to 8 per core),
// and each keeps the large requests freed in it, so a server's peak grew
// with its call threads (bench/worker_queue_bench: 298 MiB with the
// default arenas, 88 MiB with 2; a search allocates its memo in large
// blocks, and 2 arenas did not change thread_speed_bench's times).
void CapHeapArenas(int arenas);

class IdleTrim {
 public:
  explicit IdleTrim(std::function<bool()> should_trim);
  ~IdleTrim();  // stops the thread, at most a second's wait
  IdleTrim(const IdleTrim&) = delete;
  IdleTrim& operator=(const IdleTrim&) = delete;

 private:
  void Loop();

  const std::function<bool()> should_trim_;
  absl::Mutex mu_;
  bool stop_ ABSL_GUARDED_BY(mu_) = false;
  std::thread thread_;  // last: starts once the rest exists
};

}  // namespace sliceplan

#endif  // SLICEPLAN_RPC_IDLE_TRIM_H_
