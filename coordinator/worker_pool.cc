#include "coordinator/worker_pool.h"

#include <arpa/inet.h>
#include <netdb.h>
#include <sys/socket.h>

#include <algorithm>
#include <set>

#include "absl/strings/str_cat.h"
#include "absl/strings/str_split.h"

namespace sliceplan {

absl::StatusOr<std::vector<std::string>> ParseWorkerList(const std::string& list) {
  std::vector<std::string> out;
  for (absl::string_view part : absl::StrSplit(list, ',', absl::SkipWhitespace())) {
    const std::string entry(part);
    const size_t colon = entry.rfind(':');
    if (colon == std::string::npos || colon == 0 || colon + 1 == entry.size()) {
      return absl::InvalidArgumentError(
          absl::StrCat("--workers: \"", entry, "\" is not HOST:PORT"));
    }
    out.push_back(entry);
  }
  if (out.empty()) return absl::InvalidArgumentError("--workers: no workers given");
  return out;
}

std::vector<std::string> ResolveEntry(const std::string& entry) {
  const size_t colon = entry.rfind(':');
  std::string host = entry.substr(0, colon);
  const std::string port = entry.substr(colon + 1);
  if (host.size() > 2 && host.front() == '[' && host.back() == ']') {
    host = host.substr(1, host.size() - 2);
  }
  addrinfo hints{};
  hints.ai_family = AF_UNSPEC;
  hints.ai_socktype = SOCK_STREAM;
  addrinfo* found = nullptr;
  if (getaddrinfo(host.c_str(), port.c_str(), &hints, &found) != 0) return {entry};
  std::set<std::string> out;
  for (addrinfo* a = found; a != nullptr; a = a->ai_next) {
    char text[INET6_ADDRSTRLEN] = {};
    if (a->ai_family == AF_INET) {
      inet_ntop(AF_INET, &reinterpret_cast<sockaddr_in*>(a->ai_addr)->sin_addr, text, sizeof text);
      out.insert(absl::StrCat(text, ":", port));
    } else if (a->ai_family == AF_INET6) {
      inet_ntop(AF_INET6, &reinterpret_cast<sockaddr_in6*>(a->ai_addr)->sin6_addr, text,
                sizeof text);
      out.insert(absl::StrCat("[", text, "]:", port));
    }
  }
  freeaddrinfo(found);
  if (out.empty()) return {entry};
  return {out.begin(), out.end()};
}

WorkerPool::WorkerPool(std::vector<std::string> entries, std::chrono::milliseconds interval,
                       std::shared_ptr<grpc::ChannelCredentials> credentials)
    : entries_(std::move(entries)), interval_(interval), credentials_(std::move(credentials)) {
  Refresh();
  thread_ = std::thread([this] { Loop(); });
}

WorkerPool::~WorkerPool() {
  {
    absl::MutexLock lock(&mu_);
    stop_ = true;
  }
  thread_.join();
}

std::vector<std::shared_ptr<RpcWorker>> WorkerPool::Workers() const {
  absl::MutexLock lock(&mu_);
  return workers_;
}

void WorkerPool::Refresh() {
  std::vector<std::string> addresses;
  for (const std::string& e : entries_) {
    for (std::string& a : ResolveEntry(e)) addresses.push_back(std::move(a));
  }
  absl::MutexLock lock(&mu_);
  for (const std::string& a : addresses) {
    const bool known = std::any_of(workers_.begin(), workers_.end(),
                                   [&](const auto& w) { return w->Name() == a; });
    if (!known) workers_.push_back(std::make_shared<RpcWorker>(a, credentials_));
  }
}

void WorkerPool::CheckNow() {
  for (const auto& w : Workers())
    w->CheckHealth(std::min(interval_, std::chrono::milliseconds(500)));
}

void WorkerPool::Loop() {
  for (;;) {
    Refresh();
    CheckNow();
    absl::MutexLock lock(&mu_);
    if (mu_.AwaitWithTimeout(absl::Condition(&stop_), absl::FromChrono(interval_))) return;
  }
}

}  // namespace sliceplan
