#include "schedule/slice_scheduler.h"

#include <algorithm>
#include <bit>
#include <cmath>
#include <deque>
#include <memory>
#include <thread>

#include "absl/base/thread_annotations.h"
#include "absl/strings/str_cat.h"
#include "absl/strings/str_format.h"
#include "absl/strings/str_join.h"
#include "absl/synchronization/mutex.h"
#include "absl/time/time.h"
#include "core/model/status_macros.h"
#include "core/slice_check.h"
#include "core/slicing/constraint_choice.h"
#include "core/slicing/search_estimate.h"

namespace sliceplan {

bool IsRetryable(const absl::Status& status) {
  if (IsBusy(status)) return true;  // another worker may have room
  switch (status.code()) {
    case absl::StatusCode::kUnavailable:
    case absl::StatusCode::kInternal:
    case absl::StatusCode::kUnknown:
    case absl::StatusCode::kAborted:
    case absl::StatusCode::kDeadlineExceeded:  // the call's, not the run's
    case absl::StatusCode::kCancelled:         // not cancelled by us
    case absl::StatusCode::kDataLoss:
      return true;
    default:
      return false;
  }
}

bool IsWorkerFault(const absl::Status& status) {
  switch (status.code()) {
    case absl::StatusCode::kUnavailable:
    case absl::StatusCode::kInternal:
    case absl::StatusCode::kUnknown:
    case absl::StatusCode::kAborted:
    case absl::StatusCode::kDataLoss:
      return true;
    default:
      return false;
  }
}

namespace {

using Clock = std::chrono::steady_clock;

// One call of one slice on one worker. slice, worker and started never
// change; call and finished are guarded by the Run's mutex.
struct Attempt {
  uint32_t slice;
  size_t worker;
  Clock::time_point started;
  std::unique_ptr<SliceCall> call;  // set right after Start returns
  bool finished = false;
};

// How long the answer waits for cancelled calls to report: past it, the
// calls still running (a search thread starved of CPU is slow to see its
// cancel) are left to a reaper thread, and the answer goes out without
// them (docs/operations.md, "Deadlines under load").
constexpr auto kCancelGrace = std::chrono::milliseconds(20);

// One Run: all state behind one mutex; calls report back via Finish().
// Calls are started and their handles stored with the mutex released
// (a worker may finish a call inside Start), so Dispatch only picks the
// attempts and StartCalls starts them. Owned by a shared pointer: a call
// that outlives Execute keeps the Run (its query copy, its attempts)
// alive until it reports.
class Run : public std::enable_shared_from_this<Run> {
 public:
  Run(const Query& query, const SearchOptions& options, uint32_t slice_count,
      std::span<SliceWorker* const> workers, const ScheduleOptions& schedule)
      : query_(query),
        options_(options),
        count_(slice_count),
        chosen_(ChooseConstraintRelations(query, options.shape, std::countr_zero(slice_count),
                                          options.cross_products)),
        workers_(workers.begin(), workers.end()),
        schedule_(schedule),
        busy_(workers_.size(), 0),
        failed_(workers_.size()),
        solved_by_(workers_.size(), 0),
        attempts_of_(slice_count, 0),
        running_of_(slice_count, 0),
        faults_of_(slice_count),
        answers_(slice_count),
        answer_worker_(slice_count, 0) {
    for (uint32_t i = 0; i < slice_count; ++i) pending_.push_back(i);
  }

