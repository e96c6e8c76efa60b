// A child server process for the process-level tests: started with its
// stdout on a pipe, its "listening on HOST:PORT" line read back (servers
// bind port 0, so tests never race for ports), always reaped: the
// destructor kills it (SIGKILL) and waits.
#ifndef SLICEPLAN_TESTS_SUPPORT_PROCESS_H_
#define SLICEPLAN_TESTS_SUPPORT_PROCESS_H_

#include <sys/types.h>

#include <chrono>
#include <cstdint>
#include <memory>
#include <string>
#include <vector>

#include "absl/status/statusor.h"

namespace sliceplan::testing {

// What a finished command printed and how it ended.
struct CommandResult {
  int exit_status = -1;  // or 128 + signal
  std::string output;    // stdout (add 2>&1 to the command for stderr too)
};

// Runs `command` through the shell to its end (for binaries that are
// expected to exit: refusals at start, the CLI).
CommandResult RunCommand(const std::string& command);

class ServerProcess {
 public:
  // Runs argv and waits up to `timeout` for its listening line.
  static absl::StatusOr<std::unique_ptr<ServerProcess>> Start(
      const std::vector<std::string>& argv,
      std::chrono::milliseconds timeout = std::chrono::seconds(10));
  ~ServerProcess();

  const std::string& address() const { return address_; }
  // The rest of the next stdout line starting with `prefix` (e.g. "health
  // on "), waiting up to `timeout`; DEADLINE_EXCEEDED naming what it said.
  absl::StatusOr<std::string> WaitForLine(const std::string& prefix,
                                          std::chrono::milliseconds timeout);
  // Sends `sig` (e.g. SIGKILL) and, for SIGKILL, waits for the exit.
  void Signal(int sig);
  // Waits up to `timeout` for the process to exit; its exit status (or
  // 128 + signal), or DEADLINE_EXCEEDED while it still runs.
  absl::StatusOr<int> WaitExit(std::chrono::milliseconds timeout);
  // User plus system CPU time so far, from /proc/PID/stat.
  double CpuSeconds() const;
  // Resident set size in bytes (VmRSS of /proc/PID/status); 0 once gone.
  int64_t RssBytes() const;
  // The TCP ports it listens on, from /proc (its socket inodes matched
  // against the kernel's listening sockets, IPv4 and IPv6).
  std::vector<int> ListeningPorts() const;
  pid_t pid() const { return pid_; }

 private:
  ServerProcess(pid_t pid, int out) : pid_(pid), out_(out) {}
  pid_t pid_;
  int out_;
  bool reaped_ = false;
  std::string address_;
  std::string unread_;  // stdout read but not yet matched
};

}  // namespace sliceplan::testing

#endif  // SLICEPLAN_TESTS_SUPPORT_PROCESS_H_
