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

}  // namespace

std::unique_ptr<SliceCall> LocalWorker::Start(const SliceTask& task, SliceDone done) {
  return std::make_unique<LocalCall>(task, std::move(done));
}

}  // namespace sliceplan
