#include "coordinator/worker_pool.h"

#include <arpa/inet.h>
#include <netdb.h>
#include <sys/socket.h>

#include <algorithm>
#include <set>

#include "absl/strings/str_cat.h"
#include "absl/strings/str_split.h"
#include "spdlog/spdlog.h"

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

namespace {

std::string HostOf(const std::string& entry) {
  std::string host = entry.substr(0, entry.rfind(':'));
  if (host.size() > 2 && host.front() == '[' && host.back() == ']') {
    host = host.substr(1, host.size() - 2);
  }
  return host;
}

}  // namespace

std::string EntryHostName(const std::string& entry) {
  const std::string host = HostOf(entry);
  in6_addr ip{};
  const bool literal =
      inet_pton(AF_INET, host.c_str(), &ip) == 1 || inet_pton(AF_INET6, host.c_str(), &ip) == 1;
  return literal ? "" : host;
}

std::optional<std::vector<std::string>> ResolveEntry(const std::string& entry) {
  const std::string host = HostOf(entry);
  const std::string port = entry.substr(entry.rfind(':') + 1);
  addrinfo hints{};
  hints.ai_family = AF_UNSPEC;
  hints.ai_socktype = SOCK_STREAM;
  addrinfo* found = nullptr;
  if (getaddrinfo(host.c_str(), port.c_str(), &hints, &found) != 0) return std::nullopt;
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
  if (out.empty()) return std::nullopt;
  return std::vector<std::string>(out.begin(), out.end());
}

WorkerPool::WorkerPool(std::vector<std::string> entries, std::chrono::milliseconds interval,
                       std::shared_ptr<grpc::ChannelCredentials> credentials, Resolver resolve)
    : entries_(std::move(entries)),
      interval_(interval),
      credentials_(std::move(credentials)),
      resolve_(std::move(resolve)) {
  // Until a name resolves, the entry itself (gRPC keeps trying it).
  for (const std::string& e : entries_) resolved_.push_back({e});
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
  std::vector<std::pair<std::string, std::string>> wanted;  // address, TLS name
  for (size_t i = 0; i < entries_.size(); ++i) {
    if (auto now = resolve_(entries_[i])) resolved_[i] = *std::move(now);
    for (const std::string& a : resolved_[i]) wanted.emplace_back(a, EntryHostName(entries_[i]));
  }
  const auto is_wanted = [&](const std::string& address) {
    return std::any_of(wanted.begin(), wanted.end(),
                       [&](const auto& w) { return w.first == address; });
  };
  absl::MutexLock lock(&mu_);
  for (auto it = workers_.begin(); it != workers_.end();) {
    if (is_wanted((*it)->Name())) {
      ++it;
      continue;
    }
    spdlog::info("pool: {} left (no longer resolved); no new slices go to it", (*it)->Name());
    it = workers_.erase(it);
  }
  for (const auto& want : wanted) {  // no structured binding: clang 14 cannot capture one
    const std::string& address = want.first;
    const bool known = std::any_of(workers_.begin(), workers_.end(),
                                   [&](const auto& w) { return w->Name() == address; });
    if (known) continue;
    if (!first_refresh_) spdlog::info("pool: {} joined", address);
    workers_.push_back(std::make_shared<RpcWorker>(address, credentials_, want.second));
  }
  first_refresh_ = false;
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