  absl::StatusOr<ScheduleOutcome> Execute() ABSL_LOCKS_EXCLUDED(mu_) {
    mu_.Lock();
    while (error_.ok() && done_ < count_) {
      if (schedule_.deadline && Clock::now() >= *schedule_.deadline) {
        deadline_passed_ = true;
        break;
      }
      if (std::vector<Attempt*> picked = Dispatch(); !picked.empty()) {
        mu_.Unlock();
        StartCalls(picked);
        mu_.Lock();
        continue;  // look again: calls may have finished already
      }
      if (error_.ok() && running_ == 0 && done_ < count_ && !AnyUsable()) {
        error_ = NoWorkerLeft();
      }
      if (!error_.ok() || done_ == count_) break;
      Wait();
      if (schedule_.cancelled && error_.ok() && schedule_.cancelled()) {
        error_ = absl::CancelledError(absl::StrCat("the request was cancelled with ", done_, " of ",
                                                   count_, " slices solved"));
      }
    }
    CancelAll();
    const absl::Time grace_end = absl::Now() + absl::FromChrono(kCancelGrace);
    while (running_ != 0 && !changed_.WaitWithDeadline(&mu_, grace_end)) {
    }
    absl::StatusOr<ScheduleOutcome> out = Outcome();
    std::vector<std::unique_ptr<Attempt>> attempts = std::move(attempts_);
    abandoned_ = running_ != 0;
    const bool abandoned = abandoned_;
    mu_.Unlock();
    {
      absl::MutexLock report(&report_mu_);
      returned_ = true;  // no progress reported from here on
    }
    if (abandoned) {
      // The calls still running join on a reaper thread, which keeps this
      // Run alive until they have reported.
      std::thread([self = shared_from_this(), attempts = std::move(attempts)]() mutable {
        attempts.clear();
      }).detach();
    } else {
      attempts.clear();  // joins local threads; no call is running now
    }
    return out;
  }

 private:
  // Sleeps until a call reports, or the deadline, a hedge or a cancel poll
  // is due.
  void Wait() ABSL_EXCLUSIVE_LOCKS_REQUIRED(mu_) {
    auto wake = NextWakeUp();
    if (schedule_.cancelled) {
      const auto poll = Clock::now() + kCancelPoll;
      if (!wake || poll < *wake) wake = poll;
    }
    if (wake) {
      changed_.WaitWithTimeout(&mu_, absl::FromChrono(*wake - Clock::now()));
    } else {
      changed_.Wait(&mu_);
    }
  }

  // Picks work for every worker with a slice free: the pending slices, then hedges.
  std::vector<Attempt*> Dispatch() ABSL_EXCLUSIVE_LOCKS_REQUIRED(mu_) {
    std::vector<Attempt*> picked;
    for (;;) {
      if (!pending_.empty()) {
        const auto w = FreeWorker();
        if (!w) return picked;
        const uint32_t slice = pending_.front();
        pending_.pop_front();
        picked.push_back(NewAttempt(slice, *w));
        continue;
      }
      Attempt* hedge = TryHedge();
      if (hedge == nullptr) return picked;
      picked.push_back(hedge);
    }
  }

  // A second copy of the oldest lone slice that has run longer than
  // hedge_after, on another worker with a slice free; null when none.
  Attempt* TryHedge() ABSL_EXCLUSIVE_LOCKS_REQUIRED(mu_) {
    if (!schedule_.hedge_after) return nullptr;
    const auto now = Clock::now();
    for (const auto& a : attempts_) {
      if (a->finished || answers_[a->slice] || running_of_[a->slice] != 1) continue;
      if (now - a->started < *schedule_.hedge_after) continue;
      const auto w = FreeWorker(a->worker);
      if (!w) continue;
      ++hedges_;
      return NewAttempt(a->slice, *w);
    }
    return nullptr;
  }

  // A usable worker with a slice free, preferring one other than `avoid`,
  // and the least busy.
  std::optional<size_t> FreeWorker(std::optional<size_t> avoid = {}) const
      ABSL_EXCLUSIVE_LOCKS_REQUIRED(mu_) {
    std::optional<size_t> best;
    for (size_t w = 0; w < workers_.size(); ++w) {
      if (!Usable(w) || busy_[w] >= workers_[w]->ConcurrentSlices()) continue;
      if (avoid && w == *avoid) continue;
      if (!best || busy_[w] < busy_[*best]) best = w;
    }
    return best;
  }

  bool Usable(size_t w) const ABSL_EXCLUSIVE_LOCKS_REQUIRED(mu_) {
    return failed_[w].ok() && workers_[w]->Healthy();
  }
  bool AnyUsable() const ABSL_EXCLUSIVE_LOCKS_REQUIRED(mu_) {
    for (size_t w = 0; w < workers_.size(); ++w) {
      if (Usable(w)) return true;
    }
    return false;
  }

  // Books one of worker w's concurrent slices for `slice`; the call starts in StartCalls.
  Attempt* NewAttempt(uint32_t slice, size_t w) ABSL_EXCLUSIVE_LOCKS_REQUIRED(mu_) {
    attempts_.push_back(std::make_unique<Attempt>(Attempt{slice, w, Clock::now(), nullptr}));
    ++busy_[w];
    ++running_;
    ++running_of_[slice];
    ++attempts_of_[slice];
    return attempts_.back().get();
  }

