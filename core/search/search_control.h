// Cancellation and deadline checks for a running search.
//
// The enumerators call Tick(work) after each memo entry with the number of
// splits it evaluated; every kTickWork splits Tick consults the clock and
// the cancel flag, so the check costs nothing on the hot path. A control is
// owned by one search (one thread); the cancel flag may be set from any
// thread.
#ifndef SLICEPLAN_CORE_SEARCH_SEARCH_CONTROL_H_
#define SLICEPLAN_CORE_SEARCH_SEARCH_CONTROL_H_

#include <atomic>
#include <chrono>
#include <cstdint>
#include <functional>
#include <optional>
#include <vector>

#include "absl/status/status.h"

namespace sliceplan {

class SearchControl {
 public:
  using Clock = std::chrono::steady_clock;
  static constexpr int64_t kTickWork = 1 << 16;
  static constexpr int kTickCalls = 64;

  // Never stops.
  SearchControl() = default;
  // Stops once *cancel is true (if given) or the deadline passed (if given).
  SearchControl(const std::atomic<bool>* cancel, std::optional<Clock::time_point> deadline)
      : cancel_(cancel), deadline_(deadline) {}
  // Also stops once `cancelled()` returns true (polled with the clock, so
  // it may take a lock or ask an RPC context). Checks accumulate.
  void set_cancel_check(std::function<bool()> cancelled) {
    checks_.push_back(std::move(cancelled));
  }

  // Returns true when the search must stop; status() then says why. Also
  // checks every kTickCalls calls, for searches whose splits are costly
  // (Pareto sets) and so few.
  // Once it has returned true it returns true on every later call, so a
  // policy that ticks inside one memo entry and the enumerator that ticks
  // after it agree.
  bool Tick(uint64_t work) {
    if (!status_.ok()) return true;
    budget_ -= static_cast<int64_t>(work);
    if (budget_ > 0 && ++calls_ < kTickCalls) return false;
    budget_ = kTickWork;
    calls_ = 0;
    return Check();
  }
  // CANCELLED or DEADLINE_EXCEEDED after Tick returned true, else OK.
  absl::Status status() const { return status_; }

  // The deadline, if any; and the same control with an earlier one.
  std::optional<Clock::time_point> deadline() const { return deadline_; }
  void TightenDeadline(Clock::time_point by) {
    if (!deadline_ || by < *deadline_) deadline_ = by;
  }

 private:
  bool Check();

  const std::atomic<bool>* cancel_ = nullptr;
  std::vector<std::function<bool()>> checks_;
  std::optional<Clock::time_point> deadline_;
  int64_t budget_ = kTickWork;
  int calls_ = 0;
  absl::Status status_;
};

// Seconds from `a` to `b` (negative when b comes first): the one clock
// helper the searches, the forecasts and the tiers share.
inline double SecondsBetween(SearchControl::Clock::time_point a,
                             SearchControl::Clock::time_point b) {
  return std::chrono::duration<double>(b - a).count();
}

}  // namespace sliceplan

#endif  // SLICEPLAN_CORE_SEARCH_SEARCH_CONTROL_H_
