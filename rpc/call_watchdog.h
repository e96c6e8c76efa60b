// Cancels a server call unless disarmed in time: bounds a step the gRPC
// API gives no time limit of its own, such as reading a streamed request
// from a client that sends it slowly (worker/worker_service.h). A thread
// waits for the disarm; on time-out it calls ServerContext::TryCancel, and
// the step blocked on the call returns failed. Thread-compatible.
#ifndef SLICEPLAN_RPC_CALL_WATCHDOG_H_
#define SLICEPLAN_RPC_CALL_WATCHDOG_H_

#include <atomic>
#include <chrono>
#include <thread>

#include "absl/synchronization/notification.h"
#include "absl/time/time.h"
#include "grpcpp/server_context.h"

namespace sliceplan {

class CallWatchdog {
 public:
  CallWatchdog(grpc::ServerContext* context, std::chrono::steady_clock::duration limit)
      : thread_([this, context, limit] {
          if (!disarmed_.WaitForNotificationWithTimeout(absl::FromChrono(limit))) {
            fired_ = true;
            context->TryCancel();
          }
        }) {}
  ~CallWatchdog() { Disarm(); }
  CallWatchdog(const CallWatchdog&) = delete;
  CallWatchdog& operator=(const CallWatchdog&) = delete;

  // Stops the watch (at once; idempotent). True when it had fired.
  bool Disarm() {
    if (thread_.joinable()) {
      if (!disarmed_.HasBeenNotified()) disarmed_.Notify();
      thread_.join();
    }
    return fired_;
  }

 private:
  absl::Notification disarmed_;
  std::atomic<bool> fired_{false};
  std::thread thread_;  // last: starts once the rest exists
};

}  // namespace sliceplan

#endif  // SLICEPLAN_RPC_CALL_WATCHDOG_H_
