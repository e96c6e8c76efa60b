// sliceplan-worker: a stateless slice solver behind gRPC.
//
//   sliceplan-worker --listen=HOST:PORT [--threads=T] [--concurrent-slices=C]
//                    [--memo_limit_gib=G]
#include <iostream>
#include <string>
#include <thread>
#include <vector>

#include "absl/flags/flag.h"
#include "absl/strings/str_cat.h"
#include "core/search_options.h"
#include "rpc/idle_trim.h"
#include "rpc/serve.h"
#include "rpc/server_flags.h"
#include "rpc/server_setup.h"
#include "rpc/tls.h"
#include "spdlog/spdlog.h"
#include "worker/worker_service.h"

ABSL_FLAG(int, threads, 0,
          "threads solving one slice together (0: the machine's cores over --concurrent-slices)");
ABSL_FLAG(int, concurrent_slices, 1, "slices solved at once");
ABSL_FLAG(double, memo_limit_gib, 8.0, "per-slice memo limit in GiB");
ABSL_FLAG(int, max_queued_slices, 16,
          "calls that may wait for a free slot; more are refused with RESOURCE_EXHAUSTED");
ABSL_FLAG(double, test_only_hang_seconds, 0,
          "test-only fault: sleep this long at the start of every call");
ABSL_FLAG(int64_t, test_only_crash_on_slice, -1,
          "test-only fault: abort the process when asked for this slice index (-1: never)");

namespace {

int Refuse(const std::string& message) {
  std::cerr << "sliceplan-worker: " << message << "\n";
  return 2;
}

}  // namespace

int main(int argc, char** argv) {
  sliceplan::BlockStopSignals();
  sliceplan::ParseServerCommandLine(
      argc, argv, "sliceplan-worker --listen=HOST:PORT [--threads=T] [--concurrent-slices=C]",
      "worker/main.cc");
  // Logs go to stderr: stdout carries only the announced addresses.
  auto flags = sliceplan::ReadServerFlags("worker");
  if (!flags.ok()) return Refuse(std::string(flags.status().message()));
  sliceplan::WorkerConfig config;
  config.concurrent_slices = absl::GetFlag(FLAGS_concurrent_slices);
  if (config.concurrent_slices < 1 || config.concurrent_slices > 4096) {
    return Refuse("--concurrent-slices: must be in 1..4096");
  }
  config.max_queued_slices = absl::GetFlag(FLAGS_max_queued_slices);
  if (config.max_queued_slices < 0 || config.max_queued_slices > 100000) {
    return Refuse("--max_queued_slices: must be in 0..100000");
  }
  config.threads_per_slice = absl::GetFlag(FLAGS_threads);
  if (config.threads_per_slice < 0 || config.threads_per_slice > sliceplan::kMaxSearchThreads) {
    return Refuse(absl::StrCat("--threads: must be in 0..", sliceplan::kMaxSearchThreads,
                               " (0: the cores over --concurrent-slices)"));
  }
  if (config.threads_per_slice == 0) {
    const int cores = static_cast<int>(std::max(1u, std::thread::hardware_concurrency()));
    config.threads_per_slice = std::max(1, cores / config.concurrent_slices);
  }
  const double gib = absl::GetFlag(FLAGS_memo_limit_gib);
  if (!(gib > 0 && gib < 1e6)) return Refuse("--memo_limit_gib must be in (0, 1e6)");
  config.memo_limit_bytes = static_cast<uint64_t>(gib * (uint64_t{1} << 30));
  config.limits = flags->limits;
  config.test_hang_seconds = absl::GetFlag(FLAGS_test_only_hang_seconds);
  config.test_crash_slice = absl::GetFlag(FLAGS_test_only_crash_on_slice);
  sliceplan::WorkerService service(config);
  spdlog::info("worker: {} slice{} at once on {} thread{} each, memo limit {:.1f} GiB{}",
               config.concurrent_slices, config.concurrent_slices == 1 ? "" : "s",
               config.threads_per_slice, config.threads_per_slice == 1 ? "" : "s", gib,
               config.test_hang_seconds > 0 ? " (test fault: hanging)" : "");
  flags->serve.metrics = service.MetricsCollectables();
  // The running and waiting calls, and a few for health checks and
  // refusals: only the running calls hold their requests
  // (worker_service.h), and two heap arenas keep little of them after.
  sliceplan::CapHeapArenas(2);
  flags->serve.max_threads = config.concurrent_slices + config.max_queued_slices + 8;
  flags->serve.max_buffer_bytes = int64_t{256} << 20;
  const sliceplan::IdleTrim trim([&service] { return service.IdleAfterCalls(); });
  const auto status = sliceplan::Serve(flags->listen, {&service}, flags->serve);
  if (!status.ok()) {
    std::cerr << "sliceplan-worker: " << status.message() << "\n";
    return 1;
  }
  spdlog::info("worker: stopped");
  return 0;
}
