// Starting the real servers for the process-level tests: a worker or a
// coordinator on 127.0.0.1 port 0 (the port read back from its listening
// line), with the test's extra flags. A failed start is a test failure
// (EXPECT) and returns null. The binaries' paths come from the test
// target's SLICEPLAN_WORKER_BIN and SLICEPLAN_COORDINATOR_BIN.
#ifndef SLICEPLAN_TESTS_SUPPORT_SERVERS_H_
#define SLICEPLAN_TESTS_SUPPORT_SERVERS_H_

#include <memory>
#include <string>
#include <vector>

#include "tests/support/process.h"

namespace sliceplan::testing {

// A worker with one thread (--threads=1) plus `extra`.
std::unique_ptr<ServerProcess> StartWorker(const std::vector<std::string>& extra = {});

// A coordinator over `workers` and the comma-separated `more_workers`,
// health checked every 200 ms, plus `extra`.
std::unique_ptr<ServerProcess> StartCoordinator(
    const std::vector<std::unique_ptr<ServerProcess>>& workers,
    const std::vector<std::string>& extra = {}, std::string more_workers = "");

}  // namespace sliceplan::testing

#endif  // SLICEPLAN_TESTS_SUPPORT_SERVERS_H_
