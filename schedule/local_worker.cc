#include "schedule/local_worker.h"

#include <atomic>
#include <thread>

namespace sliceplan {
namespace {

class LocalCall : public SliceCall {
 public:
  LocalCall(const SliceTask& task, SliceDone done)
      : thread_([this, task, done = std::move(done)] {
          SearchControl control(&cancel_, task.deadline);
          done(SolveSlice(*task.query, task.options, task.slice, control));
        }) {}
  ~LocalCall() override { thread_.join(); }
  void Cancel() override { cancel_ = true; }

 private:
  std::atomic<bool> cancel_{false};
  std::thread thread_;  // last: starts after cancel_ exists
};

// An anytime part on its own thread, stopped its reserve before the
// task's deadline (as a remote worker stops it).
class LocalAnytimeCall : public SliceCall {
 public:
  LocalAnytimeCall(const AnytimeTask& task, AnytimeDone done)
      : thread_([this, task, done = std::move(done)] {
          const double given = SecondsBetween(std::chrono::steady_clock::now(), task.deadline);
          SearchControl control(&cancel_,
                                task.deadline - AnytimeReserve(given, task.query->size()));
          AnytimeAnswer answer =
              RunAnytimePart(*task.query, task.options, task.part, control, task.on_progress);
          if (cancel_.load()) {
            done(absl::CancelledError("the anytime part was cancelled"));
          } else {
            done(std::move(answer));
          }
        }) {}
  ~LocalAnytimeCall() override { thread_.join(); }
  void Cancel() override { cancel_ = true; }

 private:
  std::atomic<bool> cancel_{false};
  std::thread thread_;  // last: starts after cancel_ exists
};

}  // namespace

std::unique_ptr<SliceCall> LocalWorker::Start(const SliceTask& task, SliceDone done) {
  return std::make_unique<LocalCall>(task, std::move(done));
}

std::unique_ptr<SliceCall> LocalWorker::StartAnytime(const AnytimeTask& task, AnytimeDone done) {
  return std::make_unique<LocalAnytimeCall>(task, std::move(done));
}

}  // namespace sliceplan
