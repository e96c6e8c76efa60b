// sliceplan-coordinator: the service query engines call.
//
//   sliceplan-coordinator --listen=HOST:PORT --workers=HOST:PORT,...
#include <iostream>

#include "absl/flags/flag.h"
#include "absl/flags/parse.h"
#include "absl/flags/usage.h"
#include "coordinator/coordinator_service.h"
#include "coordinator/serve.h"
#include "coordinator/worker_pool.h"
#include "spdlog/sinks/stdout_color_sinks.h"
#include "spdlog/spdlog.h"

ABSL_FLAG(std::string, listen, "127.0.0.1:0", "address to serve on (port 0: any free port)");
ABSL_FLAG(std::string, workers, "",
          "worker addresses HOST:PORT,... (a name with many addresses gives many workers)");
ABSL_FLAG(double, hedge_after_seconds, 2.0,
          "start a second copy of a slice running this long (0: never hedge)");
ABSL_FLAG(int, health_interval_ms, 1000, "how often to check the workers' health");

int main(int argc, char** argv) {
  sliceplan::BlockStopSignals();
  absl::SetProgramUsageMessage("sliceplan-coordinator --listen=HOST:PORT --workers=HOST:PORT,...");
  absl::ParseCommandLine(argc, argv);
  // Logs go to stderr: stdout carries only the listening line.
  spdlog::set_default_logger(spdlog::stderr_color_mt("sliceplan"));
  auto entries = sliceplan::ParseWorkerList(absl::GetFlag(FLAGS_workers));
  if (!entries.ok()) {
    std::cerr << "sliceplan-coordinator: " << entries.status().message() << "\n";
    return 2;
  }
  sliceplan::CoordinatorConfig config;
  const double hedge = absl::GetFlag(FLAGS_hedge_after_seconds);
  if (hedge > 0) {
    config.hedge_after = std::chrono::milliseconds(static_cast<int64_t>(hedge * 1000));
  } else {
    config.hedge_after.reset();
  }
  sliceplan::WorkerPool pool(*entries,
                             std::chrono::milliseconds(absl::GetFlag(FLAGS_health_interval_ms)));
  sliceplan::CoordinatorService service(pool, config);
  spdlog::info("coordinator: {} worker entries, hedge after {:.1f} s", entries->size(), hedge);
  const auto status = sliceplan::Serve(absl::GetFlag(FLAGS_listen), {&service});
  if (!status.ok()) {
    std::cerr << "sliceplan-coordinator: " << status.message() << "\n";
    return 1;
  }
  return 0;
}
