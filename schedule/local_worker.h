// A worker in this process: each call runs SolveSlice (or an anytime
// part, RunAnytimePart) on its own thread.
// The embedded mode's pool is a set of these behind the same scheduler the
// RPC coordinator uses. Thread-safe.
#ifndef SLICEPLAN_SCHEDULE_LOCAL_WORKER_H_
#define SLICEPLAN_SCHEDULE_LOCAL_WORKER_H_

#include <string>

#include "schedule/slice_worker.h"

namespace sliceplan {

class LocalWorker : public SliceWorker {
 public:
  explicit LocalWorker(std::string name) : name_(std::move(name)) {}
  std::string Name() const override { return name_; }
  std::unique_ptr<SliceCall> Start(const SliceTask& task, SliceDone done) override;
  std::unique_ptr<SliceCall> StartAnytime(const AnytimeTask& task, AnytimeDone done) override;

 private:
  std::string name_;
};

}  // namespace sliceplan

#endif  // SLICEPLAN_SCHEDULE_LOCAL_WORKER_H_
