#include "tests/support/process.h"

#include <fcntl.h>
#include <poll.h>
#include <signal.h>
#include <sys/wait.h>
#include <unistd.h>

#include <cstdio>
#include <filesystem>
#include <fstream>
#include <iterator>
#include <set>
#include <sstream>
#include <thread>

#include "absl/strings/str_cat.h"

namespace sliceplan::testing {

CommandResult RunCommand(const std::string& command) {
  CommandResult out;
  FILE* pipe = popen(command.c_str(), "r");
  if (pipe == nullptr) return out;
  char buf[4096];
  size_t n = 0;
  while ((n = fread(buf, 1, sizeof buf, pipe)) > 0) out.output.append(buf, n);
  const int status = pclose(pipe);
  out.exit_status = WIFEXITED(status) ? WEXITSTATUS(status) : 128 + WTERMSIG(status);
  return out;
}

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
  auto address = proc->WaitForLine("listening on ", timeout);
  if (!address.ok()) {
    return absl::DeadlineExceededError(absl::StrCat(argv[0], " ", address.status().message()));
  }
  proc->address_ = *address;
  return proc;
}

absl::StatusOr<std::string> ServerProcess::WaitForLine(const std::string& prefix,
                                                       std::chrono::milliseconds timeout) {
  const auto end = std::chrono::steady_clock::now() + timeout;
  for (;;) {
    const size_t at = unread_.find(prefix);
    const size_t nl = at == std::string::npos ? at : unread_.find('\n', at);
    if (nl != std::string::npos) {
      std::string rest = unread_.substr(at + prefix.size(), nl - at - prefix.size());
      unread_.erase(0, nl + 1);
      return rest;
    }
    if (std::chrono::steady_clock::now() >= end) break;
    pollfd p{out_, POLLIN, 0};
    if (poll(&p, 1, 50) <= 0) continue;
    char buf[256];
    const ssize_t n = read(out_, buf, sizeof buf);
    if (n <= 0) break;
    unread_.append(buf, static_cast<size_t>(n));
  }
  return absl::DeadlineExceededError(
      absl::StrCat("printed no \"", prefix, "\" line; it said: ", unread_));
}

void ServerProcess::Signal(int sig) {
  if (reaped_) return;
  kill(pid_, sig);
  if (sig == SIGKILL) {
    waitpid(pid_, nullptr, 0);
    reaped_ = true;
  }
}

absl::StatusOr<int> ServerProcess::WaitExit(std::chrono::milliseconds timeout) {
  const auto end = std::chrono::steady_clock::now() + timeout;
  while (!reaped_) {
    int status = 0;
    if (waitpid(pid_, &status, WNOHANG) == pid_) {
      reaped_ = true;
      return WIFEXITED(status) ? WEXITSTATUS(status) : 128 + WTERMSIG(status);
    }
    if (std::chrono::steady_clock::now() >= end) {
      return absl::DeadlineExceededError("still running");
    }
    std::this_thread::sleep_for(std::chrono::milliseconds(10));
  }
  return absl::FailedPreconditionError("already reaped");
}

int64_t ServerProcess::RssBytes() const {
  std::ifstream in(absl::StrCat("/proc/", pid_, "/status"));
  for (std::string line; std::getline(in, line);) {
    if (line.rfind("VmRSS:", 0) == 0) return std::stoll(line.substr(6)) * 1024;  // in kB
  }
  return 0;
}

double ServerProcess::CpuSeconds() const {
  std::ifstream in(absl::StrCat("/proc/", pid_, "/stat"));
  std::string text((std::istreambuf_iterator<char>(in)), std::istreambuf_iterator<char>());
  // Fields after the parenthesised command name; utime and stime are the
  // 14th and 15th fields of the whole line (proc(5)).
  std::istringstream rest(text.substr(text.rfind(')') + 2));
  std::string field;
  double ticks = 0;
  for (int i = 3; i <= 15 && rest >> field; ++i) {
    if (i >= 14) ticks += std::stod(field);
  }
  return ticks / static_cast<double>(sysconf(_SC_CLK_TCK));
}

std::vector<int> ServerProcess::ListeningPorts() const {
  std::set<std::string> inodes;
  const std::string fd_dir = absl::StrCat("/proc/", pid_, "/fd");
  for (const auto& entry : std::filesystem::directory_iterator(fd_dir)) {
    std::error_code ec;
    const std::string target = std::filesystem::read_symlink(entry.path(), ec).string();
    if (!ec && target.rfind("socket:[", 0) == 0) {
      inodes.insert(target.substr(8, target.size() - 9));
    }
  }
  std::vector<int> ports;
  for (const char* table : {"/proc/net/tcp", "/proc/net/tcp6"}) {
    std::ifstream in(table);
    std::string line;
    std::getline(in, line);  // header
    while (std::getline(in, line)) {
      std::istringstream f(line);
      std::string slot, local, remote, state, queues, timer, retr, uid, timeout, inode;
      f >> slot >> local >> remote >> state >> queues >> timer >> retr >> uid >> timeout >> inode;
      if (state != "0A" || inodes.count(inode) == 0) continue;  // 0A: LISTEN
      ports.push_back(std::stoi(local.substr(local.rfind(':') + 1), nullptr, 16));
    }
  }
  return ports;
}

ServerProcess::~ServerProcess() {
  Signal(SIGKILL);
  close(out_);
}

}  // namespace sliceplan::testing