  // Starts the picked attempts' calls. The attempts stay alive (attempts_
  // only grows until Execute ends) and their slice and worker never change.
  void StartCalls(const std::vector<Attempt*>& picked) ABSL_LOCKS_EXCLUDED(mu_) {
    for (Attempt* a : picked) {
      SliceTask task{
          &query_, options_, {a->slice, count_}, schedule_.deadline, schedule_.request_id};
      auto call = workers_[a->worker]->Start(
          task, [this, a](absl::StatusOr<SliceResult> r) { Finish(a, std::move(r)); });
      absl::MutexLock lock(&mu_);
      a->call = std::move(call);
      if (cancelled_ && !a->finished) a->call->Cancel();
    }
  }

  void Finish(Attempt* a, absl::StatusOr<SliceResult> r) ABSL_LOCKS_EXCLUDED(mu_) {
    {
      // The run has answered without this call: only its count.
      absl::MutexLock lock(&mu_);
      if (abandoned_) {
        a->finished = true;
        --running_;
        return;
      }
    }
    // No worker's answer is trusted: a tree that is not the slice's, or
    // figures the query does not give, is a worker fault (DATA_LOSS): the
    // slice goes to another worker and the client is never blamed.
    if (r.ok()) {
      absl::Status check = r->slice.index == a->slice && r->slice.count == count_
                               ? CheckSliceResult(query_, options_, *r, chosen_)
                               : absl::DataLossError(absl::StrCat(
                                     "an answer for slice ", r->slice.index, " of ", r->slice.count,
                                     ", not ", a->slice, " of ", count_));
      if (!check.ok()) {
        r = absl::DataLossError(absl::StrCat(workers_[a->worker]->Name(), ": ", check.message()));
      }
    }
    std::optional<ScheduleProgress> progress;
    {
      absl::MutexLock lock(&mu_);
      a->finished = true;
      --busy_[a->worker];
      --running_;
      --running_of_[a->slice];
      progress = Record(a, std::move(r));
    }
    if (progress) {
      absl::MutexLock report(&report_mu_);
      if (!returned_ && schedule_.on_progress) schedule_.on_progress(*progress);
    }
    changed_.SignalAll();
  }

  // Returns progress to report when a slice completed.
  std::optional<ScheduleProgress> Record(Attempt* a, absl::StatusOr<SliceResult> r)
      ABSL_EXCLUSIVE_LOCKS_REQUIRED(mu_) {
    if (answers_[a->slice]) return std::nullopt;  // a twin answered first
    if (r.ok()) return Solved(a, *std::move(r));
    if (cancelled_) return std::nullopt;
    if (!IsRetryable(r.status())) {
      if (error_.ok()) error_ = r.status();
      return std::nullopt;
    }
    failed_[a->worker] = r.status();
    if (IsWorkerFault(r.status())) {
      faults_of_[a->slice].push_back(
          absl::StrCat(workers_[a->worker]->Name(), ": ", r.status().message()));
      if (faults_of_[a->slice].size() >= kPoisonWorkers) {
        if (error_.ok()) error_ = PoisonSlice(a->slice);
        return std::nullopt;
      }
    }
    if (running_of_[a->slice] > 0) return std::nullopt;  // its twin still runs
    if (attempts_of_[a->slice] >= schedule_.max_attempts_per_slice) {
      const std::string message =
          absl::StrCat("slice ", a->slice, " failed ", attempts_of_[a->slice],
                       " times; last: ", r.status().message());
      // A busy refusal stays marked busy: the caller should retry later.
      error_ = IsBusy(r.status()) ? BusyError(message) : absl::Status(r.status().code(), message);
      return std::nullopt;
    }
    ++retries_;
    pending_.push_front(a->slice);
    return std::nullopt;
  }

