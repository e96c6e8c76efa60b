// The coordinator's pool of remote workers, from a list of HOST:PORT
// entries. A host that resolves to several addresses (a DNS name with many
// records, e.g. a Kubernetes headless service) gives one worker per
// address. A background thread re-checks every worker's health each
// interval and re-resolves the names, adding workers that appeared.
// Thread-safe.
#ifndef SLICEPLAN_COORDINATOR_WORKER_POOL_H_
#define SLICEPLAN_COORDINATOR_WORKER_POOL_H_

#include <atomic>
#include <chrono>
#include <memory>
#include <string>
#include <thread>
#include <vector>

#include "absl/base/thread_annotations.h"
#include "absl/status/statusor.h"
#include "absl/synchronization/mutex.h"
#include "coordinator/rpc_worker.h"

namespace sliceplan {

// "a:1,b:2" -> {"a:1", "b:2"}. Errors (INVALID_ARGUMENT): an empty list or
// an entry without a port.
absl::StatusOr<std::vector<std::string>> ParseWorkerList(const std::string& list);

// The addresses `entry` (HOST:PORT) resolves to, as IP:PORT; the entry
// itself when it does not resolve (gRPC will keep trying).
std::vector<std::string> ResolveEntry(const std::string& entry);

class WorkerPool {
 public:
  // `credentials` reach every worker (rpc/tls.h); null: plaintext.
  WorkerPool(std::vector<std::string> entries, std::chrono::milliseconds interval,
             std::shared_ptr<grpc::ChannelCredentials> credentials = nullptr);
  ~WorkerPool();  // stops the health thread

  // Every worker known now (healthy or not).
  std::vector<std::shared_ptr<RpcWorker>> Workers() const ABSL_LOCKS_EXCLUDED(mu_);
  // Checks every worker once, now (startup and tests).
  void CheckNow() ABSL_LOCKS_EXCLUDED(mu_);

 private:
  void Refresh() ABSL_LOCKS_EXCLUDED(mu_);
  void Loop() ABSL_LOCKS_EXCLUDED(mu_);

  const std::vector<std::string> entries_;
  const std::chrono::milliseconds interval_;
  const std::shared_ptr<grpc::ChannelCredentials> credentials_;
  mutable absl::Mutex mu_;
  std::vector<std::shared_ptr<RpcWorker>> workers_ ABSL_GUARDED_BY(mu_);
  bool stop_ ABSL_GUARDED_BY(mu_) = false;
  std::thread thread_;
};

}  // namespace sliceplan

#endif  // SLICEPLAN_COORDINATOR_WORKER_POOL_H_
