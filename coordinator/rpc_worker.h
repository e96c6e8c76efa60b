// A remote worker as the scheduler sees it (slice_worker.h): one gRPC
// channel to a sliceplan-worker, calls (slices and anytime parts) as
// asynchronous SolveSlice RPCs, and health from the standard
// grpc.health.v1 check plus DescribeWorker (for its concurrent slices).
// Until the first check it counts as healthy with one concurrent slice.
// Thread-safe.
#ifndef SLICEPLAN_COORDINATOR_RPC_WORKER_H_
#define SLICEPLAN_COORDINATOR_RPC_WORKER_H_

#include <atomic>
#include <chrono>
#include <memory>
#include <string>

#include "absl/base/thread_annotations.h"
#include "absl/synchronization/mutex.h"
#include "grpc/health/v1/health.grpc.pb.h"
#include "grpcpp/grpcpp.h"
#include "schedule/slice_worker.h"
#include "sliceplan.grpc.pb.h"

namespace sliceplan {

struct WorkerCounters {
  uint64_t solved = 0;
  uint64_t failures = 0;
  std::string last_error;
};

class RpcWorker : public SliceWorker {
 public:
  // `credentials`: how to reach the worker (rpc/tls.h); null: plaintext.
  // `tls_name`: the name its certificate must carry when it is not the
  // address (a worker found through a DNS name is dialled by IP but
  // verified against that name); empty: the address.
  explicit RpcWorker(std::string address,
                     std::shared_ptr<grpc::ChannelCredentials> credentials = nullptr,
                     const std::string& tls_name = "");

  std::string Name() const override { return address_; }
  int ConcurrentSlices() const override { return concurrent_slices_.load(); }
  int ThreadsPerSlice() const override { return threads_per_slice_.load(); }
  bool Healthy() const override { return healthy_.load(); }
  std::unique_ptr<SliceCall> Start(const SliceTask& task, SliceDone done) override;
  // An anytime part as a SolveSlice call with its `anytime` field set.
  std::unique_ptr<SliceCall> StartAnytime(const AnytimeTask& task, AnytimeDone done) override;
  // kDemoteAfterHedgeLosses in a row (no answer between) demote the worker:
  // unhealthy, the reason in last_error and a log line, until a probe
  // slice answers (CheckHealth). Its health service may say SERVING
  // while its calls hang.
  void NoteLostToHedge() override ABSL_LOCKS_EXCLUDED(mu_);

  // Runs the health check and DescribeWorker with `timeout`; updates
  // Healthy() and ConcurrentSlices(). A demoted worker must also answer a
  // two-relation slice within `timeout` to come back.
  void CheckHealth(std::chrono::milliseconds timeout) ABSL_LOCKS_EXCLUDED(mu_);
  WorkerCounters counters() const ABSL_LOCKS_EXCLUDED(mu_);

 private:
  void Count(const absl::Status& status) ABSL_LOCKS_EXCLUDED(mu_);

  const std::string address_;
  std::shared_ptr<grpc::Channel> channel_;
  std::unique_ptr<v1::SliceWorker::Stub> stub_;
  std::unique_ptr<grpc::health::v1::Health::Stub> health_;
  // The probe a demoted worker must answer.
  bool ProbeAnswers(std::chrono::milliseconds timeout);

  std::atomic<bool> healthy_{true};
  std::atomic<bool> demoted_{false};
  std::atomic<int> concurrent_slices_{1};
  std::atomic<int> threads_per_slice_{1};
  mutable absl::Mutex mu_;
  WorkerCounters counters_ ABSL_GUARDED_BY(mu_);
  int hedge_losses_ ABSL_GUARDED_BY(mu_) = 0;  // in a row
};

inline constexpr int kDemoteAfterHedgeLosses = 2;

}  // namespace sliceplan

#endif  // SLICEPLAN_COORDINATOR_RPC_WORKER_H_
