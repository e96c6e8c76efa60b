// Admission of requests: a place when one is free, a wait in the queue
// otherwise, an immediate refusal with the numbers when the queue is full,
// and a waiting request that gives up at its deadline or cancel.
#include "coordinator/admission.h"

#include <atomic>
#include <thread>

#include "gtest/gtest.h"

namespace sliceplan {
namespace {

using namespace std::chrono_literals;
using Clock = std::chrono::steady_clock;

TEST(AdmissionTest, QueueThenRefuse) {
  Admission admission(1, 1);
  std::optional<Admission::Ticket> first;
  ASSERT_TRUE(admission.Enter(Clock::now() + 10s, {}, first).ok());
  std::atomic<bool> second_in{false};
  std::thread waiter([&] {
    std::optional<Admission::Ticket> second;
    EXPECT_TRUE(admission.Enter(Clock::now() + 10s, {}, second).ok());
    second_in = true;
  });
  while (admission.queued() == 0) std::this_thread::sleep_for(1ms);  // the second waits
  std::optional<Admission::Ticket> third;
  const absl::Status s = admission.Enter(Clock::now() + 10s, {}, third);
  EXPECT_EQ(s.code(), absl::StatusCode::kResourceExhausted);
  EXPECT_NE(s.message().find("runs 1 requests and has 1 waiting"), std::string::npos) << s;
  EXPECT_FALSE(second_in);
  first.reset();  // a place frees: the waiting request runs
  waiter.join();
  EXPECT_TRUE(second_in);
  EXPECT_EQ(admission.queued(), 0);
}

TEST(AdmissionTest, WaitingRequestGivesUpAtItsDeadlineOrCancel) {
  Admission admission(1, 4);
  std::optional<Admission::Ticket> first;
  ASSERT_TRUE(admission.Enter(Clock::now() + 10s, {}, first).ok());
  std::optional<Admission::Ticket> late;
  EXPECT_EQ(admission.Enter(Clock::now() + 50ms, {}, late).code(),
            absl::StatusCode::kDeadlineExceeded);
  std::atomic<bool> cancel{false};
  std::thread canceller([&] {
    std::this_thread::sleep_for(50ms);
    cancel = true;
  });
  EXPECT_EQ(admission
                .Enter(
                    Clock::now() + 10s, [&] { return cancel.load(); }, late)
                .code(),
            absl::StatusCode::kCancelled);
  canceller.join();
  EXPECT_FALSE(late.has_value());
  EXPECT_EQ(admission.queued(), 0);
}

}  // namespace
}  // namespace sliceplan
