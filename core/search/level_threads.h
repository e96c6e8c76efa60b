// Runs a dynamic program level by level on several threads: the sets of one
// size depend only on smaller ones, so a level's work items run in any
// order on any thread, and a level starts once the one before it is done
// (no lock on the hot path: threads take items from one atomic counter).
// Each thread polls its own copy of the caller's SearchControl; the first
// to stop makes the others stop at their next item.
#ifndef SLICEPLAN_CORE_SEARCH_LEVEL_THREADS_H_
#define SLICEPLAN_CORE_SEARCH_LEVEL_THREADS_H_

#include <atomic>
#include <cstdint>
#include <thread>
#include <vector>

#include "absl/status/status.h"
#include "core/search/search_control.h"

namespace sliceplan {

// For each level in [first, last], calls item(level, index, thread, control)
// for every index in [0, items(level)) on `threads` threads (the caller's
// one of them); item returns false once its control has stopped. Returns
// OK, or the first stopped control's status. thread is in [0, threads).
template <class Items, class Item>
absl::Status RunLevels(int first, int last, int threads, const SearchControl& outer, Items&& items,
                       Item&& item) {
  // One cache line or more each: a control's tick counter is written per
  // set, and two threads' counters on one line cost a transfer per tick.
  struct alignas(64) OwnControl {
    SearchControl control;
  };
  std::vector<OwnControl> controls(threads, OwnControl{outer});
  std::atomic<bool> stopped{false};
  for (int level = first; level <= last && !stopped.load(); ++level) {
    const uint64_t count = items(level);
    std::atomic<uint64_t> next{0};
    const auto work = [&](int t) {
      for (uint64_t i = next.fetch_add(1); i < count && !stopped.load(std::memory_order_relaxed);
           i = next.fetch_add(1)) {
        if (!item(level, i, t, controls[t].control)) stopped.store(true);
      }
    };
    std::vector<std::thread> helpers;
    for (int t = 1; t < threads; ++t) helpers.emplace_back(work, t);
    work(0);
    for (std::thread& h : helpers) h.join();
  }
  for (const OwnControl& c : controls) {
    if (!c.control.status().ok()) return c.control.status();
  }
  return absl::OkStatus();
}

}  // namespace sliceplan

#endif  // SLICEPLAN_CORE_SEARCH_LEVEL_THREADS_H_
