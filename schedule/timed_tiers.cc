#include "schedule/timed_tiers.h"

#include <algorithm>
#include <atomic>
#include <optional>
#include <system_error>
#include <utility>

#include "absl/strings/str_cat.h"
#include "absl/time/time.h"
#include "core/search/search_control.h"
#include "schedule/incumbent_board.h"

namespace sliceplan {

using Clock = std::chrono::steady_clock;

struct TimedTiers::Flight {
  explicit Flight(TimedTierInputs inputs) : in(std::move(inputs)) {}

  TimedTierInputs in;
  IncumbentBoard board;
  std::function<bool()> caller_cancelled;
  std::function<void(const ScheduleProgress&)> caller_progress;
  std::atomic<bool> cancel{false};
  absl::Mutex mu;
  std::optional<absl::StatusOr<TieredOutcome>> result ABSL_GUARDED_BY(mu);
  // Apart from `mu`, so a slow progress target never holds up the wait or
  // the reaping.
  absl::Mutex progress_mu;
  bool answered ABSL_GUARDED_BY(progress_mu) = false;  // the caller has its answer

  bool Ended() const ABSL_EXCLUSIVE_LOCKS_REQUIRED(mu) { return result.has_value(); }
};

namespace {

// The answer at the deadline: the best plan posted, unproven, or
// DEADLINE_EXCEEDED when none was.
absl::StatusOr<TieredOutcome> AtDeadline(const std::optional<Incumbent>& best,
                                         Clock::time_point start) {
  if (!best) {
    return absl::DeadlineExceededError(
        "the deadline passed before any tier had a plan (the search thread had too little CPU "
        "in time, or the tier asked for has no plan before it ends)");
  }
  TieredOutcome out;
  out.tier = best->tier;
  out.proven_optimal = false;
  out.coverage = 0;
  out.plan = best->plan;
  out.start_cost = best->start_cost;
  out.reason = absl::StrCat("the deadline passed while the tiers still ran; the best plan so far (",
                            TierName(best->tier), ") stands, not proven optimal");
  out.wall_seconds = SecondsBetween(start, Clock::now());
  return out;
}

}  // namespace

TimedTiers::TimedTiers(Clock::duration slack) : slack_(slack) {}

TimedTiers::~TimedTiers() {
  std::vector<std::pair<std::shared_ptr<Flight>, std::thread>> flights;
  {
    absl::MutexLock lock(&mu_);
    flights.swap(flights_);
  }
  for (auto& [flight, thread] : flights) {
    flight->cancel = true;
    thread.join();
  }
}

void TimedTiers::Reap() {
  for (auto it = flights_.begin(); it != flights_.end();) {
    bool ended;
    {
      absl::MutexLock lock(&it->first->mu);
      ended = it->first->Ended();
    }
    if (!ended) {
      ++it;
      continue;
    }
    it->second.join();  // it has stored its result: about to return
    it = flights_.erase(it);
  }
}

absl::StatusOr<TieredOutcome> TimedTiers::Run(TimedTierInputs in, Work work) {
  const auto start = Clock::now();
  auto caller_cancelled = std::move(in.schedule.cancelled);
  auto caller_progress = std::move(in.schedule.on_progress);
  auto flight = std::make_shared<Flight>(std::move(in));
  Flight* f = flight.get();
  f->caller_cancelled = std::move(caller_cancelled);
  f->caller_progress = std::move(caller_progress);
  f->in.request.board = &f->board;
  // Weak: the scheduler's own reaper may keep copies of these past the
  // flight.
  const std::weak_ptr<Flight> weak = flight;
  f->in.schedule.cancelled = [weak] {
    const auto held = weak.lock();
    return held == nullptr || held->cancel.load();
  };
  if (f->caller_progress) {
    f->in.schedule.on_progress = [weak](const ScheduleProgress& p) {
      const auto held = weak.lock();
      if (held == nullptr) return;
      absl::MutexLock lock(&held->progress_mu);
      if (!held->answered) held->caller_progress(p);
    };
  }
  std::thread thread;
  try {
    thread = std::thread([flight, work = std::move(work)] {
      std::vector<SliceWorker*> workers;
      for (const auto& w : flight->in.workers) workers.push_back(w.get());
      const TimedTierInputs& own = flight->in;
      absl::StatusOr<TieredOutcome> r =
          work ? work(own, workers)
               : RunTiers(own.query, own.options, own.request, workers, own.schedule);
      flight->in.hold.reset();  // the run has stopped: its place is free
      absl::MutexLock lock(&flight->mu);
      flight->result = std::move(r);
    });
  } catch (const std::system_error& e) {
    return absl::ResourceExhaustedError(
        absl::StrCat("busy: no thread could be started for the search (", e.what(), "); retry"));
  }
  {
    absl::MutexLock lock(&mu_);
    Reap();
    flights_.emplace_back(flight, std::move(thread));
  }
  absl::StatusOr<TieredOutcome> answer = Wait(*f, start);
  f->cancel = true;  // a no-op for a run that ended
  absl::MutexLock lock(&f->progress_mu);
  f->answered = true;
  return answer;
}

absl::StatusOr<TieredOutcome> TimedTiers::Wait(Flight& f, Clock::time_point start) const {
  const std::optional<Clock::time_point> deadline = f.in.schedule.deadline;
  absl::MutexLock lock(&f.mu);
  while (true) {
    // Wakes for the result, the caller's cancel (polled) or the deadline.
    Clock::duration wait = kCancelPoll;
    if (deadline) {
      wait = std::min(wait, std::max(Clock::duration{0}, *deadline + slack_ - Clock::now()));
    }
    f.mu.AwaitWithTimeout(absl::Condition(&f, &Flight::Ended), absl::FromChrono(wait));
    if (f.Ended()) return std::move(*f.result);
    if (f.caller_cancelled && f.caller_cancelled()) {
      return absl::CancelledError("the caller cancelled");
    }
    if (deadline && Clock::now() >= *deadline + slack_) return AtDeadline(f.board.Best(), start);
  }
}

}  // namespace sliceplan