  ScheduleProgress Solved(Attempt* a, SliceResult r) ABSL_EXCLUSIVE_LOCKS_REQUIRED(mu_) {
    answers_[a->slice] = std::move(r);
    answer_worker_[a->slice] = a->worker;
    ++solved_by_[a->worker];
    ++done_;
    const auto& plan = answers_[a->slice]->plan;
    if (plan && (!best_cost_ || plan->root().cost < *best_cost_)) {
      best_cost_ = plan->root().cost;
    }
    for (const auto& other : attempts_) {  // cancel the twin, if any
      if (other.get() != a && other->slice == a->slice && !other->finished && other->call) {
        other->call->Cancel();
        // The earlier call lost to its hedge.
        if (other->started < a->started) workers_[other->worker]->NoteLostToHedge();
      }
    }
    return ScheduleProgress{done_, count_, best_cost_, Elapsed()};
  }

  // When the loop must look again without an event: the deadline, or the
  // moment the oldest lone slice becomes hedgeable.
  std::optional<Clock::time_point> NextWakeUp() const ABSL_EXCLUSIVE_LOCKS_REQUIRED(mu_) {
    std::optional<Clock::time_point> wake = schedule_.deadline;
    if (schedule_.hedge_after && pending_.empty()) {
      for (const auto& a : attempts_) {
        if (a->finished || answers_[a->slice] || running_of_[a->slice] != 1) continue;
        const auto t = a->started + *schedule_.hedge_after;
        if (!wake || t < *wake) wake = t;
      }
    }
    return wake;
  }

  void CancelAll() ABSL_EXCLUSIVE_LOCKS_REQUIRED(mu_) {
    cancelled_ = true;
    for (const auto& a : attempts_) {
      if (!a->finished && a->call) a->call->Cancel();
    }
  }

  absl::Status PoisonSlice(uint32_t slice) const ABSL_EXCLUSIVE_LOCKS_REQUIRED(mu_) {
    return absl::InternalError(
        absl::StrCat("slice ", slice, " of ", count_, " failed on ", faults_of_[slice].size(),
                     " workers (", absl::StrJoin(faults_of_[slice], "; "),
                     "); it is not sent to another worker, since it may be what brings them down"));
  }

  absl::Status NoWorkerLeft() const ABSL_EXCLUSIVE_LOCKS_REQUIRED(mu_) {
    std::vector<std::string> why;
    for (size_t w = 0; w < workers_.size(); ++w) {
      why.push_back(absl::StrCat(workers_[w]->Name(), ": ",
                                 failed_[w].ok() ? "unhealthy" : failed_[w].message()));
    }
    return absl::UnavailableError(absl::StrCat(
        "no worker available with ", count_ - done_, " of ", count_, " slices unsolved (",
        why.empty() ? "no workers configured" : absl::StrJoin(why, "; "), ")"));
  }

  double Elapsed() const { return std::chrono::duration<double>(Clock::now() - start_).count(); }

  absl::StatusOr<ScheduleOutcome> Outcome() ABSL_EXCLUSIVE_LOCKS_REQUIRED(mu_) {
    if (!error_.ok()) return error_;
    std::vector<SliceResult> solved;
    std::vector<std::string> names;
    for (uint32_t i = 0; i < count_; ++i) {
      if (!answers_[i]) continue;
      solved.push_back(*std::move(answers_[i]));
      names.push_back(workers_[answer_worker_[i]]->Name());
    }
    const double coverage = static_cast<double>(done_) / count_;
    if (deadline_passed_ && done_ < count_) {
      if (!schedule_.partial_on_deadline || !best_cost_) {
        return absl::DeadlineExceededError(
            absl::StrCat("deadline passed with ", done_, " of ", count_, " slices solved"));
      }
    }
    absl::StatusOr<OptimizeResult> merged =
        done_ == count_ ? MergeSlices(std::move(solved), count_, options_.cluster.objectives)
                        : MergeSolvedSlices(std::move(solved), count_, options_.cluster.objectives);
    if (!merged.ok()) return merged.status();
    ApplyChoice(*merged, options_.cluster.choice);
    ScheduleOutcome out;
    out.result = *std::move(merged);
    out.result.wall_seconds = Elapsed();
    out.proven_optimal = done_ == count_;
    out.coverage = coverage;
    out.retries = retries_;
    out.hedges = hedges_;
    out.slice_workers = std::move(names);
    for (uint32_t n : solved_by_) out.workers_used += n > 0;
    return out;
  }

