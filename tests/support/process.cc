#include "tests/support/process.h"

#include <fcntl.h>
#include <poll.h>
#include <signal.h>
#include <sys/wait.h>
#include <unistd.h>

#include "absl/strings/str_cat.h"

namespace sliceplan::testing {

absl::StatusOr<std::unique_ptr<ServerProcess>> ServerProcess::Start(
    const std::vector<std::string>& argv, std::chrono::milliseconds timeout) {
  int pipe_fds[2];
  if (pipe(pipe_fds) != 0) return absl::InternalError("pipe failed");
  const pid_t pid = fork();
  if (pid < 0) return absl::InternalError("fork failed");
  if (pid == 0) {
    dup2(pipe_fds[1], STDOUT_FILENO);
    close(pipe_fds[0]);
    close(pipe_fds[1]);
    std::vector<char*> args;
    for (const std::string& a : argv) args.push_back(const_cast<char*>(a.c_str()));
    args.push_back(nullptr);
    execv(args[0], args.data());
    _exit(127);
  }
  close(pipe_fds[1]);
  std::unique_ptr<ServerProcess> proc(new ServerProcess(pid, pipe_fds[0]));
  const auto end = std::chrono::steady_clock::now() + timeout;
  std::string seen;
  while (std::chrono::steady_clock::now() < end) {
    pollfd p{proc->out_, POLLIN, 0};
    if (poll(&p, 1, 50) <= 0) continue;
    char buf[256];
    const ssize_t n = read(proc->out_, buf, sizeof buf);
    if (n <= 0) break;
    seen.append(buf, static_cast<size_t>(n));
    const size_t at = seen.find("listening on ");
    const size_t nl = at == std::string::npos ? at : seen.find('\n', at);
    if (nl != std::string::npos) {
      proc->address_ = seen.substr(at + 13, nl - at - 13);
      return proc;
    }
  }
  return absl::DeadlineExceededError(
      absl::StrCat(argv[0], " printed no listening line; it said: ", seen));
}

void ServerProcess::Signal(int sig) {
  if (reaped_) return;
  kill(pid_, sig);
  if (sig == SIGKILL) {
    waitpid(pid_, nullptr, 0);
    reaped_ = true;
  }
}

ServerProcess::~ServerProcess() {
  Signal(SIGKILL);
  close(out_);
}

}  // namespace sliceplan::testing
