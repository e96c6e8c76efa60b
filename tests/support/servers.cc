#include "tests/support/servers.h"

#include "gtest/gtest.h"

namespace sliceplan::testing {
namespace {

std::unique_ptr<ServerProcess> Start(std::vector<std::string> argv,
                                     const std::vector<std::string>& extra) {
  argv.insert(argv.end(), extra.begin(), extra.end());
  auto p = ServerProcess::Start(argv);
  EXPECT_TRUE(p.ok()) << p.status();
  return p.ok() ? *std::move(p) : nullptr;
}

}  // namespace

std::unique_ptr<ServerProcess> StartWorker(const std::vector<std::string>& extra) {
  return Start({SLICEPLAN_WORKER_BIN, "--listen=127.0.0.1:0", "--threads=1"}, extra);
}

std::unique_ptr<ServerProcess> StartCoordinator(
    const std::vector<std::unique_ptr<ServerProcess>>& workers,
    const std::vector<std::string>& extra, std::string more_workers) {
  std::string list = std::move(more_workers);
  for (const auto& w : workers) list += (list.empty() ? "" : ",") + w->address();
  return Start({SLICEPLAN_COORDINATOR_BIN, "--listen=127.0.0.1:0", "--workers=" + list,
                "--health_interval_ms=200"},
               extra);
}

}  // namespace sliceplan::testing
