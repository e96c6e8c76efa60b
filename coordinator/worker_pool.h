// The coordinator's pool of remote workers, from a list of HOST:PORT
// entries. A host that resolves to several addresses (a DNS name with many
// records, e.g. a Kubernetes headless service) gives one worker per
// address. A background thread re-checks every worker's health each
// interval and re-resolves the names: workers that appeared join the pool,
// workers whose address is gone leave it (drained: no new slices; a slice
// still running there finishes, or is re-dispatched if the worker fails).
// A name that does not resolve keeps its last addresses, so a DNS outage
// does not empty the pool. Thread-safe.
#ifndef SLICEPLAN_COORDINATOR_WORKER_POOL_H_
#define SLICEPLAN_COORDINATOR_WORKER_POOL_H_

#include <atomic>
#include <chrono>
#include <functional>
#include <memory>
#include <optional>
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

// The addresses `entry` (HOST:PORT) resolves to, as IP:PORT, sorted;
// nullopt when it does not resolve.
using Resolver = std::function<std::optional<std::vector<std::string>>(const std::string& entry)>;
std::optional<std::vector<std::string>> ResolveEntry(const std::string& entry);

// The host of `entry` when it is a name rather than an IP literal (what a
// worker's certificate is checked against); "" for an IP.
std::string EntryHostName(const std::string& entry);

class WorkerPool {
 public:
  // `credentials` reach every worker (rpc/tls.h); null: plaintext.
  WorkerPool(std::vector<std::string> entries, std::chrono::milliseconds interval,
             std::shared_ptr<grpc::ChannelCredentials> credentials = nullptr,
             Resolver resolve = ResolveEntry);
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
  const Resolver resolve_;
  // Each entry's addresses as last resolved (the entry itself until it
  // first resolves); touched by Refresh only, which runs on one thread.
  std::vector<std::vector<std::string>> resolved_;
  bool first_refresh_ = true;  // the constructor's: joins are not logged
  mutable absl::Mutex mu_;
  std::vector<std::shared_ptr<RpcWorker>> workers_ ABSL_GUARDED_BY(mu_);
  bool stop_ ABSL_GUARDED_BY(mu_) = false;
  std::thread thread_;
};

}  // namespace sliceplan

#endif  // SLICEPLAN_COORDINATOR_WORKER_POOL_H_
