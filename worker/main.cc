// sliceplan-worker: a stateless slice solver behind gRPC.
//
//   sliceplan-worker --listen=HOST:PORT [--threads=N] [--memo_limit_gib=G]
#include <iostream>
#include <thread>

#include "absl/flags/flag.h"
#include "absl/flags/parse.h"
#include "absl/flags/usage.h"
#include "coordinator/serve.h"
#include "spdlog/sinks/stdout_color_sinks.h"
#include "spdlog/spdlog.h"
#include "worker/worker_service.h"

ABSL_FLAG(std::string, listen, "127.0.0.1:0", "address to serve on (port 0: any free port)");
ABSL_FLAG(int, threads, 0, "slices solved at once (0: the machine's cores)");
ABSL_FLAG(double, memo_limit_gib, 8.0, "per-slice memo limit in GiB");
ABSL_FLAG(double, test_only_hang_seconds, 0,
          "test-only fault: sleep this long at the start of every call");

int main(int argc, char** argv) {
  sliceplan::BlockStopSignals();
  absl::SetProgramUsageMessage("sliceplan-worker --listen=HOST:PORT [--threads=N]");
  absl::ParseCommandLine(argc, argv);
  // Logs go to stderr: stdout carries only the listening line.
  spdlog::set_default_logger(spdlog::stderr_color_mt("sliceplan"));
  sliceplan::WorkerConfig config;
  config.threads = absl::GetFlag(FLAGS_threads);
  if (config.threads <= 0) {
    config.threads = static_cast<int>(std::max(1u, std::thread::hardware_concurrency()));
  }
  const double gib = absl::GetFlag(FLAGS_memo_limit_gib);
  if (!(gib > 0)) {
    std::cerr << "sliceplan-worker: --memo_limit_gib must be > 0\n";
    return 2;
  }
  config.memo_limit_bytes = static_cast<uint64_t>(gib * (uint64_t{1} << 30));
  config.test_hang_seconds = absl::GetFlag(FLAGS_test_only_hang_seconds);
  sliceplan::WorkerService service(config);
  spdlog::info("worker: {} threads, memo limit {:.1f} GiB{}", config.threads, gib,
               config.test_hang_seconds > 0 ? " (test fault: hanging)" : "");
  const auto status = sliceplan::Serve(absl::GetFlag(FLAGS_listen), {&service});
  if (!status.ok()) {
    std::cerr << "sliceplan-worker: " << status.message() << "\n";
    return 1;
  }
  return 0;
}
