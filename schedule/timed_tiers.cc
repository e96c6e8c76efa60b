#include "schedule/timed_tiers.h"

#include <algorithm>
#include <atomic>
#include <optional>
#include <utility>

#include "absl/strings/str_cat.h"
#include "absl/time/time.h"
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
  bool answered ABSL_GUARDED_BY(mu) = false;  // the caller has its answer
  std::optional<absl::StatusOr<TieredOutcome>> result ABSL_GUARDED_BY(mu);

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
  out.wall_seconds = std::chrono::duration<double>(Clock::now() - start).count();
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
  f->in.schedule.cancelled = [f] { return f->cancel.load(); };
  if (f->caller_progress) {
    f->in.schedule.on_progress = [f](const ScheduleProgress& p) {
      absl::MutexLock lock(&f->mu);
      if (!f->answered) f->caller_progress(p);
    };
  }
  std::thread thread([flight, work = std::move(work)] {
    std::vector<SliceWorker*> workers;
    for (const auto& w : flight->in.workers) workers.push_back(w.get());
    const TimedTierInputs& own = flight->in;
    absl::StatusOr<TieredOutcome> r =
        work ? work(own, workers)
             : RunTiers(own.query, own.options, own.request, workers, own.schedule);
    absl::MutexLock lock(&flight->mu);
    flight->result = std::move(r);
  });
  {
    absl::MutexLock lock(&mu_);
    Reap();
    flights_.emplace_back(flight, std::move(thread));
  }
  const std::optional<Clock::time_point> deadline = f->in.schedule.deadline;
  absl::MutexLock lock(&f->mu);
  while (true) {
    // Wakes for the result, the caller's cancel (polled) or the deadline.
    Clock::duration wait = kCancelPoll;
    if (deadline)
      wait = std::min(wait, std::max(Clock::duration{0}, *deadline + slack_ - Clock::now()));
    f->mu.AwaitWithTimeout(absl::Condition(f, &Flight::Ended), absl::FromChrono(wait));
    if (f->Ended()) {
      f->answered = true;
      return std::move(*f->result);
    }
    if (f->caller_cancelled && f->caller_cancelled()) {
      f->cancel = true;
      f->answered = true;
      return absl::CancelledError("the caller cancelled");
    }
    if (deadline && Clock::now() >= *deadline + slack_) {
      f->cancel = true;
      f->answered = true;
      return AtDeadline(f->board.Best(), start);
    }
  }
}

}  // namespace sliceplan
