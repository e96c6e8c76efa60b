#include "schedule/anytime_fanout.h"

#include <memory>

#include "absl/strings/str_cat.h"
#include "absl/synchronization/mutex.h"

namespace sliceplan {
namespace {

using Clock = std::chrono::steady_clock;

// The parts' shared state: their answers and live counts.
class Parts {
 public:
  explicit Parts(size_t n) : plans_(n, 0), trees_(n, 0) {}

  void Progress(size_t part, size_t plans, uint64_t trees) {
    absl::MutexLock lock(&mu_);
    plans_[part] = plans;
    trees_[part] = trees;
  }

  void Answer(size_t part, absl::StatusOr<AnytimeAnswer> answer, const std::string& worker) {
    absl::MutexLock lock(&mu_);
    ++done_;
    if (!answer.ok()) {
      plans_[part] = trees_[part] = 0;  // its set counts no more
      if (out_.failure.empty()) {
        out_.failure = absl::StrCat("part ", part, " on ", worker, ": ", answer.status().message());
      }
      return;
    }
    plans_[part] = answer->frontier.size();
    trees_[part] = answer->trees;
    ++out_.answered;
    out_.trees += answer->trees;
    for (WidePlan& p : answer->frontier) out_.plans.push_back(std::move(p));
  }

  // True once every part answered, or after `wait`.
  bool WaitAll(size_t parts, absl::Duration wait) {
    absl::MutexLock lock(&mu_);
    const auto all = [&]() ABSL_SHARED_LOCKS_REQUIRED(mu_) { return done_ == parts; };
    return mu_.AwaitWithTimeout(absl::Condition(&all), wait);
  }

  std::pair<uint64_t, uint64_t> Counts() {
    absl::MutexLock lock(&mu_);
    uint64_t plans = 0, trees = 0;
    for (size_t i = 0; i < plans_.size(); ++i) plans += plans_[i], trees += trees_[i];
    return {plans, trees};
  }

  AnytimeFanout Take() {
    absl::MutexLock lock(&mu_);
    return std::move(out_);
  }

 private:
  absl::Mutex mu_;
  std::vector<uint64_t> plans_ ABSL_GUARDED_BY(mu_);
  std::vector<uint64_t> trees_ ABSL_GUARDED_BY(mu_);
  size_t done_ ABSL_GUARDED_BY(mu_) = 0;
  AnytimeFanout out_ ABSL_GUARDED_BY(mu_);
};

}  // namespace

absl::StatusOr<AnytimeFanout> RunAnytimeFanout(const AnytimeFanoutRequest& request,
                                               std::span<SliceWorker* const> workers) {
  std::vector<SliceWorker*> places;  // one per part
  for (SliceWorker* w : workers) {
    if (!w->Healthy()) continue;
    for (int k = 0; k < w->ConcurrentSlices(); ++k) places.push_back(w);
  }
  if (places.empty()) return absl::FailedPreconditionError("no worker is healthy");
  const auto parts = static_cast<uint32_t>(std::min<size_t>(places.size(), kMaxAnytimeParts));
  Parts state(parts);
  std::vector<std::unique_ptr<SliceCall>> calls;
  for (uint32_t k = 0; k < parts; ++k) {
    AnytimeTask task{request.query,    request.options,    {k, parts},
                     request.deadline, request.request_id, nullptr};
    task.on_progress = [&state, k](size_t plans, uint64_t trees) {
      state.Progress(k, plans, trees);
    };
    const std::string name = places[k]->Name();
    const WideQuery& query = *request.query;
    const SearchOptions& options = request.options;
    calls.push_back(places[k]->StartAnytime(
        task, [&state, k, name, &query, &options](absl::StatusOr<AnytimeAnswer> answer) {
          if (answer.ok() && !answer->checked) {
            // Checked before it is pooled: a worker is not trusted.
            if (auto s = CheckAnytimeAnswer(query, options, *answer); !s.ok()) {
              answer = absl::DataLossError(absl::StrCat("bad answer: ", s.message()));
            }
          }
          state.Answer(k, std::move(answer), name);
        }));
  }
  bool cancelled = false;
  auto next_report = Clock::now() + std::chrono::seconds(1);
  while (!state.WaitAll(parts, absl::Milliseconds(50))) {
    if (!cancelled && request.cancelled && request.cancelled()) {
      cancelled = true;
      for (auto& c : calls) c->Cancel();
    }
    if (request.on_progress && Clock::now() >= next_report) {
      const auto [plans, trees] = state.Counts();
      request.on_progress(plans, trees);
      next_report += std::chrono::seconds(1);
    }
  }
  calls.clear();  // every part has answered: their threads and calls end
  if (cancelled) return absl::CancelledError("the caller cancelled");
  AnytimeFanout out = state.Take();
  out.parts = parts;
  return out;
}

}  // namespace sliceplan