  // Copies: calls may outlive Execute's caller.
  const Query query_;
  const SearchOptions options_;
  const uint32_t count_;
  // The slices' constraint relations, chosen once to check every answer.
  const std::vector<ConstraintRelations> chosen_;
  const std::vector<SliceWorker*> workers_;
  const ScheduleOptions schedule_;
  const Clock::time_point start_ = Clock::now();

  absl::Mutex mu_;
  absl::CondVar changed_;
  std::deque<uint32_t> pending_ ABSL_GUARDED_BY(mu_);
  std::vector<std::unique_ptr<Attempt>> attempts_ ABSL_GUARDED_BY(mu_);
  std::vector<int> busy_ ABSL_GUARDED_BY(mu_);
  std::vector<absl::Status> failed_ ABSL_GUARDED_BY(mu_);
  std::vector<uint32_t> solved_by_ ABSL_GUARDED_BY(mu_);
  std::vector<int> attempts_of_ ABSL_GUARDED_BY(mu_);
  std::vector<int> running_of_ ABSL_GUARDED_BY(mu_);
  // per slice: "worker: error" of each worker fault
  std::vector<std::vector<std::string>> faults_of_ ABSL_GUARDED_BY(mu_);
  std::vector<std::optional<SliceResult>> answers_ ABSL_GUARDED_BY(mu_);
  std::vector<size_t> answer_worker_ ABSL_GUARDED_BY(mu_);
  std::optional<double> best_cost_ ABSL_GUARDED_BY(mu_);
  uint32_t done_ ABSL_GUARDED_BY(mu_) = 0;
  int running_ ABSL_GUARDED_BY(mu_) = 0;
  uint32_t retries_ ABSL_GUARDED_BY(mu_) = 0;
  uint32_t hedges_ ABSL_GUARDED_BY(mu_) = 0;
  bool cancelled_ ABSL_GUARDED_BY(mu_) = false;
  bool deadline_passed_ ABSL_GUARDED_BY(mu_) = false;
  bool abandoned_ ABSL_GUARDED_BY(mu_) = false;  // answered with calls still running
  // Held while progress is reported, so none is after Execute returned.
  absl::Mutex report_mu_;
  bool returned_ ABSL_GUARDED_BY(report_mu_) = false;
  absl::Status error_ ABSL_GUARDED_BY(mu_);
};

}  // namespace

absl::Status CheckCanFinish(const Query& query, const SearchOptions& options, uint32_t slice_count,
                            std::span<SliceWorker* const> workers,
                            const ScheduleOptions& schedule) {
  if (!schedule.deadline || schedule.partial_on_deadline || !options.cross_products) {
    return absl::OkStatus();
  }
  int concurrent = 0;
  for (SliceWorker* w : workers) concurrent += w->Healthy() ? w->ConcurrentSlices() : 0;
  if (concurrent == 0) return absl::OkStatus();  // the run reports the pool
  const int k = std::countr_zero(slice_count);
  double per_split = kFastestSplitSeconds;
  if (options.cost == CostModelKind::kCluster) {
    per_split *= 3.0 * static_cast<double>(options.cluster.params.node_counts.size());
  }
  const double rounds = std::ceil(static_cast<double>(slice_count) / concurrent);
  const double splits = DenseSplits(query.size(), options.shape, k, true);
  const double at_least = rounds * splits * per_split;
  const double allowed = std::chrono::duration<double>(*schedule.deadline - Clock::now()).count();
  if (at_least <= allowed) return absl::OkStatus();
  return absl::DeadlineExceededError(absl::StrFormat(
      "refused up front: %u slices of %.3g splits each on %d concurrent worker slices need at "
      "least "
      "%.3g s, and the deadline allows %.3g s; use more workers, a later deadline, or "
      "partial_on_deadline",
      slice_count, splits, concurrent, at_least, std::max(0.0, allowed)));
}

absl::StatusOr<ScheduleOutcome> RunSlices(const Query& query, const SearchOptions& options,
                                          uint32_t slice_count,
                                          std::span<SliceWorker* const> workers,
                                          const ScheduleOptions& schedule) {
  RETURN_IF_ERROR(ValidateSlice({0, slice_count}, query.size(), options.shape));
  RETURN_IF_ERROR(CheckCanFinish(query, options, slice_count, workers, schedule));
  return std::make_shared<Run>(query, options, slice_count, workers, schedule)->Execute();
}

}  // namespace sliceplan
