// Progress on a server stream that never holds up the search: Offer keeps
// only the latest event and returns at once; one pump thread writes it
// when the previous write has returned. A client that does not read
// blocks the pump, never the search, and the search's place is freed when
// it ends (docs/operations.md, "What the coordinator checks").
//
// Finish hands the pump the last message (an unsent progress event is
// dropped: the last message supersedes it) and waits for it to be written
// until `give_up`, then cancels the call, so a client that never reads
// cannot hold the handler past it, however large the last message.
// Thread-safe; Offer may be called from any thread until Finish.
#ifndef SLICEPLAN_RPC_COALESCING_WRITER_H_
#define SLICEPLAN_RPC_COALESCING_WRITER_H_

#include <chrono>
#include <optional>
#include <thread>

#include "absl/base/thread_annotations.h"
#include "absl/synchronization/mutex.h"
#include "absl/time/time.h"
#include "grpcpp/server_context.h"
#include "grpcpp/support/sync_stream.h"

namespace sliceplan {

template <class Message>
class CoalescingWriter {
 public:
  CoalescingWriter(grpc::ServerWriter<Message>* writer, grpc::ServerContext* context)
      : writer_(writer), context_(context), pump_([this] { Pump(); }) {}
  ~CoalescingWriter() { Finish(std::nullopt, std::chrono::steady_clock::now()); }
  CoalescingWriter(const CoalescingWriter&) = delete;
  CoalescingWriter& operator=(const CoalescingWriter&) = delete;

  void Offer(Message m) ABSL_LOCKS_EXCLUDED(mu_) {
    absl::MutexLock lock(&mu_);
    if (!stopping_) pending_ = std::move(m);
  }

  // Returns whether `last` was written (false: none given, or the call
  // ended, or `give_up` came first). Later calls do nothing.
  bool Finish(std::optional<Message> last, std::chrono::steady_clock::time_point give_up)
      ABSL_LOCKS_EXCLUDED(mu_) {
    bool written = false;
    {
      absl::MutexLock lock(&mu_);
      if (finished_) return false;
      finished_ = true;
      // The last message replaces any progress not yet sent; the pump
      // writes it (or nothing) and ends.
      pending_ = std::move(last);
      stopping_ = true;
      const auto ended = [this]() ABSL_EXCLUSIVE_LOCKS_REQUIRED(mu_) { return pump_ended_; };
      if (!mu_.AwaitWithDeadline(absl::Condition(&ended), absl::FromChrono(ToSystem(give_up)))) {
        context_->TryCancel();  // unblocks the write in flight
      }
      mu_.Await(absl::Condition(&ended));
      written = last_written_;
    }
    pump_.join();
    return written;
  }

 private:
  static std::chrono::system_clock::time_point ToSystem(std::chrono::steady_clock::time_point t) {
    return std::chrono::system_clock::now() +
           std::chrono::duration_cast<std::chrono::system_clock::duration>(
               t - std::chrono::steady_clock::now());
  }

  // Writes the latest event whenever there is one; once stopping, the
  // last message (if any) and ends.
  void Pump() ABSL_LOCKS_EXCLUDED(mu_) {
    absl::MutexLock lock(&mu_);
    const auto work = [this]() ABSL_EXCLUSIVE_LOCKS_REQUIRED(mu_) {
      return stopping_ || pending_.has_value();
    };
    bool open = true;
    while (true) {
      mu_.Await(absl::Condition(&work));
      const bool last = stopping_;
      if (pending_.has_value() && open) {
        Message m = std::move(*pending_);
        pending_.reset();
        mu_.Unlock();
        open = writer_->Write(m);  // false: the call ended
        mu_.Lock();
        if (last) last_written_ = open;
      } else {
        pending_.reset();
      }
      if (last) break;
      // A Finish that came during the write is met by the next Await.
    }
    pump_ended_ = true;
  }

  grpc::ServerWriter<Message>* const writer_;
  grpc::ServerContext* const context_;
  absl::Mutex mu_;
  std::optional<Message> pending_ ABSL_GUARDED_BY(mu_);
  bool stopping_ ABSL_GUARDED_BY(mu_) = false;
  bool finished_ ABSL_GUARDED_BY(mu_) = false;
  bool pump_ended_ ABSL_GUARDED_BY(mu_) = false;
  bool last_written_ ABSL_GUARDED_BY(mu_) = false;
  std::thread pump_;  // last: started once the members above exist
};

}  // namespace sliceplan

#endif  // SLICEPLAN_RPC_COALESCING_WRITER_H_
